/**
 * Friendly Householder QR: A = Q·R for a real or complex m×n matrix (Dense, ml-matrix Matrix or
 * nested arrays). The factored form (reflectors + τ) is kept; R, the thin or full Q, and the
 * products Q·X and Qᴴ·X are computed on request without forming Q for the latter.
 */
import { Dense, asVector, isVectorInput, toDense, type MatrixLike } from '../dense';
import { dgeqrfCM, dormqrCM, dorgqrCM, zgeqrfCM, zungqrCM, zunmqrCM } from './householder';
import { triangularCondition, type ConditionEstimate } from './triangular';

export class HouseholderQR {
  /** Rows and columns of A. */
  readonly m: number;
  readonly n: number;
  readonly complex: boolean;
  /** The factored matrix, column-major m×n: R on and above the diagonal, reflectors below. */
  readonly factors: Dense;
  /** τ of each reflector (min(m, n) entries; complex: interleaved pairs). */
  readonly tau: Float64Array;

  /** Leading dimension of `factors` (column-major: strides [1, ld]). */
  readonly ld: number;

  constructor(factors: Dense, tau: Float64Array) {
    if (factors.strides[0] !== 1 && factors.rows > 1) {
      throw new RangeError(
        `factors must be column-major (row stride 1), got strides [${factors.strides.join(', ')}]`
      );
    }
    this.ld = Math.max(1, factors.rows, factors.cols > 1 ? factors.strides[1] : 1);
    this.factors = factors;
    this.tau = tau;
    this.m = factors.rows;
    this.n = factors.cols;
    this.complex = factors.complex;
  }

  /** min(m, n): the number of reflectors. */
  get k(): number {
    return Math.min(this.m, this.n);
  }

  /** R: k×n upper triangular (thin, default) or m×n ('full'). */
  R(mode: 'thin' | 'full' = 'thin'): Dense {
    const rows = mode === 'full' ? this.m : this.k;
    const out = Dense.zeros([rows, this.n], { complex: this.complex, order: 'F' });
    const f = this.factors;
    for (let j = 0; j < this.n; j++) {
      for (let i = 0; i <= Math.min(j, this.k - 1); i++) {
        out.set(i, j, f.get(i, j), f.getIm(i, j));
      }
    }
    return out;
  }

  /** 1-norm condition estimate of the leading k×k block of R (κ₁(R) = κ₁(A) when m ≥ n). */
  condition(): ConditionEstimate {
    const k = this.k;
    return triangularCondition(this.R().slice(0, k, 0, k));
  }

  /** Q: m×k with orthonormal columns (thin, default) or the full m×m unitary matrix. */
  Q(mode: 'thin' | 'full' = 'thin'): Dense {
    const cols = mode === 'full' ? this.m : this.k;
    const out = Dense.zeros([this.m, cols], { complex: this.complex, order: 'F' });
    const lda = Math.max(1, this.m);
    (this.complex ? zungqrCM : dorgqrCM)(
      this.m,
      cols,
      this.k,
      this.factors.data,
      this.factors.offset,
      this.ld,
      this.tau,
      0,
      out.data,
      0,
      lda
    );
    return out;
  }

  /**
   * Q·X (default) or Qᴴ·X (`adjoint: true`) for an m×p X, without forming Q. Returns a new
   * column-major array (1-D for a 1-D x); X is not modified.
   */
  applyQ(x: MatrixLike, options: { adjoint?: boolean } = {}): Dense {
    const out = this.applyQ2(toDense('x', x), options);
    return isVectorInput(x) ? asVector(out) : out;
  }

  private applyQ2(xd: Dense, options: { adjoint?: boolean }): Dense {
    if (xd.rows !== this.m) {
      throw new RangeError(`x has ${xd.rows} rows but Q is ${this.m}x${this.m}; they must match`);
    }
    if (xd.complex && !this.complex) {
      // Q is real: apply it to the real and imaginary parts alike (same code path, complex Q).
      return complexify(this).applyQ2(xd, options);
    }
    const c = this.complex && !xd.complex ? xd.toComplex().copy('F') : xd.copy('F');
    const lda = Math.max(1, this.m);
    if (this.complex) {
      zunmqrCM(
        options.adjoint ? 'C' : 'N',
        this.m,
        c.cols,
        this.k,
        this.factors.data,
        this.factors.offset,
        this.ld,
        this.tau,
        0,
        c.data,
        0,
        lda
      );
    } else {
      dormqrCM(
        options.adjoint ? 'T' : 'N',
        this.m,
        c.cols,
        this.k,
        this.factors.data,
        this.factors.offset,
        this.ld,
        this.tau,
        0,
        c.data,
        0,
        lda
      );
    }
    return c;
  }
}

function complexify(f: HouseholderQR): HouseholderQR {
  const tau = new Float64Array(2 * f.tau.length);
  for (let i = 0; i < f.tau.length; i++) {
    tau[2 * i] = f.tau[i];
  }
  return new HouseholderQR(f.factors.toComplex().copy('F'), tau);
}

/**
 * Householder QR of A (real or complex). The input is copied and A left unmodified, unless
 * `inPlace` is set: then A (a column-major Dense) is overwritten by R and the reflectors, LAPACK
 * style, and the result refers to it.
 *
 * Backward stable: the computed Q̂R̂ = A + ΔA with ‖ΔA‖ ≤ c·m·n·u·‖A‖ (Higham, Accuracy and
 * Stability of Numerical Algorithms 2e, Theorem 19.4).
 */
export function householderQR(a: MatrixLike, options: { inPlace?: boolean } = {}): HouseholderQR {
  const d = toDense('a', a);
  if (d.rows === 0 || d.cols === 0) {
    throw new RangeError(`a is empty (${d.rows}x${d.cols}); give at least one row and column`);
  }
  let f: Dense;
  if (options.inPlace) {
    // In place: a must be a column-major Dense view (row stride 1), e.g. a numpy Fortran array.
    if (
      !(a instanceof Dense) ||
      a.ndim !== 2 ||
      (a.strides[0] !== 1 && a.rows > 1) ||
      (a.cols > 1 && a.strides[1] < a.rows)
    ) {
      throw new TypeError(
        'a must be a 2-D column-major Dense (row stride 1) to be factored in place; ' +
          'omit inPlace to factor a copy'
      );
    }
    f = a;
  } else {
    f = d.copy('F');
  }
  const k = Math.min(f.rows, f.cols);
  const tau = new Float64Array(f.complex ? 2 * k : k);
  const ld = Math.max(1, f.rows, f.cols > 1 ? f.strides[1] : 1);
  (f.complex ? zgeqrfCM : dgeqrfCM)(f.rows, f.cols, f.data, f.offset, ld, tau, 0);
  return new HouseholderQR(f, tau);
}
