/**
 * Property-based tests (fast-check 4) on random shapes, including 1×1, m < n and strided views
 * with non-unit strides and offsets inside a larger buffer. Invariants: the LAWN 41 ratios of
 * Householder and pivoted QR stay below 30, Qᴴ(Qx) = x, projections are idempotent with a
 * residual orthogonal to the basis, the least-squares residual is orthogonal to range(A), and
 * the views give the same result as their contiguous copies.
 */
import fc from 'fast-check';
import { Dense } from '../../../src/core/dense';
import { dnrm2, householderQR, pivotedQR } from '../../../src/core/linalg';
import { lstsq, projectOff, projectOnto } from '../../../src/core/subspace';
import { Rng, U, matmul, norm1, ratioFactor, ratioOrth, sub } from './helpers';

const shape = fc.record({
  m: fc.integer({ min: 1, max: 12 }),
  n: fc.integer({ min: 1, max: 12 }),
  complex: fc.boolean(),
  rowMajor: fc.boolean(),
  pad: fc.integer({ min: 0, max: 3 }),
  step: fc.integer({ min: 1, max: 3 }),
  offset: fc.integer({ min: 0, max: 5 }),
  seed: fc.integer({ min: 0, max: 2 ** 31 - 1 })
});

type Shape = {
  m: number;
  n: number;
  complex: boolean;
  rowMajor: boolean;
  pad: number;
  step: number;
  offset: number;
  seed: number;
};

/** A random m×n matrix as a strided view (non-unit inner step, padding, offset) of a buffer. */
function view(s: Shape, rows = s.m, cols = s.n): Dense {
  const rng = new Rng(s.seed);
  const inner = s.step;
  const outer = inner * (s.rowMajor ? cols : rows) + s.pad;
  const strides = s.rowMajor ? [outer, inner] : [inner, outer];
  const size = s.offset + outer * (s.rowMajor ? rows : cols) + 1;
  const data = new Float64Array((s.complex ? 2 : 1) * size).map(() => rng.normal());
  return new Dense(data, [rows, cols], strides, s.offset, s.complex);
}

// Always include the corner shapes: 1×1, a single row (m < n), a single column, strided.
const corners: Shape[] = [
  { m: 1, n: 1, complex: false, rowMajor: false, pad: 0, step: 1, offset: 0, seed: 1 },
  { m: 1, n: 1, complex: true, rowMajor: true, pad: 2, step: 3, offset: 4, seed: 2 },
  { m: 1, n: 7, complex: false, rowMajor: true, pad: 1, step: 2, offset: 1, seed: 3 },
  { m: 3, n: 9, complex: true, rowMajor: false, pad: 3, step: 2, offset: 5, seed: 4 },
  { m: 9, n: 1, complex: false, rowMajor: false, pad: 2, step: 3, offset: 2, seed: 5 }
];
const runs = { numRuns: 150, seed: 20261202, examples: corners.map(c => [c] as [Shape]) };

test('Householder QR: LAWN 41 ratios < 30 and Qᴴ(Qx) = x on strided views', () => {
  fc.assert(
    fc.property(shape, s => {
      const a = view(s);
      const f = householderQR(a);
      const q = f.Q();
      if (ratioFactor(a, matmul(q, f.R())) >= 30 || ratioOrth(q) >= 30) {
        return false;
      }
      const x = view({ ...s, seed: s.seed + 1 }, s.m, 2);
      const back = f.applyQ(f.applyQ(x), { adjoint: true });
      return norm1(sub(back, x)) <= 30 * s.m * U * norm1(x);
    }),
    runs
  );
});

test('a strided view factors exactly like its contiguous copy', () => {
  fc.assert(
    fc.property(shape, s => {
      const a = view(s);
      const r1 = householderQR(a).R();
      const r2 = householderQR(a.copy('F')).R();
      return norm1(sub(r1, r2)) === 0;
    }),
    runs
  );
});

