/**
 * Signal inputs of the filters and metrics as a newcomer passes them (issue 9, point 4): the
 * documented layouts of runTrials' K rows all give the same run, a layout that is none of them
 * is an error naming the argument and what is wrong (never a NaN that is not in the data),
 * and a list of rows where one signal is expected is refused with the reason.
 */
import {
  Dense,
  createFilter,
  ensembleAverage,
  learningCurve,
  misadjustment,
  runFilter,
  runTrials,
  squaredError
} from '../../../src/core';
import { Rng } from '../filters/helpers';

// System identification of w = (1, −0.5) in white noise; RLS with λ = 1 is the exact
// least-squares solution after M samples (Haykin, Adaptive Filter Theory, 4th ed., §9.1).
const K = 3;
const N = 300;
const rng = new Rng(9401);
const X = rng.gaussArray(K * N);
const D = new Float64Array(K * N);
for (let k = 0; k < K; k++) {
  for (let i = 0; i < N; i++) {
    const j = k * N + i;
    D[j] = X[j] - 0.5 * (i > 0 ? X[j - 1] : 0) + 0.01 * rng.gauss();
  }
}
const rowsOf = (a: Float64Array) =>
  Array.from({ length: K }, (_, k) => a.slice(k * N, (k + 1) * N));
const OPTS = { algorithm: 'rls', taps: 2, lambda: 1, delta: 1e-3 } as const;

describe('runTrials accepts the documented layouts of K rows, with the same result', () => {
  const flat = runTrials(X, D, K, OPTS);
  test('flat K·N (the reference layout) identifies w = (1, −0.5)', () => {
    expect(flat.weights[0]).toBeCloseTo(1, 2);
    expect(flat.weights[1]).toBeCloseTo(-0.5, 2);
    expect(flat.curve.mean.every(Number.isFinite)).toBe(true);
  });
  test.each([
    ['a list of Float64Array rows', () => runTrials(rowsOf(X), rowsOf(D), K, OPTS)],
    [
      'a list of number[] rows',
      () =>
        runTrials(
          rowsOf(X).map(r => Array.from(r)),
          rowsOf(D).map(r => Array.from(r)),
          K,
          OPTS
        )
    ],
    [
      'a K×N Dense',
      () => runTrials(Dense.fromBuffer(X, [K, N]), Dense.fromBuffer(D, [K, N]), K, OPTS)
    ],
    [
      'a K×N view of an N×K Fortran buffer (x.T)',
      () =>
        runTrials(
          Dense.fromBuffer(X, [N, K], { order: 'F' }).T,
          Dense.fromBuffer(D, [N, K], { order: 'F' }).T,
          K,
          OPTS
        )
    ]
  ])('%s', (_, run) => {
    const r = run();
    expect(Array.from(r.curve.mean)).toEqual(Array.from(flat.curve.mean));
    expect(Array.from(r.weights)).toEqual(Array.from(flat.weights));
  });
});

describe('runTrials names what is wrong with a layout', () => {
  test('a list with the wrong number of rows', () => {
    expect(() => runTrials(rowsOf(X).slice(0, 2), rowsOf(D), K, OPTS)).toThrow(
      /^x is a list of 2 rows but K = 3: give one row per trial/
    );
  });
  test('ragged rows', () => {
    const xs = rowsOf(X);
    xs[2] = xs[2].subarray(0, N - 1);
    expect(() => runTrials(xs, rowsOf(D), K, OPTS)).toThrow(
      /^x\[2\] has 299 values but each row must have 300/
    );
  });
  test('a non-number inside a row', () => {
    const ds: unknown[][] = rowsOf(D).map(r => Array.from(r));
    ds[1][5] = 'a';
    expect(() => runTrials(rowsOf(X), ds, K, OPTS)).toThrow(
      /^d\[1\]\[5\] must be a number, got "a"/
    );
  });
  test('a Dense whose first axis is not K (samples down the columns)', () => {
    expect(() =>
      runTrials(Dense.fromBuffer(X, [N, K]), Dense.fromBuffer(D, [N, K]), K, OPTS)
    ).toThrow(/^x is a 300×3 Dense array but K = 3: trials run along the first axis .* pass x\.T/);
  });
});

describe('one signal where one is expected', () => {
  test('runFilter refuses a list of rows for a transversal filter, saying why', () => {
    expect(() => runFilter(rowsOf(X), D.subarray(0, K), OPTS)).toThrow(
      /^x must be one flat signal .* got an Array\(3\) whose first entry is Float64Array\(300\); rows are taken only as regressor rows/
    );
  });
  test('regressor input takes N rows of M values (the same run as the flat N×M layout)', () => {
    const rows = Array.from({ length: N }, (_, i) => [X[i], X[N + i]]);
    const flatU = Float64Array.from(rows.flat());
    const opts = { ...OPTS, input: 'regressor' } as const;
    const a = runFilter(rows, D.subarray(0, N), opts);
    const b = runFilter(flatU, D.subarray(0, N), opts);
    expect(Array.from(a.e)).toEqual(Array.from(b.e));
    const f = createFilter(opts);
    expect(() => f.process([[1, 2, 3]], [1])).toThrow(
      /^x\[0\] has 3 values but each row must have 2/
    );
  });
  test('learningCurve and squaredError refuse a list of rows instead of returning NaN', () => {
    expect(() => learningCurve([[1, 2]] as unknown as number[])).toThrow(
      /^e\[0\] must be a number, got Array\(2\): e is one signal/
    );
    expect(() => squaredError([1, 'x'] as unknown as number[])).toThrow(
      /^e\[1\] must be a number, got "x"/
    );
  });
});

test('ensembleAverage of one flat array without K says what K is and the other layout', () => {
  expect(() => ensembleAverage(Float64Array.of(1, 2, 3, 4))).toThrow(
    /^options.K must be an integer \(the number of trials\) when curves is one flat K×N array, got undefined; or pass the curves as a list of K arrays/
  );
  // mean of the rows (1, 2) and (3, 4): (2, 3) (common practice)
  expect(Array.from(ensembleAverage(Float64Array.of(1, 2, 3, 4), { K: 2 }).mean)).toEqual([2, 3]);
});

test('misadjustment refuses a negative steady-state MSE (a dB value given by mistake)', () => {
  // 𝓜 = (J(∞) − J_min)/J_min (Haykin, Adaptive Filter Theory, 4th ed., §5.4)
  expect(misadjustment(0.011, 0.01)).toBeCloseTo(0.1, 12);
  expect(() => misadjustment(-20, 0.01)).toThrow(
    /^steadyMse must be ≥ 0 \(a mean-square value, not dB\), got -20/
  );
});
