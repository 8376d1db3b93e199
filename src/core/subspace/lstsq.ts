/**
 * Linear least squares min‖A·x − b‖₂, real or complex, one or many right-hand sides.
 *
 * A·P = Q·R by rank-revealing QR (for m ≥ 2n, a plain blocked QR first, then the pivoted QR of
 * the n×n R: the column norms, hence the pivots, are those of A — Golub & Van Loan, Matrix
 * Computations 4e, §5.4.2 and §5.5). With numerical rank r:
 *  - r = n: x = P·R⁻¹·(Qᴴb)(0:n) (Golub & Van Loan 4e §5.3.3, Algorithm 5.3.2);
 *  - r < n: the complete orthogonal decomposition [R₁₁ R₁₂] = [L 0]·Zᴴ (from a QR of
 *    [R₁₁ R₁₂]ᴴ) gives the minimum-norm solution x = P·Z·[L⁻¹c₁; 0] (Golub & Van Loan 4e
 *    §5.5.2; Lawson & Hanson, Solving Least Squares Problems, SIAM 1995; LAPACK xGELSY).
 * Rank deficiency is reported in the result, never thrown.
 *
 * Rank rule: r = the number of |r_ii| of the pivoted R above tol, tol = max(m, n)·ε·|r₁₁| unless
 * `tol` or `rtol` is given (LAPACK xGELSY decides with an incremental condition estimate
 * instead). Cost: for m ≥ 2n Q is never formed — [A b] is factored in one blocked QR, so Qᴴb
 * comes out of the trailing updates — and the pivoted QR runs on the n×n R only (O(n³); at
 * 10000×50 about 0.15 ms of ≈ 20 ms), so a cheaper condition-estimate test first would not pay.
 */
import { Dense, asVector, isVectorInput, toDense, type MatrixLike } from '../dense';
import { dgeqrfCM, dormqrCM, zgeqrfCM, zunmqrCM } from '../linalg/householder';
import { dgeqp3CM, zgeqp3CM } from '../linalg/pivoted';
import { dtrsv, ztrsv } from '../linalg/triangular';
import { checkNumber } from '../errors';

export interface LeastSquaresResult {
  /** n×p solution for an m×p b; a 1-D b gives a 1-D x of length n. Minimum-norm when rank < n. */
  x: Dense;
  /** Numerical rank of A. */
  rank: number;
  /** Tolerance used on |r_ii| (absolute). */
  tol: number;
  /** ‖b_j − A·x_j‖₂ for each right-hand side, measured. */
  residualNorm: Float64Array;
  /** |r_ii| of the rank-revealing QR. */
  diagonal: Float64Array;
}

export interface LeastSquaresOptions {
  /** Absolute tolerance on |r_ii| (default max(m, n)·ε·|r₁₁|). */
  tol?: number;
  /** Relative tolerance: tol = rtol·|r₁₁|, in [0, 1). */
  rtol?: number;
}

