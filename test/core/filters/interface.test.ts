/**
 * The streaming interface, the configuration helpers and the argument checks.
 * Chunked processing must equal one-shot processing exactly (same operations in the same
 * order); configurations are checked against their definitions (Haykin, Adaptive Filter
 * Theory, 4th ed., Introduction: identification, prediction, interference cancelling, inverse
 * modelling/equalization).
 */
import {
  createFilter,
  equalize,
  linearPrediction,
  noiseCancellation,
  runFilter,
  systemIdentification,
  type Algorithm
} from '../../../src/core/filters';
import { Dense } from '../../../src/core/dense';
import { residualEnergy } from '../../../src/core/metrics';
import { Rng, ar1, desired } from './helpers';

const ALGS: Algorithm[] = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-textbook', 'nlms', 'lms'];

test('chunked processing equals one-shot processing bit for bit; decimated trajectory; reset', () => {
  const rng = new Rng(8000);
  for (const complex of [false, true]) {
    for (const precision of ['float64', 'float32'] as const) {
      const W = complex ? 2 : 1;
      const N = 1003;
      const x = rng.gaussArray(N, complex);
      const d = desired(
        x,
        rng.gaussArray(4, complex),
        4,
        complex,
        true,
        rng.gaussArray(N, complex, 0.01)
      );
      for (const algorithm of ALGS) {
        const opts = {
          algorithm,
          taps: 4,
          complex,
          precision,
          lambda: 0.99,
          mu: algorithm === 'lms' ? 0.02 : 0.5,
          keepWeightsEvery: 10
        };
        const one = runFilter(x, d, opts);
        const chunked = runFilter(x, d, { ...opts, chunkSize: 97 });
        expect(Array.from(chunked.e)).toEqual(Array.from(one.e));
        expect(Array.from(chunked.trajectory)).toEqual(Array.from(one.trajectory));
        expect(one.trajectoryIndex.length).toBe(100);
        expect(one.trajectoryIndex[0]).toBe(9);
        expect(one.trajectory.length).toBe(100 * 4 * W);
        // the last trajectory row (after sample 999) is not the final weights (after 1002)
        const f = createFilter(opts);
        f.process(x, d);
        expect(Array.from(f.weights())).toEqual(Array.from(one.weights));
        f.reset();
        expect(f.samples).toBe(0);
        const again = f.process(x, d);
        expect(Array.from(again.e)).toEqual(Array.from(one.e));
      }
    }
  }
});

test('Dense input at the API edge (regressor rows as an N×M view)', () => {
  const rng = new Rng(8001);
  const N = 200;
  const M = 3;
  const X = rng.gaussArray(N * M);
  const d = desired(
    X,
    Float64Array.from([1, -2, 0.5]),
    M,
    false,
    false,
    rng.gaussArray(N, false, 1e-3)
  );
  const dense = new Dense(X, [N, M]);
  const a = runFilter(dense, d, {
    algorithm: 'qr-rls',
    taps: M,
    input: 'regressor',
    lambda: 1,
    delta: 1e-6
  });
  const b = runFilter(X, d, {
    algorithm: 'qr-rls',
    taps: M,
    input: 'regressor',
    lambda: 1,
    delta: 1e-6
  });
  expect(Array.from(a.e)).toEqual(Array.from(b.e));
  expect(a.weights[1]).toBeCloseTo(-2, 3);
  // a Fortran-order copy of the same matrix gives the same result
  const f = dense.copy('F');
  const c = runFilter(f, d, {
    algorithm: 'qr-rls',
    taps: M,
    input: 'regressor',
    lambda: 1,
    delta: 1e-6
  });
  expect(Array.from(c.e)).toEqual(Array.from(b.e));
});

