/**
 * What Welch's method, the cross-spectrum, coherence and the spectrogram share: the parameters
 * (checked once), and the segment loop's pieces — detrend, window, zero-pad, FFT.
 *
 * Segments follow scipy.signal (SciPy 1.17 reference guide, welch/csd/spectrogram): segment s
 * covers samples [s·step, s·step + nperseg), step = nperseg − noverlap, and there are
 * ⌊(n − noverlap)/step⌋ of them (samples after the last full segment are not used). Each segment
 * is detrended (its mean, or its least-squares line, removed), multiplied by the window, zero-padded
 * to nfft and transformed. The FFT is fft.js 4 (radix-4; power-of-two sizes only), so nfft must be
 * a power of two: by default the smallest one ≥ nperseg (SciPy's default nfft = nperseg is the same
 * whenever nperseg is a power of two).
 *
 * Scaling (P. D. Welch, IEEE Trans. Audio Electroacoust. 15(2), 1967; SciPy's `scaling`):
 * 'density' divides |X_k|² by fs·Σw² (a power spectral density, signal unit²/Hz), 'spectrum' by
 * (Σw)² (a power spectrum, signal unit², whose peak at a sinusoid's bin is its mean square).
 * One-sided results (real input) double every bin but 0 and nfft/2.
 *
 * Two real segments a and b go through one complex FFT of z = a + jb: with Z its transform,
 * A_k = (Z_k + conj Z_{N−k})/2 and B_k = (Z_k − conj Z_{N−k})/(2j) (Oppenheim and Schafer,
 * Discrete-Time Signal Processing, 3rd ed., §8.6.4 / problem 8.64, from memory), so
 * |A_k|² + |B_k|² = (|Z_k|² + |Z_{N−k}|²)/2.
 */
import FFT from 'fft.js';
import { checkInteger, checkNumber, describe } from '../errors';
import { getWindow, type WindowSpec } from './windows';
import type { CheckedSignal } from './signal';

export type Detrend = 'constant' | 'linear' | 'none' | false;

export interface SpectralOptions {
  /** Sampling frequency (default 1: frequencies in cycles per sample). */
  fs?: number;
  /** Window (default: periodic hann; spectrogram: periodic tukey with α = 0.25, as SciPy). */
  window?: WindowSpec;
  /** Segment length (default 256, or the signal length when shorter; a given window's length). */
  nperseg?: number;
  /** Overlap of neighbouring segments in samples (default ⌊nperseg/2⌋; spectrogram ⌊nperseg/8⌋). */
  noverlap?: number;
  /** FFT length, a power of two ≥ nperseg (default the smallest such). */
  nfft?: number;
  /** Removed from each segment before windowing (default 'constant'). */
  detrend?: Detrend;
  /** One-sided spectrum for real input (default true); complex input is always two-sided. */
  onesided?: boolean;
  /** 'density' (unit²/Hz, default) or 'spectrum' (unit²). */
  scaling?: 'density' | 'spectrum';
  /**
   * Order of a two-sided result: 'fft' (SciPy's: 0, positive, then negative frequencies; the
   * default) or 'ascending' (−fs/2 … fs/2 − fs/nfft, numpy.fft.fftshift of the former).
   */
  order?: 'fft' | 'ascending';
}

/** The parameters a result was computed with. */
export interface SpectralInfo {
  fs: number;
  nperseg: number;
  noverlap: number;
  nfft: number;
  /** Number of segments averaged (or columns of a spectrogram). */
  segments: number;
  onesided: boolean;
  scaling: 'density' | 'spectrum';
  detrend: 'constant' | 'linear' | 'none';
  order: 'fft' | 'ascending';
  /** Unit of the values: 'signal²/Hz' (density) or 'signal²' (spectrum); signal = the input's unit. */
  unit: 'signal²/Hz' | 'signal²';
}

export interface Plan extends SpectralInfo {
  step: number;
  /** Number of frequency bins in the result. */
  nfreq: number;
  window: Float64Array;
  /** Factor applied to |X_k|² (before one-sided doubling). */
  scale: number;
}

export function isPowerOfTwo(n: number): boolean {
  return n >= 1 && (n & (n - 1)) === 0;
}

function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) {
    p *= 2;
  }
  return p;
}

