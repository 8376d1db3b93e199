/**
 * Givens rotations: the defining equations (LAPACK 3.10 xLARTG convention; Anderson, ACM TOMS 44,
 * 2017, §4) at ordinary and extreme magnitudes where the naive √(f²+g²) overflows or underflows.
 * SciPy's dlartg/zlartg comparison lives in scipy-fixtures.test.ts.
 */
import { Dense } from '../../../src/core/dense';
import { drot, givens, givensComplex, householderQR, zrot } from '../../../src/core/linalg';
import { Rng, randn } from './helpers';
import { rowPhaseDistance } from './scipyref';

const EPS = Number.EPSILON;

function checkReal(f: number, g: number) {
  const o = new Float64Array(3);
  givens(f, g, o);
  const [c, s, r] = o;
  expect(Number.isFinite(c) && Number.isFinite(s)).toBe(true);
  // r itself overflows only when √(f²+g²) exceeds the largest double (then it must be ±Inf).
  const sc0 = Math.max(Math.abs(f), Math.abs(g));
  const exact = sc0 * Math.hypot(f / sc0, g / sc0);
  expect(Number.isFinite(r)).toBe(Number.isFinite(exact));
  if (!Number.isFinite(r)) {
    return;
  }
  expect(Math.abs(c * c + s * s - 1)).toBeLessThan(4 * EPS);
  expect(c).toBeGreaterThanOrEqual(0);
  // Residuals scaled by max(|f|,|g|) so the extreme cases are judged relatively.
  // In the subnormal range r cannot carry full relative precision: allow one unit of 2^-1074.
  const sc = Math.max(Math.abs(f), Math.abs(g));
  const tol = 4 * EPS + (2 * 2 ** -1074) / sc;
  expect(Math.abs(c * (f / sc) + s * (g / sc) - r / sc)).toBeLessThan(tol);
  expect(Math.abs(-s * (f / sc) + c * (g / sc))).toBeLessThan(tol);
  if (f !== 0) {
    expect(Math.sign(r)).toBe(Math.sign(f));
  }
}

function checkComplex(fr: number, fi: number, gr: number, gi: number) {
  const o = new Float64Array(5);
  givensComplex(fr, fi, gr, gi, o);
  const [c, sr, si, rr, ri] = o;
  for (const v of o) {
    expect(Number.isFinite(v)).toBe(true);
  }
  expect(Math.abs(c * c + sr * sr + si * si - 1)).toBeLessThan(6 * EPS);
  const sc = Math.max(Math.abs(fr), Math.abs(fi), Math.abs(gr), Math.abs(gi));
  const [a, b, p, q] = [fr / sc, fi / sc, gr / sc, gi / sc];
  // c f + s g = r
  expect(Math.abs(c * a + sr * p - si * q - rr / sc)).toBeLessThan(8 * EPS);
  expect(Math.abs(c * b + sr * q + si * p - ri / sc)).toBeLessThan(8 * EPS);
  // −conj(s) f + c g = 0
  expect(Math.abs(-(sr * a + si * b) + c * p)).toBeLessThan(8 * EPS);
  expect(Math.abs(-(sr * b - si * a) + c * q)).toBeLessThan(8 * EPS);
  // |r|² = |f|² + |g|² (scaled)
  expect(Math.abs(Math.hypot(rr / sc, ri / sc) - Math.hypot(a, b, p, q))).toBeLessThan(8 * EPS);
}

describe('real Givens', () => {
  test('3-4-5 and the special cases', () => {
    const o = new Float64Array(3);
    givens(3, 4, o);
    expect(Array.from(o)).toEqual([0.6, 0.8, 5]);
    givens(5, 0, o);
    expect(Array.from(o)).toEqual([1, 0, 5]);
    givens(0, -2, o);
    expect(Array.from(o)).toEqual([0, -1, 2]);
    givens(-3, 4, o);
    expect(o[2]).toBe(-5);
  });
  test('no overflow or underflow at extreme magnitudes', () => {
    const vals = [1e308, 1.7e308, 1e-308, 5e-324, 1e154, 1e-160, 1, 3];
    for (const f of vals) {
      for (const g of vals) {
        checkReal(f, g);
        checkReal(-f, g);
        checkReal(f, -g);
      }
    }
  });
  test('random pairs', () => {
    const rng = new Rng(11);
    for (let k = 0; k < 500; k++) {
      checkReal(rng.normal() * 10 ** rng.int(-300, 300), rng.normal() * 10 ** rng.int(-300, 300));
    }
  });
  test('drot applies the rotation and zeros the target on strided pairs', () => {
    const o = new Float64Array(3);
    givens(3, 4, o);
    const x = Float64Array.from([3, 0, 1]);
    const y = Float64Array.from([4, 0, 2]);
    drot(2, x, 2, 0, y, 2, 0, o[0], o[1]);
    expect(x[0]).toBeCloseTo(5, 15);
    expect(y[0]).toBeCloseTo(0, 15);
    expect(x[2]).toBeCloseTo(0.6 + 1.6, 15);
    expect(y[2]).toBeCloseTo(-0.8 + 1.2, 15);
  });
});

