/**
 * Ensemble averages over independent trials: K realizations of x and d (K×N, samples along the
 * last axis, DESIGN §3) run as K independent filters; their learning curves are averaged with a
 * confidence band for the mean, mean ± z·s/√K (normal approximation to the sampling
 * distribution of the mean, adequate for K ≳ 30; common practice).
 */
import { checkInteger, checkInterval, describe } from '../errors';
import { Dense } from '../dense';
import { movingAverage } from './learning';
import { createFilter } from '../filters/create';
import type { FilterOptions, Health, Real } from '../filters/types';
import { toFlat } from '../filters/base';

export interface EnsembleCurve {
  /** Number of trials. */
  K: number;
  /** Mean over trials at each sample. */
  mean: Float64Array;
  /** Sample standard deviation over trials at each sample (0 when K = 1). */
  std: Float64Array;
  /** Lower and upper ends of the confidence band for the mean. */
  lower: Float64Array;
  upper: Float64Array;
  /** Confidence level of the band. */
  confidence: number;
}

/**
 * Inverse of the standard normal CDF (P. J. Acklam's rational approximation with one Newton
 * step; relative error below 1e−12 after refinement).
 */
export function normalQuantile(p: number): number {
  checkInterval('p', p, 0, 1, '()');
  const a = [
    -39.69683028665376, 220.9460984245205, -275.9285104469687, 138.357751867269, -30.66479806614716,
    2.506628277459239
  ];
  const b = [
    -54.47609879822406, 161.5858368580409, -155.6989798598866, 66.80131188771972, -13.28068155288572
  ];
  const c = [
    -0.007784894002430293, -0.3223964580411365, -2.400758277161838, -2.549732539343734,
    4.374664141464968, 2.938163982698783
  ];
  const d = [0.007784695709041462, 0.3224671290700398, 2.445134137142996, 3.754408661907416];
  const pl = 0.02425;
  let x: number;
  if (p < pl) {
    const q = Math.sqrt(-2 * Math.log(p));
    x =
      (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
      ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  } else if (p <= 1 - pl) {
    const q = p - 0.5;
    const r = q * q;
    x =
      ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q) /
      (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
  } else {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    x =
      -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
      ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  // One Halley step on Φ(x) − p with Φ from erfc.
  const e = 0.5 * erfc(-x / Math.SQRT2) - p;
  const u = e * Math.sqrt(2 * Math.PI) * Math.exp((x * x) / 2);
  return x - u / (1 + (x * u) / 2);
}

/**
 * Complementary error function: the Chebyshev fit of Press et al., Numerical Recipes, 3rd ed.,
 * §6.2.2 (erfccheb), fractional error below 1.2e−16 (as stated there).
 */
function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 2 / (2 + z);
  const ty = 4 * t - 2;
  const cof = [
    -1.3026537197817094, 0.6419697923564902, 1.9476473204185836e-2, -9.561514786808631e-3,
    -9.46595344482036e-4, 3.66839497852761e-4, 4.2523324806907e-5, -2.0278578112534e-5,
    -1.624290004647e-6, 1.30365583558e-6, 1.5626441722e-8, -8.5238095915e-8, 6.529054439e-9,
    5.059343495e-9, -9.91364156e-10, -2.27365122e-10, 9.6467911e-11, 2.394038e-12, -6.886027e-12,
    8.94487e-13, 3.13092e-13, -1.12708e-13, 3.81e-16, 7.106e-15, -1.523e-15, -9.4e-17, 1.21e-16,
    -2.8e-17
  ];
  let d = 0;
  let dd = 0;
  for (let j = cof.length - 1; j > 0; j--) {
    const tmp = d;
    d = ty * d - dd + cof[j];
    dd = tmp;
  }
  const r = t * Math.exp(-z * z + 0.5 * (cof[0] + ty * d) - dd);
  return x >= 0 ? r : 2 - r;
}

/**
 * Mean, standard deviation and confidence band over K curves of equal length N, given as a
 * K×N row-major array (with `K`) or as an array of K curves.
 */
export function ensembleAverage(
  curves: ArrayLike<number> | ArrayLike<number>[],
  options: { K?: number; confidence?: number } = {}
): EnsembleCurve {
  let rows: ArrayLike<number>[];
  if (Array.isArray(curves) && curves.length > 0 && typeof curves[0] !== 'number') {
    rows = curves as ArrayLike<number>[];
  } else {
    const flat = curves as ArrayLike<number>;
    if (options.K === undefined) {
      throw new TypeError(
        `options.K must be an integer (the number of trials) when curves is one flat K×N ` +
          `array, got undefined; or pass the curves as a list of K arrays`
      );
    }
    const K = checkInteger('options.K', options.K, 1);
    if (flat.length % K !== 0) {
      throw new RangeError(`curves has ${flat.length} values, not a multiple of K = ${K}`);
    }
    const N = flat.length / K;
    rows = [];
    for (let k = 0; k < K; k++) {
      rows.push(
        ArrayBuffer.isView(flat)
          ? (flat as Float64Array).subarray(k * N, (k + 1) * N)
          : Array.prototype.slice.call(flat, k * N, (k + 1) * N)
      );
    }
  }
  const K = rows.length;
  if (K === 0) {
    throw new RangeError('curves must hold at least one trial');
  }
  const N = rows[0].length;
  rows.forEach((r, k) => {
    if (r.length !== N) {
      throw new RangeError(
        `curves[${k}] has length ${r.length} but curves[0] has length ${N}; they must match`
      );
    }
  });
  const conf = checkInterval('options.confidence', options.confidence ?? 0.95, 0, 1, '()');
  const z = normalQuantile(0.5 + conf / 2);
  const mean = new Float64Array(N);
  const std = new Float64Array(N);
  for (const r of rows) {
    for (let i = 0; i < N; i++) {
      mean[i] += r[i];
    }
  }
  for (let i = 0; i < N; i++) {
    mean[i] /= K;
  }
  if (K > 1) {
    for (const r of rows) {
      for (let i = 0; i < N; i++) {
        const t = r[i] - mean[i];
        std[i] += t * t;
      }
    }
    for (let i = 0; i < N; i++) {
      std[i] = Math.sqrt(std[i] / (K - 1));
    }
  }
  const lower = new Float64Array(N);
  const upper = new Float64Array(N);
  const s = z / Math.sqrt(K);
  for (let i = 0; i < N; i++) {
    lower[i] = mean[i] - s * std[i];
    upper[i] = mean[i] + s * std[i];
  }
  return { K, mean, std, lower, upper, confidence: conf };
}

export interface TrialsResult {
  /** Ensemble learning curve |e(n)|² (a-priori error), with its band. */
  curve: EnsembleCurve;
  /** Final weights of each trial, K rows (× M, ×2 when complex). */
  weights: Float64Array;
  /** Health of each trial. */
  health: Health[];
}

/**
 * Runs K independent filters on the rows of x (K×N; for regressor input K×N×M) and d (K×N) and
 * averages their learning curves. With `window`, each trial's curve is smoothed first.
 *
 * Accepted layouts for x and d (samples along the last axis, DESIGN §3): one flat array of K
 * rows back to back (Float64Array, Float32Array or number[], C order), a list of K rows (typed
 * arrays or number[]; for regressor input each row holds N·M values, row-major), or a Dense
 * whose first axis is K. Anything else is an error that names the argument and the layout.
 */
export function runTrials(
  x: unknown,
  d: unknown,
  K: number,
  options: FilterOptions & { window?: number; confidence?: number }
): TrialsResult {
  checkInteger('K', K, 1);
  const filt = createFilter(options);
  const cx = filt.complex;
  const X = trials('x', x, K, filt.f32, cx);
  const D = trials('d', d, K, filt.f32, cx);
  if (D.length % K !== 0 || X.length % K !== 0) {
    throw new RangeError(
      `x (${X.length} values) and d (${D.length} values) must both hold K = ${K} rows`
    );
  }
  const W = cx ? 2 : 1;
  const dl = D.length / K;
  const xl = X.length / K;
  const N = dl / W;
  const window = options.window ?? 1;
  checkInteger('options.window', window, 1);
  const curves: Float64Array[] = [];
  const weights = new Float64Array(K * filt.weightLength);
  const health: Health[] = [];
  for (let k = 0; k < K; k++) {
    const f = k === 0 ? filt : createFilter(options);
    const r = f.process(X.subarray(k * xl, (k + 1) * xl), D.subarray(k * dl, (k + 1) * dl));
    const c = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      c[i] = cx ? r.e[2 * i] * r.e[2 * i] + r.e[2 * i + 1] * r.e[2 * i + 1] : r.e[i] * r.e[i];
    }
    curves.push(window > 1 ? movingAverage(c, window) : c);
    weights.set(f.weights(), k * f.weightLength);
    health.push(f.health());
  }
  return { curve: ensembleAverage(curves, { confidence: options.confidence }), weights, health };
}

/** K trials in one of runTrials' layouts, as one flat array of K rows back to back. */
function trials(name: string, a: unknown, K: number, f32: boolean, complex: boolean): Real {
  if (Array.isArray(a) && a.length > 0 && typeof a[0] !== 'number') {
    if (a.length !== K) {
      throw new RangeError(
        `${name} is a list of ${a.length} rows but K = ${K}: give one row per trial`
      );
    }
    const first = a[0] as unknown;
    if (!(first instanceof Float64Array || first instanceof Float32Array || Array.isArray(first))) {
      throw new TypeError(
        `${name}[0] must be a row (Float64Array, Float32Array or number[]), got ${describe(first)}`
      );
    }
    const len = (first as ArrayLike<number>).length;
    return toFlat(name, a, f32, complex, len);
  }
  if (a instanceof Dense && a.ndim >= 2 && a.shape[0] !== K) {
    throw new RangeError(
      `${name} is a ${a.shape.join('×')} Dense array but K = ${K}: trials run along the first ` +
        `axis (K×N, samples along the last axis); if the samples run down the columns, pass ${name}.T`
    );
  }
  return toFlat(name, a, f32, complex);
}
