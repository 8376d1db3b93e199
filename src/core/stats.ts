/**
 * Summary statistics of a signal for display: count, mean, RMS, peak magnitude, min and max.
 * One pass, compensated (Kahan–Babuška–Neumaier) sums so that a long signal's mean and energy do
 * not drift (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., §4.3).
 */
import { checkFloatArray } from './errors';

export interface SignalSummary {
  /** Number of (real or complex) elements. */
  count: number;
  /** Mean of the real parts (real signals: the mean). */
  mean: number;
  /** Mean of the imaginary parts (0 for real signals). */
  meanImag: number;
  /** sqrt(Σ|x|² / count). */
  rms: number;
  /** max |x|. */
  peak: number;
  /** Smallest and largest real part. */
  min: number;
  max: number;
  /** Σ|x|². */
  energy: number;
}

/** Neumaier's variant of compensated summation, as one accumulator. */
class Sum {
  s = 0;
  c = 0;
  add(v: number): void {
    const t = this.s + v;
    this.c += Math.abs(this.s) >= Math.abs(v) ? this.s - t + v : v - t + this.s;
    this.s = t;
  }
  get value(): number {
    return this.s + this.c;
  }
}

/**
 * Summarises `data` (complex interleaved when `complex`). An empty input gives count 0 and NaN
 * statistics; non-finite values propagate (the caller has checked finiteness where it matters).
 */
export function summarize(data: Float64Array | Float32Array, complex = false): SignalSummary {
  checkFloatArray('data', data);
  const step = complex ? 2 : 1;
  if (complex && data.length % 2 !== 0) {
    throw new RangeError(
      `data holds interleaved complex values, so its length must be even, got ${data.length}`
    );
  }
  const count = data.length / step;
  if (count === 0) {
    return {
      count: 0,
      mean: NaN,
      meanImag: NaN,
      rms: NaN,
      peak: NaN,
      min: NaN,
      max: NaN,
      energy: 0
    };
  }
  const re = new Sum();
  const im = new Sum();
  const en = new Sum();
  let peak = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < data.length; i += step) {
    const a = data[i];
    const b = complex ? data[i + 1] : 0;
    re.add(a);
    im.add(b);
    en.add(a * a + b * b);
    // |x| without overflow or underflow in the square (hypot only where complex needs it).
    const m = complex ? Math.hypot(a, b) : Math.abs(a);
    if (m > peak) {
      peak = m;
    }
    if (a < min) {
      min = a;
    }
    if (a > max) {
      max = a;
    }
  }
  const energy = en.value;
  return {
    count,
    mean: re.value / count,
    meanImag: im.value / count,
    rms: Math.sqrt(energy / count),
    peak,
    min,
    max,
    energy
  };
}
