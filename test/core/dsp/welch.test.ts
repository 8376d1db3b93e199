/**
 * Properties of the spectral estimates that hold by definition, checked on seeded signals:
 * Parseval's relation for the DFT (Σ_k |X_k|² = N Σ_j |x_j|²; Oppenheim and Schafer,
 * Discrete-Time Signal Processing, 3rd ed., ch. 8, from memory), so the density integrates to the
 * mean power of the windowed, detrended segments over the window's power; a sinusoid centred on a
 * bin shows its mean square A²/2 at that bin in 'spectrum' scaling (what SciPy's welch
 * documentation reads off its example; common practice); a linear chirp's spectrogram peak
 * follows its instantaneous frequency f0 + βt (common practice); the argument checks.
 */
import {
  coherence,
  csd,
  getWindow,
  spectrogram,
  welch,
  type Detrend,
  type WindowSpec
} from '../../../src/core/dsp';
import { Rng } from '../filters/helpers';

/** Σ_j |w_j d_j|² / Σ w_j², averaged over segments: the mean power of the windowed segments. */
function segmentPower(
  x: Float64Array,
  complex: boolean,
  nperseg: number,
  noverlap: number,
  win: Float64Array,
  detrend: Detrend
): number {
  const W = complex ? 2 : 1;
  const n = x.length / W;
  const step = nperseg - noverlap;
  const nseg = Math.floor((n - noverlap) / step);
  let sw2 = 0;
  for (const w of win) {
    sw2 += w * w;
  }
  let total = 0;
  for (let s = 0; s < nseg; s++) {
    for (let q = 0; q < W; q++) {
      const seg = Array.from({ length: nperseg }, (_, j) => x[W * (s * step + j) + q]);
      // the trend by the normal equations, written out here
      const t = seg.map((_, j) => j);
      const mean = seg.reduce((a, b) => a + b, 0) / nperseg;
      const tm = (nperseg - 1) / 2;
      const stt = t.reduce((a, j) => a + (j - tm) ** 2, 0);
      const b = seg.reduce((a, v, j) => a + (j - tm) * (v - mean), 0) / stt;
      const d = seg.map((v, j) =>
        detrend === 'linear' ? v - mean - b * (j - tm) : detrend === 'constant' ? v - mean : v
      );
      total += d.reduce((a, v, j) => a + (v * win[j]) ** 2, 0) / sw2;
    }
  }
  return total / nseg;
}

test('Parseval: the density integrates to the mean power of the windowed, detrended segments', () => {
  const rng = new Rng(5100);
  let cases = 0;
  for (const complex of [false, true]) {
    for (const detrend of ['constant', 'linear', 'none'] as Detrend[]) {
      for (const [window, nperseg, noverlap, nfft] of [
        ['hann', 128, 64, 128],
        ['blackman', 100, 30, 256],
        [{ name: 'tukey', alpha: 0.4 }, 77, 0, 128]
      ] as [WindowSpec, number, number, number][]) {
        const x = rng.gaussArray(1000, complex);
        for (let i = 0; i < x.length; i++) {
          x[i] += 0.3 + 1e-3 * i;
        }
        const fs = 250;
        const r = welch(x, { complex, window, nperseg, noverlap, nfft, detrend, fs });
        const df = fs / nfft;
        const integral = r.psd.reduce((a, p) => a + p, 0) * df;
        const expected = segmentPower(
          x,
          complex,
          nperseg,
          noverlap,
          getWindow(window, nperseg),
          detrend
        );
        expect(Math.abs(integral - expected) / expected).toBeLessThan(1e-12);
        expect(r.onesided).toBe(!complex);
        cases++;
      }
    }
  }
  expect(cases).toBe(18);
});

test("'spectrum' scaling: a bin-centred sinusoid of amplitude A peaks at its mean square A²/2", () => {
  const N = 4096;
  const A = 3;
  const k0 = 100;
  const x = Float64Array.from(
    { length: N },
    (_, i) => A * Math.cos((2 * Math.PI * k0 * i) / 256 + 0.7)
  );
  for (const window of ['hann', 'hamming', 'blackman', 'boxcar'] as const) {
    const r = welch(x, { window, nperseg: 256, scaling: 'spectrum', detrend: 'none' });
    expect(Math.abs(r.psd[k0] - (A * A) / 2)).toBeLessThan(1e-12);
    expect(r.frequency[k0]).toBeCloseTo(k0 / 256, 15);
    expect(r.unit).toBe('signal²');
  }
  // complex exponential: all its power A² at its (two-sided) bin
  const z = new Float64Array(2 * N);
  for (let i = 0; i < N; i++) {
    z[2 * i] = A * Math.cos((2 * Math.PI * -k0 * i) / 256);
    z[2 * i + 1] = A * Math.sin((2 * Math.PI * -k0 * i) / 256);
  }
  const r = welch({ data: z, complex: true }, { nperseg: 256, scaling: 'spectrum' });
  expect(r.onesided).toBe(false);
  expect(Math.abs(r.psd[256 - k0] - A * A)).toBeLessThan(1e-11);
  expect(r.frequency[256 - k0]).toBeCloseTo(-k0 / 256, 15);
});

