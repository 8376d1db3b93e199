/**
 * Gram–Schmidt QR: classical (CGS), modified (MGS) and classical with one reorthogonalisation
 * pass (CGS2, "twice is enough": Giraud, Langou, Rozložník, Computers & Mathematics with
 * Applications 50, 2005). A = Q·R with Q m×n, R n×n upper triangular (m ≥ n expected; for m < n
 * at most m columns can be independent).
 *
 * All three are backward stable as factorisations (‖A − QR‖ ≈ u‖A‖), but orthogonality differs
 * (Björck, Numerical Methods for Least Squares Problems, SIAM 1996, §2.4; Higham, Accuracy and
 * Stability 2e, §19.8): MGS loses it in proportion to κ(A)·u, CGS like κ(A)²·u, CGS2 keeps it at
 * O(u) while κ(A)·u < 1. The measured loss ‖I − QᴴQ‖₁ is reported with the result.
 *
 * A column whose orthogonalised remainder is at most `tol`·‖a_j‖ is reported in `dependent`
 * (numerical breakdown is a result, not an error).
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { checkNumber } from '../errors';

export type GramSchmidtMethod = 'cgs' | 'mgs' | 'cgs2';

export interface GramSchmidtResult {
  /** m×n, orthonormal columns up to the reported loss. */
  Q: Dense;
  /** n×n upper triangular. */
  R: Dense;
  method: GramSchmidtMethod;
  /** ‖I − QᴴQ‖₁ measured on the result (NaN when `measureLoss` is false). */
  orthogonalityLoss: number;
  /** Columns j whose remainder fell to ≤ tol·‖a_j‖ (numerically dependent on earlier ones). */
  dependent: number[];
  /** The relative tolerance used for `dependent`. */
  tol: number;
}

export interface GramSchmidtOptions {
  method?: GramSchmidtMethod;
  /** Relative dependence tolerance (default max(m, n)·ε). In [0, 1). */
  tol?: number;
  /** Measure ‖I − QᴴQ‖₁ (an extra O(mn²) pass). Default true. */
  measureLoss?: boolean;
}

/** Gram–Schmidt QR of A (real or complex). The input is copied. */
export function gramSchmidt(a: MatrixLike, options: GramSchmidtOptions = {}): GramSchmidtResult {
  const d = toDense('a', a);
  const method = options.method ?? 'mgs';
  if (method !== 'cgs' && method !== 'mgs' && method !== 'cgs2') {
    throw new RangeError(`method must be 'cgs', 'mgs' or 'cgs2', got ${JSON.stringify(method)}`);
  }
  if (d.rows === 0 || d.cols === 0) {
    throw new RangeError(`a is empty (${d.rows}x${d.cols}); give at least one row and column`);
  }
  const m = d.rows;
  const n = d.cols;
  const tol = options.tol ?? Math.max(m, n) * Number.EPSILON;
  checkNumber('tol', tol);
  if (tol < 0 || tol >= 1) {
    throw new RangeError(`tol must be in [0, 1), got ${tol}`);
  }
  const q = d.copy('F');
  const r = Dense.zeros([n, n], { complex: d.complex, order: 'F' });
  const dependent: number[] = [];
  const work = new Float64Array((d.complex ? 2 : 1) * n);
  (d.complex ? zgs : dgs)(method, m, n, q.data, r.data, work, tol, dependent);
  const loss = options.measureLoss === false ? NaN : orthogonalityLoss(q);
  return { Q: q, R: r, method, orthogonalityLoss: loss, dependent, tol };
}

function dgs(
  method: GramSchmidtMethod,
  m: number,
  n: number,
  q: Float64Array,
  r: Float64Array,
  s: Float64Array,
  tol: number,
  dependent: number[]
): void {
  for (let j = 0; j < n; j++) {
    const cj = j * m;
    let anorm = 0;
    for (let i = 0; i < m; i++) {
      anorm += q[cj + i] * q[cj + i];
    }
    anorm = Math.sqrt(anorm);
    const passes = method === 'cgs2' ? 2 : 1;
    if (method === 'mgs') {
      for (let p = 0; p < j; p++) {
        const cp = p * m;
        let t = 0;
        for (let i = 0; i < m; i++) {
          t += q[cp + i] * q[cj + i];
        }
        r[p + j * n] = t;
        for (let i = 0; i < m; i++) {
          q[cj + i] -= t * q[cp + i];
        }
      }
    } else {
      for (let pass = 0; pass < passes; pass++) {
        // s = Qᵀ v using the same v for every p (classical), then v −= Q s.
        for (let p = 0; p < j; p++) {
          const cp = p * m;
          let t = 0;
          for (let i = 0; i < m; i++) {
            t += q[cp + i] * q[cj + i];
          }
          s[p] = t;
        }
        for (let p = 0; p < j; p++) {
          const cp = p * m;
          const t = s[p];
          r[p + j * n] += t;
          for (let i = 0; i < m; i++) {
            q[cj + i] -= t * q[cp + i];
          }
        }
      }
    }
    let nv = 0;
    for (let i = 0; i < m; i++) {
      nv += q[cj + i] * q[cj + i];
    }
    nv = Math.sqrt(nv);
    r[j + j * n] = nv;
    if (nv <= tol * anorm) {
      dependent.push(j);
    }
    if (nv > 0) {
      const inv = 1 / nv;
      for (let i = 0; i < m; i++) {
        q[cj + i] *= inv;
      }
    }
  }
}

