/**
 * Test helpers: a seeded generator (xoshiro128**, Blackman & Vigna, "Scrambled linear
 * pseudorandom number generators", ACM TOMS 47, 2021) with Gaussian deviates by the Box–Muller
 * transform, plain reference products, and the LAPACK Working Note 41 ratio tests.
 */
import { Dense } from '../../../src/core/dense';

export class Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare: number | null = null;
  constructor(seed: number) {
    // splitmix32 to spread the seed over the state.
    let x = seed >>> 0;
    const next = () => {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
  }
  u32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }
  /** Uniform in [0, 1) with 53 random bits. */
  uniform(): number {
    const hi = this.u32() >>> 5;
    const lo = this.u32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }
  /** Integer in [lo, hi]. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.uniform() * (hi - lo + 1));
  }
  normal(): number {
    if (this.spare !== null) {
      const s = this.spare;
      this.spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) {
      u = this.uniform();
    }
    const v = this.uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    this.spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** Unit roundoff u = 2^-53 (LAWN 41; Number.EPSILON is 2u). */
export const U = Math.pow(2, -53);

/** m×n Gaussian matrix, Fortran order unless told. */
export function randn(rng: Rng, m: number, n: number, complex = false, order: 'C' | 'F' = 'F') {
  const a = Dense.zeros([m, n], { complex, order });
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) {
      a.set(i, j, rng.normal(), complex ? rng.normal() : 0);
    }
  }
  return a;
}

/** C = A·B (or Aᴴ·B with conjA) by the plain triple loop, complex-aware, both 2-D. */
export function matmul(a: Dense, b: Dense, conjA = false): Dense {
  const m = conjA ? a.cols : a.rows;
  const k = conjA ? a.rows : a.cols;
  if (k !== b.rows) {
    throw new Error(`matmul: inner sizes ${k} and ${b.rows}`);
  }
  const n = b.cols;
  const complex = a.complex || b.complex;
  // Element (i, p) of op(A) at ai + i*si + p*sp; of B (p, j) at bo + p*bp + j*bj.
  const si = conjA ? a.strides[1] : a.strides[0];
  const sp = conjA ? a.strides[0] : a.strides[1];
  const bp = b.strides[0];
  const bj = b.strides[1];
  const c = Dense.zeros([m, n], { complex, order: 'F' });
  const A = a.data;
  const B = b.data;
  const C = c.data;
  const ac = a.complex;
  const bc = b.complex;
  const sgn = conjA ? -1 : 1;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) {
      let re = 0;
      let im = 0;
      let ea = a.offset + i * si;
      let eb = b.offset + j * bj;
      for (let p = 0; p < k; p++) {
        const ar = ac ? A[2 * ea] : A[ea];
        const ai = ac ? sgn * A[2 * ea + 1] : 0;
        const br = bc ? B[2 * eb] : B[eb];
        const bi = bc ? B[2 * eb + 1] : 0;
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
        ea += sp;
        eb += bp;
      }
      if (complex) {
        C[2 * (i + j * m)] = re;
        C[2 * (i + j * m) + 1] = im;
      } else {
        C[i + j * m] = re;
      }
    }
  }
  return c;
}

/** ‖A‖₁: largest column sum of |a_ij|. */
export function norm1(a: Dense): number {
  let best = 0;
  for (let j = 0; j < a.cols; j++) {
    let s = 0;
    for (let i = 0; i < a.rows; i++) {
      s += Math.hypot(a.get(i, j), a.getIm(i, j));
    }
    best = Math.max(best, s);
  }
  return best;
}

/** Frobenius norm. */
export function normF(a: Dense): number {
  let s = 0;
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      s += a.get(i, j) ** 2 + a.getIm(i, j) ** 2;
    }
  }
  return Math.sqrt(s);
}

/** A − B. */
export function sub(a: Dense, b: Dense): Dense {
  const c = Dense.zeros([a.rows, a.cols], { complex: a.complex || b.complex, order: 'F' });
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      c.set(i, j, a.get(i, j) - b.get(i, j), a.getIm(i, j) - b.getIm(i, j));
    }
  }
  return c;
}

/** ‖I − QᴴQ‖₁ (Q m×k). */
export function orthLoss1(q: Dense): number {
  const g = matmul(q, q, true);
  for (let i = 0; i < g.rows; i++) {
    g.set(i, i, g.get(i, i) - 1, g.getIm(i, i));
  }
  return norm1(g);
}

/**
 * LAPACK Working Note 41 (Anderson, Dongarra, Ostrouchov, "Installation guide for LAPACK", 1992;
 * authors from memory), the test of LAPACK's xQRT01 as defined in DESIGN.md §7: factorisation
 * ratio ‖A − QR‖₁ / (m·‖A‖₁·u).
 */
export function ratioFactor(a: Dense, qr: Dense): number {
  const m = a.rows;
  const na = norm1(a);
  const r = norm1(sub(a, qr));
  return na === 0 ? r / (m * U) : r / (Math.max(m, 1) * na * U);
}

/** LAWN 41 orthogonality ratio ‖I − QᴴQ‖₁ / (m·u). */
export function ratioOrth(q: Dense): number {
  return orthLoss1(q) / (Math.max(q.rows, 1) * U);
}

