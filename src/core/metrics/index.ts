export * from './learning';
export * from './ensemble';