/** Checks the options against a signal of n samples and fixes every parameter. */
export function makePlan(
  n: number,
  complex: boolean,
  options: SpectralOptions,
  defaults: { window: WindowSpec; overlapDivisor: number }
): Plan {
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`options must be an object, got ${describe(options)}`);
  }
  if (n < 1) {
    throw new RangeError('the signal has no samples');
  }
  const fs = checkNumber('options.fs', options.fs ?? 1);
  if (!(fs > 0)) {
    throw new RangeError(`options.fs must be > 0, got ${describe(fs)}`);
  }
  const spec = options.window ?? defaults.window;
  let nperseg: number;
  if (spec instanceof Float64Array) {
    nperseg = checkInteger('options.nperseg', options.nperseg ?? spec.length, 1);
  } else {
    nperseg = checkInteger('options.nperseg', options.nperseg ?? Math.min(256, n), 1);
  }
  if (nperseg > n) {
    throw new RangeError(
      `options.nperseg is ${nperseg} but the signal has ${n} samples; it must not exceed them`
    );
  }
  const window = getWindow(spec, nperseg);
  const noverlap = checkInteger(
    'options.noverlap',
    options.noverlap ?? Math.floor(nperseg / defaults.overlapDivisor),
    0,
    nperseg - 1
  );
  const nfft = checkInteger(
    'options.nfft',
    options.nfft ?? nextPowerOfTwo(nperseg),
    Math.max(2, nperseg)
  );
  if (!isPowerOfTwo(nfft)) {
    throw new RangeError(
      `options.nfft must be a power of two (the FFT, fft.js 4, takes no other size), got ${nfft}; ` +
        `${nextPowerOfTwo(nfft)} would zero-pad each segment further`
    );
  }
  const dt = options.detrend ?? 'constant';
  if (dt !== 'constant' && dt !== 'linear' && dt !== 'none' && dt !== false) {
    throw new RangeError(
      `options.detrend must be 'constant', 'linear', 'none' or false, got ${describe(dt)}`
    );
  }
  const scaling = options.scaling ?? 'density';
  if (scaling !== 'density' && scaling !== 'spectrum') {
    throw new RangeError(
      `options.scaling must be 'density' or 'spectrum', got ${describe(scaling)}`
    );
  }
  const one = options.onesided ?? true;
  if (typeof one !== 'boolean') {
    throw new TypeError(`options.onesided must be a boolean, got ${describe(one)}`);
  }
  const order = options.order ?? 'fft';
  if (order !== 'fft' && order !== 'ascending') {
    throw new RangeError(`options.order must be 'fft' or 'ascending', got ${describe(order)}`);
  }
  const onesided = one && !complex;
  const step = nperseg - noverlap;
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < nperseg; i++) {
    s1 += window[i];
    s2 += window[i] * window[i];
  }
  const scale = scaling === 'density' ? 1 / (fs * s2) : 1 / (s1 * s1);
  if (!Number.isFinite(scale)) {
    throw new RangeError(
      `the window's ${scaling === 'density' ? 'energy Σw²' : 'sum Σw'} is ${scaling === 'density' ? s2 : s1}; ` +
        `it cannot scale a ${scaling}`
    );
  }
  return {
    fs,
    nperseg,
    noverlap,
    nfft,
    step,
    segments: Math.floor((n - noverlap) / step),
    onesided,
    scaling,
    detrend: dt === false ? 'none' : dt,
    order,
    unit: scaling === 'density' ? 'signal²/Hz' : 'signal²',
    nfreq: onesided ? nfft / 2 + 1 : nfft,
    window,
    scale
  };
}

/** Frequencies of the result's bins: rfftfreq, fftfreq, or fftfreq in ascending order. */
export function frequencies(plan: Plan): Float64Array {
  const { nfft, fs, nfreq } = plan;
  const f = new Float64Array(nfreq);
  const df = fs / nfft;
  for (let i = 0; i < nfreq; i++) {
    const k = binOf(plan, i);
    f[i] = (k < nfft / 2 || plan.onesided ? k : k - nfft) * df;
  }
  return f;
}

/** FFT bin shown at position i of the result (the order of a two-sided 'ascending' result). */
export function binOf(plan: Plan, i: number): number {
  if (plan.onesided || plan.order === 'fft') {
    return i;
  }
  const h = plan.nfft / 2;
  return i < h ? i + h : i - h;
}

