/**
 * Triangular solves (real and complex, strided; BLAS xTRSV semantics) and a 1-norm condition
 * estimate for triangular factors such as R (Hager, "Condition estimates", SIAM J. Sci. Stat.
 * Comput. 5, 1984; Higham, "FORTRAN codes for estimating the one-norm of a real or complex
 * matrix, with applications to condition estimation", ACM TOMS 14, 1988, Algorithm 4.1 — the
 * estimator behind LAPACK's xLACN2 and xTRCON).
 */
import { type Dense, asVector, isVectorInput, toDense, type MatrixLike } from '../dense';

export type Uplo = 'U' | 'L';
export type Trans = 'N' | 'T' | 'C';

/**
 * Solves op(A)·x = b in place (x holds b on entry) for an n×n triangular A, real.
 * op(A) = A ('N') or Aᵀ ('T' or 'C'). `unit` assumes a unit diagonal. A zero pivot produces
 * ±Inf/NaN (the BLAS behaviour); the friendly `solveTriangular` checks for it first.
 */
export function dtrsv(
  uplo: Uplo,
  trans: Trans,
  unit: boolean,
  n: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  x: Float64Array,
  sx: number,
  ox: number
): void {
  // Solving with Aᵀ is solving with the transposed view: swap the strides and the triangle.
  const t = trans !== 'N';
  const s1 = t ? sa2 : sa1;
  const s2 = t ? sa1 : sa2;
  const upper = (uplo === 'U') !== t;
  if (upper) {
    for (let i = n - 1; i >= 0; i--) {
      let s = x[ox + i * sx];
      for (let j = i + 1; j < n; j++) {
        s -= A[oa + i * s1 + j * s2] * x[ox + j * sx];
      }
      x[ox + i * sx] = unit ? s : s / A[oa + i * s1 + i * s2];
    }
  } else {
    for (let i = 0; i < n; i++) {
      let s = x[ox + i * sx];
      for (let j = 0; j < i; j++) {
        s -= A[oa + i * s1 + j * s2] * x[ox + j * sx];
      }
      x[ox + i * sx] = unit ? s : s / A[oa + i * s1 + i * s2];
    }
  }
}

/** Complex triangular solve, op(A) = A ('N'), Aᵀ ('T') or Aᴴ ('C'); element strides. */
export function ztrsv(
  uplo: Uplo,
  trans: Trans,
  unit: boolean,
  n: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  x: Float64Array,
  sx: number,
  ox: number
): void {
  const t = trans !== 'N';
  const cj = trans === 'C' ? -1 : 1;
  const s1 = t ? sa2 : sa1;
  const s2 = t ? sa1 : sa2;
  const upper = (uplo === 'U') !== t;
  const solveRow = (i: number, j0: number, j1: number) => {
    const xi = 2 * (ox + i * sx);
    let sr = x[xi];
    let si = x[xi + 1];
    for (let j = j0; j < j1; j++) {
      const e = 2 * (oa + i * s1 + j * s2);
      const ar = A[e];
      const ai = cj * A[e + 1];
      const xj = 2 * (ox + j * sx);
      const br = x[xj];
      const bi = x[xj + 1];
      sr -= ar * br - ai * bi;
      si -= ar * bi + ai * br;
    }
    if (!unit) {
      const e = 2 * (oa + i * s1 + i * s2);
      const dr = A[e];
      const di = cj * A[e + 1];
      // Smith's complex division s / d.
      if (Math.abs(di) <= Math.abs(dr)) {
        const q = di / dr;
        const den = dr + di * q;
        const nr = (sr + si * q) / den;
        const ni = (si - sr * q) / den;
        sr = nr;
        si = ni;
      } else {
        const q = dr / di;
        const den = di + dr * q;
        const nr = (sr * q + si) / den;
        const ni = (si * q - sr) / den;
        sr = nr;
        si = ni;
      }
    }
    x[xi] = sr;
    x[xi + 1] = si;
  };
  if (upper) {
    for (let i = n - 1; i >= 0; i--) {
      solveRow(i, i + 1, n);
    }
  } else {
    for (let i = 0; i < n; i++) {
      solveRow(i, 0, i);
    }
  }
}