/** Solves min‖A·x − b‖₂ (minimum-norm x when A is rank-deficient). */
export function lstsq(
  aIn: MatrixLike,
  bIn: MatrixLike,
  options: LeastSquaresOptions = {}
): LeastSquaresResult {
  const a0 = toDense('a', aIn);
  const b0 = toDense('b', bIn);
  const m = a0.rows;
  const n = a0.cols;
  if (m === 0 || n === 0) {
    throw new RangeError(`a is empty (${m}x${n}); give at least one row and column`);
  }
  if (b0.rows !== m) {
    throw new RangeError(`b has ${b0.rows} rows but a is ${m}x${n}; they must match`);
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
  const complex = a0.complex || b0.complex;
  const p = b0.cols;
  const tall = m >= 2 * n;
  // Tall: factor [A b] (m×(n+p)) in one blocked QR, so Q₀ᴴb comes out of the trailing updates
  // (its top n rows are Q₀ᴴb's, whatever the extra reflectors do below them).
  const a = tall
    ? augmented(a0, b0, complex)
    : complex && !a0.complex
      ? a0.toComplex().copy('F')
      : a0.copy('F');
  const c = tall ? a : complex && !b0.complex ? b0.toComplex().copy('F') : b0.copy('F');
  const f = complex ? 2 : 1;
  const geqrf = complex ? zgeqrfCM : dgeqrfCM;
  const geqp3 = complex ? zgeqp3CM : dgeqp3CM;
  const lda = m;
  const perm = new Int32Array(n);
  // R: the n'×n upper-trapezoidal factor to work with (column-major, ldr), c its rhs rows.
  let rdata: Float64Array;
  let ldr: number;
  let rows: number; // rows of R (min(m, n))
  let cTop: Float64Array; // rows×p right-hand side Qᴴb (top part), column-major
  if (tall) {
    const tau0 = new Float64Array(f * Math.min(m, n + p));
    geqrf(m, n + p, a.data, 0, lda, tau0, 0);
    // R₀ (n×n) → pivoted QR
    rdata = new Float64Array(f * n * n);
    for (let j = 0; j < n; j++) {
      for (let i = 0; i <= j; i++) {
        copyEl(complex, a.data, i + j * lda, rdata, i + j * n);
      }
    }
    ldr = n;
    rows = n;
    const tau1 = new Float64Array(f * n);
    geqp3(n, n, rdata, 0, ldr, perm, tau1, 0);
    cTop = new Float64Array(f * n * p);
    for (let j = 0; j < p; j++) {
      for (let i = 0; i < n; i++) {
        copyEl(complex, c.data, i + (n + j) * m, cTop, i + j * n);
      }
    }
    applyQh(complex, n, p, n, rdata, ldr, tau1, cTop);
  } else {
    const k = Math.min(m, n);
    const tau = new Float64Array(f * k);
    geqp3(m, n, a.data, 0, lda, perm, tau, 0);
    applyQh(complex, m, p, k, a.data, lda, tau, c.data);
    rdata = a.data;
    ldr = lda;
    rows = k;
    cTop = new Float64Array(f * rows * p);
    for (let j = 0; j < p; j++) {
      for (let i = 0; i < rows; i++) {
        copyEl(complex, c.data, i + j * m, cTop, i + j * rows);
      }
    }
  }
  const diag = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    diag[i] = absEl(complex, rdata, i + i * ldr);
  }
  const tol =
    options.tol ??
    (options.rtol !== undefined
      ? options.rtol * diag[0]
      : Math.max(m, n) * Number.EPSILON * diag[0]);
  let rank = 0;
  while (rank < rows && diag[rank] > tol) {
    rank++;
  }
  // z (n×p) in the permuted coordinates.
  const z = new Float64Array(f * n * p);
  const trsv = complex ? ztrsv : dtrsv;
  if (rank === n) {
    for (let j = 0; j < p; j++) {
      for (let i = 0; i < n; i++) {
        copyEl(complex, cTop, i + j * rows, z, i + j * n);
      }
      trsv('U', 'N', false, n, rdata, 1, ldr, 0, z, 1, j * n);
    }
  } else if (rank > 0) {
    // [R₁₁ R₁₂]ᴴ (n×rank) = W·[L̃; 0]  ⇒  [R₁₁ R₁₂] = [L̃ᴴ 0]·Wᴴ.
    const w = new Float64Array(f * n * rank);
    for (let i = 0; i < rank; i++) {
      for (let j = i; j < n; j++) {
        // W(j, i) = conj(R(i, j))
        const s = i + j * ldr;
        const d = j + i * n;
        if (complex) {
          w[2 * d] = rdata[2 * s];
          w[2 * d + 1] = -rdata[2 * s + 1];
        } else {
          w[d] = rdata[s];
        }
      }
    }
    const tauW = new Float64Array(f * rank);
    geqrf(n, rank, w, 0, n, tauW, 0);
    for (let j = 0; j < p; j++) {
      // Solve L̃ᴴ·y = c₁ (L̃ upper in w, so L̃ᴴ is lower: trans 'C').
      for (let i = 0; i < rank; i++) {
        copyEl(complex, cTop, i + j * rows, z, i + j * n);
      }
      trsv('U', 'C', false, rank, w, 1, n, 0, z, 1, j * n);
    }
    // z ← W·[y; 0]
    if (complex) {
      zunmqrCM('N', n, p, rank, w, 0, n, tauW, 0, z, 0, n);
    } else {
      dormqrCM('N', n, p, rank, w, 0, n, tauW, 0, z, 0, n);
    }
  }
  // x = P·z
  const x = Dense.zeros([n, p], { complex, order: 'F' });
  for (let j = 0; j < p; j++) {
    for (let i = 0; i < n; i++) {
      copyEl(complex, z, i + j * n, x.data, perm[i] + j * n);
    }
  }
  const residualNorm = residuals(a0, b0, x, complex);
  return { x: isVectorInput(bIn) ? asVector(x) : x, rank, tol, residualNorm, diagonal: diag };
}