function zgs(
  method: GramSchmidtMethod,
  m: number,
  n: number,
  q: Float64Array,
  r: Float64Array,
  s: Float64Array,
  tol: number,
  dependent: number[]
): void {
  const dot = (cp: number, cj: number, out: Float64Array, o: number) => {
    let re = 0;
    let im = 0;
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = q[cp + i],
        ai = q[cp + i + 1];
      const br = q[cj + i],
        bi = q[cj + i + 1];
      re += ar * br + ai * bi;
      im += ar * bi - ai * br;
    }
    out[o] = re;
    out[o + 1] = im;
  };
  const sub = (cp: number, cj: number, tr: number, ti: number) => {
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = q[cp + i],
        ai = q[cp + i + 1];
      q[cj + i] -= tr * ar - ti * ai;
      q[cj + i + 1] -= tr * ai + ti * ar;
    }
  };
  for (let j = 0; j < n; j++) {
    const cj = 2 * j * m;
    let anorm = 0;
    for (let i = 0; i < 2 * m; i++) {
      anorm += q[cj + i] * q[cj + i];
    }
    anorm = Math.sqrt(anorm);
    if (method === 'mgs') {
      for (let p = 0; p < j; p++) {
        const e = 2 * (p + j * n);
        dot(2 * p * m, cj, r, e);
        sub(2 * p * m, cj, r[e], r[e + 1]);
      }
    } else {
      const passes = method === 'cgs2' ? 2 : 1;
      for (let pass = 0; pass < passes; pass++) {
        for (let p = 0; p < j; p++) {
          dot(2 * p * m, cj, s, 2 * p);
        }
        for (let p = 0; p < j; p++) {
          const e = 2 * (p + j * n);
          r[e] += s[2 * p];
          r[e + 1] += s[2 * p + 1];
          sub(2 * p * m, cj, s[2 * p], s[2 * p + 1]);
        }
      }
    }
    let nv = 0;
    for (let i = 0; i < 2 * m; i++) {
      nv += q[cj + i] * q[cj + i];
    }
    nv = Math.sqrt(nv);
    r[2 * (j + j * n)] = nv;
    if (nv <= tol * anorm) {
      dependent.push(j);
    }
    if (nv > 0) {
      const inv = 1 / nv;
      for (let i = 0; i < 2 * m; i++) {
        q[cj + i] *= inv;
      }
    }
  }
}

/** ‖I − QᴴQ‖₁ of an m×k matrix Q (real or complex), in O(mk²). */
export function orthogonalityLoss(qm: MatrixLike): number {
  const q = toDense('q', qm).copy('F');
  const m = q.rows;
  const k = q.cols;
  const d = q.data;
  const colSums = new Float64Array(k);
  for (let j = 0; j < k; j++) {
    for (let p = 0; p <= j; p++) {
      let re = 0;
      let im = 0;
      if (q.complex) {
        const a = 2 * p * m;
        const b = 2 * j * m;
        for (let i = 0; i < 2 * m; i += 2) {
          re += d[a + i] * d[b + i] + d[a + i + 1] * d[b + i + 1];
          im += d[a + i] * d[b + i + 1] - d[a + i + 1] * d[b + i];
        }
      } else {
        const a = p * m;
        const b = j * m;
        for (let i = 0; i < m; i++) {
          re += d[a + i] * d[b + i];
        }
      }
      if (p === j) {
        re -= 1;
      }
      const v = Math.hypot(re, im);
      colSums[j] += v;
      if (p !== j) {
        colSums[p] += v; // Hermitian: entry (j, p) has the same modulus
      }
    }
  }
  let best = 0;
  for (let j = 0; j < k; j++) {
    best = Math.max(best, colSums[j]);
  }
  return best;
}
