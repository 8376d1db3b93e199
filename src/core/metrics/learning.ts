/**
 * Learning curves and the figures read off them: MSE in dB, steady-state MSE over a tail,
 * convergence time within a stated dB margin, misadjustment, residual energy.
 *
 * Definitions (Haykin, Adaptive Filter Theory, 4th ed., §5.4 and §6.3 (learning curve, excess
 * MSE, misadjustment 𝓜 = J_ex(∞)/J_min); Sayed, Fundamentals of Adaptive Filtering, 2003,
 * §6.2 (from memory)). The curve is the squared a-priori error |e(n)|²; an ensemble average over
 * independent trials estimates E|e(n)|².
 */
import { checkFinite, checkInteger, checkNumber, describe } from '../errors';

type Arr = ArrayLike<number>;

function checkArray(name: string, a: unknown): Arr {
  if (!(a instanceof Float64Array) && !(a instanceof Float32Array) && !Array.isArray(a)) {
    throw new TypeError(
      `${name} must be a Float64Array, Float32Array or number[], got ${describe(a)}`
    );
  }
  if (Array.isArray(a)) {
    // A list of rows (or anything but numbers) would turn into NaN silently below.
    for (let i = 0; i < a.length; i++) {
      if (typeof a[i] !== 'number') {
        throw new TypeError(
          `${name}[${i}] must be a number, got ${describe(a[i])}` +
            (Array.isArray(a[i]) || ArrayBuffer.isView(a[i])
              ? `: ${name} is one signal; for several trials use ensembleAverage`
              : '')
        );
      }
    }
  }
  return a as Arr;
}

/**
 * |e(n)|² of a real or interleaved complex error signal, into `out` when given (its length the
 * number of samples; nothing is allocated then, for a caller filling a curve chunk by chunk).
 */
export function squaredError(e: Arr, complex = false, out?: Float64Array): Float64Array {
  checkArray('e', e);
  if (complex && e.length % 2 !== 0) {
    throw new RangeError(`e must hold (re, im) pairs when complex, got length ${e.length}`);
  }
  const n = complex ? e.length / 2 : e.length;
  if (out !== undefined && (!(out instanceof Float64Array) || out.length !== n)) {
    throw new RangeError(
      `out must be a Float64Array of ${n} values (one per sample of e), got ${describe(out)}`
    );
  }
  out ??= new Float64Array(n);
  if (e instanceof Float64Array) {
    squaredErrorF64(e, complex, out);
  } else if (complex) {
    for (let i = 0; i < n; i++) {
      out[i] = e[2 * i] * e[2 * i] + e[2 * i + 1] * e[2 * i + 1];
    }
  } else {
    for (let i = 0; i < n; i++) {
      out[i] = e[i] * e[i];
    }
  }
  return out;
}

// The same loops on a Float64Array alone (the jobs' case): one element kind, so V8 compiles
// them without the checks a loop shared by three array kinds needs.
function squaredErrorF64(e: Float64Array, complex: boolean, out: Float64Array): void {
  const n = out.length;
  if (complex) {
    for (let i = 0, j = 0; i < n; i++, j += 2) {
      const re = e[j];
      const im = e[j + 1];
      out[i] = re * re + im * im;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const v = e[i];
      out[i] = v * v;
    }
  }
}

/**
 * Trailing moving average of length `window`: out[n] = mean(x[max(0, n−window+1) … n]) (the
 * first window−1 values average what is available). Running sum with periodic re-summation so
 * rounding does not accumulate over long signals: after every 4096th sample (i ≡ 4095 mod 4096)
 * the sum is recomputed exactly over the window ending there.
 */
export function movingAverage(x: Arr, window: number): Float64Array {
  checkArray('x', x);
  checkInteger('window', window, 1);
  const out = new Float64Array(x.length);
  if (x instanceof Float64Array) {
    movingAverageF64(x, window, out);
    return out;
  }
  const n = x.length;
  let s = 0;
  for (let i = 0; i < n; i++) {
    s += x[i];
    if (i >= window) {
      s -= x[i - window];
    }
    if (i % 4096 === 4095) {
      s = 0;
      for (let k = Math.max(0, i - window + 1); k <= i; k++) {
        s += x[k];
      }
    }
    out[i] = s / Math.min(i + 1, window);
  }
  return out;
}

