/**
 * BLAS-like strided kernels, real (d*) and complex (z*).
 *
 * Convention (CONVENTIONS.md): `(n, x, strideX, offsetX, …)`, outputs supplied by the caller,
 * nothing allocated. For the complex kernels `x` is an interleaved (re, im) Float64Array and
 * strides and offsets count complex elements: element k of x is at `x[2*(offsetX + k*strideX)]`
 * (real part) and the next index (imaginary part). Complex scalars are passed as (re, im) pairs;
 * complex results are written to `out[outOffset]`, `out[outOffset + 1]`.
 *
 * Matrices are (m, n, A, strideA1, strideA2, offsetA): element (i, j) at
 * `offsetA + i*strideA1 + j*strideA2` (column-major when strideA1 = 1, row-major when strideA2 = 1).
 *
 * The kernels do not check their arguments (they are the inner loops); the friendly entry points
 * elsewhere check once. Semantics follow the reference BLAS (Dongarra et al., "An extended set of
 * FORTRAN basic linear algebra subprograms", ACM TOMS 14, 1988; Lawson et al., ACM TOMS 5, 1979).
 */

/** x·y (real). */
export function ddot(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): number {
  let s0 = 0;
  let s1 = 0;
  if (sx === 1 && sy === 1) {
    let i = 0;
    for (; i + 1 < n; i += 2) {
      s0 += x[ox + i] * y[oy + i];
      s1 += x[ox + i + 1] * y[oy + i + 1];
    }
    if (i < n) {
      s0 += x[ox + i] * y[oy + i];
    }
    return s0 + s1;
  }
  let ix = ox;
  let iy = oy;
  for (let i = 0; i < n; i++) {
    s0 += x[ix] * y[iy];
    ix += sx;
    iy += sy;
  }
  return s0;
}

// Blue's scaling constants for IEEE double (Anderson, "Algorithm 978: Safe scaling in the Level 1
// BLAS", ACM TOMS 44, 2017, §3): sums of squares of entries in [tsml, tbig] neither overflow nor
// underflow; larger ones are scaled down by sbig, smaller ones up by ssml.
const TSML = Math.pow(2, -511);
const TBIG = Math.pow(2, 486);
const SSML = Math.pow(2, 537);
const SBIG = Math.pow(2, -538);

/** Euclidean norm without overflow or harmful underflow (Blue's algorithm, one pass). */
export function dnrm2(n: number, x: Float64Array, sx: number, ox: number): number {
  let asml = 0;
  let amed = 0;
  let abig = 0;
  let ix = ox;
  for (let i = 0; i < n; i++) {
    const ax = Math.abs(x[ix]);
    ix += sx;
    if (ax > TBIG) {
      const t = ax * SBIG;
      abig += t * t;
    } else if (ax < TSML) {
      if (abig === 0) {
        const t = ax * SSML;
        asml += t * t;
      }
    } else {
      amed += ax * ax;
    }
  }
  return blueCombine(asml, amed, abig);
}

const TBIG2 = TBIG * TBIG; // 2^972
const TSML2_EPS = (TSML * TSML) / Number.EPSILON; // 2^-970

/**
 * Euclidean norm of n contiguous entries x[ox..ox+n): the plain sum of squares s (four partial
 * sums) when that is provably as good as dnrm2's, else dnrm2 (Blue's algorithm). Safe when
 * s < TBIG² (then no |x_i| exceeds TBIG: nothing overflowed) and s ≥ n·TSML²/ε (entries below
 * TSML, whose squares may lose digits to underflow, add up to less than ε·s). NaN or ±Inf make
 * s fail both tests and take dnrm2's path. Used by the reflector generator, where the norm of
 * each column below the diagonal is taken once per reflector.
 */
export function dnrm2Unit(n: number, x: Float64Array, ox: number): number {
  let s0 = 0,
    s1 = 0,
    s2 = 0,
    s3 = 0;
  let i = 0;
  for (; i + 4 <= n; i += 4) {
    const a = x[ox + i];
    const b = x[ox + i + 1];
    const c = x[ox + i + 2];
    const d = x[ox + i + 3];
    s0 += a * a;
    s1 += b * b;
    s2 += c * c;
    s3 += d * d;
  }
  for (; i < n; i++) {
    const a = x[ox + i];
    s0 += a * a;
  }
  const s = s0 + s1 + (s2 + s3);
  if (s < TBIG2 && s >= n * TSML2_EPS) {
    return Math.sqrt(s);
  }
  return dnrm2(n, x, 1, ox);
}

