/**
 * Householder reflectors and block reflectors (compact WY form), real and complex.
 *
 * A reflector is H = I − τ·v·vᴴ with v(0) = 1 (LAPACK's representation, Golub & Van Loan,
 * Matrix Computations 4e, §5.1.2–5.1.4); a product H₁H₂⋯H_k is I − V·T·Vᴴ with V unit lower
 * trapezoidal and T upper triangular (Schreiber & Van Loan, "A storage-efficient WY
 * representation for products of Householder transformations", SIAM J. Sci. Stat. Comput. 10,
 * 1989; Golub & Van Loan 4e §5.2.3).
 *
 * All routines here work on column-major storage: (A, offsetA, lda) with element (i, j) at
 * `offsetA + i + j*lda` (complex: element index, data index twice that). The strided public
 * kernels in householder.ts pack other layouts into this one once, at the entry.
 */
import { dnrm2, dnrm2Unit, dznrm2 } from './blas';

const SAFMIN = Math.pow(2, -1022) / Number.EPSILON; // dlamch('S')/dlamch('E') as in dlarfg
const RSAFMN = 1 / SAFMIN;

/**
 * Generates a real reflector with H·(α; x) = (β; 0): α = a[ia] is overwritten by β, x (n−1
 * entries at stride sx from ox) by v(1:), and τ is returned (τ = 0 means H = I). After LAPACK's
 * dlarfg, including the rescaling of tiny β.
 */
export function dlarfg(
  n: number,
  a: Float64Array,
  ia: number,
  x: Float64Array,
  sx: number,
  ox: number
): number {
  if (n <= 1) {
    return 0;
  }
  let xnorm = sx === 1 ? dnrm2Unit(n - 1, x, ox) : dnrm2(n - 1, x, sx, ox);
  // An exactly zero x needs no reflection; this is the algorithm's branch, not a rank test.
  if (xnorm === 0) {
    return 0;
  }
  let alpha = a[ia];
  let beta = -Math.sign(alpha || 1) * hypot2(alpha, xnorm);
  let knt = 0;
  if (Math.abs(beta) < SAFMIN) {
    // β may be inaccurate: scale x up until it is not (at most ~20 times).
    do {
      knt++;
      scale(n - 1, RSAFMN, x, sx, ox);
      beta *= RSAFMN;
      alpha *= RSAFMN;
    } while (Math.abs(beta) < SAFMIN && knt < 20);
    xnorm = dnrm2(n - 1, x, sx, ox);
    beta = -Math.sign(alpha || 1) * hypot2(alpha, xnorm);
  }
  const tau = (beta - alpha) / beta;
  scale(n - 1, 1 / (alpha - beta), x, sx, ox);
  for (let j = 0; j < knt; j++) {
    beta *= SAFMIN;
  }
  a[ia] = beta;
  return tau;
}

/**
 * Generates a complex reflector with Hᴴ·(α; x) = (β; 0), β real, H = I − τ v vᴴ (after LAPACK's
 * zlarfg). α at element ia of a (data index 2·ia) is overwritten by β; x by v(1:); τ is written
 * to tauOut[ot], tauOut[ot+1].
 */
export function zlarfg(
  n: number,
  a: Float64Array,
  ia: number,
  x: Float64Array,
  sx: number,
  ox: number,
  tauOut: Float64Array,
  ot: number
): void {
  tauOut[ot] = 0;
  tauOut[ot + 1] = 0;
  if (n <= 0) {
    return;
  }
  let xnorm = n > 1 ? dznrm2(n - 1, x, sx, ox) : 0;
  let alphr = a[2 * ia];
  let alphi = a[2 * ia + 1];
  // Exactly zero x and real α: H = I (the algorithm's branch, not a rank test).
  if (xnorm === 0 && alphi === 0) {
    return;
  }
  let beta = -Math.sign(alphr || 1) * hypot3(alphr, alphi, xnorm);
  let knt = 0;
  if (Math.abs(beta) < SAFMIN) {
    do {
      knt++;
      zscaleReal(n - 1, RSAFMN, x, sx, ox);
      beta *= RSAFMN;
      alphr *= RSAFMN;
      alphi *= RSAFMN;
    } while (Math.abs(beta) < SAFMIN && knt < 20);
    xnorm = n > 1 ? dznrm2(n - 1, x, sx, ox) : 0;
    beta = -Math.sign(alphr || 1) * hypot3(alphr, alphi, xnorm);
  }
  tauOut[ot] = (beta - alphr) / beta;
  tauOut[ot + 1] = -alphi / beta;
  // x ← x / (α − β), by Smith's division of 1 by (alphr − β, alphi).
  const dr = alphr - beta;
  const di = alphi;
  let qr: number;
  let qi: number;
  if (Math.abs(di) <= Math.abs(dr)) {
    const e = di / dr;
    const f = dr + di * e;
    qr = 1 / f;
    qi = -e / f;
  } else {
    const e = dr / di;
    const f = di + dr * e;
    qr = e / f;
    qi = -1 / f;
  }
  let ix = 2 * ox;
  for (let i = 0; i < n - 1; i++) {
    const xr = x[ix];
    const xi = x[ix + 1];
    x[ix] = qr * xr - qi * xi;
    x[ix + 1] = qr * xi + qi * xr;
    ix += 2 * sx;
  }
  for (let j = 0; j < knt; j++) {
    beta *= SAFMIN;
  }
  a[2 * ia] = beta;
  a[2 * ia + 1] = 0;
}

function scale(n: number, s: number, x: Float64Array, sx: number, ox: number) {
  let ix = ox;
  for (let i = 0; i < n; i++) {
    x[ix] *= s;
    ix += sx;
  }
}

