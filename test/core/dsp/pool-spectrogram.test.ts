// poolSpectrogram: adjacent columns averaged, checked against the spectrogram's own columns
// (the mean of a group's powers and of its times, by definition) and against Welch's method:
// pooling every column of a spectrogram with Welch's window and overlap gives Welch's PSD
// (P. D. Welch, IEEE Trans. Audio Electroacoust. 15(2), 1967: the average of the segments'
// periodograms; scipy.signal.welch and spectrogram share the segment loop).
import { poolSpectrogram, spectrogram, welch } from '../../../src/core';

function signal(n: number): Float64Array {
  const x = new Float64Array(n);
  let a = 12345;
  for (let i = 0; i < n; i++) {
    a = (a * 1103515245 + 12345) % 2147483648; // an LCG (common practice), fixed seed
    x[i] = Math.sin(0.3 * i) + (a / 2147483648 - 0.5);
  }
  return x;
}

test('groups of ⌈cols/max⌉ columns become their mean power at their mean time', () => {
  const s = spectrogram(signal(5000), { fs: 100, nperseg: 64 });
  expect(s.cols).toBe(Math.floor((5000 - 8) / 56)); // 89 segments, step 56
  const p = poolSpectrogram(s, 20);
  const g = Math.ceil(89 / 20); // 5
  expect(p.cols).toBe(Math.ceil(89 / g)); // 18; the last group holds 4 columns
  expect(p.rows).toBe(s.rows);
  for (const [c, i] of [
    [0, 0],
    [7, 13],
    [17, 32]
  ]) {
    const c0 = c * g;
    const c1 = Math.min(s.cols, c0 + g);
    let pw = 0;
    let t = 0;
    for (let k = c0; k < c1; k++) {
      pw += s.sxx[i * s.cols + k];
      t += s.time[k];
    }
    expect(p.sxx[i * p.cols + c]).toBeCloseTo(pw / (c1 - c0), 14);
    expect(p.time[c]).toBeCloseTo(t / (c1 - c0), 12);
  }
});

test("pooled into one column with Welch's window and overlap, it is Welch's PSD", () => {
  const x = signal(4096);
  const s = spectrogram(x, { nperseg: 256, noverlap: 128, window: 'hann' });
  const w = welch(x, { nperseg: 256 });
  const p = poolSpectrogram(s, 1);
  expect(p.cols).toBe(1);
  let worst = 0;
  for (let i = 0; i < p.rows; i++) {
    worst = Math.max(worst, Math.abs(p.sxx[i] - w.psd[i]) / Math.max(...w.psd));
  }
  expect(worst).toBeLessThan(1e-12);
});

test('a spectrogram within the bound comes back as it is; a bad bound is refused', () => {
  const s = spectrogram(signal(1000), { nperseg: 100 });
  expect(poolSpectrogram(s, 1000)).toBe(s);
  expect(() => poolSpectrogram(s, 0)).toThrow(/maxColumns/);
});