test("'ascending' order is numpy.fft.fftshift of the 'fft' order; float32 input as its float64 copy", () => {
  const rng = new Rng(5101);
  const z = rng.gaussArray(700, true);
  const a = welch(z, { complex: true, nperseg: 64 });
  const b = welch(z, { complex: true, nperseg: 64, order: 'ascending' });
  for (let i = 0; i < 64; i++) {
    expect(b.psd[i]).toBe(a.psd[(i + 32) % 64]);
    expect(b.frequency[i]).toBe(a.frequency[(i + 32) % 64]);
    if (i > 0) {
      expect(b.frequency[i]).toBeGreaterThan(b.frequency[i - 1]);
    }
  }
  expect(b.frequency[0]).toBe(-0.5);
  const c = csd(z, z, { complex: true, nperseg: 64, order: 'ascending' });
  for (let i = 0; i < 64; i++) {
    expect(Math.abs(c.csd[2 * i] - b.psd[i])).toBeLessThan(1e-15 * Math.max(...b.psd));
  }
  const sa = spectrogram(z, { complex: true, nperseg: 64 });
  const sb = spectrogram(z, { complex: true, nperseg: 64, order: 'ascending' });
  expect([sb.rows, sb.cols]).toEqual([64, sa.cols]);
  for (let i = 0; i < 64; i++) {
    for (let s = 0; s < sa.cols; s++) {
      expect(sb.sxx[i * sb.cols + s]).toBe(sa.sxx[((i + 32) % 64) * sa.cols + s]);
    }
  }
  const x32 = Float32Array.from(rng.gaussArray(900));
  const x64 = Float64Array.from(x32);
  expect(Array.from(welch(x32, { nperseg: 100 }).psd)).toEqual(
    Array.from(welch(x64, { nperseg: 100 }).psd)
  );
});

test('coherence: 1 for y a filtered copy of x, near 0 for independent noise', () => {
  const rng = new Rng(5102);
  const n = 20000;
  const x = rng.gaussArray(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    y[i] = 0.5 * x[i] + (i > 0 ? 0.3 * x[i - 1] : 0);
  }
  const c = coherence(x, y, { nperseg: 128 });
  // y is a linear time-invariant function of x: γ² = 1 but for the one-sample memory of the
  // filter across segment edges (a bias of order delay/nperseg)
  for (const v of c.coherence) {
    expect(v).toBeGreaterThan(0.98);
    expect(v).toBeLessThanOrEqual(1 + 1e-12);
  }
  const u = rng.gaussArray(n);
  const d = coherence(x, u, { nperseg: 128 });
  // bias of the estimate for independent signals ≈ 1/(number of independent averages) (Bendat and
  // Piersol, Random Data, 4th ed., §9.2, from memory): ~1/300 here; 0.05 leaves room
  const mean = d.coherence.reduce((a, b) => a + b, 0) / d.coherence.length;
  expect(mean).toBeLessThan(0.05);
});

test("the spectrogram's peak follows a drifting tone (linear chirp)", () => {
  const fs = 8000;
  const n = 40000;
  const f0 = 500;
  const beta = 500; // Hz per second: 500 → 3000 Hz over 5 s
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    x[i] = Math.cos(2 * Math.PI * (f0 * t + 0.5 * beta * t * t));
  }
  const r = spectrogram(x, { fs, nperseg: 256, noverlap: 128, window: 'hann' });
  expect(r.rows).toBe(129);
  const df = fs / 256;
  for (let s = 0; s < r.cols; s++) {
    let best = 0;
    for (let k = 1; k < r.rows; k++) {
      if (r.sxx[k * r.cols + s] > r.sxx[best * r.cols + s]) {
        best = k;
      }
    }
    const fi = f0 + beta * r.time[s];
    expect(Math.abs(r.frequency[best] - fi)).toBeLessThanOrEqual(df);
  }
  expect(r.time[0]).toBeCloseTo(128 / fs, 15);
});

test('bad arguments throw clear errors naming the argument', () => {
  const x = new Float64Array(1000);
  expect(() => welch(x, { nfft: 1000 })).toThrow(/options.nfft must be a power of two.*got 1000/);
  expect(() => welch(x, { nperseg: 300, nfft: 256 })).toThrow(/options.nfft must be in \[300/);
  expect(() => welch(x, { nperseg: 2000 })).toThrow(
    /options.nperseg is 2000 but the signal has 1000 samples/
  );
  expect(() => welch(x, { nperseg: 100, noverlap: 100 })).toThrow(
    /options.noverlap must be in \[0, 99\]/
  );
  expect(() => welch(x, { fs: 0 })).toThrow(/options.fs must be > 0/);
  expect(() => welch(x, { fs: NaN })).toThrow(/options.fs must be a finite number/);
  expect(() => welch(x, { window: 'kaiser' as never })).toThrow(/window must be one of boxcar/);
  expect(() => welch(x, { window: new Float64Array(10), nperseg: 12 })).toThrow(
    /window has length 10 but nperseg is 12/
  );
  expect(() => welch(x, { detrend: 'quadratic' as never })).toThrow(/options.detrend must be/);
  expect(() => welch(x, { scaling: 'psd' as never })).toThrow(/options.scaling must be/);
  expect(() => welch(x, { average: 'max' as never })).toThrow(/options.average must be/);
  expect(() => welch(new Float64Array(0))).toThrow(/the signal has no samples/);
  expect(() => welch([1, 2, 3])).toThrow(/x must be a Float64Array/);
  expect(() => welch(new Float64Array(5), { complex: true })).toThrow(/\(re, im\) pairs/);
  expect(() => csd(x, new Float64Array(999))).toThrow(/x has 1000 samples but y has 999/);
  expect(() => welch(x, { window: { name: 'tukey', alpha: -1 } })).toThrow(/window.alpha/);
  expect(() => welch(x, { window: 'boxcar', scaling: 'density', nperseg: 10 })).not.toThrow();
  expect(() => welch(x, { window: new Float64Array(16), nperseg: 16 })).toThrow(
    /the window's energy Σw² is 0/
  );
});