export interface TriangularOptions {
  /** Lower triangular (default: upper). */
  lower?: boolean;
  /** Solve with Aᵀ ('T') or Aᴴ ('C') instead of A ('N', default). */
  trans?: Trans;
  /** Assume ones on the diagonal (not read). */
  unitDiagonal?: boolean;
}

/**
 * Solves op(T)·X = B for triangular T (n×n; only the chosen triangle is read) and B n×p (or a
 * 1-D b, which gives a 1-D x). Returns X; T and B are not modified. An exactly zero diagonal entry is a caller error
 * (the system has no unique solution) and throws a RangeError naming it.
 */
export function solveTriangular(
  tIn: MatrixLike,
  bIn: MatrixLike,
  options: TriangularOptions = {}
): Dense {
  const t = toDense('t', tIn);
  const b = toDense('b', bIn);
  if (t.rows !== t.cols) {
    throw new RangeError(`t must be square, got ${t.rows}x${t.cols}`);
  }
  if (b.rows !== t.rows) {
    throw new RangeError(`b has ${b.rows} rows but t is ${t.rows}x${t.cols}; they must match`);
  }
  const trans = options.trans ?? 'N';
  if (trans !== 'N' && trans !== 'T' && trans !== 'C') {
    throw new RangeError(`trans must be 'N', 'T' or 'C', got ${JSON.stringify(trans)}`);
  }
  const n = t.rows;
  const unit = options.unitDiagonal ?? false;
  if (!unit) {
    for (let i = 0; i < n; i++) {
      if (t.get(i, i) === 0 && t.getIm(i, i) === 0) {
        throw new RangeError(`t[${i}][${i}] is 0: the triangular system is singular`);
      }
    }
  }
  const complex = t.complex || b.complex;
  const tt = complex && !t.complex ? t.toComplex() : t;
  const x = complex && !b.complex ? b.toComplex().copy('F') : b.copy('F');
  const uplo: Uplo = options.lower ? 'L' : 'U';
  for (let j = 0; j < x.cols; j++) {
    (complex ? ztrsv : dtrsv)(
      uplo,
      trans,
      unit,
      n,
      tt.data,
      tt.strides[0],
      tt.strides[1],
      tt.offset,
      x.data,
      1,
      j * n
    );
  }
  return isVectorInput(bIn) ? asVector(x) : x;
}

/**
 * Estimates ‖A⁻¹‖₁ given solvers for A·x = b and Aᴴ·x = b (in place on x, n entries, real or
 * interleaved complex). Higham's Algorithm 4.1 (ACM TOMS 14, 1988) with the alternating-sign
 * safeguard; the estimate is a lower bound, usually within a factor 3 of the true value.
 */
