/**
 * Subspace tools: ratio-style tests in the LAWN 41 form (u = 2⁻⁵³, threshold 30) for null
 * spaces (‖AN‖₁/(max(m,n)‖A‖₁u), ‖I − NᴴN‖₁/(n·u)) and projections (idempotence, orthogonality
 * of the residual), the minimum-norm least-squares solution against ml-matrix's pseudo-inverse
 * (a second reference library), principal angles on constructed subspaces, and the builders.
 */
import { Matrix, pseudoInverse } from 'ml-matrix';
import { Dense } from '../../../src/core/dense';
import { householderQR, solveTriangular } from '../../../src/core/linalg';
import {
  complexExponentials,
  delayEmbedding,
  harmonicBasis,
  lstsq,
  nullSpace,
  orth,
  principalAngles,
  projectOff,
  projectOnto,
  suppression,
  ulaSteering
} from '../../../src/core/subspace';
import {
  Rng,
  U,
  makeMatrix,
  matmul,
  norm1,
  orthLoss1,
  randn,
  sub,
  type Family
} from '../linalg/helpers';

const THRESHOLD = 30;

describe.each([false, true])('null space ratio tests (complex %s)', complex => {
  test('rank-deficient, wide and random families', () => {
    const rng = new Rng(500 + (complex ? 1 : 0));
    const worst = { residual: 0, orth: 0, count: 0 };
    for (const family of ['rank-deficient', 'wide', 'random'] as Family[]) {
      for (let t = 0; t < 40; t++) {
        const { a, rank } = makeMatrix(rng, family, complex);
        // rank-deficient family has noise 1e-13: decide the rank between noise and signal
        const ns = nullSpace(a, rank !== undefined ? { rtol: 1e-10 } : {});
        if (rank !== undefined) {
          expect(ns.rank).toBe(rank);
        }
        expect(ns.nullity).toBe(a.cols - ns.rank);
        if (ns.nullity === 0) {
          continue;
        }
        const an = matmul(a, ns.basis);
        const noise = rank !== undefined ? 1e-13 * Math.sqrt(a.rows * a.cols) : 0;
        const rr = norm1(an) / (Math.max(a.rows, a.cols) * norm1(a) * U + noise);
        const ro = orthLoss1(ns.basis) / (a.cols * U);
        worst.residual = Math.max(worst.residual, rr);
        worst.orth = Math.max(worst.orth, ro);
        worst.count++;
        // the reported residual is the measured Frobenius norm of A·N
        let f = 0;
        for (let i = 0; i < an.rows; i++) {
          for (let j = 0; j < an.cols; j++) {
            f += an.get(i, j) ** 2 + an.getIm(i, j) ** 2;
          }
        }
        expect(ns.residual).toBeCloseTo(Math.sqrt(f), 12);
      }
    }
    console.log(`null space ratio maxima (complex=${complex}): ${JSON.stringify(worst)}`);
    expect(worst.residual).toBeLessThan(THRESHOLD);
    expect(worst.orth).toBeLessThan(THRESHOLD);
  });
});

