/**
 * FIR response of the weights against scipy.signal.freqz (SciPy 1.17 reference guide) on
 * h = conj(w) (y = wᴴu), and numpy.unwrap for the phase. freqz's 256-point grids, πk/256 on
 * [0, π) and 2πk/256 on [0, 2π), are the first 256 points of firResponse's grid over the band
 * [0, 0.5] (real) or [0, 1] (complex) with 257 points, both ends included.
 */
import * as fs from 'fs';
import { firResponse } from '../../../src/core/dsp';
import { Rng, maxAbsDiff, readF64, runReference, writeF64 } from '../filters/helpers';

test('firResponse matches scipy.signal.freqz and numpy.unwrap (real and complex weights)', () => {
  const rng = new Rng(4400);
  const wr = rng.gaussArray(9);
  const wc = rng.gaussArray(9, true);
  const dir = runReference('metrics', dd => {
    writeF64(dd, 'curve.bin', new Float64Array(10));
    writeF64(dd, 'trials.bin', new Float64Array(10));
    writeF64(dd, 'wr.bin', wr);
    writeF64(dd, 'wc.bin', wc);
    fs.writeFileSync(`${dd}/meta.json`, JSON.stringify({ window: 3, K: 2, p: [0.5], n: 256 }));
  });
  for (const [w, cx, tag] of [
    [wr, false, 'wr'],
    [wc, true, 'wc']
  ] as const) {
    const full = firResponse(w, { complex: cx, points: 257, band: [0, cx ? 1 : 0.5] });
    const r = {
      response: full.response.subarray(0, 512),
      phase: full.phase.subarray(0, 256),
      frequency: full.frequency,
      magnitudeDb: full.magnitudeDb
    };
    const H = readF64(dir, `${tag}.H.bin`);
    expect(maxAbsDiff(r.response, H)).toBeLessThan(1e-12);
    expect(maxAbsDiff(r.phase, readF64(dir, `${tag}.phase.bin`))).toBeLessThan(1e-11);
    expect(r.frequency[1]).toBeCloseTo(cx ? 1 / 256 : 0.5 / 256, 15);
    expect(r.magnitudeDb[3]).toBeCloseTo(20 * Math.log10(Math.hypot(H[6], H[7])), 10);
    if (cx) {
      // The default complex band [−0.5, 0.5] holds the same frequencies: f = −0.5 + k/256 is
      // freqz's point (k + 128) mod 256 (the response is 1-periodic in f).
      const c = firResponse(w, { complex: true, points: 257 });
      expect(c.frequency[0]).toBe(-0.5);
      expect(c.frequency[256]).toBe(0.5);
      for (const k of [0, 1, 100, 128, 255]) {
        const q = (k + 128) % 256;
        expect(Math.abs(c.response[2 * k] - H[2 * q])).toBeLessThan(1e-12);
        expect(Math.abs(c.response[2 * k + 1] - H[2 * q + 1])).toBeLessThan(1e-12);
      }
    }
  }
  fs.rmSync(dir, { recursive: true, force: true });
  expect(() => firResponse([1, 2, 3], { complex: true })).toThrow(/w must hold \(re, im\) pairs/);
  expect(() => firResponse([1, NaN])).toThrow(/w\[1\] is NaN/);
});

test('the default grid: 1025 points from 0 to Nyquist inclusive (real), −0.5 to 0.5 (complex)', () => {
  // A two-tap average h = (½, ½): H(f) = cos(πf)·e^{−jπf}, zero at Nyquist (Oppenheim and
  // Schafer, Discrete-Time Signal Processing, 3rd ed., §5.1, the moving-average example).
  const r = firResponse([0.5, 0.5]);
  expect(r.frequency.length).toBe(1025);
  expect(r.frequency[0]).toBe(0);
  expect(r.frequency[1024]).toBe(0.5);
  expect(r.magnitude[0]).toBeCloseTo(1, 15);
  expect(r.magnitude[512]).toBeCloseTo(Math.cos(Math.PI / 4), 15);
  expect(r.magnitude[1024]).toBeLessThan(1e-15);
  const c = firResponse([0.5, 0, 0.5, 0], { complex: true });
  expect(c.frequency[0]).toBe(-0.5);
  expect(c.frequency[1024]).toBe(0.5);
  expect(c.magnitude[512]).toBeCloseTo(1, 15); // f = 0
});

test('a band of its own: [f0, f1] with both ends, and options named in the errors', () => {
  const r = firResponse([0.5, 0.5], { band: [0.1, 0.2], points: 3 });
  expect(Array.from(r.frequency)).toEqual([0.1, 0.15000000000000002, 0.2]);
  expect(r.magnitude[2]).toBeCloseTo(Math.cos(0.2 * Math.PI), 15);
  expect(() => firResponse([1], { band: [0.3, 0.1] })).toThrow(
    /^options.band must have f0 ≤ f1, got \[0.3, 0.1\]/
  );
  expect(() => firResponse([1], { points: 0 })).toThrow(/^options.points must be in \[1, /);
  expect(() => firResponse([1], { n: 8 } as unknown as { points: number })).toThrow(
    /^options.n is not an option of firResponse; its options are complex, points/
  );
});
