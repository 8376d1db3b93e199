/**
 * Orthonormal basis of span(B) by rank-revealing QR (Golub & Van Loan, Matrix Computations 4e,
 * §5.4.2): B·P = Q·R, rank r = #{|r_ii| > tol}, basis = the first r columns of Q.
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { pivotedQR, type PivotedQROptions } from '../linalg/pivoted';

export interface OrthResult {
  /** m×rank, orthonormal columns spanning the numerical range of B. */
  basis: Dense;
  /** Numerical rank. */
  rank: number;
  /** Tolerance used for the rank decision (absolute, on |r_ii|). */
  tol: number;
  /** |r_ii| from the pivoted QR: the gap at `rank` shows how clear the decision was. */
  diagonal: Float64Array;
  /** Column j of B·P is column perm[j] of B. */
  perm: Int32Array;
}

/**
 * Orthonormal basis of span(B) (B m×n, real or complex; a 1-D B is one column) with its
 * numerical rank. Default tolerance max(m, n)·ε·|r₁₁|; pass `tol` (absolute) or `rtol`.
 */
export function orth(b: MatrixLike, options: PivotedQROptions = {}): OrthResult {
  const d = toDense('b', b);
  const f = pivotedQR(d, options);
  const q = f.Q();
  const basis =
    f.rank === q.cols ? q : new Dense(q.data, [q.rows, f.rank], q.strides, 0, q.complex);
  return { basis, rank: f.rank, tol: f.tol, diagonal: f.diagonal, perm: f.perm };
}
