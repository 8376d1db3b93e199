/**
 * Textbook worked examples. Each value was recalled from the book, then recomputed here (by hand
 * in the comment, and by the test itself): "recalled, recomputed here".
 */
import { solve, Matrix } from 'ml-matrix';
import { Dense } from '../../../src/core/dense';
import { gramSchmidt, householderQR, orthogonalityLoss } from '../../../src/core/linalg';
import { lstsq, nullSpace, projectOnto } from '../../../src/core/subspace';
import { U, matmul, ratioFactor } from './helpers';

describe('Strang, Introduction to Linear Algebra 4e', () => {
  test('§4.3 least squares: A=[1 0;1 1;1 2], b=(6,0,0) ⇒ x̂=(5,−3), p=(5,2,−1)', () => {
    // recalled, recomputed here: AᵀA = [3 3; 3 5], Aᵀb = (6, 0); det 6;
    // x̂ = (5·6 − 3·0, −3·6 + 3·0)/6 = (5, −3); p = A x̂ = (5, 2, −1).
    const a = [
      [1, 0],
      [1, 1],
      [1, 2]
    ];
    const ls = lstsq(a, [[6], [0], [0]]);
    expect(ls.x.get(0, 0)).toBeCloseTo(5, 14);
    expect(ls.x.get(1, 0)).toBeCloseTo(-3, 14);
    // the projection of b onto the column space is p
    const p = projectOnto(a, [[6], [0], [0]]).output;
    expect([p.get(0, 0), p.get(1, 0), p.get(2, 0)].map(v => Math.round(v * 1e12) / 1e12)).toEqual([
      5, 2, -1
    ]);
    // ‖e‖² = ‖b − p‖² = 1 + 4 + 1 = 6
    expect(ls.residualNorm[0]).toBeCloseTo(Math.sqrt(6), 14);
  });

  test('§4.4 Gram–Schmidt on (1,−1,0), (2,0,−2), (3,−3,3) ⇒ R=[√2 √2 √18; 0 √6 −√6; 0 0 √3]', () => {
    // recalled, recomputed here: q₁ = (1,−1,0)/√2, r₁₂ = q₁·b = 2/√2 = √2,
    // B = b − √2 q₁ = (1,1,−2), ‖B‖ = √6; r₁₃ = q₁·c = 6/√2 = √18, r₂₃ = q₂·c = −6/√6 = −√6,
    // C = c − √18 q₁ + √6 q₂ = (1,1,1), ‖C‖ = √3.
    const a = Dense.fromNested([
      [1, 2, 3],
      [-1, 0, -3],
      [0, -2, 3]
    ]);
    const expected = [
      [Math.SQRT2, Math.SQRT2, Math.sqrt(18)],
      [0, Math.sqrt(6), -Math.sqrt(6)],
      [0, 0, Math.sqrt(3)]
    ];
    for (const method of ['cgs', 'mgs', 'cgs2'] as const) {
      const g = gramSchmidt(a, { method });
      for (let i = 0; i < 3; i++) {
        for (let j = 0; j < 3; j++) {
          expect(g.R.get(i, j)).toBeCloseTo(expected[i][j], 14);
        }
      }
    }
    // Householder gives the same R up to the signs of its rows (Golub & Van Loan 4e, Thm 5.2.3)
    const r = householderQR(a).R();
    for (let i = 0; i < 3; i++) {
      const s = Math.sign(r.get(i, i));
      for (let j = 0; j < 3; j++) {
        expect(s * r.get(i, j)).toBeCloseTo(expected[i][j], 14);
      }
    }
  });

  test('§3.2 the null space of [1 1 2 3; 2 2 8 10; 3 3 10 13] has dimension 2', () => {
    // recalled, recomputed here: row 3 = row 1 + row 2, rows 1 and 2 independent ⇒ rank 2,
    // nullity 4 − 2 = 2; special solutions (−1,1,0,0) and (−1,0,−1,1) (A·s = 0 checked by hand).
    const a = [
      [1, 1, 2, 3],
      [2, 2, 8, 10],
      [3, 3, 10, 13]
    ];
    const ns = nullSpace(a);
    expect(ns.rank).toBe(2);
    expect(ns.nullity).toBe(2);
    expect(ns.residual).toBeLessThan(30 * 4 * U * 20);
    // both special solutions lie in span(N): projecting onto it leaves them unchanged
    for (const s of [
      [-1, 1, 0, 0],
      [-1, 0, -1, 1]
    ]) {
      const sp = projectOnto(ns.basis, new Dense(Float64Array.from(s), [4]), { orthonormal: true });
      for (let i = 0; i < 4; i++) {
        expect(sp.output.get(i, 0)).toBeCloseTo(s[i], 13);
      }
    }
  });
});