/** One-sided doubling factor of bin k (1 at 0 and nfft/2, 2 elsewhere; 1 when two-sided). */
export function sideFactor(plan: Plan, k: number): number {
  return plan.onesided && k !== 0 && k !== plan.nfft / 2 ? 2 : 1;
}

/**
 * Writes one detrended, windowed segment of real samples v_j = data[p + j·ps] (j < L) to
 * dst[d0 + j·ds]. Allocates nothing.
 */
export function fillSegment(
  data: Float64Array | Float32Array,
  p: number,
  ps: number,
  L: number,
  win: Float64Array,
  detrend: 'constant' | 'linear' | 'none',
  dst: Float64Array,
  d0: number,
  ds: number
): void {
  if (detrend === 'none') {
    for (let j = 0, q = p, d = d0; j < L; j++, q += ps, d += ds) {
      dst[d] = data[q] * win[j];
    }
    return;
  }
  let sx = 0;
  let stx = 0;
  for (let j = 0, q = p; j < L; j++, q += ps) {
    const v = data[q];
    sx += v;
    stx += j * v;
  }
  const mean = sx / L;
  if (detrend === 'constant') {
    for (let j = 0, q = p, d = d0; j < L; j++, q += ps, d += ds) {
      dst[d] = (data[q] - mean) * win[j];
    }
    return;
  }
  // least-squares line a + b·j: b = Σ(j − t̄)v_j / Σ(j − t̄)², residual v_j − mean − b(j − t̄)
  const tbar = (L - 1) / 2;
  const stt = (L * (L * L - 1)) / 12;
  const b = stt > 0 ? (stx - tbar * sx) / stt : 0;
  for (let j = 0, q = p, d = d0; j < L; j++, q += ps, d += ds) {
    dst[d] = (data[q] - mean - b * (j - tbar)) * win[j];
  }
}

// fft.js objects (twiddle and bit-reversal tables) by size, kept between calls: building one
// costs a pass of cos/sin, and V8 drops optimised code that refers to objects that die, so a
// fresh FFT per call would leave every call's first segments running unoptimised.
const FFT_CACHE = new Map<number, FFT>();
const FFT_CACHE_SIZES = 8;

/** The fft.js transform of size n (a power of two ≥ 2), from the cache. */
export function fftOf(n: number): FFT {
  let f = FFT_CACHE.get(n);
  if (f === undefined) {
    f = new FFT(n);
    if (FFT_CACHE.size >= FFT_CACHE_SIZES) {
      FFT_CACHE.delete(FFT_CACHE.keys().next().value as number);
    }
    FFT_CACHE.set(n, f);
  }
  return f;
}

/** The FFT and its work buffers for one plan (allocated once, reused for every segment). */
export class SegmentFFT {
  readonly fft: FFT;
  /** Complex input, interleaved, 2·nfft (zero past nperseg unless written). */
  readonly z: Float64Array;
  /** Complex output, interleaved, 2·nfft. */
  readonly Z: Float64Array;
  constructor(readonly plan: Plan) {
    this.fft = fftOf(plan.nfft);
    this.z = new Float64Array(2 * plan.nfft);
    this.Z = new Float64Array(2 * plan.nfft);
  }

  /**
   * Loads segment s of a signal into the real (part 0) or imaginary (part 1) lane of z; a real
   * signal's samples, or one component (comp 0 re, 1 im) of a complex signal's.
   */
  load(sig: CheckedSignal, s: number, part: 0 | 1, comp: 0 | 1 = 0): void {
    const { nperseg, step, window, detrend } = this.plan;
    const W = sig.complex ? 2 : 1;
    const p = W * (sig.offset + s * step * sig.stride) + comp;
    fillSegment(sig.data, p, W * sig.stride, nperseg, window, detrend, this.z, part, 2);
  }

  /** Loads a complex signal's segment s into both lanes of z. */
  loadComplex(sig: CheckedSignal, s: number): void {
    this.load(sig, s, 0, 0);
    this.load(sig, s, 1, 1);
  }