describe.each([false, true])('projections (complex %s)', complex => {
  test('idempotence, residual ⟂ basis, onto + off = x, energy bookkeeping', () => {
    const rng = new Rng(600 + (complex ? 1 : 0));
    let worstIdem = 0;
    let worstOrth = 0;
    for (let t = 0; t < 60; t++) {
      const m = rng.int(2, 64);
      const r = rng.int(1, m);
      const n = rng.int(1, 200);
      const b = randn(rng, m, r, complex);
      const x = randn(rng, m, n, complex, rng.uniform() < 0.5 ? 'C' : 'F');
      const off = projectOff(b, x);
      const onto = projectOnto(b, x);
      const q = off.basis;
      // P(Px) = Px: project the projection again
      const again = projectOnto(q, onto.output, { orthonormal: true }).output;
      const xn = norm1(x);
      worstIdem = Math.max(worstIdem, norm1(sub(again, onto.output)) / (m * xn * U));
      // Qᴴ(x − QQᴴx) = 0
      worstOrth = Math.max(worstOrth, norm1(matmul(q, off.output, true)) / (m * xn * U));
      // onto + off = x
      const sum = Dense.zeros([m, n], { complex, order: 'F' });
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < n; j++) {
          sum.set(
            i,
            j,
            onto.output.get(i, j) + off.output.get(i, j),
            onto.output.getIm(i, j) + off.output.getIm(i, j)
          );
        }
      }
      expect(norm1(sub(sum, x)) / xn).toBeLessThan(m * 1e-15);
      // Pythagoras: input = projected + residual energy
      const e = off.energy;
      expect(Math.abs(e.inputEnergy - e.projectedEnergy - e.residualEnergy)).toBeLessThan(
        1e-12 * e.inputEnergy
      );
      let sumDir = 0;
      for (const v of e.directionEnergy) {
        sumDir += v;
      }
      expect(sumDir).toBeCloseTo(e.projectedEnergy, 8);
      expect(e.suppressionDb).toBeCloseTo(10 * Math.log10(e.inputEnergy / e.residualEnergy), 10);
    }
    console.log(
      `projection ratio maxima (complex=${complex}): idempotence ${worstIdem}, residual orthogonality ${worstOrth}`
    );
    expect(worstIdem).toBeLessThan(THRESHOLD);
    expect(worstOrth).toBeLessThan(THRESHOLD);
  });
});

describe('projection layouts', () => {
  test('K×N signals against a basis over the samples ("rows") equals projecting the transpose', () => {
    const rng = new Rng(3);
    const N = 300;
    const basis = harmonicBasis({ f0: 50, fs: 1000, harmonics: 3, samples: N });
    const x = randn(rng, 4, N, false, 'C'); // 4 signals, samples along the last axis
    const rows = projectOff(basis, x);
    const cols = projectOff(basis, x.transpose().copy('F'));
    expect(rows.output.shape).toEqual([4, N]);
    expect(norm1(sub(rows.output, cols.output.transpose()))).toBeLessThan(1e-12);
    // a rank-deficient basis is reduced to its rank
    const twice = Dense.zeros([N, 12], { order: 'F' });
    for (let j = 0; j < 12; j++) {
      for (let i = 0; i < N; i++) {
        twice.set(i, j, basis.get(i, j % 6));
      }
    }
    expect(projectOff(twice, x).rank).toBe(6);
  });
  test('a pure interference signal is suppressed to rounding level', () => {
    // 50 Hz hum with 3 harmonics, arbitrary amplitudes and phases: it lies in span(basis).
    const N = 2000;
    const fs = 1000;
    const x = new Float64Array(N);
    for (let n = 0; n < N; n++) {
      const t = n / fs;
      x[n] = 1.5 * Math.cos(2 * Math.PI * 50 * t + 0.3) + 0.2 * Math.sin(2 * Math.PI * 150 * t);
    }
    const basis = harmonicBasis({ f0: 50, fs, harmonics: 3, samples: N });
    const res = projectOff(basis, new Dense(x, [N]));
    expect(res.energy.suppressionDb).toBeGreaterThan(250);
    const s = suppression(new Dense(x, [N]), res.output);
    expect(s.db).toBeCloseTo(res.energy.suppressionDb, 6);
    expect(s.perRowDb.length).toBe(1);
  });
  test('a zero input reports 0 dB (nothing to suppress), not NaN', () => {
    const res = projectOff([[1], [0]], [[0], [0]]);
    expect(res.energy.suppressionDb).toBe(0);
    expect(res.energy.directionSuppressionDb[0]).toBe(0);
    expect(res.energy.directionShareDb[0]).toBe(-Infinity);
  });
  test('errors name the argument', () => {
    expect(() => projectOff([[1], [2]], [[1, 2, 3]])).toThrow(/x is 1x3 but the basis has 2 rows/);
    expect(() => projectOff([[1]], [[1]], { vectors: 'diag' as never })).toThrow(
      /vectors must be 'columns' or 'rows'/
    );
  });
});

