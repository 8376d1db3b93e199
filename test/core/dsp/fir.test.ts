/**
 * FIR response of the weights against scipy.signal.freqz (SciPy 1.17 reference guide) on
 * h = conj(w) (y = wᴴu), real on [0, π) and complex on [0, 2π), and numpy.unwrap for the phase.
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
    const r = firResponse(w, { complex: cx, n: 256 });
    const H = readF64(dir, `${tag}.H.bin`);
    expect(maxAbsDiff(r.response, H)).toBeLessThan(1e-12);
    expect(maxAbsDiff(r.phase, readF64(dir, `${tag}.phase.bin`))).toBeLessThan(1e-11);
    expect(r.frequency[1]).toBeCloseTo(cx ? 1 / 256 : 0.5 / 256, 15);
    expect(r.magnitudeDb[3]).toBeCloseTo(20 * Math.log10(Math.hypot(H[6], H[7])), 10);
  }
  fs.rmSync(dir, { recursive: true, force: true });
  expect(() => firResponse([1, 2, 3], { complex: true })).toThrow(/w must hold \(re, im\) pairs/);
  expect(() => firResponse([1, NaN])).toThrow(/w\[1\] is NaN/);
});
