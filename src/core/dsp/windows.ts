/**
 * Window functions for spectral estimation, as scipy.signal.get_window builds them (SciPy 1.17
 * reference guide, scipy.signal.windows): periodic ("DFT-even": the symmetric window of length
 * M + 1 with its last sample dropped) unless asked for symmetric — get_window's default
 * (fftbins=True) and what Welch's method uses.
 *
 * Cosine-sum windows w(n) = Σ_k a_k cos(k·φ_n), φ_n = −π + 2πn/(L − 1), n = 0 … L − 1 (L = M,
 * or M + 1 for periodic), written as SciPy's general_cosine writes them (Harris, "On the use of
 * windows for harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1), 1978):
 * hann a = (0.5, 0.5); hamming (0.54, 0.46); blackman (0.42, 0.50, 0.08); flattop (0.21557895,
 * 0.41663158, 0.277263158, 0.083578947, 0.006947368). boxcar is all ones; tukey(α) is flat with
 * cosine tapers over α/2 of its length at each end (α = 0: boxcar, α = 1: hann).
 */
import { checkInteger, checkInterval, describe } from '../errors';

export type WindowName = 'boxcar' | 'hann' | 'hamming' | 'blackman' | 'flattop' | 'tukey';

/**
 * A window: a name (periodic), `{ name, alpha?, symmetric? }` (alpha for tukey, default 0.5), or
 * the samples themselves (a Float64Array whose length is the segment length).
 */
export type WindowSpec =
  WindowName | { name: WindowName; alpha?: number; symmetric?: boolean } | Float64Array;

const COSINE: Partial<Record<WindowName, number[]>> = {
  hann: [0.5, 0.5],
  hamming: [0.54, 0.46],
  blackman: [0.42, 0.5, 0.08],
  flattop: [0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368]
};

const NAMES: WindowName[] = ['boxcar', 'hann', 'hamming', 'blackman', 'flattop', 'tukey'];

/**
 * The window `spec` of length `m` (a new Float64Array). A given array is checked (length m,
 * finite) and copied.
 */
export function getWindow(spec: WindowSpec, m: number): Float64Array {
  checkInteger('window length', m, 0);
  if (spec instanceof Float64Array) {
    if (spec.length !== m) {
      throw new RangeError(`window has length ${spec.length} but nperseg is ${m}; they must match`);
    }
    for (let i = 0; i < m; i++) {
      if (!Number.isFinite(spec[i])) {
        throw new RangeError(`window[${i}] is ${spec[i]}; window samples must be finite`);
      }
    }
    return Float64Array.from(spec);
  }
  const o = typeof spec === 'string' ? { name: spec } : spec;
  if (o === null || typeof o !== 'object' || !NAMES.includes(o.name)) {
    throw new RangeError(
      `window must be one of ${NAMES.join(', ')}, { name, alpha?, symmetric? } or a Float64Array, got ${describe(
        typeof spec === 'object' && spec !== null ? (spec as { name?: unknown }).name : spec
      )}`
    );
  }
  const symmetric = (o as { symmetric?: boolean }).symmetric ?? false;
  if (typeof symmetric !== 'boolean') {
    throw new TypeError(`window symmetric (a flag) must be a boolean, got ${describe(symmetric)}`);
  }
  const w = new Float64Array(m);
  if (m <= 1) {
    w.fill(1);
    return w;
  }
  // periodic: the symmetric window of length m + 1, truncated
  const L = symmetric ? m : m + 1;
  if (o.name === 'boxcar') {
    w.fill(1);
    return w;
  }
  if (o.name === 'tukey') {
    const alpha = checkInterval(
      'window alpha (the Tukey taper fraction)',
      (o as { alpha?: number }).alpha ?? 0.5,
      0,
      Number.MAX_VALUE
    );
    if (alpha <= 0) {
      w.fill(1);
      return w;
    }
    if (alpha < 1) {
      const width = Math.floor((alpha * (L - 1)) / 2);
      for (let n = 0; n < m; n++) {
        if (n <= width) {
          w[n] = 0.5 * (1 + Math.cos(Math.PI * (-1 + (2 * n) / alpha / (L - 1))));
        } else if (n < L - width - 1) {
          w[n] = 1;
        } else {
          w[n] = 0.5 * (1 + Math.cos(Math.PI * (-2 / alpha + 1 + (2 * n) / alpha / (L - 1))));
        }
      }
      return w;
    }
    // α ≥ 1 is the hann window
  }
  const a = COSINE[o.name === 'tukey' ? 'hann' : o.name]!;
  const step = (2 * Math.PI) / (L - 1);
  for (let n = 0; n < m; n++) {
    const phi = n === L - 1 ? Math.PI : -Math.PI + n * step;
    let s = 0;
    for (let k = 0; k < a.length; k++) {
      s += a[k] * Math.cos(k * phi);
    }
    w[n] = s;
  }
  return w;
}