describe('least squares', () => {
  test.each([false, true])('full-rank: residual ⟂ range(A) (complex %s)', complex => {
    const rng = new Rng(700 + (complex ? 1 : 0));
    for (let t = 0; t < 40; t++) {
      const n = rng.int(1, 20);
      const m = rng.int(n, 80);
      const a = randn(rng, m, n, complex);
      const b = randn(rng, m, 2, complex);
      const ls = lstsq(a, b);
      expect(ls.rank).toBe(n);
      const r = sub(b, matmul(a, ls.x));
      // normal equations hold at the solution: ‖Aᴴr‖ ≲ κ·u·‖A‖‖b‖ (well-conditioned here)
      expect(norm1(matmul(a, r, true))).toBeLessThan(1e3 * m * U * norm1(a) * norm1(b));
      expect(ls.residualNorm[0]).toBeCloseTo(
        Math.sqrt(
          Array.from({ length: m }, (_, i) => r.get(i, 0) ** 2 + r.getIm(i, 0) ** 2).reduce(
            (s, v) => s + v,
            0
          )
        ),
        10
      );
    }
  });
  test('rank-deficient: the minimum-norm solution equals pinv(A)·b (ml-matrix reference)', () => {
    const rng = new Rng(710);
    for (let t = 0; t < 30; t++) {
      const m = rng.int(3, 40);
      const n = rng.int(3, 40);
      const r = rng.int(1, Math.min(m, n) - 1);
      const a = matmul(randn(rng, m, r), randn(rng, r, n));
      const b = randn(rng, m, 1);
      const ls = lstsq(a, b, { rtol: 1e-10 });
      expect(ls.rank).toBe(r);
      const ref = pseudoInverse(a.toMatrix(), 1e-10).mmul(b.toMatrix());
      const x = ls.x.toMatrix();
      const err = Matrix.sub(x, ref).norm() / ref.norm();
      expect(err).toBeLessThan(1e-8);
    }
  });
  test('underdetermined full row rank (m < n): minimum-norm solution = pinv(A)·b', () => {
    const rng = new Rng(715);
    for (let t = 0; t < 20; t++) {
      const m = rng.int(1, 20);
      const n = rng.int(m + 1, 40);
      const a = randn(rng, m, n);
      const b = randn(rng, m, 2);
      const ls = lstsq(a, b);
      expect(ls.rank).toBe(m);
      const ref = pseudoInverse(a.toMatrix()).mmul(b.toMatrix());
      expect(Matrix.sub(ls.x.toMatrix(), ref).norm() / ref.norm()).toBeLessThan(1e-10);
      // consistent system: zero residual up to rounding
      expect(ls.residualNorm[0]).toBeLessThan(1e-12 * norm1(a) * norm1(ls.x) + 1e-13);
    }
  });
  test('rank-deficient complex: x ⟂ null(A) and Aᴴ(b − Ax) = 0', () => {
    const rng = new Rng(720);
    for (let t = 0; t < 20; t++) {
      const m = rng.int(3, 30);
      const n = rng.int(3, 30);
      const r = rng.int(1, Math.min(m, n) - 1);
      const a = matmul(randn(rng, m, r, true), randn(rng, r, n, true));
      const b = randn(rng, m, 1, true);
      const ls = lstsq(a, b, { rtol: 1e-10 });
      expect(ls.rank).toBe(r);
      const ns = nullSpace(a, { rtol: 1e-10 });
      const xn = norm1(ls.x);
      expect(norm1(matmul(ns.basis, ls.x, true)) / xn).toBeLessThan(1e-9);
      const res = sub(b, matmul(a, ls.x));
      expect(norm1(matmul(a, res, true)) / (norm1(a) * norm1(b))).toBeLessThan(1e-10);
    }
  });
  test('errors', () => {
    expect(() => lstsq([[1], [2]], [[1]])).toThrow(/b has 1 rows but a is 2x1/);
    expect(() => lstsq([[1]], [[1]], { rtol: -0.1 })).toThrow(/rtol must be in \[0, 1\), got -0.1/);
  });
});