/** [A b] as one column-major m×(n+p) array (complex when either is). */
function augmented(a: Dense, b: Dense, complex: boolean): Dense {
  const m = a.rows;
  const n = a.cols;
  const p = b.cols;
  const out = Dense.zeros([m, n + p], { complex, order: 'F' });
  const d = out.data;
  const put = (src: Dense, col0: number) => {
    if (!complex && src.isFContiguous()) {
      d.set(src.data.subarray(src.offset, src.offset + src.size), col0 * m);
      return;
    }
    const [s1, s2] = src.strides;
    for (let j = 0; j < src.cols; j++) {
      for (let i = 0; i < m; i++) {
        const e = src.offset + i * s1 + j * s2;
        const t = i + (col0 + j) * m;
        if (complex) {
          d[2 * t] = src.complex ? src.data[2 * e] : src.data[e];
          d[2 * t + 1] = src.complex ? src.data[2 * e + 1] : 0;
        } else {
          d[t] = src.data[e];
        }
      }
    }
  };
  put(a, 0);
  put(b, n);
  return out;
}

function applyQh(
  complex: boolean,
  m: number,
  p: number,
  k: number,
  a: Float64Array,
  lda: number,
  tau: Float64Array,
  c: Float64Array
) {
  if (complex) {
    zunmqrCM('C', m, p, k, a, 0, lda, tau, 0, c, 0, m);
  } else {
    dormqrCM('T', m, p, k, a, 0, lda, tau, 0, c, 0, m);
  }
}

function copyEl(complex: boolean, src: Float64Array, s: number, dst: Float64Array, d: number) {
  if (complex) {
    dst[2 * d] = src[2 * s];
    dst[2 * d + 1] = src[2 * s + 1];
  } else {
    dst[d] = src[s];
  }
}

function absEl(complex: boolean, a: Float64Array, e: number): number {
  return complex ? Math.hypot(a[2 * e], a[2 * e + 1]) : Math.abs(a[e]);
}

/** ‖b_j − A x_j‖₂ measured from the original data (column sweeps over A's strides). */
function residuals(a: Dense, b: Dense, x: Dense, complex: boolean): Float64Array {
  const m = a.rows;
  const n = a.cols;
  const p = x.cols;
  const out = new Float64Array(p);
  const f = complex ? 2 : 1;
  const r = new Float64Array(f * m);
  const [sa1, sa2] = a.strides;
  const [sb1, sb2] = b.strides;
  const A = a.data;
  const B = b.data;
  const X = x.data;
  for (let j = 0; j < p; j++) {
    for (let i = 0; i < m; i++) {
      const e = b.offset + i * sb1 + j * sb2;
      if (complex) {
        r[2 * i] = b.complex ? B[2 * e] : B[e];
        r[2 * i + 1] = b.complex ? B[2 * e + 1] : 0;
      } else {
        r[i] = B[e];
      }
    }
    for (let q = 0; q < n; q++) {
      const base = a.offset + q * sa2;
      if (complex) {
        const xr = X[2 * (q + j * n)];
        const xi = X[2 * (q + j * n) + 1];
        for (let i = 0; i < m; i++) {
          const e = base + i * sa1;
          const ar = a.complex ? A[2 * e] : A[e];
          const ai = a.complex ? A[2 * e + 1] : 0;
          r[2 * i] -= ar * xr - ai * xi;
          r[2 * i + 1] -= ar * xi + ai * xr;
        }
      } else if (sa1 === 1 && q + 4 <= n) {
        // Contiguous columns: four at a time, one pass over r instead of four.
        const b1 = base + sa2;
        const b2 = b1 + sa2;
        const b3 = b2 + sa2;
        const x0 = X[q + j * n];
        const x1 = X[q + 1 + j * n];
        const x2 = X[q + 2 + j * n];
        const x3 = X[q + 3 + j * n];
        for (let i = 0; i < m; i++) {
          r[i] -= A[base + i] * x0 + A[b1 + i] * x1 + A[b2 + i] * x2 + A[b3 + i] * x3;
        }
        q += 3;
      } else {
        const xv = X[q + j * n];
        for (let i = 0; i < m; i++) {
          r[i] -= A[base + i * sa1] * xv;
        }
      }
    }
    let s = 0;
    for (let i = 0; i < f * m; i++) {
      s += r[i] * r[i];
    }
    out[j] = Math.sqrt(s);
  }
  return out;
}
