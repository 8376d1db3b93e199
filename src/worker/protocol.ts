/**
 * The typed message protocol between the main thread and a job worker, and the job specs and
 * results it carries. Everything here is plain data: numbers, strings, arrays of numbers and
 * Float64Arrays, so it passes through structured clone and the arrays' buffers can be
 * transferred instead of copied (DESIGN §2, §5). Complex arrays are interleaved (re, im) as numpy
 * stores complex128 (DESIGN §3), so a buffer read from the kernel is used as is.
 *
 * The exchange:
 *   worker → main  `ready`                  once, when the worker's listener is installed; no
 *                                            buffer is handed over before it (a message sent
 *                                            earlier could be lost, and its buffers with it);
 *   main → worker  `run` {id, spec, holdBytes, partsAhead}
 *                                            spec buffers in the transfer list;
 *   worker → main  `need` {id, names}        the named arrays of the spec (see ArrayData.held)
 *                                            this worker does not hold; before any progress;
 *   main → worker  `supply` {id, arrays} | {id, error}
 *                                            their values (buffers transferred), or why not;
 *   worker → main  `progress` {id, done, total, stage}
 *                                            after each chunk of the core (samples, or steps);
 *   worker → main  `part` {id, key, offset, length, data}
 *                                            when the run asked for parts ahead: the next
 *                                            values of a result array as they are computed
 *                                            (result-parts.ts), in order; the result then
 *                                            carries that array with an empty data;
 *   main → worker  `cancel` {id}             seen at the next chunk border;
 *   worker → main  `result` {id, result, timing} | `failed` {id, error} | `cancelled` {id, done}
 *                                            exactly one of the three per run; result buffers
 *                                            in the transfer list.
 * No type here depends on the DOM, the WebWorker lib or JupyterLab.
 */
import type {
  CoherenceResult,
  PsdResult,
  SpectrogramOptions,
  SpectrogramResult,
  WelchOptions
} from '../core/dsp';
import type { Algorithm, Constellation, Precision } from '../core/filters';

/** Version of this protocol; the worker announces it in `ready`. */
export const PROTOCOL_VERSION = 3;

// ---------------------------------------------------------------------------------------------
// Arrays

/**
 * A dense array in C order (samples along the last axis, DESIGN §3). `data` holds
 * `shape.reduce(×)` values, twice that when `complex` (interleaved re, im).
 */
export interface ArrayData {
  data: Float64Array;
  shape: number[];
  complex: boolean;
  /**
   * A name for these values that no other values have (the kernel's SHA-256 of the bytes with the
   * shape and layout), given by the page to inputs the job only reads. A worker keeps named
   * inputs (within the `holdBytes` of the run message) and uses them again for a later job that
   * names them; the page may then send the name with an empty `data`, and a worker that does not
   * hold them asks for them (`need`).
   */
  held?: string;
}

// ---------------------------------------------------------------------------------------------
// Job specs (what the workbench model builds)

/** Where x and d come from: the four uses of an adaptive filter plus equalization. */
export type FilterConfiguration =
  /** The unknown system's input drives the filter; its output is d. */
  | { kind: 'system-identification'; input: ArrayData; output: ArrayData }
  /** The reference sensor drives the filter; the primary is d; the error is the cleaned signal. */
  | { kind: 'noise-cancellation'; reference: ArrayData; primary: ArrayData }
  /** x(n) = s(n − delay), d(n) = s(n): `delay`-step-ahead prediction (delay ≥ 1). */
  | { kind: 'linear-prediction'; signal: ArrayData; delay: number }
  /**
   * d(n) = training(n − delay) for the first `trainingLength` symbols (default: all of
   * `training`), then decisions (decision-directed) or frozen weights. 1-D sources only.
   */
  | {
      kind: 'equalization';
      received: ArrayData;
      training: ArrayData;
      /** Decision delay Δ in samples (≥ 0). */
      delay: number;
      trainingLength?: number;
      decisionDirected?: boolean;
      /** Named constellation or its points (interleaved re, im when complex). */
      constellation?: Constellation | number[];
      /** The full transmitted sequence, to count symbol errors after training. */
      symbols?: ArrayData;
    };

