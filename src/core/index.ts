/**
 * Perpend's numerical core: pure TypeScript on typed arrays, no DOM, no JupyterLab.
 * Runs in Node, the browser and a Web Worker. Each area keeps its own index file.
 */
export * from './errors';
export * from './dense';
export * from './linalg';
export * from './filters';
export * from './metrics';
export * from './dsp';
export * from './subspace';
export * from './stats';
