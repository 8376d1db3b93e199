/**
 * QR with column pivoting: LAWN 41 ratio tests for A·P = Q·R (xQPT01: ‖AP − QR‖₁/(m‖A‖₁u),
 * ‖I − QᴴQ‖₁/(m·u), threshold 30), non-increasing |r_ii| (Golub & Van Loan 4e §5.4.2), the rank
 * decision with the stated default tolerance, and argument errors.
 */
import { Dense } from '../../../src/core/dense';
import { pivotedQR } from '../../../src/core/linalg';
import { FAMILIES, Rng, makeMatrix, matmul, randn, ratioFactor, ratioOrth } from './helpers';

const THRESHOLD = 30;
const PER_FAMILY = 40;

function permuteColumns(a: Dense, perm: Int32Array): Dense {
  const out = Dense.zeros([a.rows, a.cols], { complex: a.complex, order: 'F' });
  for (let j = 0; j < a.cols; j++) {
    for (let i = 0; i < a.rows; i++) {
      out.set(i, j, a.get(i, perm[j]), a.getIm(i, perm[j]));
    }
  }
  return out;
}

describe.each([false, true])('pivoted QR ratio tests (complex: %s)', complex => {
  const maxima: Record<string, object> = {};
  afterAll(() => {
    console.log(`pivoted QR ratio maxima (complex=${complex}): ${JSON.stringify(maxima)}`);
  });
  test.each(FAMILIES)('%s', family => {
    const rng = new Rng(2000 + FAMILIES.indexOf(family) + (complex ? 100 : 0));
    let mf = 0;
    let mo = 0;
    let rankHits = 0;
    let rankCases = 0;
    for (let t = 0; t < PER_FAMILY; t++) {
      const { a, rank } = makeMatrix(rng, family, complex);
      const f = pivotedQR(a);
      const q = f.Q();
      mf = Math.max(mf, ratioFactor(permuteColumns(a, f.perm), matmul(q, f.R())));
      mo = Math.max(mo, ratioOrth(q));
      const d = f.diagonal;
      for (let i = 1; i < d.length; i++) {
        // |r_ii| non-increasing up to the downdating's rounding (relative 1e-10 slack)
        expect(d[i]).toBeLessThanOrEqual(d[i - 1] * (1 + 1e-10) + 1e-300);
      }
      if (rank !== undefined) {
        rankCases++;
        // noise 1e-13 against an O(1)·√n tolerance gap: use rtol 1e-10 between noise and signal
        if (pivotedQR(a, { rtol: 1e-10 }).rank === rank) {
          rankHits++;
        }
      }
    }
    maxima[family] = { factor: mf, orth: mo, count: PER_FAMILY };
    expect(mf).toBeLessThan(THRESHOLD);
    expect(mo).toBeLessThan(THRESHOLD);
    expect(rankHits).toBe(rankCases);
  });
});

describe('rank decision', () => {
  test('default tolerance max(m,n)·ε·|r11| (DESIGN.md §3) on an exactly rank-2 matrix', () => {
    // Strang, Introduction to Linear Algebra 4e, §3.2: rows 3 = row 1 + row 2 (recalled,
    // recomputed here: 1+2=3, 1+2=3, 2+8=10, 3+10=13), so the rank is 2.
    const a = [
      [1, 1, 2, 3],
      [2, 2, 8, 10],
      [3, 3, 10, 13]
    ];
    const f = pivotedQR(a);
    expect(f.rank).toBe(2);
    expect(f.tol).toBeCloseTo(4 * Number.EPSILON * f.diagonal[0], 30);
    expect(f.diagonal[2]).toBeLessThanOrEqual(f.tol);
  });
  test('an overridden tolerance moves the rank across a clear gap', () => {
    const a = Dense.fromNested([
      [1, 0, 0],
      [0, 1e-6, 0],
      [0, 0, 1e-12]
    ]);
    expect(pivotedQR(a).rank).toBe(3);
    expect(pivotedQR(a, { tol: 1e-9 }).rank).toBe(2);
    expect(pivotedQR(a, { rtol: 1e-3 }).rank).toBe(1);
  });
  test('the zero matrix has rank 0 (a result, not an error)', () => {
    const f = pivotedQR([
      [0, 0],
      [0, 0]
    ]);
    expect(f.rank).toBe(0);
  });
  test('the permutation puts the largest column first', () => {
    const f = pivotedQR([
      [1, 10, 0],
      [0, 0, 3]
    ]);
    expect(f.perm[0]).toBe(1);
    expect(Array.from(f.perm).sort()).toEqual([0, 1, 2]);
    const p = f.P();
    expect(p.get(1, 0)).toBe(1);
  });
  test('tolerance out of range is a RangeError naming it', () => {
    expect(() => pivotedQR([[1]], { tol: -1 })).toThrow(/tol must be ≥ 0, got -1/);
    expect(() => pivotedQR([[1]], { rtol: 1 })).toThrow(/rtol must be in \[0, 1\), got 1/);
    expect(() => pivotedQR([[1]], { tol: NaN })).toThrow(/tol must be a finite number, got NaN/);
  });
});

describe('pivoted QR on larger matrices', () => {
  test.each([
    [300, 200, false],
    [120, 250, false],
    [160, 120, true]
  ])('%ix%i complex=%s', (m, n, complex) => {
    const rng = new Rng(m + n);
    const a = randn(rng, m, n, complex);
    const f = pivotedQR(a);
    const q = f.Q();
    expect(ratioFactor(permuteColumns(a, f.perm), matmul(q, f.R()))).toBeLessThan(THRESHOLD);
    expect(ratioOrth(q)).toBeLessThan(THRESHOLD);
    expect(f.rank).toBe(Math.min(m, n));
  });
});