function zscaleReal(n: number, s: number, x: Float64Array, sx: number, ox: number) {
  let ix = 2 * ox;
  for (let i = 0; i < n; i++) {
    x[ix] *= s;
    x[ix + 1] *= s;
    ix += 2 * sx;
  }
}

/** √(a²+b²) without overflow (LAPACK dlapy2). */
export function hypot2(a: number, b: number): number {
  const x = Math.abs(a);
  const y = Math.abs(b);
  const w = x > y ? x : y;
  const z = x > y ? y : x;
  if (w === 0) {
    return 0;
  }
  const r = z / w;
  return w * Math.sqrt(1 + r * r);
}

/** √(a²+b²+c²) without overflow (LAPACK dlapy3). */
export function hypot3(a: number, b: number, c: number): number {
  const x = Math.abs(a);
  const y = Math.abs(b);
  const z = Math.abs(c);
  const w = Math.max(x, y, z);
  if (w === 0) {
    return x + y + z;
  }
  return w * Math.sqrt((x / w) ** 2 + (y / w) ** 2 + (z / w) ** 2);
}

/**
 * C ← Aᵀ·B for column-major A (m×k1), B (m×k2), C (k1×k2, ldc): the Gram-type products of the
 * block reflectors, in 4×4 register blocks with four independent accumulators in the
 * remainders (a single running sum is latency-bound).
 */
export function dgemmTN(
  k1: number,
  k2: number,
  m: number,
  A: Float64Array,
  oa: number,
  lda: number,
  B: Float64Array,
  ob: number,
  ldb: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  upper = false
): void {
  // upper: only blocks touching the strict upper triangle are needed (a Gram matrix VᵀV).
  let p = 0;
  for (; p + 4 <= k1; p += 4) {
    const a0 = oa + p * lda;
    const a1 = a0 + lda;
    const a2 = a1 + lda;
    const a3 = a2 + lda;
    let q = upper ? p : 0;
    for (; q + 4 <= k2; q += 4) {
      const b0 = ob + q * ldb;
      const b1 = b0 + ldb;
      const b2 = b1 + ldb;
      const b3 = b2 + ldb;
      let s00 = 0,
        s01 = 0,
        s02 = 0,
        s03 = 0,
        s10 = 0,
        s11 = 0,
        s12 = 0,
        s13 = 0,
        s20 = 0,
        s21 = 0,
        s22 = 0,
        s23 = 0,
        s30 = 0,
        s31 = 0,
        s32 = 0,
        s33 = 0;
      for (let i = 0; i < m; i++) {
        const x0 = A[a0 + i],
          x1 = A[a1 + i],
          x2 = A[a2 + i],
          x3 = A[a3 + i];
        const y0 = B[b0 + i],
          y1 = B[b1 + i],
          y2 = B[b2 + i],
          y3 = B[b3 + i];
        s00 += x0 * y0;
        s01 += x0 * y1;
        s02 += x0 * y2;
        s03 += x0 * y3;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s12 += x1 * y2;
        s13 += x1 * y3;
        s20 += x2 * y0;
        s21 += x2 * y1;
        s22 += x2 * y2;
        s23 += x2 * y3;
        s30 += x3 * y0;
        s31 += x3 * y1;
        s32 += x3 * y2;
        s33 += x3 * y3;
      }
      const c0 = oc + p + q * ldc;
      C[c0] = s00;
      C[c0 + 1] = s10;
      C[c0 + 2] = s20;
      C[c0 + 3] = s30;
      C[c0 + ldc] = s01;
      C[c0 + ldc + 1] = s11;
      C[c0 + ldc + 2] = s21;
      C[c0 + ldc + 3] = s31;
      C[c0 + 2 * ldc] = s02;
      C[c0 + 2 * ldc + 1] = s12;
      C[c0 + 2 * ldc + 2] = s22;
      C[c0 + 2 * ldc + 3] = s32;
      C[c0 + 3 * ldc] = s03;
      C[c0 + 3 * ldc + 1] = s13;
      C[c0 + 3 * ldc + 2] = s23;
      C[c0 + 3 * ldc + 3] = s33;
    }
    for (; q < k2; q++) {
      const b0 = ob + q * ldb;
      let s0 = 0,
        s1 = 0,
        s2 = 0,
        s3 = 0;
      for (let i = 0; i < m; i++) {
        const y = B[b0 + i];
        s0 += A[a0 + i] * y;
        s1 += A[a1 + i] * y;
        s2 += A[a2 + i] * y;
        s3 += A[a3 + i] * y;
      }
      const c0 = oc + p + q * ldc;
      C[c0] = s0;
      C[c0 + 1] = s1;
      C[c0 + 2] = s2;
      C[c0 + 3] = s3;
    }
  }
  for (; p < k1; p++) {
    const a0 = oa + p * lda;
    for (let q = upper ? p : 0; q < k2; q++) {
      C[oc + p + q * ldc] = dot4(m, A, a0, B, ob + q * ldb);
    }
  }
}

/** Σ x_i y_i over contiguous runs, four accumulators. */
function dot4(m: number, x: Float64Array, ox: number, y: Float64Array, oy: number): number {
  let s0 = 0,
    s1 = 0,
    s2 = 0,
    s3 = 0;
  let i = 0;
  for (; i + 4 <= m; i += 4) {
    s0 += x[ox + i] * y[oy + i];
    s1 += x[ox + i + 1] * y[oy + i + 1];
    s2 += x[ox + i + 2] * y[oy + i + 2];
    s3 += x[ox + i + 3] * y[oy + i + 3];
  }
  for (; i < m; i++) {
    s0 += x[ox + i] * y[oy + i];
  }
  return s0 + s1 + (s2 + s3);
}

// ---------------------------------------------------------------------------------------------
// Block reflector application, real.