test('configurations: identification, noise cancellation, one-step prediction', () => {
  const rng = new Rng(8002);
  const N = 4000;
  // system identification of h = [0.8, −0.4, 0.2]
  const u = rng.gaussArray(N);
  const out = desired(
    u,
    Float64Array.from([0.8, -0.4, 0.2]),
    3,
    false,
    true,
    rng.gaussArray(N, false, 1e-3)
  );
  const sid = runFilter(systemIdentification(u, out).x, out, {
    algorithm: 'rls',
    taps: 3,
    lambda: 1
  });
  expect(sid.weights[0]).toBeCloseTo(0.8, 3);
  expect(sid.weights[2]).toBeCloseTo(0.2, 3);
  // noise cancellation: primary = signal + reference through a short path; the error is the signal
  const sig = Float64Array.from({ length: N }, (_, n) => Math.sin(0.05 * n));
  const ref = rng.gaussArray(N);
  const path = desired(ref, Float64Array.from([0.6, 0.3]), 2, false, true, new Float64Array(N));
  const primary = Float64Array.from(sig, (s, n) => s + path[n]);
  const nc = noiseCancellation(ref, primary);
  const r = runFilter(nc.x, nc.d, { algorithm: 'rls', taps: 4, lambda: 0.9995 });
  const cleaned = Float64Array.from(r.e.subarray(2000), (e, k) => e - sig[2000 + k]);
  expect(residualEnergy(cleaned, path.subarray(2000)).reductionDb).toBeGreaterThan(20);
  // one-step prediction of an AR(1) with a = 0.9: the predictor weight is 0.9
  const s = ar1(rng, N, 0.9);
  const lp = linearPrediction(s);
  expect(lp.x[0]).toBe(0);
  expect(lp.x[5]).toBe(s[4]);
  const pr = runFilter(lp.x, lp.d, { algorithm: 'qr-rls', taps: 2, lambda: 1 });
  expect(pr.weights[0]).toBeCloseTo(0.9, 1);
  expect(Math.abs(pr.weights[1])).toBeLessThan(0.05);
});

test('equalizer: training, then decision-directed with the symbol error rate; frozen weights otherwise', () => {
  const rng = new Rng(8003);
  const N = 3000;
  const syms = Float64Array.from(
    { length: 2 * N },
    () => (rng.uniform() < 0.5 ? -1 : 1) * Math.SQRT1_2
  );
  // complex channel h = [1, 0.4 − 0.2j]: x(n) = s(n) + h1 s(n−1) + noise
  const x = new Float64Array(2 * N);
  for (let n = 0; n < N; n++) {
    x[2 * n] =
      syms[2 * n] +
      (n > 0 ? 0.4 * syms[2 * n - 2] + 0.2 * syms[2 * n - 1] : 0) +
      0.02 * rng.gauss();
    x[2 * n + 1] =
      syms[2 * n + 1] +
      (n > 0 ? 0.4 * syms[2 * n - 1] - 0.2 * syms[2 * n - 2] : 0) +
      0.02 * rng.gauss();
  }
  const opts = {
    algorithm: 'rls' as const,
    taps: 6,
    complex: true,
    lambda: 0.999,
    delay: 0,
    symbols: syms
  };
  const dd = equalize(x, syms.subarray(0, 400), { ...opts, decisionDirected: true });
  expect(dd.trainingLength).toBe(200);
  expect(dd.symbolsCounted).toBe(N - 200);
  expect(dd.symbolErrorRate).toBe(0);
  const frozen = equalize(x, syms.subarray(0, 400), { ...opts, decisionDirected: false });
  expect(frozen.symbolErrorRate).toBe(0);
  // without training the frozen (zero) weights decide every symbol as the same point: SER ≈ 3/4
  const poor = equalize(x, new Float64Array(0), { ...opts, decisionDirected: false });
  expect(poor.symbolErrorRate!).toBeGreaterThan(0.6);
  expect(() => equalize(x, syms, { ...opts, constellation: 'qpsk', complex: false })).toThrow(
    /constellation qpsk needs a complex filter/
  );
});

