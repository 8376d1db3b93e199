/**
 * Types shared by every adaptive filter: options, per-chunk outputs and the health report.
 *
 * Conventions (one for every algorithm, real and complex):
 *  - regressor u(n) = [x(n), x(n−1), …, x(n−M+1)]ᵀ for tapped-delay ("transversal") input, or
 *    row n of an N×M matrix for general-regressor input;
 *  - output y(n) = w(n−1)ᴴu(n), a-priori error e(n) = d(n) − y(n);
 *  - update w(n) = w(n−1) + μ(n)·g(n)·e*(n) (complex conjugate on the error);
 *  - a-posteriori error ε(n) = d(n) − w(n)ᴴu(n) = γ(n)·e(n), with γ(n) the conversion factor.
 * Complex data are interleaved (re, im), as numpy stores complex128.
 */

/**
 * The algorithms offered. `rls` is conventional RLS with P kept Hermitian by construction;
 * `rls-textbook` is the unsymmetrised textbook form of the same recursion (the Riccati update of
 * every entry of P, as printed in Haykin, Adaptive Filter Theory, 4th ed., Table 9.1), which
 * loses the symmetry of P at a rate set by ln(1/λ): offered to compare against, with its loss of
 * symmetry reported in the health.
 */
export type Algorithm = 'qr-rls' | 'inverse-qr-rls' | 'rls' | 'rls-textbook' | 'nlms' | 'lms';

/** Arithmetic: float64, or float32 emulated with Math.fround after every operation. */
export type Precision = 'float64' | 'float32';

/** How x is read: a signal through a tapped delay line, or one regressor row per sample. */
export type InputKind = 'transversal' | 'regressor';

/** Options accepted by {@link createFilter}. */
export interface FilterOptions {
  algorithm: Algorithm;
  /** Number of taps M ≥ 1 (the length of the weight vector). */
  taps: number;
  /** Interleaved complex data when true (default false). */
  complex?: boolean;
  /** Default 'float64'. */
  precision?: Precision;
  /** Default 'transversal'. */
  input?: InputKind;
  /** Forgetting factor λ in (0, 1] for the RLS family (default 0.99). */
  lambda?: number;
  /**
   * Initialisation δ > 0 for the RLS family (default 0.01): Φ(0) = δI, that is P(0) = δ⁻¹I,
   * R(0) = √δ·I, P^½(0) = δ^−½·I.
   */
  delta?: number;
  /** Step size μ > 0 (NLMS: μ < 2 is enforced; default 0.5 for NLMS, 0.01 for LMS). */
  mu?: number;
  /** NLMS regularisation ε ≥ 0 added to ‖u‖² (default 1e-6). */
  epsilon?: number;
  /**
   * Keep the weights every k samples (a trajectory row after every k-th sample); 0, the default,
   * keeps no trajectory.
   */
  keepWeightsEvery?: number;
  /**
   * Divergence threshold: the error energy is flagged as blowing up when its exponentially
   * smoothed power (time constant 256 samples) exceeds this factor times the smoothed power of d
   * (default 1e8, i.e. 80 dB).
   */
  divergenceThreshold?: number;
  /**
   * Conventional RLS only: relative asymmetry ‖(P − Pᴴ)u‖/‖Pu‖ above which loss of symmetry is
   * flagged (default √ε of the precision: 1.5e-8 in float64, 3.5e-4 in float32). Only the
   * unsymmetrised textbook form (`rls-textbook`) can lose symmetry; the default variant keeps P Hermitian by construction.
   */
  asymmetryTolerance?: number;
}

/** Options after defaults are applied and checks passed. */
export interface ResolvedOptions {
  algorithm: Algorithm;
  taps: number;
  complex: boolean;
  precision: Precision;
  input: InputKind;
  lambda: number;
  delta: number;
  mu: number;
  epsilon: number;
  keepWeightsEvery: number;
  divergenceThreshold: number;
  asymmetryTolerance: number;
}

/** What can be wrong with a run. */
export type HealthKind =
  /** a NaN or ±Inf appeared in the error (the state is lost). */
  | 'nonfinite'
  /** the smoothed error power exceeded divergenceThreshold × the smoothed power of d. */
  | 'divergence'
  /** conventional RLS: uᴴPu < 0 or a diagonal entry of P ≤ 0 (P no longer positive definite). */
  | 'indefinite'
  /** conventional RLS, unsymmetrised textbook form: ‖(P − Pᴴ)u‖/‖Pu‖ above the tolerance. */
  | 'asymmetry'
  /** LMS: μ above the mean-square bound estimated from the input power (a warning). */
  | 'step-size';

export interface HealthEvent {
  kind: HealthKind;
  /** 0-based sample index (over the whole stream) where it was first seen. */
  index: number;
  message: string;
}

/** 'failed' for nonfinite / divergence / indefinite, 'warning' for asymmetry / step-size. */
export type HealthStatus = 'ok' | 'warning' | 'failed';

export interface Health {
  status: HealthStatus;
  /** First occurrence of each kind, in the order seen. */
  events: HealthEvent[];
  /** Index of the first event of any kind, −1 when none. */
  firstIndex: number;
}

/** Typed array of the run's precision. */
export type Real = Float64Array | Float32Array;

/** Outputs of one chunk (or of a whole run). */
export interface FilterChunk {
  /** 0-based index of the chunk's first sample in the stream. */
  start: number;
  /** Number of samples in the chunk. */
  length: number;
  /** Output y(n) = w(n−1)ᴴu(n) (interleaved when complex). */
  y: Real;
  /** A-priori error e(n) = d(n) − y(n). */
  e: Real;
  /** A-posteriori error ε(n) = d(n) − w(n)ᴴu(n). */
  ePost: Real;
  /** Conversion factor γ(n) = ε(n)/e(n) (real, length n). */
  gamma: Real;
  /** Weights kept every `keepWeightsEvery` samples: rows × M (× 2 when complex), row-major. */
  trajectory: Float64Array;
  /** Stream index of the sample after which each trajectory row was taken. */
  trajectoryIndex: Float64Array;
}

/** Caller-supplied output buffers (no allocation at all when all are given). */
export interface ChunkBuffers {
  y?: Real;
  e?: Real;
  ePost?: Real;
  gamma?: Real;
  trajectory?: Float64Array;
  trajectoryIndex?: Float64Array;
}
