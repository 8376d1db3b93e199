/**
 * The streaming interface shared by every adaptive filter.
 *
 * A filter is created with its options, then fed a signal chunk by chunk with `process`; the
 * whole state (weights, factor or inverse correlation matrix, the tapped delay line, the health
 * monitor, the trajectory counter) is carried between chunks, so a long signal never has to sit
 * in memory at once and a caller can report progress or stop between chunks. Each algorithm
 * implements one `kernel` per arithmetic (float64 real, float64 complex, float32 emulation) that
 * runs the whole chunk in one loop without allocating.
 */
import { checkFinite, checkInteger, checkInterval, checkNumber, describe } from '../errors';
import { Dense } from '../dense';
import type {
  ChunkBuffers,
  FilterChunk,
  FilterOptions,
  Health,
  HealthEvent,
  HealthKind,
  Real,
  ResolvedOptions
} from './types';

/** Smoothing of the health monitor's power estimates: time constant 256 samples. */
export const HEALTH_ALPHA = 1 / 256;

/**
 * Moves a real tapped delay line on by one sample. The line is stored twice (ub has length 2M)
 * so that u(n) is the contiguous slice ub[pos … pos+M): the new sample goes in front of it, at
 * pos − 1 (mod M), in both copies. Returns the new pos.
 */
export function pushSample(ub: Float64Array, pos: number, M: number, v: number): number {
  const p = pos === 0 ? M - 1 : pos - 1;
  ub[p] = v;
  ub[p + M] = v;
  return p;
}

/** pushSample for complex samples (interleaved; ub has length 4M, the slice starts at 2·pos). */
export function pushSampleC(
  ub: Float64Array,
  pos: number,
  M: number,
  re: number,
  im: number
): number {
  const p = pos === 0 ? M - 1 : pos - 1;
  const o = 2 * p;
  ub[o] = re;
  ub[o + 1] = im;
  ub[o + 2 * M] = re;
  ub[o + 2 * M + 1] = im;
  return p;
}

/** Bit order of the health mask (nonfinite = 1, divergence = 2, indefinite = 4, …). */
const HEALTH_KINDS: HealthKind[] = [
  'nonfinite',
  'divergence',
  'indefinite',
  'asymmetry',
  'step-size'
];

const ALGORITHMS = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-textbook', 'nlms', 'lms'];

/** The filter's own options, then those the runners built on it add (runFilter, runTrials, equalize). */
const OPTION_NAMES = new Set([
  'algorithm',
  'taps',
  'complex',
  'precision',
  'input',
  'lambda',
  'delta',
  'mu',
  'epsilon',
  'keepWeightsEvery',
  'divergenceThreshold',
  'asymmetryTolerance',
  'textbook',
  'chunkSize',
  'window',
  'confidence',
  'delay',
  'decisionDirected',
  'constellation',
  'symbols'
]);

/** Names this interface used before, with the one to use now. */
const RENAMED: Record<string, string> = {
  order: 'taps (the number of taps M)',
  decimation: 'keepWeightsEvery (keep the weights every k samples)'
};

/**
 * Applies defaults and checks every option; throws TypeError/RangeError naming the option. An
 * option name that none of the filters and runners knows is a TypeError (a misspelt option would
 * otherwise be ignored without a word).
 */