describe('principal angles', () => {
  function planes(theta: number[], m: number, complex: boolean, rng: Rng) {
    // span A = span{e_1..e_k}; B's column i = cosθ_i e_i + sinθ_i e_{k+i}, then a random
    // unitary change of basis applied to both (it preserves angles).
    const k = theta.length;
    const a = Dense.zeros([m, k], { complex, order: 'F' });
    const b = Dense.zeros([m, k], { complex, order: 'F' });
    for (let i = 0; i < k; i++) {
      a.set(i, i, 1);
      b.set(i, i, Math.cos(theta[i]));
      b.set(k + i, i, Math.sin(theta[i]));
    }
    const q = orth(randn(rng, m, m, complex)).basis;
    // mix the columns of B so the pairing is not trivial
    const mix = orth(randn(rng, k, k, complex)).basis;
    return { a: matmul(q, a), b: matmul(matmul(q, b), mix) };
  }
  test.each([false, true])('recovers constructed angles incl. tiny ones (complex %s)', complex => {
    const rng = new Rng(800 + (complex ? 1 : 0));
    const theta = [1e-12, 1e-9, 1e-5, 0.3, 1.2, Math.PI / 2];
    const { a, b } = planes(theta, 16, complex, rng);
    const pa = principalAngles(a, b);
    expect(pa.angles.length).toBe(6);
    for (let i = 0; i < theta.length; i++) {
      // sines carry small angles to full relative accuracy up to ~ε/θ + ε (Knyazev & Argentati)
      const tolAbs = 1e-15 * 16;
      expect(Math.abs(pa.angles[i] - theta[i])).toBeLessThan(tolAbs + 1e-6 * theta[i]);
    }
  });
  test('different dimensions and the ranks reported', () => {
    const rng = new Rng(9);
    const a = randn(rng, 10, 4);
    const b = Dense.zeros([10, 1], { order: 'F' });
    for (let i = 0; i < 10; i++) {
      b.set(i, 0, a.get(i, 0) + 2 * a.get(i, 3));
    }
    const pa = principalAngles(a, b);
    expect(pa.rankA).toBe(4);
    expect(pa.rankB).toBe(1);
    expect(pa.angles.length).toBe(1);
    expect(pa.angles[0]).toBeLessThan(1e-14);
  });
});

