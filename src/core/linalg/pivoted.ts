/**
 * QR with column pivoting (rank-revealing): A·P = Q·R with |r₁₁| ≥ |r₂₂| ≥ … (Businger & Golub,
 * "Linear least squares solutions by Householder transformations", Numer. Math. 7, 1965;
 * Golub & Van Loan, Matrix Computations 4e, §5.4.2, Algorithm 5.4.1). Column norms are
 * downdated with the safeguard of Drmač & Bujanović ("On the failure of rank-revealing QR
 * factorization software — a case study", ACM TOMS 35(2), 2008; LAPACK 3.1+ xLAQP2) and
 * recomputed when cancellation makes the downdate unreliable.
 *
 * Numerical rank r = #{i : |r_ii| > tol}, with the default tol = max(m, n)·ε·|r₁₁|
 * (ε = Number.EPSILON = 2⁻⁵², as numpy.linalg.matrix_rank), overridable. Rank deficiency is a
 * result (the `rank` field), never an error.
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { checkNumber } from '../errors';
import { dnrm2, dznrm2 } from './blas';
import { dlarfg, zlarfg } from './reflector';
import { HouseholderQR } from './qr';

const TOL3Z = Math.sqrt(Number.EPSILON);

/**
 * Pivoted Householder QR in place on a column-major m×n block (LAPACK dgeqp3 semantics,
 * unblocked). jpvt receives the permutation: column j of A·P is column jpvt[j] of A.
 * `norms` is scratch of 2n numbers.
 */
export function dgeqp3CM(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  jpvt: Int32Array,
  tau: Float64Array,
  otau: number,
  norms: Float64Array = new Float64Array(2 * n)
): void {
  const k = Math.min(m, n);
  for (let j = 0; j < n; j++) {
    jpvt[j] = j;
    const v = dnrm2(m, a, 1, oa + j * lda);
    norms[j] = v;
    norms[n + j] = v;
  }
  for (let i = 0; i < k; i++) {
    // Pivot: the remaining column of largest (downdated) norm.
    let pvt = i;
    for (let j = i + 1; j < n; j++) {
      if (norms[j] > norms[pvt]) {
        pvt = j;
      }
    }
    if (pvt !== i) {
      const cp = oa + pvt * lda;
      const ci = oa + i * lda;
      for (let r = 0; r < m; r++) {
        const t = a[cp + r];
        a[cp + r] = a[ci + r];
        a[ci + r] = t;
      }
      const tj = jpvt[pvt];
      jpvt[pvt] = jpvt[i];
      jpvt[i] = tj;
      norms[pvt] = norms[i];
      norms[n + pvt] = norms[n + i];
    }
    const ii = oa + i + i * lda;
    const t = i < m - 1 ? dlarfg(m - i, a, ii, a, 1, ii + 1) : 0;
    tau[otau + i] = t;
    if (i + 1 < n && t !== 0) {
      const aii = a[ii];
      a[ii] = 1;
      for (let j = i + 1; j < n; j++) {
        const cj = oa + i + j * lda;
        let s = 0;
        for (let r = 0; r < m - i; r++) {
          s += a[ii + r] * a[cj + r];
        }
        s *= t;
        for (let r = 0; r < m - i; r++) {
          a[cj + r] -= s * a[ii + r];
        }
      }
      a[ii] = aii;
    }
    // Downdate the norms of the remaining columns (Drmač & Bujanović safeguard).
    for (let j = i + 1; j < n; j++) {
      if (norms[j] !== 0) {
        const q = Math.abs(a[oa + i + j * lda]) / norms[j];
        let temp = 1 - q * q;
        temp = temp < 0 ? 0 : temp;
        const ratio = norms[j] / norms[n + j];
        const temp2 = temp * ratio * ratio;
        if (temp2 <= TOL3Z) {
          const v = i + 1 < m ? dnrm2(m - i - 1, a, 1, oa + i + 1 + j * lda) : 0;
          norms[j] = v;
          norms[n + j] = v;
        } else {
          norms[j] *= Math.sqrt(temp);
        }
      }
    }
  }
}