export function resolveOptions(options: FilterOptions): ResolvedOptions {
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`options must be an object, got ${describe(options)}`);
  }
  for (const key of Object.keys(options)) {
    if (!OPTION_NAMES.has(key)) {
      throw new TypeError(
        key in RENAMED
          ? `options.${key} is now options.${RENAMED[key]}`
          : `options.${key} is not a filter option; the options are ${[...OPTION_NAMES].join(', ')}`
      );
    }
  }
  const algorithm = options.algorithm;
  if (!ALGORITHMS.includes(algorithm as string)) {
    throw new RangeError(
      `options.algorithm must be one of ${ALGORITHMS.join(', ')}, got ${describe(algorithm)}`
    );
  }
  const taps = checkInteger('options.taps', options.taps, 1, 1 << 16);
  const complex = options.complex ?? false;
  if (typeof complex !== 'boolean') {
    throw new TypeError(`options.complex must be a boolean, got ${describe(complex)}`);
  }
  const precision = options.precision ?? 'float64';
  if (precision !== 'float64' && precision !== 'float32') {
    throw new RangeError(
      `options.precision must be 'float64' or 'float32', got ${describe(precision)}`
    );
  }
  const input = options.input ?? 'transversal';
  if (input !== 'transversal' && input !== 'regressor') {
    throw new RangeError(
      `options.input must be 'transversal' or 'regressor', got ${describe(input)}`
    );
  }
  const lambda = checkInterval('options.lambda', options.lambda ?? 0.99, 0, 1, '(]');
  const delta = checkNumber('options.delta', options.delta ?? 0.01);
  if (!(delta > 0)) {
    throw new RangeError(`options.delta must be > 0, got ${describe(delta)}`);
  }
  const mu = checkNumber('options.mu', options.mu ?? (algorithm === 'lms' ? 0.01 : 0.5));
  if (!(mu > 0)) {
    throw new RangeError(`options.mu must be > 0, got ${describe(mu)}`);
  }
  if (algorithm === 'nlms' && !(mu < 2)) {
    throw new RangeError(`options.mu must be in (0, 2) for NLMS, got ${describe(mu)}`);
  }
  const epsilon = checkNumber('options.epsilon', options.epsilon ?? 1e-6);
  if (!(epsilon >= 0)) {
    throw new RangeError(`options.epsilon must be ≥ 0, got ${describe(epsilon)}`);
  }
  const keepWeightsEvery = checkInteger(
    'options.keepWeightsEvery',
    options.keepWeightsEvery ?? 0,
    0
  );
  const divergenceThreshold = checkNumber(
    'options.divergenceThreshold',
    options.divergenceThreshold ?? 1e8
  );
  if (!(divergenceThreshold > 1)) {
    throw new RangeError(
      `options.divergenceThreshold must be > 1, got ${describe(divergenceThreshold)}`
    );
  }
  const asymmetryTolerance = checkNumber(
    'options.asymmetryTolerance',
    options.asymmetryTolerance ??
      (precision === 'float32' ? Math.sqrt(2 ** -23) : Math.sqrt(2 ** -52))
  );
  if (!(asymmetryTolerance > 0)) {
    throw new RangeError(
      `options.asymmetryTolerance must be > 0, got ${describe(asymmetryTolerance)}`
    );
  }
  return {
    algorithm,
    taps,
    complex,
    precision,
    input,
    lambda,
    delta,
    mu,
    epsilon,
    keepWeightsEvery,
    divergenceThreshold,
    asymmetryTolerance
  };
}

/**
 * Turns an accepted input (typed array, number[], or a Dense array) into a flat typed array.
 * With `rowLength` (the values of one regressor row), a list of rows — number[][] or typed
 * arrays — is also accepted and flattened row by row; without it a list of rows is a TypeError
 * that says the argument takes one flat signal.
 */
