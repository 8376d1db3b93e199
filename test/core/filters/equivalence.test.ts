/**
 * Exact equivalence of the three RLS forms (QR-RLS, inverse QR-RLS, conventional RLS) and of
 * each against the regularised, pre-windowed exponentially weighted least-squares solution.
 *
 * Source: with Φ(0) = δI (P(0) = δ⁻¹I, R(0) = √δ·I, P^½(0) = δ^−½·I) all three propagate the
 * same exact solution of min Σλⁿ⁻ⁱ|d(i) − wᴴu(i)|² + δλⁿ‖w‖² (Haykin, Adaptive Filter Theory,
 * 4th ed., §9.2–9.3 for RLS and ch. 13 for the QR and inverse QR forms; Sayed, Fundamentals of
 * Adaptive Filtering, 2003, §11.1 and ch. 12 (from memory)), so in float64 their a-priori errors
 * differ only by rounding. Bound set by the issue: ≤ 1e−10 relative to the RMS a-priori error.
 */
import * as fs from 'fs';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { createFilter } from '../../../src/core/filters';
import { Rng, ar1, desired, maxAbsDiff, readF64, rms, runReference, writeF64 } from './helpers';

const N = 1_000_000;
const M = 8;
const LAMBDA = 0.999;
const DELTA = 0.01;
const AR = 0.9;

/** Eigenvalue spread of the M×M correlation matrix of AR(1) input, r(k) = a^|k|/(1 − a²). */
function ar1Spread(a: number, m: number): number {
  const R = new Matrix(m, m);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      R.set(i, j, Math.pow(a, Math.abs(i - j)) / (1 - a * a));
    }
  }
  const ev = new EigenvalueDecomposition(R, { assumeSymmetric: true }).realEigenvalues;
  return Math.max(...ev) / Math.min(...ev);
}

// about 20 checkpoints spread logarithmically over [10, N]
const CHECKPOINTS = Array.from({ length: 20 }, (_, k) => Math.round(10 * Math.pow(N / 10, k / 19)));

for (const complex of [false, true]) {
  test(`QR-RLS, inverse QR-RLS and RLS agree over 1e6 samples (${complex ? 'complex' : 'real'}), and match batch LS at 20 checkpoints`, () => {
    const W = complex ? 2 : 1;
    const rng = new Rng(complex ? 4002 : 4001);
    const x = ar1(rng, N, AR, complex);
    const wo = rng.gaussArray(M, complex);
    const d = desired(x, wo, M, complex, true, rng.gaussArray(N, complex, 0.01));
    const spread = ar1Spread(AR, M);
    const algs = ['qr-rls', 'inverse-qr-rls', 'rls'] as const;
    const filters = algs.map(a =>
      createFilter({ algorithm: a, taps: M, lambda: LAMBDA, delta: DELTA, complex })
    );
    const E = algs.map(() => new Float64Array(N * W));
    const Wck = algs.map(() => [] as Float64Array[]);
    // Stream in chunks that end at the checkpoints (this also exercises state carried across chunks).
    let s = 0;
    for (const c of CHECKPOINTS) {
      filters.forEach((f, k) => {
        const r = f.process(x.subarray(s * W, c * W), d.subarray(s * W, c * W));
        E[k].set(r.e, s * W);
        Wck[k].push(f.weights());
      });
      s = c;
    }
    const eRms = rms(E[2], complex);
    const dQr = maxAbsDiff(E[0], E[2]) / eRms;
    const dIqr = maxAbsDiff(E[1], E[2]) / eRms;
    const dQrIqr = maxAbsDiff(E[0], E[1]) / eRms;
    // weights at the checkpoints, relative to ‖w‖
    let wDiff = 0;
    for (let c = 0; c < CHECKPOINTS.length; c++) {
      const ref = Wck[2][c];
      const nrm = rms(ref) * Math.sqrt(ref.length);
      wDiff = Math.max(wDiff, maxAbsDiff(Wck[0][c], ref) / nrm, maxAbsDiff(Wck[1][c], ref) / nrm);
    }
    // Batch LS by QR (numpy) at the checkpoints.
    const dir = runReference('batchls', dd => {
      writeF64(dd, 'x.bin', x);
      writeF64(dd, 'd.bin', d);
      fs.writeFileSync(
        `${dd}/meta.json`,
        JSON.stringify({ complex, M, lambda: LAMBDA, delta: DELTA, checkpoints: CHECKPOINTS })
      );
    });
    const wls = readF64(dir, 'w.bin');
    fs.rmSync(dir, { recursive: true, force: true });
    let lsDiff = 0;
    for (let c = 0; c < CHECKPOINTS.length; c++) {
      const ref = wls.subarray(c * M * W, (c + 1) * M * W);
      const nrm = rms(ref) * Math.sqrt(ref.length);
      for (let k = 0; k < 3; k++) {
        lsDiff = Math.max(lsDiff, maxAbsDiff(Wck[k][c], ref) / nrm);
      }
    }
    console.log(
      `equivalence ${complex ? 'complex' : 'real'}: M=${M} λ=${LAMBDA} δ=${DELTA} N=${N}, ` +
        `AR(1) a=${AR} eigenvalue spread ${spread.toFixed(2)}; RMS e ${eRms.toExponential(3)}; ` +
        `max|Δe|/rms: QR−RLS ${dQr.toExponential(2)}, IQR−RLS ${dIqr.toExponential(2)}, ` +
        `QR−IQR ${dQrIqr.toExponential(2)}; weights ${wDiff.toExponential(2)}; ` +
        `vs batch LS (20 checkpoints) ${lsDiff.toExponential(2)}`
    );
    expect(spread).toBeGreaterThan(50);
    expect(dQr).toBeLessThanOrEqual(1e-10);
    expect(dIqr).toBeLessThanOrEqual(1e-10);
    expect(dQrIqr).toBeLessThanOrEqual(1e-10);
    expect(wDiff).toBeLessThanOrEqual(1e-10);
    // batch LS: same exact solution; bound 1e−9 relative (cond(Φ) ≈ spread ≈ 1e2, u ≈ 1e−16)
    expect(lsDiff).toBeLessThanOrEqual(1e-9);
    for (const f of filters) {
      expect(f.health().status).toBe('ok');
    }
  });
}
