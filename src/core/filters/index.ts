export * from './types';
export { AdaptiveFilter, resolveOptions } from './base';
export { QrRlsFilter } from './qrrls';
export { InverseQrRlsFilter } from './iqrrls';
export { RlsFilter } from './rls';
export { LmsFilter } from './lms';
export { NlmsFilter } from './nlms';
export * from './create';
export * from './configurations';
