/**
 * Householder QR: LAPACK Working Note 41 ratio tests (the xQRT01 test: ‖A − QR‖₁/(m‖A‖₁u) and
 * ‖I − QᴴQ‖₁/(m·u), u = 2⁻⁵³, threshold 30) over seeded families, real and complex, plus a few
 * large matrices, applyQ against the formed Q, layouts and argument errors.
 */
import { Dense } from '../../../src/core/dense';
import { householderQR, geqrf } from '../../../src/core/linalg';
import {
  FAMILIES,
  Rng,
  makeMatrix,
  matmul,
  norm1,
  randn,
  ratioFactor,
  ratioOrth,
  sub
} from './helpers';

const THRESHOLD = 30; // LAWN 41: a test ratio above 30 is a failure.
const PER_FAMILY = 90; // 6 families × 90 × {real, complex} = 1080 matrices

describe.each([false, true])('Householder QR ratio tests (complex: %s)', complex => {
  const maxima: Record<string, { factor: number; orth: number; count: number }> = {};
  afterAll(() => {
    // Reported in the closing note of issue 3.
    console.log(`Householder QR ratio maxima (complex=${complex}): ${JSON.stringify(maxima)}`);
  });
  test.each(FAMILIES)('%s', family => {
    const rng = new Rng(1000 + FAMILIES.indexOf(family) + (complex ? 100 : 0));
    let mf = 0;
    let mo = 0;
    for (let t = 0; t < PER_FAMILY; t++) {
      const { a } = makeMatrix(rng, family, complex);
      const f = householderQR(a);
      const q = f.Q();
      const r = f.R();
      const rf = ratioFactor(a, matmul(q, r));
      const ro = ratioOrth(q);
      mf = Math.max(mf, rf);
      mo = Math.max(mo, ro);
      // The full Q too (LAWN 41 tests the full m×m Q in xQRT01).
      if (t % 10 === 0) {
        mo = Math.max(mo, ratioOrth(f.Q('full')));
      }
    }
    maxima[family] = { factor: mf, orth: mo, count: PER_FAMILY };
    expect(mf).toBeLessThan(THRESHOLD);
    expect(mo).toBeLessThan(THRESHOLD);
  });
});

describe('Householder QR on large matrices (blocked path)', () => {
  test.each([
    [300, 200, false],
    [150, 300, false],
    [200, 150, true],
    [100, 180, true],
    [2000, 40, false],
    [3000, 1, true]
  ])('%ix%i complex=%s', (m, n, complex) => {
    const rng = new Rng(m * 7 + n);
    const a = randn(rng, m, n, complex);
    const f = householderQR(a);
    const q = f.Q();
    expect(ratioFactor(a, matmul(q, f.R()))).toBeLessThan(THRESHOLD);
    expect(ratioOrth(q)).toBeLessThan(THRESHOLD);
  });
});

describe('applying Q without forming it', () => {
  test.each([false, true])('Q·X and Qᴴ·X match the formed full Q (complex %s)', complex => {
    const rng = new Rng(5);
    for (const [m, n, p] of [
      [70, 40, 3],
      [40, 70, 5],
      [9, 9, 1],
      [100, 37, 10]
    ]) {
      const a = randn(rng, m, n, complex);
      const x = randn(rng, m, p, complex);
      const f = householderQR(a);
      const q = f.Q('full');
      const qx = f.applyQ(x);
      const qhx = f.applyQ(x, { adjoint: true });
      const scale = norm1(x);
      expect(norm1(sub(qx, matmul(q, x))) / scale).toBeLessThan(m * 1e-15);
      expect(norm1(sub(qhx, matmul(q, x, true))) / scale).toBeLessThan(m * 1e-15);
      // Qᴴ(Q X) = X
      expect(norm1(sub(f.applyQ(qx, { adjoint: true }), x)) / scale).toBeLessThan(m * 1e-15);
    }
  });
  test('a real Q applied to complex data acts on real and imaginary parts', () => {
    const rng = new Rng(6);
    const a = randn(rng, 12, 5);
    const x = randn(rng, 12, 2, true);
    const f = householderQR(a);
    const y = f.applyQ(x, { adjoint: true });
    const q = f.Q('full');
    expect(norm1(sub(y, matmul(q, x, true)))).toBeLessThan(1e-13);
  });
});