/**
 * C ← (I − V·op(T)·Vᵀ)·C with op(T) = T ('N') or Tᵀ ('T'). V is m×k dense column-major (the unit
 * lower trapezoid stored explicitly, zeros above the diagonal), T k×k upper triangular, C m×n.
 * `work` holds at least 4k numbers. Processes C four columns at a time so that the columns stay
 * in cache between W = VᵀC and C −= V·W; the inner loops are 4×4 register blocks.
 */
export function dlarfbLeft(
  trans: 'N' | 'T',
  m: number,
  n: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  work: Float64Array
): void {
  if (m <= 0 || n <= 0 || k <= 0) {
    return;
  }
  let j = 0;
  for (; j + 4 <= n; j += 4) {
    larfbChunk4(trans, m, k, V, ov, ldv, T, ot, ldt, C, oc + j * ldc, ldc, work);
  }
  if (j + 2 <= n) {
    larfbChunk2(trans, m, k, V, ov, ldv, T, ot, ldt, C, oc + j * ldc, ldc, work);
    j += 2;
  }
  for (; j < n; j++) {
    larfbChunk1(trans, m, k, V, ov, ldv, T, ot, ldt, C, oc + j * ldc, work);
  }
}

function larfbChunk4(
  trans: 'N' | 'T',
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  W: Float64Array
): void {
  const c0 = oc;
  const c1 = oc + ldc;
  const c2 = oc + 2 * ldc;
  const c3 = oc + 3 * ldc;
  // Phase 1: W(p, b) = Σ_i V(i, p)·C(i, b); W is k×4 column-major with leading dimension k.
  let p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    let s00 = 0,
      s01 = 0,
      s02 = 0,
      s03 = 0,
      s10 = 0,
      s11 = 0,
      s12 = 0,
      s13 = 0,
      s20 = 0,
      s21 = 0,
      s22 = 0,
      s23 = 0,
      s30 = 0,
      s31 = 0,
      s32 = 0,
      s33 = 0;
    for (let i = 0; i < m; i++) {
      const a0 = V[v0 + i];
      const a1 = V[v1 + i];
      const a2 = V[v2 + i];
      const a3 = V[v3 + i];
      const b0 = C[c0 + i];
      const b1 = C[c1 + i];
      const b2 = C[c2 + i];
      const b3 = C[c3 + i];
      s00 += a0 * b0;
      s01 += a0 * b1;
      s02 += a0 * b2;
      s03 += a0 * b3;
      s10 += a1 * b0;
      s11 += a1 * b1;
      s12 += a1 * b2;
      s13 += a1 * b3;
      s20 += a2 * b0;
      s21 += a2 * b1;
      s22 += a2 * b2;
      s23 += a2 * b3;
      s30 += a3 * b0;
      s31 += a3 * b1;
      s32 += a3 * b2;
      s33 += a3 * b3;
    }
    W[p] = s00;
    W[k + p] = s01;
    W[2 * k + p] = s02;
    W[3 * k + p] = s03;
    W[p + 1] = s10;
    W[k + p + 1] = s11;
    W[2 * k + p + 1] = s12;
    W[3 * k + p + 1] = s13;
    W[p + 2] = s20;
    W[k + p + 2] = s21;
    W[2 * k + p + 2] = s22;
    W[3 * k + p + 2] = s23;
    W[p + 3] = s30;
    W[k + p + 3] = s31;
    W[2 * k + p + 3] = s32;
    W[3 * k + p + 3] = s33;
  }
  for (; p < k; p++) {
    const v0 = ov + p * ldv;
    let s0 = 0,
      s1 = 0,
      s2 = 0,
      s3 = 0;
    for (let i = 0; i < m; i++) {
      const a = V[v0 + i];
      s0 += a * C[c0 + i];
      s1 += a * C[c1 + i];
      s2 += a * C[c2 + i];
      s3 += a * C[c3 + i];
    }
    W[p] = s0;
    W[k + p] = s1;
    W[2 * k + p] = s2;
    W[3 * k + p] = s3;
  }
  // Phase 2: W ← op(T)·W.
  for (let b = 0; b < 4; b++) {
    triMulUpper(trans, k, T, ot, ldt, W, b * k);
  }
  // Phase 3: C ← C − V·W.
  p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    const w00 = W[p],
      w10 = W[p + 1],
      w20 = W[p + 2],
      w30 = W[p + 3];
    const w01 = W[k + p],
      w11 = W[k + p + 1],
      w21 = W[k + p + 2],
      w31 = W[k + p + 3];
    const w02 = W[2 * k + p],
      w12 = W[2 * k + p + 1],
      w22 = W[2 * k + p + 2],
      w32 = W[2 * k + p + 3];
    const w03 = W[3 * k + p],
      w13 = W[3 * k + p + 1],
      w23 = W[3 * k + p + 2],
      w33 = W[3 * k + p + 3];
    for (let i = 0; i < m; i++) {
      const a0 = V[v0 + i];
      const a1 = V[v1 + i];
      const a2 = V[v2 + i];
      const a3 = V[v3 + i];
      C[c0 + i] -= a0 * w00 + a1 * w10 + a2 * w20 + a3 * w30;
      C[c1 + i] -= a0 * w01 + a1 * w11 + a2 * w21 + a3 * w31;
      C[c2 + i] -= a0 * w02 + a1 * w12 + a2 * w22 + a3 * w32;
      C[c3 + i] -= a0 * w03 + a1 * w13 + a2 * w23 + a3 * w33;
    }
  }
  for (; p < k; p++) {
    const v0 = ov + p * ldv;
    const w0 = W[p],
      w1 = W[k + p],
      w2 = W[2 * k + p],
      w3 = W[3 * k + p];
    for (let i = 0; i < m; i++) {
      const a = V[v0 + i];
      C[c0 + i] -= a * w0;
      C[c1 + i] -= a * w1;
      C[c2 + i] -= a * w2;
      C[c3 + i] -= a * w3;
    }
  }
}

