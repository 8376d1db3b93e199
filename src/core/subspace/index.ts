/**
 * Subspace tools: orthonormal bases, projections onto and off a subspace (streaming over the
 * samples), null spaces, least squares (minimum-norm when rank-deficient), principal angles,
 * suppression in dB, and the interference-basis builders.
 */
export * from './basis';
export * from './project';
export * from './nullspace';
export * from './lstsq';
export * from './angles';
export * from './builders';
export * from './beam';
