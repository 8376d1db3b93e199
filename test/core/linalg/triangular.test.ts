/**
 * Triangular solves (BLAS xTRSV semantics) checked by residuals, and the 1-norm condition
 * estimate (Higham, ACM TOMS 14, 1988) against the exact κ₁ from the explicit inverse: the
 * estimate is a lower bound (Higham, Accuracy and Stability 2e, §15.3) and, on these seeded
 * matrices, within a factor 3 of the truth in most cases.
 */
import { Dense } from '../../../src/core/dense';
import {
  householderQR,
  solveTriangular,
  triangularCondition,
  dtrsv
} from '../../../src/core/linalg';
import { Rng, matmul, norm1, randn, sub } from './helpers';

function triangle(rng: Rng, n: number, lower: boolean, complex: boolean, grade = 0): Dense {
  const t = randn(rng, n, n, complex);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (lower ? j > i : j < i) {
        t.set(i, j, 0, 0);
      }
    }
    // a dominant-ish diagonal, optionally graded to make κ large
    t.set(
      i,
      i,
      (2 + Math.abs(t.get(i, i))) * 10 ** ((-grade * i) / Math.max(1, n - 1)),
      t.getIm(i, i)
    );
  }
  return t;
}

describe.each([false, true])('solveTriangular (complex %s)', complex => {
  test.each([
    [false, 'N'],
    [false, 'T'],
    [false, 'C'],
    [true, 'N'],
    [true, 'T'],
    [true, 'C']
  ] as const)('lower=%s trans=%s', (lower, trans) => {
    const rng = new Rng(lower ? 1 : 2);
    for (const n of [1, 2, 7, 40]) {
      const t = triangle(rng, n, lower, complex);
      const b = randn(rng, n, 3, complex);
      const x = solveTriangular(t, b, { lower, trans });
      let op = t;
      if (trans === 'T') {
        op = t.transpose();
      } else if (trans === 'C') {
        op = t.conjTranspose();
      }
      const res = norm1(sub(matmul(op, x), b));
      // backward-stable: residual ≤ n·u·‖T‖·‖x‖ (Higham 2e, Theorem 8.5), generous factor 10
      expect(res).toBeLessThanOrEqual(10 * n * 2 ** -53 * norm1(t) * norm1(x));
    }
  });
});

describe('triangular kernel on a strided view', () => {
  test('row-major storage with an offset', () => {
    // T = [2 1; 0 4] stored row-major at offset 1; x = T⁻¹(4, 8) = (1, 2)
    const a = Float64Array.from([99, 2, 1, 0, 4]);
    const x = Float64Array.from([4, 0, 8]);
    dtrsv('U', 'N', false, 2, a, 2, 1, 1, x, 2, 0);
    expect([x[0], x[2]]).toEqual([1, 2]);
  });
  test('singular diagonal is a RangeError naming the entry', () => {
    expect(() =>
      solveTriangular(
        [
          [1, 2],
          [0, 0]
        ],
        [[1], [1]]
      )
    ).toThrow(/t\[1\]\[1\] is 0/);
    expect(() => solveTriangular([[1, 2]], [[1]])).toThrow(/t must be square, got 1x2/);
  });
});

describe('condition estimate', () => {
  function exactInverseNorm1(t: Dense, lower: boolean): number {
    const n = t.rows;
    const eye = Dense.eye(n, { complex: t.complex, order: 'F' });
    return norm1(solveTriangular(t, eye, { lower }));
  }
  test.each([false, true])('lower bound and within 3× mostly (complex %s)', complex => {
    const rng = new Rng(40 + (complex ? 1 : 0));
    let within3 = 0;
    let total = 0;
    for (let t = 0; t < 120; t++) {
      const n = rng.int(1, 30);
      const lower = rng.uniform() < 0.5;
      const tri = triangle(rng, n, lower, complex, rng.int(0, 10));
      const est = triangularCondition(tri, { lower });
      const exact = exactInverseNorm1(tri, lower);
      expect(est.norm).toBeCloseTo(norm1(tri), 10);
      expect(est.inverseNorm).toBeLessThanOrEqual(exact * (1 + 1e-10));
      total++;
      if (est.inverseNorm >= exact / 3) {
        within3++;
      }
    }
    // Higham (1988) reports the estimate within a factor 3 in the vast majority of cases.
    expect(within3 / total).toBeGreaterThan(0.9);
  });
  test('κ of R from QR tracks κ of A', () => {
    const rng = new Rng(5);
    const a = randn(rng, 30, 10);
    for (let j = 0; j < 10; j++) {
      for (let i = 0; i < 30; i++) {
        a.set(i, j, a.get(i, j) * 10 ** -j);
      }
    }
    const c = householderQR(a).condition();
    expect(c.condition).toBeGreaterThan(1e8);
    expect(c.condition).toBeLessThan(1e11);
    expect(triangularCondition([[0]]).rcond).toBe(0);
  });
});
