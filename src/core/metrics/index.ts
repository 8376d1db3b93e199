export * from './learning';
export * from './ensemble';
export * from './display';
export * from './misalignment';
