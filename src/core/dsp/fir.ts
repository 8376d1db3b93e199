/**
 * Frequency response of an adaptive filter's weights.
 *
 * The filter computes y(n) = w(n)ᴴu(n) = Σ_k conj(w_k) x(n−k), so its impulse response is
 * h_k = conj(w_k) (for real weights, h = w) and H(e^{jω}) = Σ_k h_k e^{−jωk} (Oppenheim and
 * Schafer, Discrete-Time Signal Processing, 3rd ed., §5.1). The grid follows scipy.signal.freqz:
 * ω_k = πk/n for k = 0…n−1 on [0, π) (real weights, default), or 2πk/n on [0, 2π) when `whole`
 * (the default for complex weights, whose response is not conjugate-symmetric).
 */
import { checkFinite, checkInteger, describe } from '../errors';

export interface FirResponse {
  /** Normalised frequency in cycles per sample (ω/2π): [0, 0.5) or [0, 1). */
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
 * Evaluates the FIR response of weights `w` (length M, or 2M interleaved when complex) at `n`
 * frequencies (default 512). Direct evaluation, cos/sin per term (O(M·n), any grid size).
 */
export function firResponse(
  w: ArrayLike<number>,
  options: { complex?: boolean; n?: number; whole?: boolean } = {}
): FirResponse {
  if (!(w instanceof Float64Array) && !(w instanceof Float32Array) && !Array.isArray(w)) {
    throw new TypeError(`w must be a Float64Array, Float32Array or number[], got ${describe(w)}`);
  }
  const cx = options.complex ?? false;
  if (cx && w.length % 2 !== 0) {
    throw new RangeError(`w must hold (re, im) pairs when complex, got length ${w.length}`);
  }
  checkFinite('w', w, cx);
  const n = checkInteger('options.n', options.n ?? 512, 1);
  const whole = options.whole ?? cx;
  const M = cx ? w.length / 2 : w.length;
  const frequency = new Float64Array(n);
  const response = new Float64Array(2 * n);
  const magnitude = new Float64Array(n);
  const magnitudeDb = new Float64Array(n);
  const phase = new Float64Array(n);
  const span = whole ? 2 * Math.PI : Math.PI;
  for (let k = 0; k < n; k++) {
    const om = (span * k) / n;
    frequency[k] = om / (2 * Math.PI);
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