function blueCombine(asml: number, amed: number, abig: number): number {
  if (abig > 0) {
    // Beyond TBIG the medium and small parts cannot matter except through amed.
    if (amed > 0 || amed !== amed) {
      abig += amed * SBIG * SBIG;
    }
    return Math.sqrt(abig) / SBIG;
  }
  if (asml > 0) {
    if (amed > 0 || amed !== amed) {
      const am = Math.sqrt(amed);
      const as = Math.sqrt(asml) / SSML;
      const ymin = as > am ? am : as;
      const ymax = as > am ? as : am;
      const r = ymin / ymax;
      return ymax * Math.sqrt(1 + r * r);
    }
    return Math.sqrt(asml) / SSML;
  }
  return Math.sqrt(amed);
}

/** y ← αx + y. */
export function daxpy(
  n: number,
  alpha: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  if (sx === 1 && sy === 1) {
    for (let i = 0; i < n; i++) {
      y[oy + i] += alpha * x[ox + i];
    }
    return;
  }
  let ix = ox;
  let iy = oy;
  for (let i = 0; i < n; i++) {
    y[iy] += alpha * x[ix];
    ix += sx;
    iy += sy;
  }
}

/** x ← αx. */
export function dscal(n: number, alpha: number, x: Float64Array, sx: number, ox: number): void {
  let ix = ox;
  for (let i = 0; i < n; i++) {
    x[ix] *= alpha;
    ix += sx;
  }
}

/** y ← x. */
export function dcopy(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  let ix = ox;
  let iy = oy;
  for (let i = 0; i < n; i++) {
    y[iy] = x[ix];
    ix += sx;
    iy += sy;
  }
}

/** x ↔ y. */
export function dswap(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  let ix = ox;
  let iy = oy;
  for (let i = 0; i < n; i++) {
    const t = x[ix];
    x[ix] = y[iy];
    y[iy] = t;
    ix += sx;
    iy += sy;
  }
}

/** Index of the first entry of largest |x_i| (−1 when n = 0). */
export function idamax(n: number, x: Float64Array, sx: number, ox: number): number {
  let best = -1;
  let bv = -1;
  let ix = ox;
  for (let i = 0; i < n; i++) {
    const v = Math.abs(x[ix]);
    if (v > bv) {
      bv = v;
      best = i;
    }
    ix += sx;
  }
  return best;
}

/**
 * y ← α·op(A)·x + β·y with op(A) = A ('N') or Aᵀ ('T'); A is m×n. With β = 0, y is not read
 * (so it may hold NaN), as in the reference BLAS.
 */
export function dgemv(
  trans: 'N' | 'T',
  m: number,
  n: number,
  alpha: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  x: Float64Array,
  sx: number,
  ox: number,
  beta: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  const ny = trans === 'N' ? m : n;
  if (beta !== 1) {
    let iy = oy;
    for (let i = 0; i < ny; i++) {
      y[iy] = beta === 0 ? 0 : beta * y[iy];
      iy += sy;
    }
  }
  if (alpha === 0) {
    return;
  }
  if (trans === 'N') {
    if (sa1 === 1 || sa1 <= sa2) {
      // Column sweep: y += (α x_j) A[:, j].
      let ix = ox;
      for (let j = 0; j < n; j++) {
        const t = alpha * x[ix];
        ix += sx;
        daxpy(m, t, A, sa1, oa + j * sa2, y, sy, oy);
      }
    } else {
      let iy = oy;
      for (let i = 0; i < m; i++) {
        y[iy] += alpha * ddot(n, A, sa2, oa + i * sa1, x, sx, ox);
        iy += sy;
      }
    }
  } else {
    if (sa1 === 1 || sa1 <= sa2) {
      let iy = oy;
      for (let j = 0; j < n; j++) {
        y[iy] += alpha * ddot(m, A, sa1, oa + j * sa2, x, sx, ox);
        iy += sy;
      }
    } else {
      let ix = ox;
      for (let i = 0; i < m; i++) {
        const t = alpha * x[ix];
        ix += sx;
        daxpy(n, t, A, sa2, oa + i * sa1, y, sy, oy);
      }
    }
  }
}

