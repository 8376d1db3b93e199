/**
 * The filter options under the names the UI shows (issue 9, point 4): `taps` (M), the weights
 * kept every k samples (`keepWeightsEvery`), and `rls-textbook`, the unsymmetrised textbook form
 * of conventional RLS; an option name no filter knows is a TypeError naming it.
 */
import { RlsFilter, createFilter, runFilter, runTrials } from '../../../src/core';
import { Rng } from '../filters/helpers';

const rng = new Rng(9402);
const N = 400;
const x = rng.gaussArray(N);
const d = x.map((v, i) => 0.8 * v + (i > 0 ? 0.3 * x[i - 1] : 0) + 0.01 * rng.gauss());

test('taps sets M; keepWeightsEvery = k keeps a trajectory row after every k-th sample', () => {
  const f = createFilter({ algorithm: 'nlms', taps: 3, keepWeightsEvery: 100 });
  expect(f.M).toBe(3);
  expect(f.weightLength).toBe(3);
  const c = f.process(x, d);
  expect(Array.from(c.trajectoryIndex)).toEqual([99, 199, 299, 399]); // 0-based index of the k-th, 2k-th, … sample;
  expect(c.trajectory.length).toBe(4 * 3);
  expect(Array.from(c.trajectory.subarray(9, 12))).toEqual(Array.from(f.weights()));
});

test("'rls-textbook' is the unsymmetrised textbook form: the same a-priori errors as 'rls' over a short run", () => {
  // Both run the recursion of Haykin, Adaptive Filter Theory, 4th ed., Table 9.1; they differ
  // only in rounding, which the textbook form lets grow like λ⁻ⁿ (DESIGN §7), negligible here.
  const a = runFilter(x, d, { algorithm: 'rls', taps: 2, lambda: 0.99 });
  const b = runFilter(x, d, { algorithm: 'rls-textbook', taps: 2, lambda: 0.99 });
  let worst = 0;
  for (let i = 0; i < N; i++) {
    worst = Math.max(worst, Math.abs(a.e[i] - b.e[i]));
  }
  expect(worst).toBeLessThan(1e-10);
  const f = createFilter({ algorithm: 'rls-textbook', taps: 2 });
  expect(f).toBeInstanceOf(RlsFilter);
  expect((f as RlsFilter).textbook).toBe(true);
  expect((createFilter({ algorithm: 'rls', taps: 2 }) as RlsFilter).textbook).toBe(false);
  expect(new RlsFilter({ algorithm: 'rls', taps: 2, textbook: true }).options.algorithm).toBe(
    'rls-textbook'
  );
});

test('unknown and former option names are TypeErrors naming them', () => {
  const bad = (o: object) => () => createFilter(o as never);
  expect(bad({ algorithm: 'rls', order: 4 })).toThrow(
    /^options.order is now options.taps \(the number of taps M\)/
  );
  expect(bad({ algorithm: 'rls', taps: 4, decimation: 10 })).toThrow(
    /^options.decimation is now options.keepWeightsEvery/
  );
  expect(bad({ algorithm: 'rls', taps: 4, lamda: 0.9 })).toThrow(TypeError);
  expect(bad({ algorithm: 'rls', taps: 4, lamda: 0.9 })).toThrow(
    /^options.lamda is not a filter option; the options are algorithm, taps, /
  );
  expect(bad({ algorithm: 'rls-legacy', taps: 4 })).toThrow(
    /options.algorithm must be one of qr-rls, inverse-qr-rls, rls, rls-textbook, nlms, lms, got "rls-legacy"/
  );
  // the runners' own options pass through
  expect(() =>
    runTrials([x, x], [d, d], 2, { algorithm: 'lms', taps: 2, window: 5, confidence: 0.9 })
  ).not.toThrow();
  expect(() => runFilter(x, d, { algorithm: 'lms', taps: 2, chunkSize: 64 })).not.toThrow();
});

test('the asymmetry event of the textbook form says what it is and which form keeps P Hermitian', () => {
  // A tolerance far below rounding makes the first rounding-level asymmetry of P visible: the
  // unsymmetrised update does not keep P Hermitian (Verhaegen, Automatica 25(3), 1989).
  const r = runFilter(x, d, {
    algorithm: 'rls-textbook',
    taps: 4,
    lambda: 0.99,
    asymmetryTolerance: 1e-300
  });
  const ev = r.health.events.find(e => e.kind === 'asymmetry');
  expect(ev?.message).toMatch(
    /^P lost symmetry: .* \(the unsymmetrised textbook form does not keep P Hermitian; 'rls' does\)$/
  );
  const sym = runFilter(x, d, {
    algorithm: 'rls',
    taps: 4,
    lambda: 0.99,
    asymmetryTolerance: 1e-300
  });
  expect(sym.health.events.find(e => e.kind === 'asymmetry')).toBeUndefined();
});