describe('interference-basis builders', () => {
  test('harmonic basis columns: exact values and orthogonality over whole periods', () => {
    const fs = 1000;
    const b = harmonicBasis({ f0: 50, fs, harmonics: 2, samples: 200 });
    expect(b.shape).toEqual([200, 4]);
    expect(b.get(5, 0)).toBeCloseTo(Math.cos((2 * Math.PI * 50 * 5) / fs), 15);
    expect(b.get(5, 3)).toBeCloseTo(Math.sin((2 * Math.PI * 100 * 5) / fs), 15);
    // Over an integer number of periods cos/sin at distinct harmonics are orthogonal with
    // squared norm N/2 (discrete orthogonality of the DFT basis; common practice).
    const g = matmul(b, b, true);
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        expect(g.get(i, j)).toBeCloseTo(i === j ? 100 : 0, 10);
      }
    }
    const withDc = harmonicBasis({ f0: 50, fs, harmonics: 1, samples: 10, dc: true });
    expect(withDc.get(3, 0)).toBe(1);
  });
  test('builder errors', () => {
    expect(() => harmonicBasis({ f0: 300, fs: 1000, harmonics: 2, samples: 10 })).toThrow(
      /reach 600 Hz, at or above the Nyquist frequency 500 Hz/
    );
    expect(() => harmonicBasis({ f0: -1, fs: 1000, harmonics: 1, samples: 10 })).toThrow(
      /f0 must be > 0, got -1/
    );
    expect(() => harmonicBasis({ f0: 1, fs: 1000, harmonics: 1.5, samples: 10 })).toThrow(
      /harmonics must be an integer, got 1.5/
    );
    expect(() => complexExponentials({ frequencies: [600], fs: 1000, samples: 4 })).toThrow(
      /frequencies\[0\] must be in \(-500, 500\] Hz, got 600/
    );
    expect(() =>
      ulaSteering({ angles: [100], elements: 4, spacing: 0.5, wavelength: 1, unit: 'deg' })
    ).toThrow(/angles\[0\] must be in \[-90, 90\] deg, got 100/);
    expect(() => delayEmbedding(new Float64Array([1, 2]), 3)).toThrow(
      /lags must be in \[1, 2\], got 3/
    );
    expect(() => delayEmbedding(new Float64Array([1, NaN]), 1)).toThrow(/reference\[1\] is NaN/);
  });
  test('complex exponentials and their span', () => {
    const e = complexExponentials({ frequencies: [100, -250], fs: 1000, samples: 8 });
    expect(e.get(3, 0)).toBeCloseTo(Math.cos((2 * Math.PI * 100 * 3) / 1000), 15);
    expect(e.getIm(3, 1)).toBeCloseTo(Math.sin((-2 * Math.PI * 250 * 3) / 1000), 15);
  });
  test('ULA steering: half-wavelength spacing, broadside and endfire', () => {
    // Van Trees, Optimum Array Processing (2002), §2.2 (from memory): with d = λ/2 the
    // inter-element phase is π·sinθ; broadside (θ = 0) is all ones; θ = 90° alternates ±1.
    const a = ulaSteering({
      angles: [0, 90, 30],
      elements: 4,
      spacing: 0.5,
      wavelength: 1,
      unit: 'deg'
    });
    for (let m = 0; m < 4; m++) {
      expect(a.get(m, 0)).toBeCloseTo(1, 15);
      expect(a.getIm(m, 0)).toBeCloseTo(0, 15);
      expect(a.get(m, 1)).toBeCloseTo(m % 2 === 0 ? 1 : -1, 14);
      // θ = 30°: phase −π·m/2
      expect(a.get(m, 2)).toBeCloseTo(Math.cos((Math.PI * m) / 2), 14);
      expect(a.getIm(m, 2)).toBeCloseTo(-Math.sin((Math.PI * m) / 2), 14);
    }
  });
  test('delay embedding: structure, and projecting off it cancels an FIR-filtered reference', () => {
    const rng = new Rng(12);
    const N = 500;
    const ref = new Float64Array(N).map(() => rng.normal());
    const d = delayEmbedding(ref, 3);
    expect(d.get(10, 2)).toBe(ref[8]);
    expect(d.get(1, 2)).toBe(0);
    // y = 0.5 r[n] − 0.25 r[n−2] lies in span(D): projecting off removes it to rounding level
    const y = new Float64Array(N);
    for (let n = 0; n < N; n++) {
      y[n] = 0.5 * ref[n] - (n >= 2 ? 0.25 * ref[n - 2] : 0);
    }
    const res = projectOff(d, new Dense(y, [N]));
    expect(res.energy.suppressionDb).toBeGreaterThan(250);
  });
});

describe('least squares on tall matrices (the m ≥ 2n path)', () => {
  test.each([
    [5000, 20, false],
    [3000, 12, true]
  ])('%ix%i complex=%s agrees with Householder QR and leaves Aᴴr ≈ 0', (m, n, complex) => {
    const rng = new Rng(m + n);
    const a = randn(rng, m, n, complex);
    const b = randn(rng, m, 2, complex);
    const ls = lstsq(a, b);
    expect(ls.rank).toBe(n);
    // reference: x = R⁻¹(Qᴴb)(0:n) from one Householder QR of the whole A
    const f = householderQR(a);
    const ref = solveTriangular(f.R(), f.applyQ(b, { adjoint: true }).slice(0, n));
    expect(norm1(sub(ls.x, ref)) / norm1(ref)).toBeLessThan(1e-12);
    const r = sub(b, matmul(a, ls.x));
    expect(norm1(matmul(a, r, true))).toBeLessThan(100 * m * U * norm1(a) * norm1(b));
  });
});
