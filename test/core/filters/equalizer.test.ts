/**
 * The classic adaptive-equalizer experiment (Haykin, Adaptive Filter Theory, 4th ed., the LMS
 * computer experiment on adaptive equalization (§5.7) and its RLS counterpart (§9.7); set-up
 * from memory): raised-cosine channel hₙ = ½[1 + cos(2π(n−2)/W)], n = 1, 2, 3; ±1 symbols;
 * noise variance 0.001; 11 taps; decision delay 7. The eigenvalue spreads quoted from memory
 * (6.0782, 11.1238, 21.7132, 46.8216 for W = 2.9, 3.1, 3.3, 3.5) are recomputed here from the
 * 11×11 correlation matrix r(0) = Σh² + σ², r(1) = h₁h₂ + h₂h₃, r(2) = h₁h₃ (ml-matrix's
 * symmetric eigensolver).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { equalize } from '../../../src/core/filters';
import { convergenceTime, ensembleAverage, steadyStateMse } from '../../../src/core/metrics';
import { Rng } from './helpers';

const M = 11;
const DELAY = 7;
const SIGMA2 = 0.001;
const WS = [2.9, 3.1, 3.3, 3.5];
const SPREADS_FROM_MEMORY = [6.0782, 11.1238, 21.7132, 46.8216];
const TRIALS = 200;

function channel(W: number): number[] {
  return [1, 2, 3].map(n => 0.5 * (1 + Math.cos((2 * Math.PI * (n - 2)) / W)));
}

function spread(W: number): number {
  const h = channel(W);
  const r = [
    h[0] * h[0] + h[1] * h[1] + h[2] * h[2] + SIGMA2,
    h[0] * h[1] + h[1] * h[2],
    h[0] * h[2]
  ];
  const R = new Matrix(M, M);
  for (let i = 0; i < M; i++) {
    for (let j = 0; j < M; j++) {
      R.set(i, j, Math.abs(i - j) < 3 ? r[Math.abs(i - j)] : 0);
    }
  }
  const ev = new EigenvalueDecomposition(R, { assumeSymmetric: true }).realEigenvalues;
  return Math.max(...ev) / Math.min(...ev);
}

/** Ensemble learning curve |e(n)|² of `algorithm` over TRIALS runs, training on the whole run. */
function curve(
  W: number,
  N: number,
  opts: { algorithm: 'rls' | 'lms'; lambda?: number; delta?: number; mu?: number },
  seed: number
) {
  const rng = new Rng(seed);
  const h = channel(W);
  const curves: Float64Array[] = [];
  let ser = 0;
  for (let k = 0; k < TRIALS; k++) {
    const a = Float64Array.from({ length: N }, () => (rng.uniform() < 0.5 ? -1 : 1));
    // x(n) = Σ_{k=1..3} h_k a(n−k) + v(n)
    const x = new Float64Array(N);
    for (let n = 0; n < N; n++) {
      let s = 0;
      for (let q = 1; q <= 3; q++) {
        if (n - q >= 0) {
          s += h[q - 1] * a[n - q];
        }
      }
      x[n] = s + Math.sqrt(SIGMA2) * rng.gauss();
    }
    const r = equalize(x, a, { ...opts, taps: M, delay: DELAY, symbols: a });
    const c = new Float64Array(N - DELAY);
    for (let n = DELAY; n < N; n++) {
      c[n - DELAY] = r.e[n] * r.e[n];
    }
    curves.push(c);
    ser += r.symbolErrors ?? 0;
  }
  return { ens: ensembleAverage(curves), ser };
}

test('eigenvalue spreads of the equalizer experiment (recomputed)', () => {
  WS.forEach((W, k) => {
    expect(spread(W)).toBeCloseTo(SPREADS_FROM_MEMORY[k], 4);
  });
});

// The issue asked for RLS within 1 dB by n ≤ 3M. That is not what the λ = 1 theory (and the
// measurement) give: the excess MSE M/(n−M−2)·J_min (Haykin 4th ed. §9.8; see statistics.test.ts)
// is still 1.9 dB at n = 3M; within 1 dB needs n ≥ M + 2 + M/(10^0.1 − 1) ≈ 56. So the check is
// against that figure: every W converges by 1.5× it and the spread does not matter (ratio of the
// slowest to the fastest W below 1.5), while LMS slows down as the spread grows.
test('RLS (λ = 1, δ = 0.004) converges within 1 dB near n ≈ M + 2 + M/(10^0.1 − 1) for every W; LMS (μ = 0.075) slows as W grows', () => {
  const lines: string[] = [];
  const tLms: number[] = [];
  const tRls: number[] = [];
  WS.forEach((W, k) => {
    const rls = curve(W, 400, { algorithm: 'rls', lambda: 1, delta: 0.004 }, 6000 + k);
    const lms = curve(W, 3000, { algorithm: 'lms', mu: 0.075 }, 6100 + k);
    // smoothing: 5-sample trailing average of the 200-trial ensemble mean; steady state = last 100
    const nR = convergenceTime(rls.ens.mean, { marginDb: 1, tail: 100, window: 5 });
    const nL = convergenceTime(lms.ens.mean, { marginDb: 1, tail: 1500, window: 100 });
    // −1: not within 1 dB of its tail MSE by the end of the run; counted as N (slower than any)
    tLms.push(nL < 0 ? 3000 : nL);
    const jR = steadyStateMse(rls.ens.mean, 100);
    const jL = steadyStateMse(lms.ens.mean, 1500);
    // n is counted from the first sample with a training symbol (n = Δ); add 1 for 1-based
    lines.push(
      `W=${W} spread ${spread(W).toFixed(4)}: RLS within 1 dB at n=${nR + 1} (final MSE ${jR.toExponential(3)}), ` +
        `LMS ${nL < 0 ? 'not within 1 dB by n=3000' : `at n=${nL + 1}`} (final MSE ${jL.toExponential(3)})`
    );
    tRls.push(nR + 1);
    expect(rls.ser).toBe(0);
  });
  const nTheory = Math.ceil(M + 2 + M / (Math.pow(10, 0.1) - 1));
  console.log(
    `equalizer experiment (${TRIALS} trials; RLS theory n ≈ ${nTheory}):\n${lines.join('\n')}`
  );
  for (const n of tRls) {
    expect(n).toBeGreaterThanOrEqual(0.8 * nTheory);
    expect(n).toBeLessThanOrEqual(1.5 * nTheory);
  }
  expect(Math.max(...tRls) / Math.min(...tRls)).toBeLessThan(1.5);
  for (let k = 1; k < WS.length; k++) {
    expect(tLms[k]).toBeGreaterThan(tLms[k - 1]);
  }
  expect(tLms[3]).toBeGreaterThanOrEqual(3 * tLms[0]);
});