function larfbChunk2(
  trans: 'N' | 'T',
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  W: Float64Array
): void {
  const c0 = oc;
  const c1 = oc + ldc;
  let p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    let s00 = 0,
      s01 = 0,
      s10 = 0,
      s11 = 0,
      s20 = 0,
      s21 = 0,
      s30 = 0,
      s31 = 0;
    for (let i = 0; i < m; i++) {
      const x = C[c0 + i];
      const y = C[c1 + i];
      const a0 = V[v0 + i],
        a1 = V[v1 + i],
        a2 = V[v2 + i],
        a3 = V[v3 + i];
      s00 += a0 * x;
      s01 += a0 * y;
      s10 += a1 * x;
      s11 += a1 * y;
      s20 += a2 * x;
      s21 += a2 * y;
      s30 += a3 * x;
      s31 += a3 * y;
    }
    W[p] = s00;
    W[p + 1] = s10;
    W[p + 2] = s20;
    W[p + 3] = s30;
    W[k + p] = s01;
    W[k + p + 1] = s11;
    W[k + p + 2] = s21;
    W[k + p + 3] = s31;
  }
  for (; p < k; p++) {
    const v0 = ov + p * ldv;
    W[p] = dot4(m, V, v0, C, c0);
    W[k + p] = dot4(m, V, v0, C, c1);
  }
  triMulUpper(trans, k, T, ot, ldt, W, 0);
  triMulUpper(trans, k, T, ot, ldt, W, k);
  p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    const x0 = W[p],
      x1 = W[p + 1],
      x2 = W[p + 2],
      x3 = W[p + 3];
    const y0 = W[k + p],
      y1 = W[k + p + 1],
      y2 = W[k + p + 2],
      y3 = W[k + p + 3];
    for (let i = 0; i < m; i++) {
      const a0 = V[v0 + i],
        a1 = V[v1 + i],
        a2 = V[v2 + i],
        a3 = V[v3 + i];
      C[c0 + i] -= a0 * x0 + a1 * x1 + a2 * x2 + a3 * x3;
      C[c1 + i] -= a0 * y0 + a1 * y1 + a2 * y2 + a3 * y3;
    }
  }
  for (; p < k; p++) {
    const v0 = ov + p * ldv;
    const x = W[p];
    const y = W[k + p];
    for (let i = 0; i < m; i++) {
      const a = V[v0 + i];
      C[c0 + i] -= a * x;
      C[c1 + i] -= a * y;
    }
  }
}

function larfbChunk1(
  trans: 'N' | 'T',
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  W: Float64Array
): void {
  // W = Vᵀc four reflectors at a time (one load of c serves four of them), two rows per step so
  // that eight independent sums hide the add latency.
  let p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    let s0 = 0,
      s1 = 0,
      s2 = 0,
      s3 = 0,
      t0 = 0,
      t1 = 0,
      t2 = 0,
      t3 = 0;
    let i = 0;
    for (; i + 2 <= m; i += 2) {
      const x = C[oc + i];
      const y = C[oc + i + 1];
      s0 += V[v0 + i] * x;
      s1 += V[v1 + i] * x;
      s2 += V[v2 + i] * x;
      s3 += V[v3 + i] * x;
      t0 += V[v0 + i + 1] * y;
      t1 += V[v1 + i + 1] * y;
      t2 += V[v2 + i + 1] * y;
      t3 += V[v3 + i + 1] * y;
    }
    if (i < m) {
      const x = C[oc + i];
      s0 += V[v0 + i] * x;
      s1 += V[v1 + i] * x;
      s2 += V[v2 + i] * x;
      s3 += V[v3 + i] * x;
    }
    W[p] = s0 + t0;
    W[p + 1] = s1 + t1;
    W[p + 2] = s2 + t2;
    W[p + 3] = s3 + t3;
  }
  for (; p < k; p++) {
    W[p] = dot4(m, V, ov + p * ldv, C, oc);
  }
  triMulUpper(trans, k, T, ot, ldt, W, 0);
  p = 0;
  for (; p + 4 <= k; p += 4) {
    const v0 = ov + p * ldv;
    const v1 = v0 + ldv;
    const v2 = v1 + ldv;
    const v3 = v2 + ldv;
    const w0 = W[p],
      w1 = W[p + 1],
      w2 = W[p + 2],
      w3 = W[p + 3];
    for (let i = 0; i < m; i++) {
      C[oc + i] -= V[v0 + i] * w0 + V[v1 + i] * w1 + V[v2 + i] * w2 + V[v3 + i] * w3;
    }
  }
  for (; p < k; p++) {
    const v0 = ov + p * ldv;
    const w = W[p];
    for (let i = 0; i < m; i++) {
      C[oc + i] -= V[v0 + i] * w;
    }
  }
}

/** w ← op(T)·w for k×k upper triangular T, in place (w at W[ow..ow+k)). */
function triMulUpper(
  trans: 'N' | 'T',
  k: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  W: Float64Array,
  ow: number
): void {
  if (trans === 'N') {
    for (let p = 0; p < k; p++) {
      let s = 0;
      for (let q = p; q < k; q++) {
        s += T[ot + p + q * ldt] * W[ow + q];
      }
      W[ow + p] = s;
    }
  } else {
    for (let p = k - 1; p >= 0; p--) {
      let s = 0;
      const tp = ot + p * ldt;
      for (let q = 0; q <= p; q++) {
        s += T[tp + q] * W[ow + q];
      }
      W[ow + p] = s;
    }
  }
}

/**
 * C ← C − V·W for column-major V (m×k), W (k×n, ldw), C (m×n): the second half of a block
 * reflector update on its own (used where W = VᵀC is known in closed form). 4×4 blocks.
 */