/**
 * movingAverage on a Float64Array, the same sums in the same order (identical results), with
 * the branches of the general loop hoisted: blocks of 4096 samples, each split where the window
 * becomes full.
 */
function movingAverageF64(x: Float64Array, window: number, out: Float64Array): void {
  movingAverageBlocks(x, window, out, 0, x.length, 0);
}

/**
 * The blocks of movingAverageF64 from `from` (a multiple of 4096) to `to` (a multiple of 4096,
 * or x.length), continuing from the running sum `s` left by the blocks before; returns the sum
 * to continue with. Each whole block ends with the exact re-summation, so what follows does not
 * depend on where a caller stopped.
 */
function movingAverageBlocks(
  x: Float64Array,
  window: number,
  out: Float64Array,
  from: number,
  to: number,
  s: number
): number {
  for (let b = from; b < to; b += 4096) {
    const end = Math.min(b + 4096, to);
    // samples whose window is not full yet: the mean of what is available
    const full = Math.min(Math.max(b, window), end);
    let i = b;
    for (; i < full; i++) {
      s += x[i];
      out[i] = s / (i + 1);
    }
    for (; i < end; i++) {
      s += x[i];
      s -= x[i - window];
      out[i] = s / window;
    }
    if (end === b + 4096) {
      // re-sum exactly over the window ending at end − 1, as the general loop does
      const last = end - 1;
      s = 0;
      for (let k = Math.max(0, last - window + 1); k <= last; k++) {
        s += x[k];
      }
      out[last] = s / Math.min(last + 1, window);
    }
  }
  return s;
}

/**
 * movingAverage(x, window) made while x is being filled: each `advance(filled)` smooths the whole
 * blocks of 4096 samples below `filled` (everything once filled = x.length) into `out`, with
 * the same sums in the same order as movingAverage (identical values). For a job that fills a
 * learning curve chunk by chunk and sends its smoothed copy as it goes. Allocates only `out`.
 */
export class MovingAverageFill {
  /** The smoothed values; the leading `done` of them are final. */
  readonly out: Float64Array;

  constructor(
    readonly x: Float64Array,
    readonly window: number
  ) {
    if (!(x instanceof Float64Array)) {
      throw new TypeError(`x must be a Float64Array, got ${describe(x)}`);
    }
    checkInteger('window', window, 1);
    this.out = new Float64Array(x.length);
  }

  /** Leading values of `out` that are final. */
  get done(): number {
    return this._done;
  }

  /** x[0 … filled) is final: smooths what that allows; returns `done`. */
  advance(filled: number): number {
    const n = this.x.length;
    const to = filled >= n ? n : Math.max(0, filled - (filled % 4096));
    if (to > this._done) {
      this._s = movingAverageBlocks(this.x, this.window, this.out, this._done, to, this._s);
      this._done = to;
    }
    return this._done;
  }

  private _done = 0;
  private _s = 0;
}

/** Learning curve: the squared a-priori error, smoothed by a trailing moving average when `window` > 1. */
export function learningCurve(
  e: Arr,
  options: { complex?: boolean; window?: number } = {}
): Float64Array {
  const sq = squaredError(e, options.complex ?? false);
  const w = options.window ?? 1;
  checkInteger('options.window', w, 1);
  return w > 1 ? movingAverage(sq, w) : sq;
}

/** 10·log10 of each value (a power, e.g. a learning curve) — −Infinity for 0. */
export function toDb(x: Arr): Float64Array {
  checkArray('x', x);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) {
    out[i] = 10 * Math.log10(x[i]);
  }
  return out;
}

/** Mean of a power curve, in dB: 10·log10(mean(x)). */
export function mseDb(x: Arr): number {
  checkArray('x', x);
  if (x.length === 0) {
    throw new RangeError('x must not be empty');
  }
  let s = 0;
  for (let i = 0; i < x.length; i++) {
    s += x[i];
  }
  return 10 * Math.log10(s / x.length);
}

function tailLength(n: number, tail: number): number {
  checkNumber('tail', tail);
  if (tail > 0 && tail < 1) {
    return Math.max(1, Math.round(tail * n));
  }
  checkInteger('tail', tail, 1, n);
  return tail;
}

/**
 * Steady-state MSE: mean of the curve over its last `tail` samples (`tail` a count, or a
 * fraction in (0, 1) of the length; default the last 10 %).
 */