export interface AdaptiveFilterSpec {
  kind: 'adaptive-filter';
  configuration: FilterConfiguration;
  algorithm: Algorithm;
  /** Number of taps (filter length) M ≥ 1. */
  taps: number;
  /** Forgetting factor λ in (0, 1] (RLS family). */
  lambda?: number;
  /** Initialisation δ > 0 (RLS family): Φ(0) = δI. */
  delta?: number;
  /** Step size μ > 0 (LMS; NLMS needs μ < 2). */
  mu?: number;
  /** NLMS regularisation ε ≥ 0. */
  epsilon?: number;
  /** 'float64' (default) or 'float32' emulation. */
  precision?: Precision;
  /** Keep the weights every k samples (0, the default, keeps no trajectory). */
  keepEvery?: number;
  /** Sample rate in Hz: convergence time is then given in seconds too. */
  fs?: number;
  /** A stated minimum MSE J_min (linear, the unit of d squared): misadjustment is then given. */
  minMse?: number;
  /** Moving-average window of the learning curve for the figures (default N/50 in [1, 1024]). */
  window?: number;
  /** Tail that defines the steady state: a count, or a fraction in (0, 1) (default 0.1). */
  tail?: number;
  /** Margin in dB around the steady-state MSE for the convergence time (default 1 dB). */
  marginDb?: number;
  /** Samples per chunk (default: sized so a chunk takes a few milliseconds). */
  chunkSize?: number;
}

/** How the interference basis is made (m×r, one basis vector per column). */
export type BasisSpec =
  /** A matrix given by the user (m×r). */
  | { kind: 'matrix'; matrix: ArrayData }
  /** cos/sin pairs at f₀ … count·f₀ over the signal's samples (real signals only). */
  | { kind: 'harmonics'; f0: number; fs: number; count: number; t0?: number }
  /**
   * ULA steering vectors over the signal's rows (elements × snapshots): arrival angles from
   * broadside (`angles`, in `unit`, default degrees) or direction sines (`sines`, in [−1, 1]).
   */
  | {
      kind: 'steering';
      angles?: number[];
      unit?: 'deg' | 'rad';
      sines?: number[];
      spacing: number;
      wavelength: number;
    }
  /** L delayed copies of a reference channel (length N): lags 0 … L−1. */
  | { kind: 'delays'; reference: ArrayData; lags: number };

export interface InterferenceSpec {
  kind: 'interference';
  /** 1-D (N) or K×N signals for harmonics and delays; elements × snapshots for steering. */
  signal: ArrayData;
  basis: BasisSpec;
  /** Project off the subspace (remove it, the default) or onto it (keep only it). */
  mode?: 'off' | 'onto';
  /** Rank tolerance, absolute on |r_kk| (default max(m, r)·ε·|r₁₁|). */
  tol?: number;
  /** Rank tolerance relative to |r₁₁|, in [0, 1). */
  rtol?: number;
}

/** Orthonormal basis of span(A) and of its null space. */
export interface BasisJobSpec {
  kind: 'basis';
  matrix: ArrayData;
  tol?: number;
  rtol?: number;
}

/** min‖A·x − b‖₂ (minimum-norm when A is rank-deficient). */
export interface LeastSquaresSpec {
  kind: 'least-squares';
  a: ArrayData;
  b: ArrayData;
  tol?: number;
  rtol?: number;
}

/** Principal angles between span(A) and span(B). */
export interface AnglesSpec {
  kind: 'angles';
  a: ArrayData;
  b: ArrayData;
  tol?: number;
  rtol?: number;
}

export type SubspaceSpec = BasisJobSpec | LeastSquaresSpec | AnglesSpec;

/**
 * A spectral estimate a plot needs (DESIGN §5: long computations leave the page's thread): a
 * Welch PSD of x, the coherence of x and y, or a spectrogram of x pooled to at most
 * `maxColumns` columns. x and y are 1-D (one row of a result), the options the core's.
 */
export type SpectralSpec =
  | { kind: 'spectral'; op: 'welch'; x: ArrayData; options: WelchOptions }
  | {
      kind: 'spectral';
      op: 'coherence';
      x: ArrayData;
      y: ArrayData;
      options: Omit<WelchOptions, 'average' | 'scaling'>;
    }
  | {
      kind: 'spectral';
      op: 'spectrogram';
      x: ArrayData;
      options: SpectrogramOptions;
      maxColumns: number;
    };

/**
 * A plot's data as CSV text (RFC 4180), made in the worker: a million rows take the page's
 * thread for a second. Columns of numbers (Float64Array, NaN an empty field) or of text.
 */
