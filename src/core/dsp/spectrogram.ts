/**
 * Spectrogram: the short-time power of each segment, not averaged — for interference whose
 * frequency drifts. Semantics of scipy.signal.spectrogram with mode 'psd' (SciPy 1.17 reference
 * guide): default window periodic tukey with α = 0.25, nperseg 256, noverlap ⌊nperseg/8⌋,
 * detrend 'constant', scaling 'density', one-sided for real input; the time of a column is the
 * centre of its segment, (nperseg/2 + s·step)/fs. Parameters and scaling: ./segments.ts.
 */
import {
  binOf,
  frequencies,
  makePlan,
  powerSegments,
  sideFactor,
  type SpectralInfo,
  type SpectralOptions
} from './segments';
import { checkInteger } from '../errors';
import { checkSignal } from './signal';

export interface SpectrogramOptions extends SpectralOptions {
  /** The signal is interleaved complex (when given as a bare typed array). */
  complex?: boolean;
}

export interface SpectrogramResult extends SpectralInfo {
  /** Frequency of each row, in the unit of fs. */
  frequency: Float64Array;
  /** Time of each column (segment centre), in the unit of 1/fs (seconds when fs is in Hz). */
  time: Float64Array;
  /**
   * Short-time power, rows × cols row-major (row = frequency, column = segment, as SciPy's
   * Sxx[f, t] and as a heatmap takes z), in `unit`.
   */
  sxx: Float64Array;
  rows: number;
  cols: number;
}

/** Spectrogram of a real or complex signal (typed array or `SignalView`). */
export function spectrogram(x: unknown, options: SpectrogramOptions = {}): SpectrogramResult {
  const sig = checkSignal('x', x, options?.complex ?? false);
  const plan = makePlan(sig.n, sig.complex, options, {
    window: { name: 'tukey', alpha: 0.25 },
    overlapDivisor: 8
  });
  const nseg = plan.segments;
  const K = plan.onesided ? plan.nfft / 2 + 1 : plan.nfft;
  const store = new Float64Array(K * nseg);
  powerSegments(sig, plan, null, store);
  const rows = plan.nfreq;
  // rows in FFT order (one-sided, or two-sided 'fft'): scale the stored powers in place;
  // 'ascending' reorders the rows into a new array
  const inPlace = plan.onesided || plan.order === 'fft';
  const sxx = inPlace ? store : new Float64Array(rows * nseg);
  for (let i = 0; i < rows; i++) {
    const k = binOf(plan, i);
    const f = plan.scale * sideFactor(plan, k);
    for (let s = 0; s < nseg; s++) {
      sxx[i * nseg + s] = store[k * nseg + s] * f;
    }
  }
  const time = new Float64Array(nseg);
  for (let s = 0; s < nseg; s++) {
    time[s] = (plan.nperseg / 2 + s * plan.step) / plan.fs;
  }
  const { fs, nperseg, noverlap, nfft, segments, onesided, scaling, detrend, order, unit } = plan;
  return {
    fs,
    nperseg,
    noverlap,
    nfft,
    segments,
    onesided,
    scaling,
    detrend,
    order,
    unit,
    frequency: frequencies(plan),
    time,
    sxx,
    rows,
    cols: nseg
  };
}

/**
 * A spectrogram with at most `maxColumns` columns: groups of g = ⌈cols/maxColumns⌉ adjacent
 * columns averaged into one (their mean power; a group's time is the mean of its columns'
 * times, and the last group may hold fewer columns). Averaging the power of neighbouring
 * segments is Welch's averaging over a shorter stretch (common practice for display), so a
 * 1e6-sample signal draws as a few hundred columns without dropping any segment. A result
 * with at most `maxColumns` columns is returned as it is.
 */
export function poolSpectrogram(s: SpectrogramResult, maxColumns: number): SpectrogramResult {
  const max = checkInteger('maxColumns', maxColumns, 1);
  const { rows, cols } = s;
  if (cols <= max) {
    return s;
  }
  const g = Math.ceil(cols / max);
  const out = Math.ceil(cols / g);
  const sxx = new Float64Array(rows * out);
  const time = new Float64Array(out);
  for (let c = 0; c < out; c++) {
    const c0 = c * g;
    const c1 = Math.min(cols, c0 + g);
    let t = 0;
    for (let k = c0; k < c1; k++) {
      t += s.time[k];
    }
    time[c] = t / (c1 - c0);
  }
  for (let i = 0; i < rows; i++) {
    const row = i * cols;
    for (let c = 0; c < out; c++) {
      const c0 = c * g;
      const c1 = Math.min(cols, c0 + g);
      let p = 0;
      for (let k = c0; k < c1; k++) {
        p += s.sxx[row + k];
      }
      sxx[i * out + c] = p / (c1 - c0);
    }
  }
  return { ...s, sxx, time, cols: out };
}