export function dgemmNNsub(
  m: number,
  n: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  W: Float64Array,
  ow: number,
  ldw: number,
  C: Float64Array,
  oc: number,
  ldc: number
): void {
  let j = 0;
  for (; j + 4 <= n; j += 4) {
    const c0 = oc + j * ldc;
    const c1 = c0 + ldc;
    const c2 = c1 + ldc;
    const c3 = c2 + ldc;
    const wj = ow + j * ldw;
    let p = 0;
    for (; p + 4 <= k; p += 4) {
      const v0 = ov + p * ldv;
      const v1 = v0 + ldv;
      const v2 = v1 + ldv;
      const v3 = v2 + ldv;
      const b0 = wj + p;
      const b1 = b0 + ldw;
      const b2 = b1 + ldw;
      const b3 = b2 + ldw;
      const w00 = W[b0],
        w10 = W[b0 + 1],
        w20 = W[b0 + 2],
        w30 = W[b0 + 3];
      const w01 = W[b1],
        w11 = W[b1 + 1],
        w21 = W[b1 + 2],
        w31 = W[b1 + 3];
      const w02 = W[b2],
        w12 = W[b2 + 1],
        w22 = W[b2 + 2],
        w32 = W[b2 + 3];
      const w03 = W[b3],
        w13 = W[b3 + 1],
        w23 = W[b3 + 2],
        w33 = W[b3 + 3];
      for (let i = 0; i < m; i++) {
        const a0 = V[v0 + i];
        const a1 = V[v1 + i];
        const a2 = V[v2 + i];
        const a3 = V[v3 + i];
        C[c0 + i] -= a0 * w00 + a1 * w10 + a2 * w20 + a3 * w30;
        C[c1 + i] -= a0 * w01 + a1 * w11 + a2 * w21 + a3 * w31;
        C[c2 + i] -= a0 * w02 + a1 * w12 + a2 * w22 + a3 * w32;
        C[c3 + i] -= a0 * w03 + a1 * w13 + a2 * w23 + a3 * w33;
      }
    }
    for (; p < k; p++) {
      const v0 = ov + p * ldv;
      const w0 = W[wj + p],
        w1 = W[wj + ldw + p],
        w2 = W[wj + 2 * ldw + p],
        w3 = W[wj + 3 * ldw + p];
      for (let i = 0; i < m; i++) {
        const a = V[v0 + i];
        C[c0 + i] -= a * w0;
        C[c1 + i] -= a * w1;
        C[c2 + i] -= a * w2;
        C[c3 + i] -= a * w3;
      }
    }
  }
  for (; j < n; j++) {
    const c0 = oc + j * ldc;
    const wj = ow + j * ldw;
    for (let p = 0; p < k; p++) {
      const v0 = ov + p * ldv;
      const w = W[wj + p];
      for (let i = 0; i < m; i++) {
        C[c0 + i] -= V[v0 + i] * w;
      }
    }
  }
}

/**
 * Overwrites the m×k column-major block Q with (I − V·T·Vᵀ)·[I_k; 0] = [I; 0] − V·(T·V₁ᵀ), V₁ the
 * unit lower k×k top of V: forming a block's own columns of Q needs no VᵀC product
 * (half the flops of a general block-reflector update). `work` holds k·k numbers.
 */
export function dlarfbIdentity(
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  Q: Float64Array,
  oq: number,
  ldq: number,
  work: Float64Array
): void {
  // W = T·V₁ᵀ (k×k): W(p, c) = Σ_{q=p..c} T(p, q)·V(c, q).
  for (let c = 0; c < k; c++) {
    for (let p = 0; p < k; p++) {
      let s = 0;
      for (let q = p; q <= c; q++) {
        s += T[ot + p + q * ldt] * V[ov + c + q * ldv];
      }
      work[p + c * k] = s;
    }
  }
  for (let c = 0; c < k; c++) {
    const col = oq + c * ldq;
    for (let i = 0; i < m; i++) {
      Q[col + i] = i === c ? 1 : 0;
    }
  }
  dgemmNNsub(m, k, k, V, ov, ldv, work, 0, k, Q, oq, ldq);
}

/**
 * Forms the k×k upper triangular T of H₁⋯H_k = I − V·T·Vᵀ from packed V (m×k, zeros above the
 * unit diagonal) and τ (LAPACK dlarft, forward, columnwise).
 */