describe('layouts and edge cases', () => {
  test('C-order, F-order and transposed views give the same R', () => {
    const rng = new Rng(8);
    const f = randn(rng, 23, 11, false, 'F');
    const c = f.copy('C');
    const viaT = c.copy('F').transpose().copy('C').transpose(); // an F view of a C buffer
    const r1 = householderQR(f).R();
    for (const other of [c, viaT]) {
      const r2 = householderQR(other).R();
      expect(norm1(sub(r1, r2))).toBe(0);
    }
  });
  test('non-unit strides through the strided kernel', () => {
    // A 5×3 matrix stored with row stride 7 and column stride 2 inside a bigger buffer.
    const rng = new Rng(9);
    const buf = new Float64Array(60).map(() => rng.normal());
    const view = new Dense(buf, [5, 3], [7, 2], 3);
    const ref = householderQR(view.copy('F'));
    const tau = new Float64Array(3);
    const work = buf.slice();
    geqrf(5, 3, work, 7, 2, 3, tau, 0);
    const r = new Dense(work, [5, 3], [7, 2], 3);
    for (let j = 0; j < 3; j++) {
      for (let i = 0; i <= j; i++) {
        expect(r.get(i, j)).toBeCloseTo(ref.R().get(i, j), 14);
      }
    }
    // Untouched entries outside the view stay as they were.
    const inView = new Set<number>();
    for (let i = 0; i < 5; i++) {
      for (let j = 0; j < 3; j++) {
        inView.add(3 + 7 * i + 2 * j);
      }
    }
    for (let e = 0; e < 60; e++) {
      if (!inView.has(e)) {
        expect(work[e]).toBe(buf[e]);
      }
    }
  });
  test('1×1, a column, a row, and zero columns', () => {
    const one = householderQR([[-3]]);
    expect(Math.abs(one.R().get(0, 0))).toBe(3);
    const col = householderQR([[3], [4]]);
    expect(Math.abs(col.R().get(0, 0))).toBeCloseTo(5, 15);
    const row = householderQR([[1, 2, 3]]);
    expect(row.R().rows).toBe(1);
    expect(Math.abs(row.Q().get(0, 0))).toBe(1);
    const z = householderQR([
      [0, 1],
      [0, 1]
    ]);
    expect(z.R().get(0, 0)).toBe(0);
    expect(ratioOrth(z.Q('full'))).toBeLessThan(THRESHOLD);
  });
  test('tiny and huge scales do not underflow or overflow', () => {
    for (const s of [1e-300, 1e300, 1e-320]) {
      const a = Dense.fromNested([
        [3 * s, 1 * s],
        [4 * s, 2 * s]
      ]);
      const f = householderQR(a);
      expect(Math.abs(f.R().get(0, 0)) / (5 * s)).toBeCloseTo(1, s < 1e-310 ? 2 : 14);
      expect(ratioOrth(f.Q())).toBeLessThan(THRESHOLD);
    }
  });
});

describe('argument errors name the argument and the value', () => {
  test('NaN and Inf name the first index', () => {
    expect(() =>
      householderQR([
        [1, 2],
        [NaN, 3]
      ])
    ).toThrow(/a\[1\]\[0\] is NaN/);
    const d = Dense.fromNested([[1, 2]], [[0, 0]]);
    d.data[3] = Infinity;
    expect(() => householderQR(d)).toThrow(/a\[0\]\[1\] is Infinity \(imaginary part\)/);
  });
  test('ragged and empty input', () => {
    expect(() => householderQR([[1, 2], [3]])).toThrow(/a is ragged: row 1 has 1 entries/);
    expect(() => householderQR([])).toThrow(/a is empty/);
    expect(() => householderQR('x' as never)).toThrow(TypeError);
  });
  test('applyQ shape mismatch', () => {
    const f = householderQR([
      [1, 2],
      [3, 4],
      [5, 6]
    ]);
    expect(() => f.applyQ([[1], [2]])).toThrow(/x has 2 rows but Q is 3x3/);
  });
});

describe('in place with tau', () => {
  test('a column-major sub-block is overwritten by R and the reflectors (LAPACK layout)', () => {
    const rng = new Rng(31);
    const big = randn(rng, 12, 9, false, 'F');
    const view = big.slice(2, 10, 1, 7); // 8×6 view, leading dimension 12
    const copy = view.copy('F');
    const before = big.copy('F');
    const f = householderQR(view, { inPlace: true });
    const ref = householderQR(copy);
    expect(f.factors).toBe(view);
    expect(norm1(sub(f.R(), ref.R()))).toBe(0);
    expect(ratioFactor(copy, matmul(f.Q(), f.R()))).toBeLessThan(THRESHOLD);
    expect(norm1(sub(f.applyQ(copy, { adjoint: true }).slice(0, 6), ref.R()))).toBeLessThan(1e-13);
    // entries outside the view are untouched
    for (let i = 0; i < 12; i++) {
      for (let j = 0; j < 9; j++) {
        if (i < 2 || i >= 10 || j < 1 || j >= 7) {
          expect(big.get(i, j)).toBe(before.get(i, j));
        }
      }
    }
  });
  test('a row-major array cannot be factored in place', () => {
    const c = Dense.fromNested([
      [1, 2],
      [3, 4]
    ]);
    expect(() => householderQR(c, { inPlace: true })).toThrow(/column-major Dense/);
  });
});

describe('exact zeros through the blocked path (τ = 0 reflectors)', () => {
  test.each([false, true])('zero columns and an already triangular block (complex %s)', complex => {
    const rng = new Rng(41 + (complex ? 1 : 0));
    const m = 120;
    const n = 70;
    const a = randn(rng, m, n, complex);
    for (const j of [0, 5, 33, 34, 69]) {
      for (let i = 0; i < m; i++) {
        a.set(i, j, 0, 0);
      }
    }
    // columns 40..49: nonzero only on and above the diagonal (nothing to eliminate)
    for (let j = 40; j < 50; j++) {
      for (let i = j + 1; i < m; i++) {
        a.set(i, j, 0, 0);
      }
    }
    const f = householderQR(a);
    const q = f.Q();
    expect(ratioFactor(a, matmul(q, f.R()))).toBeLessThan(THRESHOLD);
    expect(ratioOrth(q)).toBeLessThan(THRESHOLD);
    expect(ratioOrth(f.Q('full'))).toBeLessThan(THRESHOLD);
    // an upper triangular input gives τ = 0 throughout and R = A (real: no reflection needed)
    if (!complex) {
      const t = Dense.zeros([80, 40], { order: 'F' });
      for (let j = 0; j < 40; j++) {
        for (let i = 0; i <= j; i++) {
          t.set(i, j, rng.normal());
        }
      }
      const g = householderQR(t);
      expect(Array.from(g.tau).every(v => v === 0)).toBe(true);
      expect(norm1(sub(g.R(), t.slice(0, 40, 0, 40)))).toBe(0);
    }
  });
});