export interface CsvSpec {
  kind: 'csv';
  columns: Array<{ header: string; values: Float64Array | Array<string | number | null> }>;
}

/** A job the worker runs. */
export type JobSpec = AdaptiveFilterSpec | InterferenceSpec | SubspaceSpec | SpectralSpec | CsvSpec;

/** The parameters a sweep can vary. */
export type SweepParameter = 'taps' | 'lambda' | 'delta' | 'mu' | 'epsilon' | 'algorithm';

/** One parameter of an adaptive-filter spec over a list of values: one job per value. */
export interface SweepSpec {
  kind: 'sweep';
  base: AdaptiveFilterSpec;
  parameter: SweepParameter;
  values: (number | Algorithm)[];
}

// ---------------------------------------------------------------------------------------------
// Results

/** Something the user should know about a run that finished (numerical breakdown, not a bug). */
export interface JobWarning {
  kind:
    | 'nonfinite'
    | 'divergence'
    | 'indefinite'
    | 'asymmetry'
    | 'step-size'
    | 'rank-deficient'
    | 'not-converged';
  message: string;
  /** 0-based sample index where it was first seen, when it has one. */
  index?: number;
  /** Trial (row) it was seen in, for K×N sources. */
  trial?: number;
  /** The value that triggered it (e.g. |r_kk| at the rank cut), when it has one. */
  value?: number;
}

export interface AdaptiveFilterFigures {
  /** 10·log10 of the mean |e|² over the last `window` samples, in dB (unit of d squared). */
  finalMseDb: number | null;
  /** 10·log10 of the mean of the learning curve over the tail, in dB. */
  steadyStateMseDb: number | null;
  /** First sample after which the smoothed curve stays within ±marginDb of the steady state. */
  convergenceSamples: number | null;
  /** convergenceSamples / fs, in seconds (when fs was given). */
  convergenceSeconds: number | null;
  /** (J∞ − J_min)/J_min, a ratio (when minMse was given). */
  misadjustment: number | null;
  /** 10·log10 Σ|d|²/Σ|e|² over the run, in dB. */
  errorReductionDb: number | null;
  /** Equalization: symbol error rate after training (a fraction), when symbols were given. */
  symbolErrorRate: number | null;
  /** The smoothing window (samples), tail (samples) and margin (dB) the figures used. */
  window: number;
  tail: number;
  marginDb: number;
}

export interface AdaptiveFilterResult {
  kind: 'adaptive-filter';
  status: 'ok' | 'warning';
  warnings: JobWarning[];
  algorithm: Algorithm;
  complex: boolean;
  /** Trials K (1 for a 1-D source), samples N, taps M. */
  K: number;
  N: number;
  taps: number;
  /** y(n), shape [N] or [K, N]. */
  output: ArrayData;
  /** a-priori error e(n) = d(n) − y(n), shape [N] or [K, N]. */
  error: ArrayData;
  /** Final weights w(N), shape [M] or [K, M]. */
  weights: ArrayData;
  /** Weights kept every keepEvery samples, shape [rows, M] or [K, rows, M]; null when not kept. */
  trajectory: ArrayData | null;
  /** Stream index after which each trajectory row was taken (length rows). */
  trajectoryIndex: Float64Array | null;
  /** Learning curve |e(n)|² (ensemble mean over K trials), length N, unit of d squared. */
  learningCurve: Float64Array;
  /**
   * The learning curve smoothed over `figures.window` samples: the curve the figures were read
   * off (null when the window is 1 or the curve is not finite). Made here so the page need not.
   */
  learningCurveSmoothed: Float64Array | null;
  /** K > 1: the 95 % band of the ensemble mean (null for one trial). */
  learningCurveLower: Float64Array | null;
  learningCurveUpper: Float64Array | null;
  figures: AdaptiveFilterFigures;
  /** Equalization: decisions (interleaved when complex), index n − Δ. */
  decisions: Float64Array | null;
}

export interface DirectionEnergy {
  /** What the direction is: "50 Hz", "−20°", "lag 3", "column 2". */
  label: string;
  /** Energy along it from least-squares coefficients on the given columns (unit of x squared). */
  energy: number;
  /** energy / input energy (a fraction). */
  share: number;
  /** 10·log10(share), in dB. */
  shareDb: number;
  /**
   * Energy along it left in the output (least squares on the same columns), as a fraction of
   * the input energy: ≈ 0 after a removal, = share after a projection onto the subspace.
   */
  shareAfter: number;
  /** 10·log10(shareAfter), in dB (−Infinity when nothing is left). */
  shareAfterDb: number;
}

