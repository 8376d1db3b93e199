/**
 * Null space of A (m×n) by rank-revealing QR of Aᴴ: Aᴴ·P = Q·R with rank r, so
 * null(A) = span(Q(:, r:n)) (Golub & Van Loan, Matrix Computations 4e, §5.4.2 and §2.5.1; the
 * complementary columns of Q are orthogonal to the row space). Q's trailing columns are computed
 * as Q·[0; I] without forming all of Q's columns first.
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { dormqrCM, zunmqrCM } from '../linalg/householder';
import { pivotedQR, type PivotedQROptions } from '../linalg/pivoted';

export interface NullSpaceResult {
  /** n×(n − rank) with orthonormal columns. */
  basis: Dense;
  rank: number;
  /** Nullity n − rank. */
  nullity: number;
  /** Measured ‖A·N‖_F (NaN when `measureResidual` is false). */
  residual: number;
  /** ‖A·N‖_F / ‖A‖_F (NaN when not measured). */
  relativeResidual: number;
  /** Tolerance used on |r_ii| of the QR of Aᴴ. */
  tol: number;
  /** |r_ii| of the QR of Aᴴ: the gap at `rank`. */
  diagonal: Float64Array;
}

export interface NullSpaceOptions extends PivotedQROptions {
  /** Compute ‖A·N‖_F by multiplying out (an extra 2·m·n·(n−r) flops). Default true. */
  measureResidual?: boolean;
}

/** Orthonormal basis of the null space of A (real or complex) with rank and residual. */
export function nullSpace(aIn: MatrixLike, options: NullSpaceOptions = {}): NullSpaceResult {
  const a = toDense('a', aIn);
  const m = a.rows;
  const n = a.cols;
  const ah = a.conjTranspose(); // n×m
  const f = pivotedQR(ah, options);
  const r = f.rank;
  const nullity = n - r;
  const basis = Dense.zeros([n, nullity], { complex: a.complex, order: 'F' });
  for (let j = 0; j < nullity; j++) {
    basis.set(r + j, j, 1);
  }
  const k = Math.min(n, m);
  const ld = Math.max(1, n);
  if (nullity > 0) {
    if (a.complex) {
      zunmqrCM('N', n, nullity, k, f.factors.data, 0, ld, f.tau, 0, basis.data, 0, ld);
    } else {
      dormqrCM('N', n, nullity, k, f.factors.data, 0, ld, f.tau, 0, basis.data, 0, ld);
    }
  }
  let residual = NaN;
  let relative = NaN;
  if (options.measureResidual !== false) {
    residual = nullity > 0 ? frobeniusOfProduct(a, basis) : 0;
    let na = 0;
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < n; j++) {
        na += a.get(i, j) ** 2 + a.getIm(i, j) ** 2;
      }
    }
    relative = na > 0 ? residual / Math.sqrt(na) : 0;
  }
  return {
    basis,
    rank: r,
    nullity,
    residual,
    relativeResidual: relative,
    tol: f.tol,
    diagonal: f.diagonal
  };
}

/** ‖A·B‖_F with A m×n (any layout) and B n×p column-major contiguous. */
function frobeniusOfProduct(a: Dense, b: Dense): number {
  const m = a.rows;
  const n = a.cols;
  const p = b.cols;
  const ac = a.copy('C'); // rows of A contiguous
  const A = ac.data;
  const B = b.data;
  let s = 0;
  if (!a.complex) {
    for (let j = 0; j < p; j++) {
      const bj = j * n;
      for (let i = 0; i < m; i++) {
        const ai = i * n;
        let t = 0;
        for (let q = 0; q < n; q++) {
          t += A[ai + q] * B[bj + q];
        }
        s += t * t;
      }
    }
  } else {
    for (let j = 0; j < p; j++) {
      const bj = 2 * j * n;
      for (let i = 0; i < m; i++) {
        const ai = 2 * i * n;
        let tr = 0;
        let ti = 0;
        for (let q = 0; q < 2 * n; q += 2) {
          tr += A[ai + q] * B[bj + q] - A[ai + q + 1] * B[bj + q + 1];
          ti += A[ai + q] * B[bj + q + 1] + A[ai + q + 1] * B[bj + q];
        }
        s += tr * tr + ti * ti;
      }
    }
  }
  return Math.sqrt(s);
}