/** A matrix with prescribed singular values U·diag(s)·Vᴴ, U and V Haar-like from QR of Gaussians. */
export function withSingularValues(
  rng: Rng,
  m: number,
  n: number,
  s: number[],
  complex: boolean,
  orthonormal: (a: Dense) => Dense
): Dense {
  const k = s.length;
  const u = orthonormal(randn(rng, m, k, complex));
  const v = orthonormal(randn(rng, n, k, complex));
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < m; i++) {
      u.set(i, j, u.get(i, j) * s[j], u.getIm(i, j) * s[j]);
    }
  }
  // U diag(s) Vᴴ
  const vh = v.conjTranspose();
  return matmul(u, vh);
}

export function logspace(a: number, b: number, n: number): number[] {
  if (n === 1) {
    return [Math.pow(10, a)];
  }
  return Array.from({ length: n }, (_, i) => Math.pow(10, a + ((b - a) * i) / (n - 1)));
}

/**
 * Orthonormal columns by classical Gram–Schmidt run twice (independent of the library's QR, so
 * test matrices do not depend on the code under test).
 */
export function orthonormalCols(a: Dense): Dense {
  const m = a.rows;
  const n = a.cols;
  const q = a.copy('F');
  for (let j = 0; j < n; j++) {
    for (let pass = 0; pass < 2; pass++) {
      for (let p = 0; p < j; p++) {
        let re = 0;
        let im = 0;
        for (let i = 0; i < m; i++) {
          // conj(q_p)·q_j
          re += q.get(i, p) * q.get(i, j) + q.getIm(i, p) * q.getIm(i, j);
          im += q.get(i, p) * q.getIm(i, j) - q.getIm(i, p) * q.get(i, j);
        }
        for (let i = 0; i < m; i++) {
          const pr = q.get(i, p);
          const pi = q.getIm(i, p);
          q.set(i, j, q.get(i, j) - (re * pr - im * pi), q.getIm(i, j) - (re * pi + im * pr));
        }
      }
    }
    let s = 0;
    for (let i = 0; i < m; i++) {
      s += q.get(i, j) ** 2 + q.getIm(i, j) ** 2;
    }
    s = Math.sqrt(s);
    for (let i = 0; i < m; i++) {
      q.set(i, j, q.get(i, j) / s, q.getIm(i, j) / s);
    }
  }
  return q;
}

export type Family = 'random' | 'tall' | 'wide' | 'graded' | 'rank-deficient' | 'ill-conditioned';
export const FAMILIES: Family[] = [
  'random',
  'tall',
  'wide',
  'graded',
  'rank-deficient',
  'ill-conditioned'
];

export interface TestMatrix {
  family: Family;
  a: Dense;
  /** Condition number (2-norm) when known by construction. */
  kappa?: number;
  /** Rank when known by construction. */
  rank?: number;
}

/**
 * One seeded test matrix of a family, no larger than maxDim in either dimension. The families
 * follow the kinds LAPACK's test-matrix generator xLATMS produces, in spirit: random, tall,
 * wide, graded (columns scaled over 12 decades), rank-deficient plus noise at 1e-13, and
 * ill-conditioned with κ up to 1e12 (singular values log-spaced).
 */
export function makeMatrix(rng: Rng, family: Family, complex: boolean, maxDim = 64): TestMatrix {
  const order = rng.uniform() < 0.5 ? 'F' : 'C';
  switch (family) {
    case 'random': {
      const m = rng.int(1, maxDim);
      const n = rng.int(1, maxDim);
      return { family, a: randn(rng, m, n, complex, order) };
    }
    case 'tall': {
      const n = rng.int(1, Math.floor(maxDim / 2));
      const m = rng.int(2 * n, maxDim);
      return { family, a: randn(rng, m, n, complex, order) };
    }
    case 'wide': {
      const m = rng.int(1, maxDim - 1);
      const n = rng.int(m + 1, maxDim);
      return { family, a: randn(rng, m, n, complex, order) };
    }
    case 'graded': {
      const m = rng.int(2, maxDim);
      const n = rng.int(2, maxDim);
      const a = randn(rng, m, n, complex, order);
      for (let j = 0; j < n; j++) {
        const s = Math.pow(10, (-12 * j) / (n - 1));
        for (let i = 0; i < m; i++) {
          a.set(i, j, a.get(i, j) * s, a.getIm(i, j) * s);
        }
      }
      return { family, a };
    }
    case 'rank-deficient': {
      const m = rng.int(3, maxDim);
      const n = rng.int(3, maxDim);
      const r = rng.int(1, Math.min(m, n) - 1);
      const x = randn(rng, m, r, complex);
      const y = randn(rng, r, n, complex);
      const a = matmul(x, y);
      const noise = 1e-13;
      const out = Dense.zeros([m, n], { complex, order });
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < n; j++) {
          out.set(
            i,
            j,
            a.get(i, j) + noise * rng.normal(),
            complex ? a.getIm(i, j) + noise * rng.normal() : 0
          );
        }
      }
      return { family, a: out, rank: r };
    }
    case 'ill-conditioned': {
      const m = rng.int(2, maxDim);
      const n = rng.int(2, maxDim);
      const k = Math.min(m, n);
      const kappa = [1e4, 1e8, 1e12][rng.int(0, 2)];
      const s = logspace(0, -Math.log10(kappa), k);
      const a = withSingularValues(rng, m, n, s, complex, orthonormalCols);
      return { family, a: order === 'C' ? a.copy('C') : a, kappa };
    }
  }
}