export function dlarft(
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  tau: Float64Array,
  otau: number,
  T: Float64Array,
  ot: number,
  ldt: number
): void {
  // G = VᵀV (k×k) by the blocked kernel: v_i is zero above row i, so the full-length dot
  // products equal LAPACK's V(i:m, 0:i)ᵀ v_i. Stored in T's strict upper part, then overwritten.
  dgemmTN(k, k, m, V, ov, ldv, V, ov, ldv, T, ot, ldt, true);
  for (let i = 0; i < k; i++) {
    const ti = tau[otau + i];
    for (let p = 0; p < i; p++) {
      T[ot + p + i * ldt] *= -ti;
    }
    // T(0:i, i) ← T(0:i, 0:i)·T(0:i, i), ascending rows use only not-yet-updated entries.
    for (let p = 0; p < i; p++) {
      let s = 0;
      for (let q = p; q < i; q++) {
        s += T[ot + p + q * ldt] * T[ot + q + i * ldt];
      }
      T[ot + p + i * ldt] = s;
    }
    T[ot + i + i * ldt] = ti;
  }
  for (let i = 0; i < k; i++) {
    for (let p = i + 1; p < k; p++) {
      T[ot + p + i * ldt] = 0;
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Block reflector application, complex (element offsets; data index = 2·element).

/**
 * C ← (I − V·op(T)·Vᴴ)·C, op(T) = T ('N') or Tᴴ ('C'); complex analogue of dlarfbLeft.
 * `work` holds at least 4k numbers (2k complex). Two columns of C at a time, 2×2 blocks.
 */
export function zlarfbLeft(
  trans: 'N' | 'C',
  m: number,
  n: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  work: Float64Array
): void {
  if (m <= 0 || n <= 0 || k <= 0) {
    return;
  }
  let j = 0;
  for (; j + 2 <= n; j += 2) {
    zlarfbChunk2(trans, m, k, V, ov, ldv, T, ot, ldt, C, oc + j * ldc, ldc, work);
  }
  for (; j < n; j++) {
    zlarfbChunk1(trans, m, k, V, ov, ldv, T, ot, ldt, C, oc + j * ldc, work);
  }
}

function zlarfbChunk2(
  trans: 'N' | 'C',
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  W: Float64Array
): void {
  const c0 = 2 * oc;
  const c1 = 2 * (oc + ldc);
  const k2 = 2 * k;
  let p = 0;
  for (; p + 2 <= k; p += 2) {
    const v0 = 2 * (ov + p * ldv);
    const v1 = v0 + 2 * ldv;
    let r00 = 0,
      i00 = 0,
      r01 = 0,
      i01 = 0,
      r10 = 0,
      i10 = 0,
      r11 = 0,
      i11 = 0;
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      const br = V[v1 + i],
        bi = V[v1 + i + 1];
      const xr = C[c0 + i],
        xi = C[c0 + i + 1];
      const yr = C[c1 + i],
        yi = C[c1 + i + 1];
      // conj(v)·c
      r00 += ar * xr + ai * xi;
      i00 += ar * xi - ai * xr;
      r01 += ar * yr + ai * yi;
      i01 += ar * yi - ai * yr;
      r10 += br * xr + bi * xi;
      i10 += br * xi - bi * xr;
      r11 += br * yr + bi * yi;
      i11 += br * yi - bi * yr;
    }
    W[2 * p] = r00;
    W[2 * p + 1] = i00;
    W[2 * p + 2] = r10;
    W[2 * p + 3] = i10;
    W[k2 + 2 * p] = r01;
    W[k2 + 2 * p + 1] = i01;
    W[k2 + 2 * p + 2] = r11;
    W[k2 + 2 * p + 3] = i11;
  }
  for (; p < k; p++) {
    const v0 = 2 * (ov + p * ldv);
    let r0 = 0,
      i0 = 0,
      r1 = 0,
      i1 = 0;
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      const xr = C[c0 + i],
        xi = C[c0 + i + 1];
      const yr = C[c1 + i],
        yi = C[c1 + i + 1];
      r0 += ar * xr + ai * xi;
      i0 += ar * xi - ai * xr;
      r1 += ar * yr + ai * yi;
      i1 += ar * yi - ai * yr;
    }
    W[2 * p] = r0;
    W[2 * p + 1] = i0;
    W[k2 + 2 * p] = r1;
    W[k2 + 2 * p + 1] = i1;
  }
  ztriMulUpper(trans, k, T, ot, ldt, W, 0);
  ztriMulUpper(trans, k, T, ot, ldt, W, k);
  p = 0;
  for (; p + 2 <= k; p += 2) {
    const v0 = 2 * (ov + p * ldv);
    const v1 = v0 + 2 * ldv;
    const w00r = W[2 * p],
      w00i = W[2 * p + 1],
      w10r = W[2 * p + 2],
      w10i = W[2 * p + 3];
    const w01r = W[k2 + 2 * p],
      w01i = W[k2 + 2 * p + 1],
      w11r = W[k2 + 2 * p + 2],
      w11i = W[k2 + 2 * p + 3];
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      const br = V[v1 + i],
        bi = V[v1 + i + 1];
      C[c0 + i] -= ar * w00r - ai * w00i + br * w10r - bi * w10i;
      C[c0 + i + 1] -= ar * w00i + ai * w00r + br * w10i + bi * w10r;
      C[c1 + i] -= ar * w01r - ai * w01i + br * w11r - bi * w11i;
      C[c1 + i + 1] -= ar * w01i + ai * w01r + br * w11i + bi * w11r;
    }
  }
  for (; p < k; p++) {
    const v0 = 2 * (ov + p * ldv);
    const w0r = W[2 * p],
      w0i = W[2 * p + 1];
    const w1r = W[k2 + 2 * p],
      w1i = W[k2 + 2 * p + 1];
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      C[c0 + i] -= ar * w0r - ai * w0i;
      C[c0 + i + 1] -= ar * w0i + ai * w0r;
      C[c1 + i] -= ar * w1r - ai * w1i;
      C[c1 + i + 1] -= ar * w1i + ai * w1r;
    }
  }
}

function zlarfbChunk1(
  trans: 'N' | 'C',
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  C: Float64Array,
  oc: number,
  W: Float64Array
): void {
  const c0 = 2 * oc;
  for (let p = 0; p < k; p++) {
    const v0 = 2 * (ov + p * ldv);
    let re = 0,
      im = 0;
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      const xr = C[c0 + i],
        xi = C[c0 + i + 1];
      re += ar * xr + ai * xi;
      im += ar * xi - ai * xr;
    }
    W[2 * p] = re;
    W[2 * p + 1] = im;
  }
  ztriMulUpper(trans, k, T, ot, ldt, W, 0);
  for (let p = 0; p < k; p++) {
    const v0 = 2 * (ov + p * ldv);
    const wr = W[2 * p],
      wi = W[2 * p + 1];
    for (let i = 0; i < 2 * m; i += 2) {
      const ar = V[v0 + i],
        ai = V[v0 + i + 1];
      C[c0 + i] -= ar * wr - ai * wi;
      C[c0 + i + 1] -= ar * wi + ai * wr;
    }
  }
}