export interface InterferenceResult {
  kind: 'interference';
  status: 'ok' | 'warning';
  warnings: JobWarning[];
  mode: 'off' | 'onto';
  /** The projected signal, same shape as the input. */
  output: ArrayData;
  /** The orthonormal basis used (m × rank). */
  basis: ArrayData;
  /** Columns given (r) and numerical rank. */
  columns: number;
  rank: number;
  tol: number;
  /** |r_kk| of the rank-revealing QR of the basis (the gap at `rank`). */
  diagonal: Float64Array;
  /** Per direction as given by the user (harmonics, angles, lags, columns), in their order. */
  directions: DirectionEnergy[];
  /** Σ|x|², in the unit of x squared. */
  inputEnergy: number;
  /** Energy in the interference subspace (removed for 'off', kept for 'onto'). */
  subspaceEnergy: number;
  /** Energy off the subspace. */
  residualEnergy: number;
  /** 10·log10(input / residual): the suppression projecting off gives, in dB. */
  suppressionDb: number;
  /** Energy of the output / input energy: the share of the signal kept (a fraction). */
  keptShare: number;
}

export interface BasisJobResult {
  kind: 'basis';
  status: 'ok' | 'warning';
  warnings: JobWarning[];
  /** m × rank orthonormal basis of span(A). */
  basis: ArrayData;
  /** n × (n − rank) orthonormal basis of null(A). */
  nullSpace: ArrayData;
  rank: number;
  nullity: number;
  tol: number;
  diagonal: Float64Array;
  /** |r_kk| just before and after the rank cut (null where there is none). */
  gapBefore: number | null;
  gapAfter: number | null;
  /** ‖A·N‖_F and ‖A·N‖_F / ‖A‖_F. */
  residual: number;
  relativeResidual: number;
}

export interface LeastSquaresJobResult {
  kind: 'least-squares';
  status: 'ok' | 'warning';
  warnings: JobWarning[];
  /** n × p solution (minimum-norm when rank < n). */
  x: ArrayData;
  rank: number;
  tol: number;
  diagonal: Float64Array;
  /** ‖b_j − A·x_j‖₂ per right-hand side. */
  residualNorm: Float64Array;
  minimumNorm: boolean;
}

export interface AnglesJobResult {
  kind: 'angles';
  status: 'ok' | 'warning';
  warnings: JobWarning[];
  /** θ₁ ≤ … ≤ θ_q in radians and in degrees. */
  radians: Float64Array;
  degrees: Float64Array;
  cosines: Float64Array;
  sines: Float64Array;
  rankA: number;
  rankB: number;
}

/** The estimate of a SpectralSpec, as the core returns it. */
export type SpectralJobResult = { kind: 'spectral'; status: 'ok'; warnings: JobWarning[] } & (
  | { op: 'welch'; psd: PsdResult }
  | { op: 'coherence'; coherence: CoherenceResult }
  | { op: 'spectrogram'; spectrogram: SpectrogramResult }
);

/** The CSV text of a CsvSpec, UTF-8 encoded (its buffer is transferred). */
export interface CsvJobResult {
  kind: 'csv';
  status: 'ok';
  warnings: JobWarning[];
  bytes: Uint8Array;
  rows: number;
}

export type JobResult =
  | CsvJobResult
  | SpectralJobResult
  | AdaptiveFilterResult
  | InterferenceResult
  | BasisJobResult
  | LeastSquaresJobResult
  | AnglesJobResult;

/** Wall-clock figures of a run inside the worker. */
export interface JobTiming {
  /** Milliseconds from the start of the job to its result. */
  ms: number;
  /** Samples (or steps) processed per second, when the job counts samples. */
  perSecond: number | null;
}

// ---------------------------------------------------------------------------------------------
// Messages

export interface RunMessage {
  type: 'run';
  id: number;
  spec: JobSpec;
  /** Bytes of named inputs this worker may keep for later jobs (0 or absent: none). */
  holdBytes?: number;
  /** Send result arrays ahead in `part` messages as they are computed (absent: no). */
  partsAhead?: boolean;
}