export function toFlat(
  name: string,
  a: unknown,
  f32: boolean,
  complex: boolean,
  rowLength?: number
): Real {
  if (Array.isArray(a) && a.length > 0 && typeof a[0] !== 'number') {
    if (rowLength === undefined || !(Array.isArray(a[0]) || ArrayBuffer.isView(a[0]))) {
      throw new TypeError(
        `${name} must be one flat signal (Float64Array, Float32Array, number[] or a 1-D Dense), ` +
          `got an Array(${a.length}) whose first entry is ${describe(a[0])}` +
          (Array.isArray(a[0]) || ArrayBuffer.isView(a[0])
            ? "; rows are taken only as regressor rows (input: 'regressor') or as trials (runTrials)"
            : '')
      );
    }
    return flattenRows(name, a, rowLength, f32, complex);
  }
  let src: ArrayLike<number>;
  if (a instanceof Dense) {
    if (a.complex !== complex) {
      throw new TypeError(
        `${name} is ${a.complex ? 'complex' : 'real'} but the filter is ${complex ? 'complex' : 'real'}`
      );
    }
    const c = a.isCContiguous() && a.offset === 0 ? a : a.copy('C');
    src = c.data.subarray(0, (complex ? 2 : 1) * c.size);
  } else if (a instanceof Float64Array || a instanceof Float32Array) {
    src = a;
  } else if (Array.isArray(a)) {
    for (let i = 0; i < a.length; i++) {
      if (typeof a[i] !== 'number') {
        throw new TypeError(`${name}[${i}] must be a number, got ${describe(a[i])}`);
      }
    }
    src = a as number[];
  } else {
    throw new TypeError(
      `${name} must be a Float64Array, Float32Array, number[] or Dense array, got ${describe(a)}`
    );
  }
  if (f32) {
    return src instanceof Float32Array ? src : Float32Array.from(src);
  }
  return src instanceof Float64Array ? src : Float64Array.from(src);
}

/** A list of rows (number[] or typed arrays) of `rowLength` values each, flattened in order. */
function flattenRows(
  name: string,
  rows: unknown[],
  rowLength: number,
  f32: boolean,
  complex: boolean
): Real {
  const out = f32
    ? new Float32Array(rows.length * rowLength)
    : new Float64Array(rows.length * rowLength);
  for (let k = 0; k < rows.length; k++) {
    const r = rows[k];
    if (!(r instanceof Float64Array || r instanceof Float32Array || Array.isArray(r))) {
      throw new TypeError(
        `${name}[${k}] must be a row (Float64Array, Float32Array or number[]), got ${describe(r)}`
      );
    }
    const row = toFlat(`${name}[${k}]`, r, f32, complex);
    if (row.length !== rowLength) {
      throw new RangeError(
        `${name}[${k}] has ${row.length} values but each row must have ${rowLength}` +
          (complex ? ' (interleaved re, im)' : '')
      );
    }
    out.set(row, k * rowLength);
  }
  return out;
}

/** Base class: argument checks, buffers, trajectory bookkeeping and the health monitor. */
export abstract class AdaptiveFilter {
  readonly options: Readonly<ResolvedOptions>;
  /** Filter length. */
  readonly M: number;
  readonly complex: boolean;
  readonly f32: boolean;
  readonly transversal: boolean;

  /** Regressor buffer: tapped delay line stored twice (length 2M, or 4M complex) so that u(n) is a contiguous slice at `upos`; for regressor input, the current row at 0. */
  protected ub!: Real;
  protected upos = 0;
  /** Samples processed so far. */
  protected t = 0;
  /** Samples since the last trajectory row. */
  protected dcount = 0;
  /** Health monitor state: smoothed |e|² and |d|², and the kinds already reported (bit mask). */
  protected hPe = 0;
  protected hPd = 0;
  protected hMask = 0;
  private events: HealthEvent[] = [];

  constructor(options: FilterOptions) {
    this.options = Object.freeze(resolveOptions(options));
    this.M = this.options.taps;
    this.complex = this.options.complex;
    this.f32 = this.options.precision === 'float32';
    this.transversal = this.options.input === 'transversal';
  }

  /** Samples processed since creation or the last reset. */
  get samples(): number {
    return this.t;
  }

  /** Values per weight vector in the flat layout: M real, 2M complex (interleaved). */
  get weightLength(): number {
    return this.complex ? 2 * this.M : this.M;
  }

  /** The health report so far (a copy). */
  health(): Health {
    const events = this.events.map(e => ({ ...e }));
    let status: Health['status'] = 'ok';
    for (const e of events) {
      if (e.kind === 'nonfinite' || e.kind === 'divergence' || e.kind === 'indefinite') {
        status = 'failed';
      } else if (status === 'ok') {
        status = 'warning';
      }
    }
    return {
      status,
      events,
      firstIndex: events.length ? Math.min(...events.map(e => e.index)) : -1
    };
  }

