/**
 * Welch's power spectral density, the cross power spectral density and the magnitude-squared
 * coherence, with scipy.signal.welch / csd / coherence semantics (SciPy 1.17 reference guide;
 * P. D. Welch, "The use of the fast Fourier transform for the estimation of power spectra",
 * IEEE Trans. Audio Electroacoust. 15(2), 1967; Bendat and Piersol, Random Data, 4th ed., §9.2
 * for the coherence γ²_xy = |G_xy|²/(G_xx G_yy), from memory). Parameters, segments, scaling and
 * the FFT are described in ./segments.ts.
 *
 * Averaging: 'mean' of the segments' periodograms (default), or 'median' divided by the median's
 * bias (scipy.signal.welch's `average='median'`; for the cross-spectrum the medians of the real
 * and imaginary parts, as SciPy takes them).
 */
import { describe } from '../errors';
import {
  SegmentFFT,
  binOf,
  frequencies,
  makePlan,
  medianBias,
  binsNeeded,
  medianInPlace,
  powerSegments,
  sideFactor,
  type Plan,
  type SpectralInfo,
  type SpectralOptions
} from './segments';
import { checkSignal, type CheckedSignal } from './signal';

export interface WelchOptions extends SpectralOptions {
  /** 'mean' (default) or 'median' of the segments' periodograms. */
  average?: 'mean' | 'median';
  /** The signal is interleaved complex (when given as a bare typed array). */
  complex?: boolean;
}

export interface PsdResult extends SpectralInfo {
  /** Frequency of each bin, in the unit of fs (Hz when fs is in Hz). */
  frequency: Float64Array;
  /** The estimate at each frequency, in `unit`. */
  psd: Float64Array;
  average: 'mean' | 'median';
}

export interface CsdResult extends SpectralInfo {
  frequency: Float64Array;
  /** P_xy = E[conj(X)·Y] scaled as the PSD, interleaved (re, im). */
  csd: Float64Array;
  average: 'mean' | 'median';
}

export interface CoherenceResult extends SpectralInfo {
  frequency: Float64Array;
  /** |P_xy|²/(P_xx·P_yy) in [0, 1] (dimensionless); NaN where P_xx or P_yy is 0. */
  coherence: Float64Array;
}

function checkAverage(a: unknown): 'mean' | 'median' {
  const v = a ?? 'mean';
  if (v !== 'mean' && v !== 'median') {
    throw new RangeError(`options.average must be 'mean' or 'median', got ${describe(v)}`);
  }
  return v;
}

function info(plan: Plan): SpectralInfo {
  const { fs, nperseg, noverlap, nfft, segments, onesided, scaling, detrend, order, unit } = plan;
  return { fs, nperseg, noverlap, nfft, segments, onesided, scaling, detrend, order, unit };
}

/**
 * Power spectral density by Welch's method (scipy.signal.welch). `x` is a Float64Array or
 * Float32Array (complex interleaved with `options.complex`) or a `SignalView` (strided).
 */
export function welch(x: unknown, options: WelchOptions = {}): PsdResult {
  const sig = checkSignal('x', x, options?.complex ?? false);
  const plan = makePlan(sig.n, sig.complex, options, { window: 'hann', overlapDivisor: 2 });
  const average = checkAverage(options.average);
  const K = binsNeeded(plan);
  const nseg = plan.segments;
  const psd = new Float64Array(plan.nfreq);
  if (average === 'mean' || nseg === 1) {
    const acc = new Float64Array(K);
    powerSegments(sig, plan, acc, null);
    for (let i = 0; i < plan.nfreq; i++) {
      const k = binOf(plan, i);
      psd[i] = (acc[k] * plan.scale * sideFactor(plan, k)) / nseg;
    }
  } else {
    const store = new Float64Array(K * nseg);
    powerSegments(sig, plan, null, store);
    const bias = medianBias(nseg);
    for (let i = 0; i < plan.nfreq; i++) {
      const k = binOf(plan, i);
      const med = medianInPlace(store.subarray(k * nseg, (k + 1) * nseg), nseg);
      psd[i] = (med * plan.scale * sideFactor(plan, k)) / bias;
    }
  }
  return { ...info(plan), average, frequency: frequencies(plan), psd };
}

/** Checks x and y and makes their common plan (complex when either is). */
function pairPlan(
  x: unknown,
  y: unknown,
  options: WelchOptions
): { sx: CheckedSignal; sy: CheckedSignal; plan: Plan } {
  const sx = checkSignal('x', x, options?.complex ?? false);
  const sy = checkSignal('y', y, options?.complex ?? false);
  if (sx.n !== sy.n) {
    throw new RangeError(`x has ${sx.n} samples but y has ${sy.n}; they must match`);
  }
  const plan = makePlan(sx.n, sx.complex || sy.complex, options, {
    window: 'hann',
    overlapDivisor: 2
  });
  return { sx, sy, plan };
}

/** Loads segment s of a real or complex signal as one complex FFT input. */
function loadAny(eng: SegmentFFT, sig: CheckedSignal, s: number): void {
  if (sig.complex) {
    eng.loadComplex(sig, s);
  } else {
    eng.load(sig, s, 0);
    eng.clearLane(1);
  }
}