/** Complex pivoted QR (LAPACK zgeqp3 semantics, unblocked), column-major, element offsets. */
export function zgeqp3CM(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  jpvt: Int32Array,
  tau: Float64Array,
  otau: number,
  norms: Float64Array = new Float64Array(2 * n)
): void {
  const k = Math.min(m, n);
  for (let j = 0; j < n; j++) {
    jpvt[j] = j;
    const v = dznrm2(m, a, 1, oa + j * lda);
    norms[j] = v;
    norms[n + j] = v;
  }
  for (let i = 0; i < k; i++) {
    let pvt = i;
    for (let j = i + 1; j < n; j++) {
      if (norms[j] > norms[pvt]) {
        pvt = j;
      }
    }
    if (pvt !== i) {
      const cp = 2 * (oa + pvt * lda);
      const ci = 2 * (oa + i * lda);
      for (let r = 0; r < 2 * m; r++) {
        const t = a[cp + r];
        a[cp + r] = a[ci + r];
        a[ci + r] = t;
      }
      const tj = jpvt[pvt];
      jpvt[pvt] = jpvt[i];
      jpvt[i] = tj;
      norms[pvt] = norms[i];
      norms[n + pvt] = norms[n + i];
    }
    const ii = oa + i + i * lda;
    zlarfg(m - i, a, ii, a, 1, ii + 1, tau, 2 * (otau + i));
    const tr = tau[2 * (otau + i)];
    const ti = -tau[2 * (otau + i) + 1];
    if (i + 1 < n && (tr !== 0 || ti !== 0)) {
      const p = 2 * ii;
      const ar = a[p];
      const ai = a[p + 1];
      a[p] = 1;
      a[p + 1] = 0;
      const len = 2 * (m - i);
      for (let j = i + 1; j < n; j++) {
        const cj = 2 * (oa + i + j * lda);
        let sr = 0,
          si = 0;
        for (let r = 0; r < len; r += 2) {
          const vr = a[p + r],
            vi = a[p + r + 1];
          const xr = a[cj + r],
            xi = a[cj + r + 1];
          sr += vr * xr + vi * xi;
          si += vr * xi - vi * xr;
        }
        const fr = tr * sr - ti * si;
        const fi = tr * si + ti * sr;
        for (let r = 0; r < len; r += 2) {
          const vr = a[p + r],
            vi = a[p + r + 1];
          a[cj + r] -= fr * vr - fi * vi;
          a[cj + r + 1] -= fr * vi + fi * vr;
        }
      }
      a[p] = ar;
      a[p + 1] = ai;
    }
    for (let j = i + 1; j < n; j++) {
      if (norms[j] !== 0) {
        const e = 2 * (oa + i + j * lda);
        const q = Math.hypot(a[e], a[e + 1]) / norms[j];
        let temp = 1 - q * q;
        temp = temp < 0 ? 0 : temp;
        const ratio = norms[j] / norms[n + j];
        const temp2 = temp * ratio * ratio;
        if (temp2 <= TOL3Z) {
          const v = i + 1 < m ? dznrm2(m - i - 1, a, 1, oa + i + 1 + j * lda) : 0;
          norms[j] = v;
          norms[n + j] = v;
        } else {
          norms[j] *= Math.sqrt(temp);
        }
      }
    }
  }
}

/** Result of `pivotedQR`: the factored form plus the permutation and the numerical rank. */
export class PivotedQR extends HouseholderQR {
  /** Column j of A·P is column perm[j] of A. */
  readonly perm: Int32Array;
  /** Numerical rank: the number of |r_ii| above `tol`. */
  readonly rank: number;
  /** The tolerance used for the rank decision. */
  readonly tol: number;
  /**
   * |r_ii|, i < min(m, n): the rank-revealing diagonal (non-increasing). A property, as on the
   * results of `orth`, `nullSpace` and `lstsq`.
   */
  readonly diagonal: Float64Array;

  constructor(factors: Dense, tau: Float64Array, perm: Int32Array, tol: number) {
    super(factors, tau);
    this.perm = perm;
    this.tol = tol;
    const k = Math.min(factors.rows, factors.cols);
    const d = new Float64Array(k);
    for (let i = 0; i < k; i++) {
      d[i] = Math.hypot(factors.get(i, i), factors.getIm(i, i));
    }
    this.diagonal = d;
    let r = 0;
    while (r < k && d[r] > tol) {
      r++;
    }
    this.rank = r;
  }

  /** The permutation as an n×n matrix P (A·P = Q·R). */
  P(): Dense {
    const n = this.n;
    const p = Dense.zeros([n, n], { order: 'F' });
    for (let j = 0; j < n; j++) {
      p.set(this.perm[j], j, 1);
    }
    return p;
  }
}

export interface PivotedQROptions {
  /**
   * Absolute tolerance for the rank decision: |r_ii| > tol counts. Default
   * max(m, n)·ε·|r₁₁| with ε = 2⁻⁵² (`rtol` scales |r₁₁| instead, if given).
   */
  tol?: number;
  /** Relative tolerance: tol = rtol·|r₁₁|. Must be in [0, 1). */
  rtol?: number;
}

/**
 * Rank-revealing QR with column pivoting of A (real or complex): A·P = Q·R. The input is copied.
 */
export function pivotedQR(a: MatrixLike, options: PivotedQROptions = {}): PivotedQR {
  const d = toDense('a', a);
  if (d.rows === 0 || d.cols === 0) {
    throw new RangeError(`a is empty (${d.rows}x${d.cols}); give at least one row and column`);
  }
  if (options.tol !== undefined) {
    checkNumber('tol', options.tol);
    if (options.tol < 0) {
      throw new RangeError(`tol must be ≥ 0, got ${options.tol}`);
    }
  }
  if (options.rtol !== undefined) {
    checkNumber('rtol', options.rtol);
    if (options.rtol < 0 || options.rtol >= 1) {
      throw new RangeError(`rtol must be in [0, 1), got ${options.rtol}`);
    }
  }
  const f = d.copy('F');
  const m = f.rows;
  const n = f.cols;
  const k = Math.min(m, n);
  const tau = new Float64Array(f.complex ? 2 * k : k);
  const perm = new Int32Array(n);
  (f.complex ? zgeqp3CM : dgeqp3CM)(m, n, f.data, 0, Math.max(1, m), perm, tau, 0);
  const r11 = Math.hypot(f.get(0, 0), f.getIm(0, 0));
  const tol =
    options.tol ??
    (options.rtol !== undefined ? options.rtol * r11 : Math.max(m, n) * Number.EPSILON * r11);
  return new PivotedQR(f, tau, perm, tol);
}

/** Default rank tolerance for an m×n matrix whose largest |r_ii| is r11 (DESIGN.md §3). */
export function defaultRankTol(m: number, n: number, r11: number): number {
  return Math.max(m, n) * Number.EPSILON * r11;
}