test('pivoted QR: ratios < 30, |r_ii| non-increasing, perm a permutation', () => {
  fc.assert(
    fc.property(shape, s => {
      const a = view(s);
      const f = pivotedQR(a);
      const ap = Dense.zeros([s.m, s.n], { complex: s.complex, order: 'F' });
      for (let j = 0; j < s.n; j++) {
        for (let i = 0; i < s.m; i++) {
          ap.set(i, j, a.get(i, f.perm[j]), a.getIm(i, f.perm[j]));
        }
      }
      const d = f.diagonal;
      for (let i = 1; i < d.length; i++) {
        if (d[i] > d[i - 1] * (1 + 1e-10)) {
          return false;
        }
      }
      const sorted = Array.from(f.perm).sort((x, y) => x - y);
      return (
        sorted.every((v, i) => v === i) &&
        ratioFactor(ap, matmul(f.Q(), f.R())) < 30 &&
        ratioOrth(f.Q()) < 30
      );
    }),
    runs
  );
});

test('projection: idempotent, residual orthogonal to the basis, onto + off = x', () => {
  fc.assert(
    fc.property(shape, fc.integer({ min: 1, max: 30 }), (s, nvec) => {
      const b = view(s);
      const x = view({ ...s, seed: s.seed + 7 }, s.m, nvec);
      const onto = projectOnto(b, x);
      const off = projectOff(b, x);
      const q = onto.basis;
      const xn = Math.max(norm1(x), 1e-300);
      const idem = norm1(
        sub(projectOnto(q, onto.output, { orthonormal: true }).output, onto.output)
      );
      const perp = norm1(matmul(q, off.output, true));
      let split = 0;
      for (let i = 0; i < s.m; i++) {
        for (let j = 0; j < nvec; j++) {
          split = Math.max(
            split,
            Math.hypot(
              onto.output.get(i, j) + off.output.get(i, j) - x.get(i, j),
              onto.output.getIm(i, j) + off.output.getIm(i, j) - x.getIm(i, j)
            )
          );
        }
      }
      return idem < 30 * s.m * U * xn && perp < 30 * s.m * U * xn && split < 30 * s.m * U * xn;
    }),
    { numRuns: 150, seed: 20261202, examples: corners.map(c => [c, 3] as [Shape, number]) }
  );
});

test('least squares: Aᴴ(b − Ax) ≈ 0 for full-column-rank A (m ≥ n)', () => {
  fc.assert(
    fc.property(shape, s => {
      const m = Math.max(s.m, s.n);
      const a = view({ ...s, m }, m, s.n);
      const b = view({ ...s, seed: s.seed + 3 }, m, 1);
      const ls = lstsq(a, b);
      if (ls.rank < s.n) {
        return true; // Gaussian matrices are full rank with probability 1; nothing to check
      }
      const r = sub(b, matmul(a, ls.x));
      const kappa = householderQR(a).condition().condition;
      return norm1(matmul(a, r, true)) <= 100 * m * kappa * U * norm1(a) * norm1(b);
    }),
    runs
  );
});

test('dnrm2 is exactly homogeneous under powers of two and never overflows', () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 40 }),
      fc.integer({ min: -1000, max: 1000 }),
      (xs, e) => {
        const x = Float64Array.from(xs);
        const base = dnrm2(x.length, x, 1, 0);
        const scale = 2 ** e;
        const y = x.map(v => v * scale);
        // skip scalings that overflow or lose the data itself to underflow
        if (!y.every(Number.isFinite) || y.some((v, i) => x[i] !== 0 && Math.abs(v) < 2 ** -1000)) {
          return true;
        }
        const scaled = dnrm2(y.length, y, 1, 0);
        return Number.isFinite(scaled) && Math.abs(scaled / scale - base) <= 4e-16 * base;
      }
    ),
    { numRuns: 150, seed: 20261202 }
  );
});