test('Heath, Scientific Computing 2e, ch. 3: quadratic fit gives x = (3/35, 2/5, 10/7)', () => {
  // recalled, recomputed here: with columns 1, t, t²: Σ1 = 5, Σt² = 2.5, Σt⁴ = 2.125, odd sums 0;
  // Σy = 4, Σty = 1, Σt²y = 3.25 ⇒ x₂ = 1/2.5 = 0.4; 5x₁ + 2.5x₃ = 4 and 2.5x₁ + 2.125x₃ = 3.25
  // ⇒ 0.875x₃ = 1.25, x₃ = 10/7, x₁ = 0.8 − 5/7 = 3/35.
  const t = [-1, -0.5, 0, 0.5, 1];
  const y = [1, 0.5, 0, 0.5, 2];
  const ls = lstsq(
    t.map(v => [1, v, v * v]),
    y.map(v => [v])
  );
  expect(ls.x.get(0, 0)).toBeCloseTo(3 / 35, 14);
  expect(ls.x.get(1, 0)).toBeCloseTo(2 / 5, 14);
  expect(ls.x.get(2, 0)).toBeCloseTo(10 / 7, 14);
});

describe('Trefethen & Bau, Numerical Linear Algebra (SIAM 1997)', () => {
  test('chapter 19: degree-14 fit of exp(sin 4t), κ≈2.3e10 — Householder keeps x₁₅ ≈ 1, normal equations fail', () => {
    // recalled, recomputed here: m = 100, n = 15, t = linspace(0,1), b = exp(sin 4t)/2006.787453080206
    // so that x₁₅ = 1; SciPy's lstsq on this machine gives x₁₅ = 2006.78744438 before scaling
    // (relative difference 4e-9 ≈ κ·u), and κ₂(A) = 2.27e10.
    const m = 100;
    const n = 15;
    const a = Dense.zeros([m, n], { order: 'F' });
    const b = Dense.zeros([m, 1], { order: 'F' });
    for (let i = 0; i < m; i++) {
      const ti = i / (m - 1);
      for (let j = 0; j < n; j++) {
        a.set(i, j, ti ** j);
      }
      b.set(i, 0, Math.exp(Math.sin(4 * ti)) / 2006.787453080206);
    }
    const x = lstsq(a, b).x.get(14, 0);
    expect(Math.abs(x - 1)).toBeLessThan(1e-6);
    // Normal equations solved by LU (ml-matrix): the squared condition number ~5e20 ≫ 1/u.
    const am = a.toMatrix();
    const xn = solve(am.transpose().mmul(am), am.transpose().mmul(b.toMatrix())).get(14, 0);
    expect(Math.abs(xn - 1)).toBeGreaterThan(1e-2);
    // The condition estimate of R sees the ill-conditioning (κ₁ ≥ κ₂/√n).
    expect(householderQR(a).condition().condition).toBeGreaterThan(1e9);
  });

  test('chapter 9, Experiment 3: ‖QᵀQ − I‖ ≈ 2e−16 Householder vs ≈ 3e−11 modified Gram–Schmidt', () => {
    // recalled, recomputed here with numpy on this machine: Householder 2.3e-16 (2-norm),
    // MGS 3.3e-11 (2-norm) / 2.3e-11 (1-norm).
    const a = [
      [0.7, 0.70711],
      [0.70001, 0.70711]
    ];
    const hh = orthogonalityLoss(householderQR(a).Q());
    const mgs = gramSchmidt(a, { method: 'mgs' }).orthogonalityLoss;
    expect(hh).toBeLessThan(1e-15);
    expect(mgs).toBeGreaterThan(1e-12);
    expect(mgs).toBeLessThan(1e-10);
  });
});

test('Läuchli matrix, ε = 1e−8: normal equations singular in float64, QR accurate', () => {
  // Läuchli (1961), as in Björck, Numerical Methods for Least Squares Problems (SIAM 1996),
  // §2.2.1 (from memory): A = [1 1; ε 0; 0 ε]. fl(1 + ε²) = 1 for ε = 1e-8 (ε² = 1e-16 < u), so
  // fl(AᵀA) = [1 1; 1 1], exactly singular. b = A·(1, 1) = (2, ε, ε), exact solution (1, 1).
  const eps = 1e-8;
  const a = Dense.fromNested([
    [1, 1],
    [eps, 0],
    [0, eps]
  ]);
  const am = a.toMatrix();
  const ata = am.transpose().mmul(am);
  expect(ata.get(0, 0) * ata.get(1, 1) - ata.get(0, 1) * ata.get(1, 0)).toBe(0);
  const f = householderQR(a);
  expect(ratioFactor(a, matmul(f.Q(), f.R()))).toBeLessThan(30);
  const ls = lstsq(a, [[2], [eps], [eps]]);
  // Forward error ≤ c·κ·u with κ₂(A) = √(2+ε²)/ε ≈ 1.4e8 (zero-residual problem; Higham 2e,
  // §20.1); the backward error (residual) is at the level of u.
  // In general only ≤ c·κ·u is guaranteed; here (recomputed) the error is one ulp of 1,
  // the "exact to a few ε" of the worked example.
  const kappa = Math.sqrt(2 + eps * eps) / eps;
  for (let i = 0; i < 2; i++) {
    expect(Math.abs(ls.x.get(i, 0) - 1)).toBeLessThan(10 * kappa * U);
    expect(Math.abs(ls.x.get(i, 0) - 1)).toBeLessThanOrEqual(4 * Number.EPSILON);
  }
  expect(ls.residualNorm[0]).toBeLessThan(10 * U * 2);
  expect(Matrix.isMatrix(am)).toBe(true);
});
