/** Shared helpers for the spectral tests: SciPy's JSON encoding and the error measure. */
import type { WindowSpec } from '../../../src/core/dsp';

export interface Enc {
  re: number[];
  im?: number[];
}

/** A real (Float64Array) or interleaved complex signal from {re, im}. */
export function decode(e: Enc): { data: Float64Array; complex: boolean } {
  if (!e.im) {
    return { data: Float64Array.from(e.re), complex: false };
  }
  const d = new Float64Array(2 * e.re.length);
  for (let i = 0; i < e.re.length; i++) {
    d[2 * i] = e.re[i];
    d[2 * i + 1] = e.im[i];
  }
  return { data: d, complex: true };
}

export function encode(data: Float64Array, complex: boolean): Enc {
  if (!complex) {
    return { re: Array.from(data) };
  }
  const re: number[] = [];
  const im: number[] = [];
  for (let i = 0; i < data.length; i += 2) {
    re.push(data[i]);
    im.push(data[i + 1]);
  }
  return { re, im };
}

/**
 * max_k |a_k − b_k| / max_k |b_k| (per complex element when both are interleaved complex): the
 * error relative to the spectrum's maximum, the measure the issue sets (≤ 1e-10).
 */
export function relToMax(a: ArrayLike<number>, b: ArrayLike<number>, complex = false): number {
  if (a.length !== b.length) {
    throw new Error(`length ${a.length} against ${b.length}`);
  }
  let err = 0;
  let scale = 0;
  const W = complex ? 2 : 1;
  for (let i = 0; i < a.length; i += W) {
    const d = complex ? Math.hypot(a[i] - b[i], a[i + 1] - b[i + 1]) : Math.abs(a[i] - b[i]);
    const m = complex ? Math.hypot(b[i], b[i + 1]) : Math.abs(b[i]);
    if (!(d <= err)) {
      err = d;
    }
    scale = Math.max(scale, m);
  }
  return err / scale;
}

/** Perpend options from the fixture's parameters (the same names; windows as given). */
export interface CaseParams {
  window?: WindowSpec | { name: string; alpha?: number; symmetric?: boolean };
  nperseg?: number;
  noverlap?: number;
  nfft?: number;
  detrend?: 'constant' | 'linear' | 'none';
  onesided?: boolean;
  scaling?: 'density' | 'spectrum';
  average?: 'mean' | 'median';
  fs?: number;
}