/** The values of the named arrays a worker asked for, or why they cannot be sent. */
export type SupplyMessage =
  | { type: 'supply'; id: number; arrays: Record<string, Float64Array> }
  | { type: 'supply'; id: number; error: string };

export interface CancelMessage {
  type: 'cancel';
  id: number;
}

export type ToWorker = RunMessage | CancelMessage | SupplyMessage;

export interface ReadyMessage {
  type: 'ready';
  protocol: number;
}

/** The named inputs of a run (see ArrayData.held) that this worker does not hold. */
export interface NeedMessage {
  type: 'need';
  id: number;
  names: string[];
}

export interface ProgressMessage {
  type: 'progress';
  id: number;
  /** Work done and total, in `unit`s (samples for filters, steps otherwise). */
  done: number;
  total: number;
  unit: 'samples' | 'steps';
  /** What is running now ("trial 2 of 5", "projection"). */
  stage: string;
}

/**
 * Result arrays a job may send ahead of its result, as it computes them (result-parts.ts): an
 * adaptive filter's output and error, and for one trial its learning curve and smoothed copy.
 */
export type PartKey = 'output' | 'error' | 'learningCurve' | 'learningCurveSmoothed';

/** Values [offset, offset + data.length) of the result array `key`, whose length is `length`. */
export interface PartMessage {
  type: 'part';
  id: number;
  key: PartKey;
  offset: number;
  length: number;
  /** Its buffer is transferred. */
  data: Float64Array;
}

export interface ResultMessage {
  type: 'result';
  id: number;
  result: JobResult;
  timing: JobTiming;
}

export interface FailedMessage {
  type: 'failed';
  id: number;
  /** The error's class name (TypeError, RangeError, …) and its message. */
  error: { name: string; message: string };
}

export interface CancelledMessage {
  type: 'cancelled';
  id: number;
  /** Work done before the cancel took effect. */
  done: number;
}

export type FromWorker =
  | ReadyMessage
  | NeedMessage
  | ProgressMessage
  | PartMessage
  | ResultMessage
  | FailedMessage
  | CancelledMessage;

// ---------------------------------------------------------------------------------------------
// Helpers on plain data

/** Number of elements of a shape. */
export function shapeSize(shape: readonly number[]): number {
  return shape.reduce((a, b) => a * b, 1);
}

/** Checks an ArrayData's shape against its buffer; throws a RangeError naming `name`. */
export function checkArrayData(name: string, a: unknown): ArrayData {
  const v = a as ArrayData;
  if (v === null || typeof v !== 'object' || !(v.data instanceof Float64Array)) {
    throw new TypeError(`${name} must be an array (data: Float64Array, shape, complex)`);
  }
  if (
    !Array.isArray(v.shape) ||
    v.shape.length === 0 ||
    v.shape.some(s => !Number.isInteger(s) || s < 0)
  ) {
    throw new RangeError(`${name}.shape must be a non-empty list of sizes ≥ 0`);
  }
  if (typeof v.complex !== 'boolean') {
    throw new TypeError(`${name}.complex must be a boolean`);
  }
  const need = shapeSize(v.shape) * (v.complex ? 2 : 1);
  if (v.data.length !== need) {
    throw new RangeError(
      `${name} has shape [${v.shape.join(', ')}]${v.complex ? ' (complex)' : ''}, which needs ` +
        `${need} values, but its data holds ${v.data.length}`
    );
  }
  return v;
}

/** The distinct ArrayBuffers under the arrays of a spec or result, for a transfer list. */
export function transferables(value: unknown): ArrayBuffer[] {
  const seen = new Set<ArrayBuffer>();
  const walk = (v: unknown, depth: number): void => {
    if (v === null || typeof v !== 'object' || depth > 8) {
      return;
    }
    if (ArrayBuffer.isView(v)) {
      const b = v.buffer;
      // by tag, not instanceof: an array made in another realm (a test's vm context, an
      // iframe) has another ArrayBuffer constructor; a SharedArrayBuffer cannot be transferred
      if (Object.prototype.toString.call(b) === '[object ArrayBuffer]' && b.byteLength > 0) {
        seen.add(b as ArrayBuffer);
      }
      return;
    }
    for (const k of Object.keys(v)) {
      walk((v as Record<string, unknown>)[k], depth + 1);
    }
  };
  walk(value, 0);
  return [...seen];
}