  /** Back to the state right after creation. */
  reset(): void {
    this.upos = 0;
    this.t = 0;
    this.dcount = 0;
    this.hPe = 0;
    this.hPd = 0;
    this.hMask = 0;
    this.events = [];
    this.ub = this.zeroed(this.ub, (this.complex ? 4 : 2) * this.M);
    this.init();
    this.prime();
  }

  /**
   * Runs the kernel on empty chunks. That changes nothing, but lets V8 collect type feedback
   * for the code around the sample loop before the loop gets hot; otherwise the loop is
   * compiled on the fly without feedback for the stores after it, and that code is thrown away
   * at the end of early chunks (seen with --trace-deopt).
   */
  private prime(): void {
    const z = this.f32 ? new Float32Array(0) : new Float64Array(0);
    const t = new Float64Array(0);
    for (let k = 0; k < 32; k++) {
      this.kernel(z, z, 0, z, z, z, z, t, t);
    }
  }

  /**
   * A zeroed state array of length `len`: the old one refilled when it fits, so that reset()
   * keeps the objects the optimised kernels were compiled against (replacing them invalidates
   * that code: V8 tracks such fields as constant).
   */
  protected zeroed<T extends Real>(old: T | undefined, len: number): T {
    if (old !== undefined && old.length === len) {
      old.fill(0);
      return old;
    }
    return (this.f32 ? new Float32Array(len) : new Float64Array(len)) as T;
  }

  /** Current weights w(n) (interleaved when complex), a new Float64Array. */
  weights(): Float64Array {
    const w = new Float64Array(this.weightLength);
    this.writeWeights(w, 0);
    return w;
  }

  /**
   * Runs the filter over one chunk. `x` is the input signal (transversal: n values, 2n when
   * complex) or the regressor rows (n×M, row-major, ×2 when complex); `d` is the desired signal
   * (n, or 2n complex). Outputs are new arrays unless `out` supplies them.
   */
  process(x: unknown, d: unknown, out: ChunkBuffers = {}): FilterChunk {
    const cx = this.complex;
    const X = toFlat('x', x, this.f32, cx, this.transversal ? undefined : this.weightLength);
    const D = toFlat('d', d, this.f32, cx);
    const w = cx ? 2 : 1;
    if (D.length % w !== 0) {
      throw new RangeError(
        `d must hold (re, im) pairs for a complex filter, got length ${D.length}`
      );
    }
    const n = D.length / w;
    const per = (this.transversal ? 1 : this.M) * w;
    if (X.length !== n * per) {
      throw new RangeError(
        this.transversal
          ? `x has length ${X.length / w} but d has length ${n}; they must match`
          : `x must be an N×M regressor matrix with N = ${n} (length of d) and M = ${this.M}, ` +
              `i.e. ${n * per} values, got ${X.length}`
      );
    }
    checkFinite('x', X, cx);
    checkFinite('d', D, cx);
    const dec = this.options.keepWeightsEvery;
    const rows = dec > 0 ? Math.floor((this.dcount + n) / dec) : 0;
    const mk = (len: number): Real => (this.f32 ? new Float32Array(len) : new Float64Array(len));
    const y = this.buffer('out.y', out.y, n * w, mk);
    const e = this.buffer('out.e', out.e, n * w, mk);
    const ep = this.buffer('out.ePost', out.ePost, n * w, mk);
    const g = this.buffer('out.gamma', out.gamma, n, mk);
    const L = this.weightLength;
    const traj = out.trajectory ?? new Float64Array(rows * L);
    const tIdx = out.trajectoryIndex ?? new Float64Array(rows);
    if (traj.length < rows * L || tIdx.length < rows) {
      throw new RangeError(
        `out.trajectory/out.trajectoryIndex must hold ${rows} rows, got ${traj.length / L}/${tIdx.length}`
      );
    }
    const start = this.t;
    this.kernel(X, D, n, y, e, ep, g, traj, tIdx);
    this.t += n;
    return {
      start,
      length: n,
      y,
      e,
      ePost: ep,
      gamma: g,
      trajectory: traj.length === rows * L ? traj : traj.subarray(0, rows * L),
      trajectoryIndex: tIdx.length === rows ? tIdx : tIdx.subarray(0, rows)
    };
  }