export function steadyStateMse(curve: Arr, tail = 0.1): number {
  checkArray('curve', curve);
  if (curve.length === 0) {
    throw new RangeError('curve must not be empty');
  }
  checkFinite('curve', curve);
  const L = tailLength(curve.length, tail);
  let s = 0;
  for (let i = curve.length - L; i < curve.length; i++) {
    s += curve[i];
  }
  return s / L;
}

export interface ConvergenceOptions {
  /** Margin in dB around the steady-state MSE (default 1 dB). */
  marginDb?: number;
  /** Tail that defines the steady state (count or fraction, default 0.1). */
  tail?: number;
  /** Moving-average window applied first (default 1: the curve as given). */
  window?: number;
  /** Steady-state value to use instead of the tail mean. */
  steadyState?: number;
}

/**
 * Convergence time: the first sample n after which the (smoothed) curve stays within
 * ±marginDb of the steady-state MSE, i.e. |10·log10(J(m)/J∞)| ≤ marginDb for every m ≥ n.
 * Returns −1 when even the last sample is outside the margin.
 */
export function convergenceTime(curve: Arr, options: ConvergenceOptions = {}): number {
  checkArray('curve', curve);
  const margin = checkNumber('options.marginDb', options.marginDb ?? 1);
  if (!(margin > 0)) {
    throw new RangeError(`options.marginDb must be > 0, got ${describe(margin)}`);
  }
  const c = (options.window ?? 1) > 1 ? movingAverage(curve, options.window!) : curve;
  const jss =
    options.steadyState !== undefined
      ? checkNumber('options.steadyState', options.steadyState)
      : steadyStateMse(c, options.tail ?? 0.1);
  if (!(jss > 0)) {
    throw new RangeError(`the steady-state MSE must be > 0, got ${describe(jss)}`);
  }
  const hi = jss * Math.pow(10, margin / 10);
  const lo = jss * Math.pow(10, -margin / 10);
  for (let i = c.length - 1; i >= 0; i--) {
    if (!(c[i] <= hi && c[i] >= lo)) {
      return i === c.length - 1 ? -1 : i + 1;
    }
  }
  return 0;
}

/** Misadjustment 𝓜 = (J∞ − J_min)/J_min from the measured steady-state MSE and the minimum MSE. */
export function misadjustment(steadyMse: number, minMse: number): number {
  checkNumber('steadyMse', steadyMse);
  checkNumber('minMse', minMse);
  if (!(minMse > 0)) {
    throw new RangeError(`minMse must be > 0, got ${describe(minMse)}`);
  }
  if (!(steadyMse >= 0)) {
    // a mean-square error is never negative: a negative value is a mix-up (dB given?)
    throw new RangeError(
      `steadyMse must be ≥ 0 (a mean-square value, not dB), got ${describe(steadyMse)}`
    );
  }
  return (steadyMse - minMse) / minMse;
}

export interface ResidualEnergy {
  /** Σ|e|² */
  errorEnergy: number;
  /** Σ|d|² */
  desiredEnergy: number;
  /** Σ|e|² / Σ|d|² */
  ratio: number;
  /** 10·log10(Σ|d|² / Σ|e|²): the suppression achieved, in dB. */
  reductionDb: number;
}

/** Energy of the residual (error) against the energy of the desired signal, over [start, end). */
export function residualEnergy(
  e: Arr,
  d: Arr,
  options: { complex?: boolean; start?: number; end?: number } = {}
): ResidualEnergy {
  checkArray('e', e);
  checkArray('d', d);
  if (e.length !== d.length) {
    throw new RangeError(`e has length ${e.length} but d has length ${d.length}; they must match`);
  }
  const W = options.complex ? 2 : 1;
  const n = e.length / W;
  const start = checkInteger('options.start', options.start ?? 0, 0, n);
  const end = checkInteger('options.end', options.end ?? n, start, n);
  let se = 0;
  let sd = 0;
  for (let i = start * W; i < end * W; i++) {
    se += e[i] * e[i];
    sd += d[i] * d[i];
  }
  return {
    errorEnergy: se,
    desiredEnergy: sd,
    ratio: se / sd,
    reductionDb: 10 * Math.log10(sd / se)
  };
}