export function estimateInverseNorm1(
  n: number,
  complex: boolean,
  solve: (x: Float64Array) => void,
  solveH: (x: Float64Array) => void
): number {
  const f = complex ? 2 : 1;
  const x = new Float64Array(f * n);
  const abs = (v: Float64Array, i: number) =>
    complex ? Math.hypot(v[2 * i], v[2 * i + 1]) : Math.abs(v[i]);
  const norm1 = (v: Float64Array) => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      s += abs(v, i);
    }
    return s;
  };
  const signs = (v: Float64Array, out: Float64Array) => {
    for (let i = 0; i < n; i++) {
      if (complex) {
        const a = Math.hypot(v[2 * i], v[2 * i + 1]);
        out[2 * i] = a > 0 ? v[2 * i] / a : 1;
        out[2 * i + 1] = a > 0 ? v[2 * i + 1] / a : 0;
      } else {
        out[i] = v[i] >= 0 ? 1 : -1;
      }
    }
  };
  for (let i = 0; i < n; i++) {
    x[f * i] = 1 / n;
  }
  solve(x);
  if (n === 1) {
    return abs(x, 0);
  }
  let est = norm1(x);
  const xi = new Float64Array(f * n);
  signs(x, xi);
  const z = xi.slice();
  solveH(z);
  let j = argmaxAbs(z, n, complex);
  for (let iter = 2; iter <= 5; iter++) {
    x.fill(0);
    x[f * j] = 1;
    solve(x);
    const old = est;
    est = norm1(x);
    const xiNew = new Float64Array(f * n);
    signs(x, xiNew);
    let same = !complex;
    if (!complex) {
      for (let i = 0; i < n; i++) {
        if (xiNew[i] !== xi[i]) {
          same = false;
          break;
        }
      }
    }
    if (same || est <= old) {
      est = Math.max(est, old);
      break;
    }
    xi.set(xiNew);
    z.set(xi);
    solveH(z);
    const jlast = j;
    j = argmaxAbs(z, n, complex);
    if (abs(z, jlast) === abs(z, j)) {
      break;
    }
  }
  // Alternating-sign vector guards against the estimator's known worst cases.
  x.fill(0);
  for (let i = 0; i < n; i++) {
    x[f * i] = (i % 2 === 0 ? 1 : -1) * (1 + i / (n - 1));
  }
  solve(x);
  const alt = (2 * norm1(x)) / (3 * n);
  return Math.max(est, alt);
}

function argmaxAbs(v: Float64Array, n: number, complex: boolean): number {
  let best = 0;
  let bv = -1;
  for (let i = 0; i < n; i++) {
    const a = complex ? Math.hypot(v[2 * i], v[2 * i + 1]) : Math.abs(v[i]);
    if (a > bv) {
      bv = a;
      best = i;
    }
  }
  return best;
}

export interface ConditionEstimate {
  /** Estimated κ₁(T) = ‖T‖₁·‖T⁻¹‖₁ (a lower bound on the true value, usually within 3×). */
  condition: number;
  /** 1/condition (0 for an exactly singular T), as LAPACK's xTRCON reports. */
  rcond: number;
  /** ‖T‖₁ computed exactly. */
  norm: number;
  /** Estimated ‖T⁻¹‖₁. */
  inverseNorm: number;
}

/**
 * 1-norm condition estimate of a triangular matrix (such as R from QR), in O(n²) — LAPACK
 * xTRCON's approach. An exactly singular T gives condition Infinity and rcond 0 (a result).
 */
export function triangularCondition(
  tIn: MatrixLike,
  options: { lower?: boolean } = {}
): ConditionEstimate {
  const t = toDense('t', tIn);
  if (t.rows !== t.cols) {
    throw new RangeError(`t must be square, got ${t.rows}x${t.cols}`);
  }
  const n = t.rows;
  const lower = options.lower ?? false;
  let norm = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = lower ? j : 0; i < (lower ? n : j + 1); i++) {
      s += Math.hypot(t.get(i, j), t.getIm(i, j));
    }
    norm = Math.max(norm, s);
  }
  for (let i = 0; i < n; i++) {
    if (t.get(i, i) === 0 && t.getIm(i, i) === 0) {
      return { condition: Infinity, rcond: 0, norm, inverseNorm: Infinity };
    }
  }
  const uplo: Uplo = lower ? 'L' : 'U';
  const kern = t.complex ? ztrsv : dtrsv;
  const [s1, s2] = t.strides;
  const inv = estimateInverseNorm1(
    n,
    t.complex,
    x => kern(uplo, 'N', false, n, t.data, s1, s2, t.offset, x, 1, 0),
    x => kern(uplo, 'C', false, n, t.data, s1, s2, t.offset, x, 1, 0)
  );
  const condition = norm * inv;
  return { condition, rcond: 1 / condition, norm, inverseNorm: inv };
}
