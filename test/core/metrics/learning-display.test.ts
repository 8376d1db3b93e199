/**
 * The learning-curve plot's numbers (learningCurveEnsemble, ensembleDb) against NumPy/SciPy in
 * the project's venv, computed there from the definitions: |e|² per trial, the trailing moving
 * average mean(x[max(0, n−w+1) … n]) by cumulative sums, mean and standard deviation over trials
 * (numpy.mean, numpy.std with ddof = 1), the band mean ± z·s/√K with z = scipy.stats.norm.ppf
 * (0.5 + confidence/2), and 10·log10 of each (NaN where the band's lower end is ≤ 0).
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as path from 'path';
import { ensembleAverage, ensembleDb, learningCurveEnsemble } from '../../../src/core/metrics';
import { Rng } from '../filters/helpers';

const root = path.resolve(__dirname, '../../..');
const python = path.join(root, '.venv', 'bin', 'python');

const SCRIPT = `
import json, sys
import numpy as np
from scipy import stats
c = json.load(sys.stdin)
K, w, conf = c['K'], c['window'], c['confidence']
e = np.array(c['e'], dtype=float).reshape(K, -1)
if c['complex']:
    e = e[:, 0::2] + 1j * e[:, 1::2]
sq = np.abs(e) ** 2
cs = np.concatenate([np.zeros((K, 1)), np.cumsum(sq, axis=1)], axis=1)
n = np.arange(sq.shape[1])
lo = np.maximum(0, n - w + 1)
sm = (cs[:, n + 1] - cs[:, lo]) / (n + 1 - lo)
mean = sm.mean(axis=0)
std = sm.std(axis=0, ddof=1)
z = stats.norm.ppf(0.5 + conf / 2)
lower = mean - z * std / np.sqrt(K)
upper = mean + z * std / np.sqrt(K)
with np.errstate(divide='ignore', invalid='ignore'):
    lowerDb = np.where(lower > 0, 10 * np.log10(np.where(lower > 0, lower, 1)), np.nan)
json.dump({'mean': mean.tolist(), 'lower': lower.tolist(), 'upper': upper.tolist(),
           'meanDb': (10 * np.log10(mean)).tolist(),
           'lowerDb': [None if np.isnan(v) else v for v in lowerDb.tolist()],
           'upperDb': (10 * np.log10(upper)).tolist()}, sys.stdout)
`;

/**
 * Linear quantities: max |a − b| over the curve's peak (the running sums of the moving average
 * round at the scale of the early, large errors). dB: the same absolute error, carried through
 * d(10·log10 x) = 4.343·dx/x, so the bound grows where x is small; null (NaN) must match NaN.
 */
function linErr(a: ArrayLike<number>, b: number[], peak: number): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    m = Math.max(m, Math.abs(a[i] - b[i]) / peak);
  }
  return m;
}

function dbWithin(
  a: ArrayLike<number>,
  b: (number | null)[],
  lin: ArrayLike<number>,
  peak: number
) {
  for (let i = 0; i < a.length; i++) {
    const r = b[i];
    if (r === null) {
      expect(a[i]).toBeNaN();
      continue;
    }
    const bound = (4.343 * 1e-12 * peak) / Math.abs(lin[i]) + 1e-12;
    if (!(Math.abs(a[i] - r) <= bound)) {
      throw new Error(`dB value ${i}: ${a[i]} against ${r} (bound ${bound})`);
    }
  }
}

test('ensemble learning curve (smoothed |e|², mean, band, dB) matches NumPy/SciPy', () => {
  if (!fs.existsSync(python)) {
    throw new Error(
      `this check needs the project's Python at ${path.relative(root, python)}: ` +
        'create it with `python3 -m venv .venv && .venv/bin/pip install --retries 0 numpy scipy`'
    );
  }
  const rng = new Rng(6100);
  let nanSeen = 0;
  for (const [K, complex, window, confidence] of [
    [3, false, 1, 0.95],
    [7, true, 25, 0.9],
    [40, false, 10, 0.99]
  ] as [number, boolean, number, number][]) {
    const N = 600;
    // a decaying error plus noise, as a converging filter leaves it
    const e = rng.gaussArray(K * N, complex);
    const W = complex ? 2 : 1;
    for (let k = 0; k < K; k++) {
      for (let n = 0; n < N; n++) {
        for (let q = 0; q < W; q++) {
          e[(k * N + n) * W + q] *= 0.05 + 2 * Math.exp(-n / 80);
        }
      }
    }
    const r = learningCurveEnsemble(e, { K, complex, window, confidence });
    const run = spawnSync(python, ['-c', SCRIPT], {
      input: JSON.stringify({ K, complex, window, confidence, e: Array.from(e) }),
      encoding: 'utf8',
      maxBuffer: 64 * 1024 * 1024
    });
    if (run.status !== 0) {
      throw new Error(`NumPy reference failed: ${run.stderr}`);
    }
    const ref = JSON.parse(run.stdout);
    const peak = Math.max(...r.upper);
    expect(linErr(r.mean, ref.mean, peak)).toBeLessThan(1e-12);
    expect(linErr(r.lower, ref.lower, peak)).toBeLessThan(1e-12);
    expect(linErr(r.upper, ref.upper, peak)).toBeLessThan(1e-12);
    dbWithin(r.meanDb, ref.meanDb, r.mean, peak);
    dbWithin(r.lowerDb, ref.lowerDb, r.lower, peak);
    dbWithin(r.upperDb, ref.upperDb, r.upper, peak);
    nanSeen += r.lowerDb.filter(v => Number.isNaN(v)).length;
    expect(r.K).toBe(K);
    expect(r.window).toBe(window);
    // a list of K rows gives the same as K rows back to back
    const rows = Array.from({ length: K }, (_, k) => e.subarray(k * N * W, (k + 1) * N * W));
    expect(Array.from(learningCurveEnsemble(rows, { complex, window, confidence }).mean)).toEqual(
      Array.from(r.mean)
    );
  }
  // with 3 trials and no smoothing the band's lower end falls below 0 somewhere: NaN there
  expect(nanSeen).toBeGreaterThan(0);
});

test('ensembleDb of a given band, and bad arguments', () => {
  const ens = ensembleAverage([Float64Array.from([1, 10, 0]), Float64Array.from([1, 10, 0])]);
  const db = ensembleDb(ens);
  expect(Array.from(db.meanDb)).toEqual([0, 10, -Infinity]);
  expect(db.lowerDb[2]).toBeNaN();
  expect(() => learningCurveEnsemble(new Float64Array(10), { K: 3 })).toThrow(
    /errors has 10 values, not a multiple of K = 3/
  );
  expect(() => learningCurveEnsemble(new Float64Array(10))).toThrow(/options.K must be an integer/);
  expect(() => learningCurveEnsemble([new Float64Array(4), new Float64Array(5)])).toThrow(
    /errors\[1\] has length 5 but errors\[0\] has length 4/
  );
  expect(() => learningCurveEnsemble(new Float64Array(6), { K: 2, window: 0 })).toThrow(
    /options.window must be in \[1/
  );
  expect(() => learningCurveEnsemble(new Float64Array(6), { K: 1, complex: true })).not.toThrow();
  expect(() => learningCurveEnsemble(new Float64Array(3), { K: 1, complex: true })).toThrow(
    /\(re, im\) pairs/
  );
});