/** A ← A + α·x·yᵀ (rank-1 update); A is m×n. */
export function dger(
  m: number,
  n: number,
  alpha: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number
): void {
  if (sa1 === 1 || sa1 <= sa2) {
    let iy = oy;
    for (let j = 0; j < n; j++) {
      const t = alpha * y[iy];
      iy += sy;
      if (t !== 0) {
        daxpy(m, t, x, sx, ox, A, sa1, oa + j * sa2);
      }
    }
  } else {
    let ix = ox;
    for (let i = 0; i < m; i++) {
      const t = alpha * x[ix];
      ix += sx;
      if (t !== 0) {
        daxpy(n, t, y, sy, oy, A, sa2, oa + i * sa1);
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Complex kernels. Strides and offsets in complex elements.

/** out ← xᴴy = Σ conj(x_i)·y_i. */
export function zdotc(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  out: Float64Array,
  outOffset = 0
): void {
  let re = 0;
  let im = 0;
  let ix = 2 * ox;
  let iy = 2 * oy;
  const dx = 2 * sx;
  const dy = 2 * sy;
  for (let i = 0; i < n; i++) {
    const xr = x[ix];
    const xi = x[ix + 1];
    const yr = y[iy];
    const yi = y[iy + 1];
    re += xr * yr + xi * yi;
    im += xr * yi - xi * yr;
    ix += dx;
    iy += dy;
  }
  out[outOffset] = re;
  out[outOffset + 1] = im;
}

/** out ← xᵀy = Σ x_i·y_i (unconjugated). */
export function zdotu(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  out: Float64Array,
  outOffset = 0
): void {
  let re = 0;
  let im = 0;
  let ix = 2 * ox;
  let iy = 2 * oy;
  const dx = 2 * sx;
  const dy = 2 * sy;
  for (let i = 0; i < n; i++) {
    const xr = x[ix];
    const xi = x[ix + 1];
    const yr = y[iy];
    const yi = y[iy + 1];
    re += xr * yr - xi * yi;
    im += xr * yi + xi * yr;
    ix += dx;
    iy += dy;
  }
  out[outOffset] = re;
  out[outOffset + 1] = im;
}

/** ‖x‖₂ of a complex vector without overflow (Blue's algorithm over the 2n real parts). */
export function dznrm2(n: number, x: Float64Array, sx: number, ox: number): number {
  let asml = 0;
  let amed = 0;
  let abig = 0;
  let ix = 2 * ox;
  const dx = 2 * sx;
  for (let i = 0; i < n; i++) {
    for (let p = 0; p < 2; p++) {
      const ax = Math.abs(x[ix + p]);
      if (ax > TBIG) {
        const t = ax * SBIG;
        abig += t * t;
      } else if (ax < TSML) {
        if (abig === 0) {
          const t = ax * SSML;
          asml += t * t;
        }
      } else {
        amed += ax * ax;
      }
    }
    ix += dx;
  }
  return blueCombine(asml, amed, abig);
}

/** y ← αx + y with complex α = (ar, ai). */
export function zaxpy(
  n: number,
  ar: number,
  ai: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  let ix = 2 * ox;
  let iy = 2 * oy;
  const dx = 2 * sx;
  const dy = 2 * sy;
  for (let i = 0; i < n; i++) {
    const xr = x[ix];
    const xi = x[ix + 1];
    y[iy] += ar * xr - ai * xi;
    y[iy + 1] += ar * xi + ai * xr;
    ix += dx;
    iy += dy;
  }
}

/** x ← αx with complex α = (ar, ai). */
export function zscal(
  n: number,
  ar: number,
  ai: number,
  x: Float64Array,
  sx: number,
  ox: number
): void {
  let ix = 2 * ox;
  const dx = 2 * sx;
  for (let i = 0; i < n; i++) {
    const xr = x[ix];
    const xi = x[ix + 1];
    x[ix] = ar * xr - ai * xi;
    x[ix + 1] = ar * xi + ai * xr;
    ix += dx;
  }
}

/** x ← αx with real α. */
export function zdscal(n: number, alpha: number, x: Float64Array, sx: number, ox: number): void {
  let ix = 2 * ox;
  const dx = 2 * sx;
  for (let i = 0; i < n; i++) {
    x[ix] *= alpha;
    x[ix + 1] *= alpha;
    ix += dx;
  }
}

/** y ← x (complex). */
export function zcopy(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  let ix = 2 * ox;
  let iy = 2 * oy;
  const dx = 2 * sx;
  const dy = 2 * sy;
  for (let i = 0; i < n; i++) {
    y[iy] = x[ix];
    y[iy + 1] = x[ix + 1];
    ix += dx;
    iy += dy;
  }
}

/** x ↔ y (complex). */
export function zswap(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  let ix = 2 * ox;
  let iy = 2 * oy;
  const dx = 2 * sx;
  const dy = 2 * sy;
  for (let i = 0; i < n; i++) {
    const tr = x[ix];
    const ti = x[ix + 1];
    x[ix] = y[iy];
    x[ix + 1] = y[iy + 1];
    y[iy] = tr;
    y[iy + 1] = ti;
    ix += dx;
    iy += dy;
  }
}

/**
 * y ← α·op(A)·x + β·y, op(A) = A ('N'), Aᵀ ('T') or Aᴴ ('C'); A is m×n complex; α = (ar, ai),
 * β = (br, bi). With β = 0, y is not read.
 */
export function zgemv(
  trans: 'N' | 'T' | 'C',
  m: number,
  n: number,
  ar: number,
  ai: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  x: Float64Array,
  sx: number,
  ox: number,
  br: number,
  bi: number,
  y: Float64Array,
  sy: number,
  oy: number
): void {
  const ny = trans === 'N' ? m : n;
  if (br !== 1 || bi !== 0) {
    let iy = 2 * oy;
    for (let i = 0; i < ny; i++) {
      if (br === 0 && bi === 0) {
        y[iy] = 0;
        y[iy + 1] = 0;
      } else {
        const yr = y[iy];
        const yi = y[iy + 1];
        y[iy] = br * yr - bi * yi;
        y[iy + 1] = br * yi + bi * yr;
      }
      iy += 2 * sy;
    }
  }
  if (ar === 0 && ai === 0) {
    return;
  }
  if (trans === 'N') {
    let ix = 2 * ox;
    for (let j = 0; j < n; j++) {
      const xr = x[ix];
      const xi = x[ix + 1];
      ix += 2 * sx;
      zaxpy(m, ar * xr - ai * xi, ar * xi + ai * xr, A, sa1, oa + j * sa2, y, sy, oy);
    }
    return;
  }
  const conj = trans === 'C';
  let iy = 2 * oy;
  for (let j = 0; j < n; j++) {
    let re = 0;
    let im = 0;
    let ia = 2 * (oa + j * sa2);
    let ix = 2 * ox;
    for (let i = 0; i < m; i++) {
      const a = A[ia];
      const b = conj ? -A[ia + 1] : A[ia + 1];
      const xr = x[ix];
      const xi = x[ix + 1];
      re += a * xr - b * xi;
      im += a * xi + b * xr;
      ia += 2 * sa1;
      ix += 2 * sx;
    }
    y[iy] += ar * re - ai * im;
    y[iy + 1] += ar * im + ai * re;
    iy += 2 * sy;
  }
}

/** A ← A + α·x·yᴴ (conjugated rank-1 update); α = (ar, ai). */
export function zgerc(
  m: number,
  n: number,
  ar: number,
  ai: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number
): void {
  let iy = 2 * oy;
  for (let j = 0; j < n; j++) {
    const yr = y[iy];
    const yi = -y[iy + 1];
    iy += 2 * sy;
    zaxpy(m, ar * yr - ai * yi, ar * yi + ai * yr, x, sx, ox, A, sa1, oa + j * sa2);
  }
}

/** A ← A + α·x·yᵀ (unconjugated rank-1 update); α = (ar, ai). */
export function zgeru(
  m: number,
  n: number,
  ar: number,
  ai: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  A: Float64Array,
  sa1: number,
  sa2: number,
  oa: number
): void {
  let iy = 2 * oy;
  for (let j = 0; j < n; j++) {
    const yr = y[iy];
    const yi = y[iy + 1];
    iy += 2 * sy;
    zaxpy(m, ar * yr - ai * yi, ar * yi + ai * yr, x, sx, ox, A, sa1, oa + j * sa2);
  }
}

/** Index of the first entry of largest |re| + |im| (as the reference BLAS izamax), −1 if n = 0. */
export function izamax(n: number, x: Float64Array, sx: number, ox: number): number {
  let best = -1;
  let bv = -1;
  let ix = 2 * ox;
  for (let i = 0; i < n; i++) {
    const v = Math.abs(x[ix]) + Math.abs(x[ix + 1]);
    if (v > bv) {
      bv = v;
      best = i;
    }
    ix += 2 * sx;
  }
  return best;
}