/**
 * The cross-spectrum loop: for each segment, X and Y, then conj(X)·Y into (pr, pi) — summed, or
 * stored per segment for the median — and |X|², |Y|² summed into pxx, pyy when given.
 */
function crossSegments(
  sx: CheckedSignal,
  sy: CheckedSignal,
  plan: Plan,
  pr: Float64Array,
  pi: Float64Array,
  pxx: Float64Array | null,
  pyy: Float64Array | null,
  stored: boolean
): void {
  const eng = new SegmentFFT(plan);
  const { nfft, segments: nseg } = plan;
  const K = binsNeeded(plan);
  const Z = eng.Z;
  const mask = nfft - 1;
  const both = !sx.complex && !sy.complex;
  const X = both ? null : new Float64Array(2 * nfft);
  // where bin k of segment s goes: k·nseg + s when stored per segment, k when summed
  const mult = stored ? nseg : 1;
  for (let s = 0; s < nseg; s++) {
    const base = stored ? s : 0;
    if (both) {
      // z = x_s + j·y_s: X_k = (Z_k + conj Z_{N−k})/2, Y_k = (Z_k − conj Z_{N−k})/(2j)
      eng.load(sx, s, 0);
      eng.load(sy, s, 1);
      eng.transform();
      for (let k = 0; k < K; k++) {
        const m = (nfft - k) & mask;
        const zr = Z[2 * k];
        const zi = Z[2 * k + 1];
        const wr = Z[2 * m];
        const wi = Z[2 * m + 1];
        const ar = 0.5 * (zr + wr);
        const ai = 0.5 * (zi - wi);
        const br = 0.5 * (zi + wi);
        const bi = 0.5 * (wr - zr);
        const t = k * mult + base;
        pr[t] += ar * br + ai * bi;
        pi[t] += ar * bi - ai * br;
        if (pxx !== null) {
          pxx[k] += ar * ar + ai * ai;
          pyy![k] += br * br + bi * bi;
        }
      }
      continue;
    }
    loadAny(eng, sx, s);
    eng.transform();
    X!.set(Z);
    loadAny(eng, sy, s);
    eng.transform();
    for (let k = 0; k < K; k++) {
      const ar = X![2 * k];
      const ai = X![2 * k + 1];
      const br = Z[2 * k];
      const bi = Z[2 * k + 1];
      const t = k * mult + base;
      pr[t] += ar * br + ai * bi;
      pi[t] += ar * bi - ai * br;
      if (pxx !== null) {
        pxx[k] += ar * ar + ai * ai;
        pyy![k] += br * br + bi * bi;
      }
    }
  }
}

/**
 * Cross power spectral density P_xy (scipy.signal.csd: conj(X)·Y averaged over segments, scaled
 * and one-sided as the PSD). x and y: as for `welch`, the same number of samples.
 */
export function csd(x: unknown, y: unknown, options: WelchOptions = {}): CsdResult {
  const { sx, sy, plan } = pairPlan(x, y, options);
  const average = checkAverage(options.average);
  const K = binsNeeded(plan);
  const nseg = plan.segments;
  const median = average === 'median' && nseg > 1;
  const pr = new Float64Array(median ? K * nseg : K);
  const pi = new Float64Array(median ? K * nseg : K);
  crossSegments(sx, sy, plan, pr, pi, null, null, median);
  const out = new Float64Array(2 * plan.nfreq);
  const bias = median ? medianBias(nseg) : nseg;
  for (let i = 0; i < plan.nfreq; i++) {
    const k = binOf(plan, i);
    const f = (plan.scale * sideFactor(plan, k)) / bias;
    if (median) {
      out[2 * i] = medianInPlace(pr.subarray(k * nseg, (k + 1) * nseg), nseg) * f;
      out[2 * i + 1] = medianInPlace(pi.subarray(k * nseg, (k + 1) * nseg), nseg) * f;
    } else {
      out[2 * i] = pr[k] * f;
      out[2 * i + 1] = pi[k] * f;
    }
  }
  return { ...info(plan), average, frequency: frequencies(plan), csd: out };
}

/**
 * Magnitude-squared coherence |P_xy|²/(P_xx·P_yy) (scipy.signal.coherence: mean-averaged Welch
 * estimates with the same parameters). Real x and y share one FFT per segment.
 */
export function coherence(
  x: unknown,
  y: unknown,
  options: Omit<WelchOptions, 'average' | 'scaling'> = {}
): CoherenceResult {
  const { sx, sy, plan } = pairPlan(x, y, { ...options, scaling: 'density' });
  const K = binsNeeded(plan);
  const pr = new Float64Array(K);
  const pi = new Float64Array(K);
  const pxx = new Float64Array(K);
  const pyy = new Float64Array(K);
  crossSegments(sx, sy, plan, pr, pi, pxx, pyy, false);
  const c = new Float64Array(plan.nfreq);
  for (let i = 0; i < plan.nfreq; i++) {
    const k = binOf(plan, i);
    // the scale, the one-sided factor and 1/nseg cancel in the ratio
    c[i] = (pr[k] * pr[k] + pi[k] * pi[k]) / pxx[k] / pyy[k];
  }
  return { ...info(plan), frequency: frequencies(plan), coherence: c };
}