  private buffer(name: string, b: Real | undefined, len: number, mk: (l: number) => Real): Real {
    if (b === undefined) {
      return mk(len);
    }
    if ((this.f32 && !(b instanceof Float32Array)) || (!this.f32 && !(b instanceof Float64Array))) {
      throw new TypeError(
        `${name} must be a ${this.f32 ? 'Float32Array' : 'Float64Array'}, got ${describe(b)}`
      );
    }
    if (b.length < len) {
      throw new RangeError(`${name} must hold at least ${len} values, got ${b.length}`);
    }
    return b;
  }

  /** Records the first occurrence of a health event (called only on the rare failing path). */
  protected flag(kind: HealthKind, index: number, message: string): void {
    const bit = 1 << HEALTH_KINDS.indexOf(kind);
    if (this.hMask & bit) {
      return;
    }
    this.hMask |= bit;
    this.events.push({ kind, index, message });
  }

  /**
   * Shared slow path of the per-sample health check, entered only when the smoothed error power
   * is not below threshold × the smoothed desired power (that comparison is false for NaN too).
   */
  protected checkError(ee: number, index: number): void {
    if (ee - ee !== 0) {
      this.flag('nonfinite', index, `the a-priori error became ${ee} at sample ${index}`);
    } else if (
      (this.hMask & 2) === 0 &&
      !(this.hPe <= this.options.divergenceThreshold * this.hPd)
    ) {
      this.flag(
        'divergence',
        index,
        `smoothed error power ${this.hPe.toExponential(3)} exceeded ` +
          `${this.options.divergenceThreshold} × smoothed power of d (${this.hPd.toExponential(3)}) at sample ${index}`
      );
    }
  }

  /** Initialises the algorithm's state. */
  protected abstract init(): void;
  /** Writes the current weights at out[o…]. */
  protected abstract writeWeights(out: Float64Array, o: number): void;
  /**
   * Runs one chunk: regressor, output, errors, update, conversion factor, trajectory, health.
   * The buffers' element type follows the precision, so the chunk goes to the kernel written
   * for it (float32 emulation, complex float64 or real float64).
   */
  protected kernel(
    x: Real,
    d: Real,
    n: number,
    y: Real,
    e: Real,
    ep: Real,
    g: Real,
    traj: Float64Array,
    tIdx: Float64Array
  ): void {
    if (this.f32) {
      this.kernel32(
        x as Float32Array,
        d as Float32Array,
        n,
        y as Float32Array,
        e as Float32Array,
        ep as Float32Array,
        g as Float32Array,
        traj,
        tIdx
      );
    } else if (this.complex) {
      this.kernelC(
        x as Float64Array,
        d as Float64Array,
        n,
        y as Float64Array,
        e as Float64Array,
        ep as Float64Array,
        g as Float64Array,
        traj,
        tIdx
      );
    } else {
      this.kernelR(
        x as Float64Array,
        d as Float64Array,
        n,
        y as Float64Array,
        e as Float64Array,
        ep as Float64Array,
        g as Float64Array,
        traj,
        tIdx
      );
    }
  }
  /** Float32 emulation, real or complex (always interleaved). */
  protected abstract kernel32(
    x: Float32Array,
    d: Float32Array,
    n: number,
    y: Float32Array,
    e: Float32Array,
    ep: Float32Array,
    g: Float32Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void;
  /** Complex float64 (interleaved). */
  protected abstract kernelC(
    x: Float64Array,
    d: Float64Array,
    n: number,
    y: Float64Array,
    e: Float64Array,
    ep: Float64Array,
    g: Float64Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void;
  /** Real float64. */
  protected abstract kernelR(
    x: Float64Array,
    d: Float64Array,
    n: number,
    y: Float64Array,
    e: Float64Array,
    ep: Float64Array,
    g: Float64Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void;
}
