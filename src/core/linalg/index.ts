/**
 * Dense linear algebra on strided typed arrays: BLAS-like kernels, Householder / Givens /
 * Gram–Schmidt QR, pivoted QR, triangular solves and condition estimates. Real and complex.
 */
export * from './blas';
export * from './givens';
export * from './reflector';
export * from './householder';
export * from './qr';
export * from './pivoted';
export * from './gramschmidt';
export * from './triangular';
