/**
 * Metrics against numpy/scipy (scripts/fixtures/filters_ref.py `metrics`: numpy.convolve for the
 * trailing moving average, mean and std with ddof = 1, scipy.stats.norm.ppf for the band's
 * quantile) and against the textbook definitions (Haykin, Adaptive Filter Theory, 4th ed., §6.3:
 * misadjustment 𝓜 = J_ex(∞)/J_min).
 */
import * as fs from 'fs';
import {
  convergenceTime,
  ensembleAverage,
  learningCurve,
  misadjustment,
  movingAverage,
  MovingAverageFill,
  mseDb,
  normalQuantile,
  residualEnergy,
  runTrials,
  squaredError,
  steadyStateMse,
  toDb
} from '../../../src/core/metrics';
import { Rng, maxAbsDiff, readF64, runReference, writeF64 } from '../filters/helpers';

test('moving average, ensemble mean/std and normal quantiles match numpy/scipy', () => {
  const rng = new Rng(4300);
  const N = 10000;
  const curve = Float64Array.from(rng.gaussArray(N), v => v * v);
  const K = 7;
  const trials = Float64Array.from(rng.gaussArray(K * 300), v => v * v);
  const p = [1e-10, 0.001, 0.025, 0.3, 0.5, 0.8, 0.975, 0.9999];
  const dir = runReference('metrics', dd => {
    writeF64(dd, 'curve.bin', curve);
    writeF64(dd, 'trials.bin', trials);
    writeF64(dd, 'wr.bin', rng.gaussArray(9));
    writeF64(dd, 'wc.bin', rng.gaussArray(9, true));
    fs.writeFileSync(`${dd}/meta.json`, JSON.stringify({ window: 37, K, p, n: 256 }));
  });
  const ma = movingAverage(curve, 37);
  expect(maxAbsDiff(ma, readF64(dir, 'ma.bin'))).toBeLessThan(1e-12);
  // the Float64Array path (blocks, hoisted branches) gives exactly what the general path gives,
  // windows shorter and longer than a re-summation block, lengths off the block grid
  for (const w of [1, 37, 4095, 4096, 5000]) {
    for (const n of [N, 8193]) {
      const c = curve.subarray(0, n);
      expect(movingAverage(c, w)).toEqual(Float64Array.from(movingAverage(Array.from(c), w)));
    }
  }
  // made while the curve fills (a job's chunks, of sizes on and off the block grid), the same
  // values bit for bit, so also within the bound of numpy's above
  for (const w of [37, 4096, 5000]) {
    const fill = new MovingAverageFill(curve, w);
    const done: number[] = [];
    for (const filled of [0, 1000, 4095, 4096, 4097, 9000, 8192, N]) {
      done.push(fill.advance(filled));
    }
    expect(done).toEqual([0, 0, 0, 4096, 4096, 8192, 8192, N]);
    expect(fill.out).toEqual(movingAverage(curve, w));
  }
  expect(() => new MovingAverageFill([1, 2] as never, 2)).toThrow(/x must be a Float64Array/);
  expect(() => new MovingAverageFill(curve, 0)).toThrow(/window must be/);
  const e = rng.gaussArray(2 * 513, true);
  // into a given array: the same values, nothing allocated; a wrong length is refused
  const n = e.length / 2;
  const into = new Float64Array(n);
  expect(squaredError(e, true, into)).toBe(into);
  expect(into).toEqual(squaredError(e, true));
  expect(() => squaredError(e, true, new Float64Array(n - 1))).toThrow(
    `out must be a Float64Array of ${n} values (one per sample of e), got Float64Array(${n - 1})`
  );
  expect(squaredError(e, true)).toEqual(squaredError(Array.from(e), true));
  expect(squaredError(e)).toEqual(squaredError(Array.from(e)));
  const ens = ensembleAverage(trials, { K, confidence: 0.9 });
  expect(maxAbsDiff(ens.mean, readF64(dir, 'mean.bin'))).toBeLessThan(1e-13);
  expect(maxAbsDiff(ens.std, readF64(dir, 'std.bin'))).toBeLessThan(1e-12);
  const z = normalQuantile(0.95);
  for (let i = 0; i < 300; i++) {
    expect(ens.upper[i] - ens.mean[i]).toBeCloseTo((z * ens.std[i]) / Math.sqrt(K), 12);
  }
  const ppf = readF64(dir, 'ppf.bin');
  p.forEach((pp, k) =>
    expect(Math.abs(normalQuantile(pp) - ppf[k])).toBeLessThan(
      1e-12 * Math.max(1, Math.abs(ppf[k]))
    )
  );
  fs.rmSync(dir, { recursive: true, force: true });
});