/** w ← op(T)·w, complex, T k×k upper, w at complex element ow of W. */
function ztriMulUpper(
  trans: 'N' | 'C',
  k: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  W: Float64Array,
  ow: number
): void {
  if (trans === 'N') {
    for (let p = 0; p < k; p++) {
      let re = 0,
        im = 0;
      for (let q = p; q < k; q++) {
        const t = 2 * (ot + p + q * ldt);
        const tr = T[t],
          ti = T[t + 1];
        const wr = W[2 * (ow + q)],
          wi = W[2 * (ow + q) + 1];
        re += tr * wr - ti * wi;
        im += tr * wi + ti * wr;
      }
      W[2 * (ow + p)] = re;
      W[2 * (ow + p) + 1] = im;
    }
  } else {
    for (let p = k - 1; p >= 0; p--) {
      let re = 0,
        im = 0;
      for (let q = 0; q <= p; q++) {
        // (Tᴴ)(p, q) = conj(T(q, p))
        const t = 2 * (ot + q + p * ldt);
        const tr = T[t],
          ti = -T[t + 1];
        const wr = W[2 * (ow + q)],
          wi = W[2 * (ow + q) + 1];
        re += tr * wr - ti * wi;
        im += tr * wi + ti * wr;
      }
      W[2 * (ow + p)] = re;
      W[2 * (ow + p) + 1] = im;
    }
  }
}

/**
 * C ← Aᴴ·B for complex column-major A (m×k1), B (m×k2), C (k1×k2, ldc); element offsets.
 * 2×2 blocks of complex accumulators.
 */
export function zgemmCN(
  k1: number,
  k2: number,
  m: number,
  A: Float64Array,
  oa: number,
  lda: number,
  B: Float64Array,
  ob: number,
  ldb: number,
  C: Float64Array,
  oc: number,
  ldc: number,
  upper = false
): void {
  const m2 = 2 * m;
  let p = 0;
  for (; p + 2 <= k1; p += 2) {
    const a0 = 2 * (oa + p * lda);
    const a1 = a0 + 2 * lda;
    let q = upper ? p : 0;
    for (; q + 2 <= k2; q += 2) {
      const b0 = 2 * (ob + q * ldb);
      const b1 = b0 + 2 * ldb;
      let r00 = 0,
        i00 = 0,
        r01 = 0,
        i01 = 0,
        r10 = 0,
        i10 = 0,
        r11 = 0,
        i11 = 0;
      for (let i = 0; i < m2; i += 2) {
        const xr = A[a0 + i],
          xi = A[a0 + i + 1];
        const yr = A[a1 + i],
          yi = A[a1 + i + 1];
        const ur = B[b0 + i],
          ui = B[b0 + i + 1];
        const vr = B[b1 + i],
          vi = B[b1 + i + 1];
        r00 += xr * ur + xi * ui;
        i00 += xr * ui - xi * ur;
        r01 += xr * vr + xi * vi;
        i01 += xr * vi - xi * vr;
        r10 += yr * ur + yi * ui;
        i10 += yr * ui - yi * ur;
        r11 += yr * vr + yi * vi;
        i11 += yr * vi - yi * vr;
      }
      const c0 = 2 * (oc + p + q * ldc);
      const c1 = c0 + 2 * ldc;
      C[c0] = r00;
      C[c0 + 1] = i00;
      C[c0 + 2] = r10;
      C[c0 + 3] = i10;
      C[c1] = r01;
      C[c1 + 1] = i01;
      C[c1 + 2] = r11;
      C[c1 + 3] = i11;
    }
    for (; q < k2; q++) {
      const b0 = 2 * (ob + q * ldb);
      let r0 = 0,
        i0 = 0,
        r1 = 0,
        i1 = 0;
      for (let i = 0; i < m2; i += 2) {
        const ur = B[b0 + i],
          ui = B[b0 + i + 1];
        const xr = A[a0 + i],
          xi = A[a0 + i + 1];
        const yr = A[a1 + i],
          yi = A[a1 + i + 1];
        r0 += xr * ur + xi * ui;
        i0 += xr * ui - xi * ur;
        r1 += yr * ur + yi * ui;
        i1 += yr * ui - yi * ur;
      }
      const c0 = 2 * (oc + p + q * ldc);
      C[c0] = r0;
      C[c0 + 1] = i0;
      C[c0 + 2] = r1;
      C[c0 + 3] = i1;
    }
  }
  for (; p < k1; p++) {
    const a0 = 2 * (oa + p * lda);
    for (let q = upper ? p : 0; q < k2; q++) {
      const b0 = 2 * (ob + q * ldb);
      let r0 = 0,
        i0 = 0,
        r1 = 0,
        i1 = 0;
      let i = 0;
      for (; i + 4 <= m2; i += 4) {
        r0 += A[a0 + i] * B[b0 + i] + A[a0 + i + 1] * B[b0 + i + 1];
        i0 += A[a0 + i] * B[b0 + i + 1] - A[a0 + i + 1] * B[b0 + i];
        r1 += A[a0 + i + 2] * B[b0 + i + 2] + A[a0 + i + 3] * B[b0 + i + 3];
        i1 += A[a0 + i + 2] * B[b0 + i + 3] - A[a0 + i + 3] * B[b0 + i + 2];
      }
      for (; i < m2; i += 2) {
        r0 += A[a0 + i] * B[b0 + i] + A[a0 + i + 1] * B[b0 + i + 1];
        i0 += A[a0 + i] * B[b0 + i + 1] - A[a0 + i + 1] * B[b0 + i];
      }
      const c0 = 2 * (oc + p + q * ldc);
      C[c0] = r0 + r1;
      C[c0 + 1] = i0 + i1;
    }
  }
}

/**
 * Complex dlarfbIdentity: Q(m×k) ← [I; 0] − V·(T·V₁ᴴ). `work` holds 2·k·k numbers; the update
 * goes through zlarfbLeft's second half via an explicit loop (2 columns at a time).
 */