describe('argument checks name the argument and the value', () => {
  const x = new Float64Array(10);
  test.each([
    [{ algorithm: 'rls', taps: 0 }, /options.taps must be in \[1, 65536\], got 0/],
    [{ algorithm: 'rls', taps: 2.5 }, /options.taps must be an integer, got 2.5/],
    [{ algorithm: 'rls', taps: 2, lambda: 0 }, /options.lambda must be in \(0, 1\], got 0/],
    [{ algorithm: 'rls', taps: 2, lambda: 1.01 }, /options.lambda must be in \(0, 1\], got 1.01/],
    [{ algorithm: 'qr-rls', taps: 2, delta: -1 }, /options.delta must be > 0, got -1/],
    [
      { algorithm: 'qr-rls', taps: 2, delta: NaN },
      /options.delta must be a finite number, got NaN/
    ],
    [{ algorithm: 'nlms', taps: 2, mu: 2 }, /options.mu must be in \(0, 2\) for NLMS, got 2/],
    [{ algorithm: 'lms', taps: 2, mu: 0 }, /options.mu must be > 0, got 0/],
    [{ algorithm: 'nlms', taps: 2, epsilon: -1 }, /options.epsilon must be ≥ 0, got -1/],
    [{ algorithm: 'kalman', taps: 2 }, /options.algorithm must be one of .*got "kalman"/],
    [
      { algorithm: 'rls', taps: 2, precision: 'float16' },
      /options.precision must be 'float64' or 'float32', got "float16"/
    ],
    [{ algorithm: 'rls', taps: 2, keepWeightsEvery: -1 }, /options.keepWeightsEvery must be in \[0/]
  ])('%o', (opts, re) => {
    expect(() => createFilter(opts as never)).toThrow(re);
  });
  test('data errors', () => {
    const f = createFilter({ algorithm: 'rls', taps: 3 });
    expect(() => f.process(x, new Float64Array(9))).toThrow(
      /x has length 10 but d has length 9; they must match/
    );
    const bad = Float64Array.from(x);
    bad[7] = NaN;
    expect(() => f.process(bad, x)).toThrow(/x\[7\] is NaN/);
    const badc = new Float64Array(20);
    badc[13] = Infinity;
    expect(() =>
      createFilter({ algorithm: 'lms', taps: 2, complex: true }).process(badc, new Float64Array(20))
    ).toThrow(/x\[6\] \(imaginary part\) is Infinity/);
    expect(() => runFilter(x, x, { algorithm: 'rls', taps: 11 })).toThrow(
      /options.taps \(M = 11\) exceeds the signal length 10/
    );
    expect(() =>
      createFilter({ algorithm: 'rls', taps: 3, input: 'regressor' }).process(x, x)
    ).toThrow(/x must be an N×M regressor matrix with N = 10/);
    expect(() => f.process('abc', x)).toThrow(
      /x must be a Float64Array, Float32Array, number\[\] or Dense array, got "abc"/
    );
    expect(() => f.process(x, x, { e: new Float32Array(10) })).toThrow(
      /out.e must be a Float64Array/
    );
    expect(() =>
      createFilter({ algorithm: 'lms', taps: 2, complex: true }).process(
        new Float64Array(4),
        new Float64Array(3)
      )
    ).toThrow(/d must hold \(re, im\) pairs/);
  });
  test('LMS step size above the white-input bound is a run-time warning, not an error', () => {
    const rng = new Rng(8004);
    const f = createFilter({ algorithm: 'lms', taps: 8, mu: 0.3 });
    f.process(rng.gaussArray(300), rng.gaussArray(300));
    const ev = f.health().events.find(e => e.kind === 'step-size');
    expect(ev?.message).toMatch(/μ = 0.3 exceeds the mean-square bound 0\.[12]\d* estimated/);
    expect(createFilter({ algorithm: 'lms', taps: 8, mu: 0.21 }).health().status).toBe('ok');
  });
});
