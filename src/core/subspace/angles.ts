/**
 * Principal angles between span(A) and span(B) (Björck & Golub, "Numerical methods for computing
 * angles between linear subspaces", Math. Comp. 27, 1973; Golub & Van Loan, Matrix Computations
 * 4e, §6.4.3). With orthonormal bases Q_A (m×p), Q_B (m×q), p ≥ q, the cosines are the singular
 * values of Q_AᴴQ_B; cosines lose angles below ~1e−8, so small angles come from the sines, the
 * singular values of Q_B − Q_A(Q_AᴴQ_B) (Knyazev & Argentati, "Principal angles between
 * subspaces in an A-based scalar product", SIAM J. Sci. Comput. 23, 2002; SciPy's
 * subspace_angles uses the same split at cos² = 1/2).
 *
 * The small SVDs go to ml-matrix (real only): a complex k×l matrix M = X + iY is embedded as the
 * real [[X, −Y], [Y, X]], whose singular values are those of M, each twice.
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { Dense, toDense, type MatrixLike } from '../dense';
import { householderQR } from '../linalg/qr';
import { orth } from './basis';
import { checkInteger } from '../errors';
import type { PivotedQROptions } from '../linalg/pivoted';

export interface PrincipalAngles {
  /** θ₁ ≤ θ₂ ≤ … ≤ θ_q in radians, q = min(rank A, rank B). (SciPy lists them largest first.) */
  angles: Float64Array;
  /** cos θ_i (from the SVD of Q_AᴴQ_B). */
  cosines: Float64Array;
  /** sin θ_i (from the SVD of the part of Q_B off span(A)). */
  sines: Float64Array;
  rankA: number;
  rankB: number;
}

/** Principal angles between the column spans of A and B (same number of rows). */
export function principalAngles(
  aIn: MatrixLike,
  bIn: MatrixLike,
  options: PivotedQROptions = {}
): PrincipalAngles {
  const a = toDense('a', aIn);
  const b = toDense('b', bIn);
  if (a.rows !== b.rows) {
    throw new RangeError(`a has ${a.rows} rows but b has ${b.rows}; they must match`);
  }
  let qa = orth(a, options).basis;
  let qb = orth(b, options).basis;
  const rankA = qa.cols;
  const rankB = qb.cols;
  if (qa.cols < qb.cols) {
    const t = qa;
    qa = qb;
    qb = t;
  }
  const q = qb.cols;
  if (q === 0) {
    const e = new Float64Array(0);
    return { angles: e, cosines: e, sines: e, rankA, rankB };
  }
  const complex = qa.complex || qb.complex;
  if (complex) {
    qa = qa.complex ? qa : qa.toComplex();
    qb = qb.complex ? qb : qb.toComplex();
  }
  // M = Q_AᴴQ_B (p×q) and W = Q_B − Q_A·M (m×q).
  const m = qa.rows;
  const p = qa.cols;
  const mm = Dense.zeros([p, q], { complex, order: 'F' });
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < q; j++) {
      let re = 0;
      let im = 0;
      for (let r = 0; r < m; r++) {
        const ar = qa.get(r, i);
        const ai = -qa.getIm(r, i);
        const br = qb.get(r, j);
        const bi = qb.getIm(r, j);
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      mm.set(i, j, re, im);
    }
  }
  const w = Dense.zeros([m, q], { complex, order: 'F' });
  for (let r = 0; r < m; r++) {
    for (let j = 0; j < q; j++) {
      let re = qb.get(r, j);
      let im = qb.getIm(r, j);
      for (let i = 0; i < p; i++) {
        const ar = qa.get(r, i);
        const ai = qa.getIm(r, i);
        const br = mm.get(i, j);
        const bi = mm.getIm(i, j);
        re -= ar * br - ai * bi;
        im -= ar * bi + ai * br;
      }
      w.set(r, j, re, im);
    }
  }
  const cos = svdValues(mm, q); // descending
  // Singular values of the tall W via its q×q R factor (same singular values, small SVD).
  const wr = w.rows >= q ? householderQR(w).R() : w;
  const sinDesc = svdValues(wr, q); // descending
  const angles = new Float64Array(q);
  const cosines = new Float64Array(q);
  const sines = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    const c = Math.min(1, cos[i]);
    const s = Math.min(1, sinDesc[q - 1 - i]); // ascending sines pair with descending cosines
    cosines[i] = c;
    sines[i] = s;
    angles[i] = c * c >= 0.5 ? Math.asin(s) : Math.acos(c);
  }
  return { angles, cosines, sines, rankA, rankB };
}

/**
 * The k largest singular values (descending) of a real or complex matrix (any `MatrixLike`; a 1-D
 * input is one column), via ml-matrix. k defaults to min(m, n) and must lie in [0, min(m, n)].
 */
export function singularValues(aIn: MatrixLike, k?: number): Float64Array {
  const a = toDense('a', aIn);
  const kmax = Math.min(a.rows, a.cols);
  return svdValues(a, k === undefined ? kmax : checkInteger('k', k, 0, kmax));
}

function svdValues(a: Dense, k: number): Float64Array {
  const m = a.rows;
  const n = a.cols;
  let mat: Matrix;
  if (!a.complex) {
    mat = a.toMatrix();
  } else {
    mat = new Matrix(2 * m, 2 * n);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < n; j++) {
        const x = a.get(i, j);
        const y = a.getIm(i, j);
        mat.set(i, j, x);
        mat.set(i, n + j, -y);
        mat.set(m + i, j, y);
        mat.set(m + i, n + j, x);
      }
    }
  }
  const svd = new SingularValueDecomposition(mat, {
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
    autoTranspose: true
  });
  const all = Array.from(svd.diagonal).sort((x, y) => y - x);
  const out = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    // complex: each singular value appears twice in the real embedding
    out[i] = a.complex ? (all[2 * i] ?? 0) : (all[i] ?? 0);
  }
  return out;
}