test('learning curve, dB, steady state, convergence time, misadjustment, residual energy (definitions)', () => {
  // complex |e|²
  expect(Array.from(squaredError([3, 4, 1, 0], true))).toEqual([25, 1]);
  expect(Array.from(learningCurve([1, 2, 3], { window: 2 }))).toEqual([1, 2.5, 6.5]);
  expect(toDb([1, 10, 100])[2]).toBeCloseTo(20, 12);
  expect(mseDb([1, 3])).toBeCloseTo(10 * Math.log10(2), 12);
  // a curve J(n) = Jmin (1 + 9·0.99^n): steady state Jmin, within 1 dB when 9·0.99^n ≤ 10^0.1 − 1
  const N = 5000;
  const c = Float64Array.from({ length: N }, (_, n) => 0.01 * (1 + 9 * Math.pow(0.99, n)));
  expect(steadyStateMse(c, 500)).toBeCloseTo(0.01, 10);
  const nExpected = Math.ceil(Math.log((Math.pow(10, 0.1) - 1) / 9) / Math.log(0.99));
  expect(convergenceTime(c, { marginDb: 1, steadyState: 0.01 })).toBe(nExpected);
  // never converged: the last sample outside the margin
  expect(convergenceTime([1, 1, 1, 5], { marginDb: 0.5, steadyState: 1 })).toBe(-1);
  expect(misadjustment(0.011, 0.01)).toBeCloseTo(0.1, 12);
  const r = residualEnergy([1, 1], [10, 10]);
  expect(r.reductionDb).toBeCloseTo(20, 12);
  expect(r.ratio).toBeCloseTo(0.01, 14);
});

test('runTrials runs K independent filters and averages their curves', () => {
  const rng = new Rng(4301);
  const K = 20;
  const N = 400;
  const M = 4;
  const x = rng.gaussArray(K * N);
  const d = new Float64Array(K * N);
  for (let k = 0; k < K; k++) {
    for (let i = 0; i < N; i++) {
      d[k * N + i] = x[k * N + i] - 0.5 * (i > 0 ? x[k * N + i - 1] : 0) + 0.01 * rng.gauss();
    }
  }
  const res = runTrials(x, d, K, { algorithm: 'rls', taps: M, lambda: 1, delta: 1e-3 });
  expect(res.curve.K).toBe(K);
  expect(res.weights[0]).toBeCloseTo(1, 2);
  expect(res.weights[1]).toBeCloseTo(-0.5, 2);
  // the ensemble curve ends near the noise floor 1e-4
  expect(steadyStateMse(res.curve.mean, 100)).toBeLessThan(2e-4);
  expect(res.health.every(h => h.status === 'ok')).toBe(true);
});

test('metrics reject bad arguments with the argument named', () => {
  expect(() => movingAverage([1, 2], 0)).toThrow(/window must be in \[1/);
  expect(() => misadjustment(1, 0)).toThrow(/minMse must be > 0, got 0/);
  expect(() => residualEnergy([1], [1, 2])).toThrow(RangeError);
  expect(() => ensembleAverage([[1, 2], [1]])).toThrow(/curves\[1\] has length 1/);
  expect(() => steadyStateMse([1, NaN])).toThrow(/curve\[1\] is NaN/);
  expect(() => normalQuantile(1)).toThrow(/p must be in \(0, 1\)/);
});
