/**
 * Perpend's numerical core: pure TypeScript on typed arrays, no DOM, no JupyterLab.
 * Runs in Node, the browser and a Web Worker. Each area keeps its own index file.
 *
 * Everything exported here is documented in the README's "Core API" section; the argument
 * checks of `errors.ts` and the shape helpers of `dense.ts` not listed below are internal.
 */
export {
  Dense,
  contiguousStrides,
  toDense,
  checkFiniteDense,
  type MatrixLike,
  type RowLike,
  type Order
} from './dense';
export * from './linalg';
export * from './filters';
export * from './metrics';
export * from './dsp';
export * from './subspace';
export * from './stats';
// Per-direction shares from least-squares coefficients on the user's own columns (harmonics,
// steering vectors, lags), in the columns' order (not the pivoted-QR basis order).
export { columnShares, harmonicShares } from './subspace/harmonic-shares';
export type {
  ColumnShares,
  ColumnSharesOptions,
  HarmonicShares,
  HarmonicSharesOptions
} from './subspace/harmonic-shares';