describe('complex Givens', () => {
  test('a hand-checked case: f = 1+2i, g = 3−i', () => {
    // |f|² = 5, |g|² = 10, c = √(5/15) = 1/√3, r = f·√15/√5 = √3(1+2i),
    // s = conj(g)·f/(|f|√15) = (3+i)(1+2i)/(√5√15) = (1+7i)/(5√3).
    const o = new Float64Array(5);
    givensComplex(1, 2, 3, -1, o);
    expect(o[0]).toBeCloseTo(1 / Math.sqrt(3), 15);
    expect(o[1]).toBeCloseTo(1 / (5 * Math.sqrt(3)), 15);
    expect(o[2]).toBeCloseTo(7 / (5 * Math.sqrt(3)), 15);
    expect(o[3]).toBeCloseTo(Math.sqrt(3), 14);
    expect(o[4]).toBeCloseTo(2 * Math.sqrt(3), 14);
  });
  test('special cases f = 0, g = 0', () => {
    const o = new Float64Array(5);
    givensComplex(0, 0, 0, 2, o);
    expect(Array.from(o)).toEqual([0, 0, -1, 2, 0]);
    givensComplex(1, -1, 0, 0, o);
    expect(Array.from(o)).toEqual([1, 0, 0, 1, -1]);
    checkComplex(0, 0, 3, 4);
    checkComplex(0, 0, 3e300, 4e300);
    checkComplex(0, 0, 3e-310, 4e-310);
  });
  test('no overflow or underflow at extreme magnitudes', () => {
    const vals = [1e308, 1e-308, 5e-324, 1e154, 1e-160, 1, 0];
    for (const a of vals) {
      for (const b of vals) {
        for (const p of vals) {
          for (const q of [1e300, 1e-300, 2]) {
            if (a === 0 && b === 0) {
              continue;
            }
            checkComplex(a, -b, p, q);
          }
        }
      }
    }
  });
  test('random pairs over wide exponent ranges', () => {
    const rng = new Rng(12);
    for (let k = 0; k < 500; k++) {
      const e = () => 10 ** rng.int(-300, 300);
      checkComplex(rng.normal() * e(), rng.normal() * e(), rng.normal() * e(), rng.normal() * e());
    }
  });
  test('zrot zeros the second component', () => {
    const o = new Float64Array(5);
    givensComplex(1, 2, 3, -1, o);
    const x = Float64Array.from([1, 2]);
    const y = Float64Array.from([3, -1]);
    zrot(1, x, 1, 0, y, 1, 0, o[0], o[1], o[2]);
    expect(x[0]).toBeCloseTo(o[3], 14);
    expect(x[1]).toBeCloseTo(o[4], 14);
    expect(Math.abs(y[0]) + Math.abs(y[1])).toBeLessThan(1e-15);
  });
});

describe('updating a factorisation with Givens rotations', () => {
  // Appending a row u to A: [R; uᴴ-row] is brought back to triangular form by n rotations,
  // giving the R of [A; u] up to row phases (Golub & Van Loan, Matrix Computations 4e, §6.5.3).
  test.each([false, true])(
    'row append matches the Householder R of the stacked matrix (complex %s)',
    complex => {
      const rng = new Rng(21 + (complex ? 1 : 0));
      const m = 12;
      const n = 5;
      const a = randn(rng, m, n, complex);
      const u = randn(rng, 1, n, complex);
      const r = householderQR(a).R().copy('F'); // n×n, column-major
      const row = u.copy('F'); // 1×n
      const o = new Float64Array(5);
      for (let k = 0; k < n; k++) {
        if (complex) {
          givensComplex(r.get(k, k), r.getIm(k, k), row.get(0, k), row.getIm(0, k), o);
          // rotate row k of R (stride n) against the new row (stride 1), columns k..n−1
          zrot(n - k, r.data, n, k + k * n, row.data, 1, k, o[0], o[1], o[2]);
        } else {
          givens(r.get(k, k), row.get(0, k), o);
          drot(n - k, r.data, n, k + k * n, row.data, 1, k, o[0], o[1]);
        }
      }
      const stacked = Dense.zeros([m + 1, n], { complex, order: 'F' });
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < n; j++) {
          stacked.set(i, j, a.get(i, j), a.getIm(i, j));
        }
      }
      for (let j = 0; j < n; j++) {
        stacked.set(m, j, u.get(0, j), u.getIm(0, j));
        expect(Math.hypot(row.get(0, j), row.getIm(0, j))).toBeLessThan(1e-14);
      }
      expect(rowPhaseDistance(r, householderQR(stacked).R())).toBeLessThan(1e-14);
    }
  );
});