  /** Zeroes one lane of z over the segment (the rest stays zero). */
  clearLane(part: 0 | 1): void {
    const z = this.z;
    for (let j = 0, d = part; j < this.plan.nperseg; j++, d += 2) {
      z[d] = 0;
    }
  }

  transform(): void {
    this.fft.transform(this.Z, this.z);
  }
}

/**
 * Median bias of n periodograms relative to their mean (Allen et al., "FINDCHIRP", Phys. Rev. D
 * 85, 2012, appendix B, as scipy.signal.welch divides by it): 1 + Σ_{i=1}^{⌊(n−1)/2⌋}
 * (1/(2i+1) − 1/(2i)).
 */
export function medianBias(n: number): number {
  let s = 1;
  for (let i = 1; i <= Math.floor((n - 1) / 2); i++) {
    s += 1 / (2 * i + 1) - 1 / (2 * i);
  }
  return s;
}

/** Median of v[0 … n) as numpy.median (mean of the two middle values when n is even); sorts v. */
export function medianInPlace(v: Float64Array, n: number): number {
  const a = v.subarray(0, n).sort();
  const h = n >> 1;
  return n % 2 === 1 ? a[h] : (a[h - 1] + a[h]) / 2;
}

/** Number of FFT bins the accumulation needs (0 … nfft/2 one-sided, all two-sided). */
export function binsNeeded(plan: Plan): number {
  return plan.onesided ? plan.nfft / 2 + 1 : plan.nfft;
}

/**
 * Per-bin power of one segment (or the sum of two) in the FFT's output: accumulates into `acc`
 * (mean) and/or writes each segment's power to `store[k·nseg + s]` (median, spectrogram).
 */
function accumulateReal(
  Z: Float64Array,
  nfft: number,
  K: number,
  acc: Float64Array | null,
  store: Float64Array | null,
  nseg: number,
  s: number,
  second: boolean
): void {
  const mask = nfft - 1;
  if (store === null) {
    for (let k = 0; k < K; k++) {
      const m = (nfft - k) & mask;
      const zr = Z[2 * k];
      const zi = Z[2 * k + 1];
      const wr = Z[2 * m];
      const wi = Z[2 * m + 1];
      acc![k] += 0.5 * (zr * zr + zi * zi + wr * wr + wi * wi);
    }
    return;
  }
  for (let k = 0; k < K; k++) {
    const m = (nfft - k) & mask;
    const zr = Z[2 * k];
    const zi = Z[2 * k + 1];
    const wr = Z[2 * m];
    const wi = Z[2 * m + 1];
    const ar = zr + wr;
    const ai = zi - wi;
    store[k * nseg + s] = 0.25 * (ar * ar + ai * ai);
    if (second) {
      const br = zi + wi;
      const bi = wr - zr;
      store[k * nseg + s + 1] = 0.25 * (br * br + bi * bi);
    }
  }
}

/**
 * Runs the segment loop of a (auto) power spectrum: real signals two segments per FFT, complex
 * one. With `store` (nseg·K) each segment's power is kept per bin; otherwise summed into `acc`.
 */
export function powerSegments(
  sig: CheckedSignal,
  plan: Plan,
  acc: Float64Array | null,
  store: Float64Array | null
): void {
  const eng = new SegmentFFT(plan);
  const { nfft, segments: nseg } = plan;
  const K = binsNeeded(plan);
  const Z = eng.Z;
  if (!sig.complex) {
    for (let s = 0; s < nseg; s += 2) {
      eng.load(sig, s, 0);
      const second = s + 1 < nseg;
      if (second) {
        eng.load(sig, s + 1, 1);
      } else {
        eng.clearLane(1);
      }
      eng.transform();
      accumulateReal(Z, nfft, K, acc, store, nseg, s, second);
    }
    return;
  }
  for (let s = 0; s < nseg; s++) {
    eng.loadComplex(sig, s);
    eng.transform();
    if (store === null) {
      for (let k = 0; k < K; k++) {
        acc![k] += Z[2 * k] * Z[2 * k] + Z[2 * k + 1] * Z[2 * k + 1];
      }
    } else {
      for (let k = 0; k < K; k++) {
        store[k * nseg + s] = Z[2 * k] * Z[2 * k] + Z[2 * k + 1] * Z[2 * k + 1];
      }
    }
  }
}