export function zlarfbIdentity(
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  T: Float64Array,
  ot: number,
  ldt: number,
  Q: Float64Array,
  oq: number,
  ldq: number,
  work: Float64Array
): void {
  // W(p, c) = Σ_{q=p..c} T(p, q)·conj(V(c, q))
  for (let c = 0; c < k; c++) {
    for (let p = 0; p < k; p++) {
      let sr = 0,
        si = 0;
      for (let q = p; q <= c; q++) {
        const t = 2 * (ot + p + q * ldt);
        const v = 2 * (ov + c + q * ldv);
        const tr = T[t],
          ti = T[t + 1];
        const vr = V[v],
          vi = -V[v + 1];
        sr += tr * vr - ti * vi;
        si += tr * vi + ti * vr;
      }
      work[2 * (p + c * k)] = sr;
      work[2 * (p + c * k) + 1] = si;
    }
  }
  for (let c = 0; c < k; c++) {
    const col = 2 * (oq + c * ldq);
    for (let i = 0; i < m; i++) {
      Q[col + 2 * i] = i === c ? 1 : 0;
      Q[col + 2 * i + 1] = 0;
    }
  }
  // Q −= V·W, two columns of Q and two of V at a time.
  let c = 0;
  for (; c + 2 <= k; c += 2) {
    const q0 = 2 * (oq + c * ldq);
    const q1 = q0 + 2 * ldq;
    let p = 0;
    for (; p + 2 <= k; p += 2) {
      const v0 = 2 * (ov + p * ldv);
      const v1 = v0 + 2 * ldv;
      const w = 2 * (p + c * k);
      const w00r = work[w],
        w00i = work[w + 1],
        w10r = work[w + 2],
        w10i = work[w + 3];
      const w01r = work[w + 2 * k],
        w01i = work[w + 2 * k + 1],
        w11r = work[w + 2 * k + 2],
        w11i = work[w + 2 * k + 3];
      for (let i = 0; i < 2 * m; i += 2) {
        const ar = V[v0 + i],
          ai = V[v0 + i + 1];
        const br = V[v1 + i],
          bi = V[v1 + i + 1];
        Q[q0 + i] -= ar * w00r - ai * w00i + br * w10r - bi * w10i;
        Q[q0 + i + 1] -= ar * w00i + ai * w00r + br * w10i + bi * w10r;
        Q[q1 + i] -= ar * w01r - ai * w01i + br * w11r - bi * w11i;
        Q[q1 + i + 1] -= ar * w01i + ai * w01r + br * w11i + bi * w11r;
      }
    }
    for (; p < k; p++) {
      const v0 = 2 * (ov + p * ldv);
      const w = 2 * (p + c * k);
      const w0r = work[w],
        w0i = work[w + 1];
      const w1r = work[w + 2 * k],
        w1i = work[w + 2 * k + 1];
      for (let i = 0; i < 2 * m; i += 2) {
        const ar = V[v0 + i],
          ai = V[v0 + i + 1];
        Q[q0 + i] -= ar * w0r - ai * w0i;
        Q[q0 + i + 1] -= ar * w0i + ai * w0r;
        Q[q1 + i] -= ar * w1r - ai * w1i;
        Q[q1 + i + 1] -= ar * w1i + ai * w1r;
      }
    }
  }
  for (; c < k; c++) {
    const q0 = 2 * (oq + c * ldq);
    for (let p = 0; p < k; p++) {
      const v0 = 2 * (ov + p * ldv);
      const w = 2 * (p + c * k);
      const wr = work[w],
        wi = work[w + 1];
      for (let i = 0; i < 2 * m; i += 2) {
        const ar = V[v0 + i],
          ai = V[v0 + i + 1];
        Q[q0 + i] -= ar * wr - ai * wi;
        Q[q0 + i + 1] -= ar * wi + ai * wr;
      }
    }
  }
}

/** Complex dlarft: T of H₁⋯H_k = I − V·T·Vᴴ (tau interleaved complex). */
export function zlarft(
  m: number,
  k: number,
  V: Float64Array,
  ov: number,
  ldv: number,
  tau: Float64Array,
  otau: number,
  T: Float64Array,
  ot: number,
  ldt: number
): void {
  // G = VᴴV by the blocked kernel (v_i is zero above row i), then the recurrence of dlarft.
  zgemmCN(k, k, m, V, ov, ldv, V, ov, ldv, T, ot, ldt, true);
  for (let i = 0; i < k; i++) {
    const tr = tau[2 * (otau + i)];
    const tim = tau[2 * (otau + i) + 1];
    for (let p = 0; p < i; p++) {
      const t = 2 * (ot + p + i * ldt);
      const sr = T[t];
      const si = T[t + 1];
      T[t] = -(tr * sr - tim * si);
      T[t + 1] = -(tr * si + tim * sr);
    }
    for (let p = 0; p < i; p++) {
      let sr = 0,
        si = 0;
      for (let q = p; q < i; q++) {
        const a = 2 * (ot + p + q * ldt);
        const b = 2 * (ot + q + i * ldt);
        sr += T[a] * T[b] - T[a + 1] * T[b + 1];
        si += T[a] * T[b + 1] + T[a + 1] * T[b];
      }
      T[2 * (ot + p + i * ldt)] = sr;
      T[2 * (ot + p + i * ldt) + 1] = si;
    }
    T[2 * (ot + i + i * ldt)] = tr;
    T[2 * (ot + i + i * ldt) + 1] = tim;
  }
  for (let i = 0; i < k; i++) {
    for (let p = i + 1; p < k; p++) {
      T[2 * (ot + p + i * ldt)] = 0;
      T[2 * (ot + p + i * ldt) + 1] = 0;
    }
  }
}
