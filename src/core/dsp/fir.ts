/**
 * Frequency response of an adaptive filter's weights.
 *
 * The filter computes y(n) = w(n)ᴴu(n) = Σ_k conj(w_k) x(n−k), so its impulse response is
 * h_k = conj(w_k) (for real weights, h = w) and H(e^{jω}) = Σ_k h_k e^{−jωk} (Oppenheim and
 * Schafer, Discrete-Time Signal Processing, 3rd ed., §5.1).
 *
 * The grid is `points` frequencies evenly spaced over `band` = [f₀, f₁] in cycles per sample,
 * both ends included: f_k = f₀ + k·(f₁ − f₀)/(points − 1). Default band [0, 0.5] (up to and
 * including Nyquist) for real weights, whose response is conjugate-symmetric, and [−0.5, 0.5]
 * for complex weights, whose negative frequencies differ; default 1025 points.
 */
import { checkFinite, checkInteger, checkNumber, describe } from '../errors';

/** Options of {@link firResponse}. */
export interface FirResponseOptions {
  /** Interleaved complex weights (default false). */
  complex?: boolean;
  /** Number of frequencies, ≥ 1 (default 1025). With 1, only f₀ is evaluated. */
  points?: number;
  /**
   * [f₀, f₁] in cycles per sample (ω/2π), f₀ ≤ f₁, both ends included; default [0, 0.5] for real
   * weights, [−0.5, 0.5] for complex. Any band is allowed (the response is 1-periodic).
   */
  band?: readonly [number, number];
}

export interface FirResponse {
  /** Frequency in cycles per sample (ω/2π), the grid over `band`. */
  frequency: Float64Array;
  /** |H(e^{jω})| */
  magnitude: Float64Array;
  /** 20·log10|H| */
  magnitudeDb: Float64Array;
  /** arg H, unwrapped along the grid (as numpy.unwrap), in radians. */
  phase: Float64Array;
  /** H itself, interleaved (re, im). */
  response: Float64Array;
}

/**
 * Evaluates the FIR response of weights `w` (length M, or 2M interleaved when complex) at
 * `points` frequencies over `band`. Direct evaluation, cos/sin per term (O(M·points), any grid).
 */
export function firResponse(w: ArrayLike<number>, options: FirResponseOptions = {}): FirResponse {
  if (!(w instanceof Float64Array) && !(w instanceof Float32Array) && !Array.isArray(w)) {
    throw new TypeError(`w must be a Float64Array, Float32Array or number[], got ${describe(w)}`);
  }
  const cx = options.complex ?? false;
  if (cx && w.length % 2 !== 0) {
    throw new RangeError(`w must hold (re, im) pairs when complex, got length ${w.length}`);
  }
  checkFinite('w', w, cx);
  for (const key of Object.keys(options)) {
    if (key !== 'complex' && key !== 'points' && key !== 'band') {
      throw new TypeError(
        `options.${key} is not an option of firResponse; its options are complex, points ` +
          `(number of frequencies) and band ([f0, f1] in cycles per sample)`
      );
    }
  }
  const n = checkInteger('options.points', options.points ?? 1025, 1);
  const band = options.band ?? (cx ? [-0.5, 0.5] : [0, 0.5]);
  if (!Array.isArray(band) || band.length !== 2) {
    throw new TypeError(
      `options.band must be [f0, f1] in cycles per sample, got ${describe(band)}`
    );
  }
  const f0 = checkNumber('options.band[0]', band[0]);
  const f1 = checkNumber('options.band[1]', band[1]);
  if (!(f1 >= f0)) {
    throw new RangeError(`options.band must have f0 ≤ f1, got [${f0}, ${f1}]`);
  }
  const M = cx ? w.length / 2 : w.length;
  const frequency = new Float64Array(n);
  const response = new Float64Array(2 * n);
  const magnitude = new Float64Array(n);
  const magnitudeDb = new Float64Array(n);
  const phase = new Float64Array(n);
  const step = n > 1 ? (f1 - f0) / (n - 1) : 0;
  for (let k = 0; k < n; k++) {
    const f = k === n - 1 && n > 1 ? f1 : f0 + k * step;
    const om = 2 * Math.PI * f;
    frequency[k] = f;
    let hr = 0;
    let hi = 0;
    for (let m = 0; m < M; m++) {
      // h_m = conj(w_m); e^{−jωm}
      const wr = cx ? w[2 * m] : w[m];
      const wi = cx ? -w[2 * m + 1] : 0;
      const c = Math.cos(om * m);
      const s = -Math.sin(om * m);
      hr += wr * c - wi * s;
      hi += wr * s + wi * c;
    }
    response[2 * k] = hr;
    response[2 * k + 1] = hi;
    magnitude[k] = Math.hypot(hr, hi);
    magnitudeDb[k] = 20 * Math.log10(magnitude[k]);
    phase[k] = Math.atan2(hi, hr);
  }
  unwrap(phase);
  return { frequency, magnitude, magnitudeDb, phase, response };
}

/** In-place phase unwrapping as numpy.unwrap (period 2π, discontinuity π). */
export function unwrap(p: Float64Array): Float64Array {
  let off = 0;
  let prev = p.length ? p[0] : 0;
  for (let i = 1; i < p.length; i++) {
    const raw = p[i];
    const dd = raw - prev;
    prev = raw;
    let ddmod = ((((dd + Math.PI) % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI)) - Math.PI;
    if (ddmod === -Math.PI && dd > 0) {
      ddmod = Math.PI;
    }
    if (Math.abs(dd) >= Math.PI) {
      off += ddmod - dd;
    }
    p[i] = raw + off;
  }
  return p;
}
