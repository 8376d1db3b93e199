/**
 * Householder QR, real and complex: A = Q·R with Q = H₁H₂⋯H_k, H_i = I − τ_i v_i v_iᴴ, stored in
 * place as LAPACK does (R on and above the diagonal, v_i below it, τ separately).
 *
 * The factorisation is blocked: panels of NB columns are factored recursively (Elmroth &
 * Gustavson, "Applying recursion to serial and parallel QR factorization leads to better
 * performance", IBM J. Res. Dev. 44(4), 2000; LAPACK's xGEQRT3), which yields the compact WY
 * factor T of each panel as a by-product, and the trailing matrix is updated with
 * C ← (I − V Tᴴ Vᴴ)·C (Schreiber & Van Loan 1989; Golub & Van Loan, Matrix Computations 4e,
 * §5.2.3, Algorithm 5.2.2). Q is formed (thin or full) or applied without forming it by the same
 * block reflectors, exploiting the identity's structure as LAPACK's xORGQR does.
 *
 * Kernels: `geqrf(m, n, A, sa1, sa2, oa, tau, otau, complex)` and friends take any strides; they
 * pack non-column-major input into a column-major copy once at the entry.
 */
import {
  dgemmTN,
  dlarfbIdentity,
  dlarfbLeft,
  dlarfg,
  dlarft,
  zgemmCN,
  zlarfbIdentity,
  zlarfbLeft,
  zlarfg,
  zlarft
} from './reflector';

/**
 * Panel width of the blocked algorithms, chosen by measurement (`npm run bench:linalg` and
 * per-kernel timings, 2-core Xeon, Node 20). The block-reflector kernel runs at the same
 * GFLOP/s for any k ≥ 4 (the cache holds V and four columns of C either way), so narrow panels
 * win by doing less of the extra work of the compact WY form (T and V₁ᵀV₂ cost ≈ m·nb² per
 * panel): at 1000×1000 nb = 8–16 took 5–10 % less time than nb = 32, at 10000×50 nb = 8 took
 * 15–20 % less, complex alike.
 */
export const QR_BLOCK = 16;

/** Panel width for an m×n problem: 8 for tall-skinny matrices (n ≤ 64), else QR_BLOCK. */
export function qrBlock(m: number, n: number): number {
  return n <= 64 || m <= 64 ? 8 : QR_BLOCK;
}
/** Below this many columns a panel is factored by the unblocked (level-2) algorithm. */
const PANEL_BASE = 4;

/**
 * Below this many columns of C, Q is applied one reflector at a time (LAPACK xORM2R): forming
 * the block factor T costs k²m flops, more than the 4kmn of the application itself.
 */
const UNBLOCKED_COLS = 4;

/** Left part of a recursive split: about half, a multiple of 4 when possible (the kernels' block). */
function splitPoint(k: number): number {
  const h = k >> 1;
  return h >= 4 ? h - (h % 4) : h;
}

/** Workspace of one factorisation (allocated once per call, reused in the loops). */
interface Work {
  vp: Float64Array; // packed V of the current panel, ldv = rows of the panel
  t: Float64Array; // T of the current panel, ldt = nb
  w: Float64Array; // block-reflector scratch
}

function makeWork(m: number, nb: number, complex: boolean): Work {
  const f = complex ? 2 : 1;
  return {
    vp: new Float64Array(f * Math.max(1, m) * nb),
    t: new Float64Array(f * nb * nb),
    w: new Float64Array(f * 4 * Math.max(nb, 1))
  };
}

// ---------------------------------------------------------------------------------------------
// Real, column-major.

/** Unblocked Householder QR of the m×n column-major block (LAPACK dgeqr2). */
export function dgeqr2(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  ot: number
): void {
  const k = Math.min(m, n);
  for (let i = 0; i < k; i++) {
    const ii = oa + i + i * lda;
    const t = dlarfg(m - i, a, ii, a, 1, ii + 1);
    tau[ot + i] = t;
    if (t === 0) {
      continue;
    }
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
}

/** Copies the reflectors of an m×k factored panel into packed V (zeros above a unit diagonal). */
function dpackV(
  m: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  vp: Float64Array,
  ov: number,
  ldv: number
): void {
  for (let j = 0; j < k; j++) {
    const col = ov + j * ldv;
    for (let i = 0; i < j && i < m; i++) {
      vp[col + i] = 0;
    }
    if (j < m) {
      vp[col + j] = 1;
    }
    const src = oa + j * lda;
    for (let i = j + 1; i < m; i++) {
      vp[col + i] = a[src + i];
    }
  }
}

/**
 * Recursive panel QR: factors the m×n block (n ≤ m not required), writes packed V (m×n, ldv)
 * and the n×n upper triangular T (ldt).
 */
function dqrPanel(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  vp: Float64Array,
  ov: number,
  ldv: number,
  t: Float64Array,
  ott: number,
  ldt: number,
  w: Float64Array
): void {
  const k = Math.min(m, n);
  if (n <= PANEL_BASE || m <= PANEL_BASE) {
    dgeqr2(m, n, a, oa, lda, tau, otau);
    dpackV(m, k, a, oa, lda, vp, ov, ldv);
    dlarft(m, k, vp, ov, ldv, tau, otau, t, ott, ldt);
    return;
  }
  const n1 = splitPoint(k);
  const n2 = n - n1;
  dqrPanel(m, n1, a, oa, lda, tau, otau, vp, ov, ldv, t, ott, ldt, w);
  // A(:, n1:) ← H₁ᵀ A(:, n1:)
  dlarfbLeft('T', m, n2, n1, vp, ov, ldv, t, ott, ldt, a, oa + n1 * lda, lda, w);
  const k2 = Math.min(m - n1, n2);
  dqrPanel(
    m - n1,
    n2,
    a,
    oa + n1 + n1 * lda,
    lda,
    tau,
    otau + n1,
    vp,
    ov + n1 + n1 * ldv,
    ldv,
    t,
    ott + n1 + n1 * ldt,
    ldt,
    w
  );
  for (let j = n1; j < n1 + k2; j++) {
    for (let i = 0; i < n1; i++) {
      vp[ov + i + j * ldv] = 0;
    }
  }
  // T₁₂ = −T₁·(V₁ᵀV₂)·T₂ (V₂ is zero above row n1, so rows n1: suffice).
  dgemmTN(n1, k2, m - n1, vp, ov + n1, ldv, vp, ov + n1 + n1 * ldv, ldv, t, ott + n1 * ldt, ldt);
  for (let j = 0; j < k2; j++) {
    const c = ott + (n1 + j) * ldt;
    for (let p = 0; p < n1; p++) {
      let s = 0;
      for (let q = p; q < n1; q++) {
        s += t[ott + p + q * ldt] * t[c + q];
      }
      t[c + p] = -s;
    }
  }
  for (let j = k2 - 1; j >= 0; j--) {
    const c = ott + (n1 + j) * ldt;
    for (let p = 0; p < n1; p++) {
      let s = 0;
      for (let q = 0; q <= j; q++) {
        s += t[ott + p + (n1 + q) * ldt] * t[ott + n1 + q + (n1 + j) * ldt];
      }
      t[c + p] = s;
    }
  }
  for (let j = 0; j < n1; j++) {
    for (let i = n1; i < n1 + k2; i++) {
      t[ott + i + j * ldt] = 0;
    }
  }
}

/** Blocked Householder QR of an m×n column-major matrix (LAPACK dgeqrf). */
export function dgeqrfCM(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  nb = qrBlock(m, n)
): void {
  const k = Math.min(m, n);
  if (k === 0) {
    return;
  }
  if (n <= PANEL_BASE || m <= PANEL_BASE) {
    dgeqr2(m, n, a, oa, lda, tau, otau);
    return;
  }
  const ws = makeWork(m, nb, false);
  for (let j0 = 0; j0 < k; j0 += nb) {
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    dqrPanel(
      rows,
      kb,
      a,
      oa + j0 + j0 * lda,
      lda,
      tau,
      otau + j0,
      ws.vp,
      0,
      rows,
      ws.t,
      0,
      nb,
      ws.w
    );
    if (j0 + kb < n) {
      dlarfbLeft(
        'T',
        rows,
        n - j0 - kb,
        kb,
        ws.vp,
        0,
        rows,
        ws.t,
        0,
        nb,
        a,
        oa + j0 + (j0 + kb) * lda,
        lda,
        ws.w
      );
    }
  }
}

/**
 * Applies Q = H₁⋯H_k ('N') or Qᵀ ('T') from the left to the m×n column-major C, with the k
 * reflectors stored below the diagonal of the m×k column-major `a` (LAPACK dormqr, side L).
 */
export function dormqrCM(
  trans: 'N' | 'T',
  m: number,
  n: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  c: Float64Array,
  oc: number,
  ldc: number,
  nb = qrBlock(m, k)
): void {
  if (m === 0 || n === 0 || k === 0) {
    return;
  }
  if (n < UNBLOCKED_COLS) {
    dorm2r(trans, m, n, k, a, oa, lda, tau, otau, c, oc, ldc);
    return;
  }
  const ws = makeWork(m, nb, false);
  const nblocks = Math.ceil(k / nb);
  for (let b = 0; b < nblocks; b++) {
    const blk = trans === 'T' ? b : nblocks - 1 - b;
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    dpackV(rows, kb, a, oa + j0 + j0 * lda, lda, ws.vp, 0, rows);
    dlarft(rows, kb, ws.vp, 0, rows, tau, otau + j0, ws.t, 0, nb);
    dlarfbLeft(trans, rows, n, kb, ws.vp, 0, rows, ws.t, 0, nb, c, oc + j0, ldc, ws.w);
  }
}

/** Applies Q ('N') or Qᵀ ('T') one reflector at a time (LAPACK dorm2r, side L). */
export function dorm2r(
  trans: 'N' | 'T',
  m: number,
  n: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  c: Float64Array,
  oc: number,
  ldc: number
): void {
  for (let s = 0; s < k; s++) {
    const i = trans === 'T' ? s : k - 1 - s;
    const t = tau[otau + i];
    if (t === 0) {
      continue;
    }
    const v = oa + i + i * lda; // v(0) = 1 implicitly, v(1:) = a(i+1:m, i)
    for (let j = 0; j < n; j++) {
      const cj = oc + i + j * ldc;
      let d0 = c[cj];
      let d1 = 0;
      let r = 1;
      for (; r + 1 < m - i; r += 2) {
        d0 += a[v + r] * c[cj + r];
        d1 += a[v + r + 1] * c[cj + r + 1];
      }
      if (r < m - i) {
        d0 += a[v + r] * c[cj + r];
      }
      const f = t * (d0 + d1);
      c[cj] -= f;
      for (let q = 1; q < m - i; q++) {
        c[cj + q] -= f * a[v + q];
      }
    }
  }
}

/** Applies Q ('N') or Qᴴ ('C') one reflector at a time (LAPACK zunm2r, side L). */
export function zunm2r(
  trans: 'N' | 'C',
  m: number,
  n: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  c: Float64Array,
  oc: number,
  ldc: number
): void {
  for (let s = 0; s < k; s++) {
    const i = trans === 'C' ? s : k - 1 - s;
    const tr = tau[2 * (otau + i)];
    const ti = trans === 'C' ? -tau[2 * (otau + i) + 1] : tau[2 * (otau + i) + 1];
    if (tr === 0 && ti === 0) {
      continue;
    }
    const v = 2 * (oa + i + i * lda);
    const len = 2 * (m - i);
    for (let j = 0; j < n; j++) {
      const cj = 2 * (oc + i + j * ldc);
      let sr = c[cj];
      let si = c[cj + 1];
      for (let r = 2; r < len; r += 2) {
        const vr = a[v + r],
          vi = a[v + r + 1];
        const xr = c[cj + r],
          xi = c[cj + r + 1];
        sr += vr * xr + vi * xi;
        si += vr * xi - vi * xr;
      }
      const fr = tr * sr - ti * si;
      const fi = tr * si + ti * sr;
      c[cj] -= fr;
      c[cj + 1] -= fi;
      for (let r = 2; r < len; r += 2) {
        const vr = a[v + r],
          vi = a[v + r + 1];
        c[cj + r] -= fr * vr - fi * vi;
        c[cj + r + 1] -= fr * vi + fi * vr;
      }
    }
  }
}

/**
 * Overwrites the m×ncols column-major `q` with the first ncols columns of Q = H₁⋯H_k, whose
 * reflectors are below the diagonal of the m×k column-major `a` (LAPACK dorgqr; ncols ≥ k).
 * `q` may be `a` itself (same offset and lda) to form the thin Q in place.
 */
export function dorgqrCM(
  m: number,
  ncols: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  q: Float64Array,
  oq: number,
  ldq: number,
  nb = qrBlock(m, k)
): void {
  if (m === 0 || ncols === 0) {
    return;
  }
  const ws = makeWork(m, nb, false);
  const nblocks = Math.ceil(k / nb);
  // Pack every block's V and T first: when q aliases a, forming Q overwrites the reflectors.
  const vs: Float64Array[] = [];
  const ts: Float64Array[] = [];
  for (let blk = 0; blk < nblocks; blk++) {
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    const v = new Float64Array(rows * kb);
    const t = new Float64Array(nb * nb);
    dpackV(rows, kb, a, oa + j0 + j0 * lda, lda, v, 0, rows);
    dlarft(rows, kb, v, 0, rows, tau, otau + j0, t, 0, nb);
    vs.push(v);
    ts.push(t);
  }
  // Start from the identity's first ncols columns.
  for (let j = 0; j < ncols; j++) {
    const col = oq + j * ldq;
    for (let i = 0; i < m; i++) {
      q[col + i] = i === j ? 1 : 0;
    }
  }
  // Apply blocks last to first; block b touches rows j0: and only columns j0: are non-trivial.
  // Its own kb columns are still identity columns then: they take the cheaper closed form.
  const wk = new Float64Array(nb * nb);
  for (let blk = nblocks - 1; blk >= 0; blk--) {
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    dlarfbLeft(
      'N',
      rows,
      ncols - j0 - kb,
      kb,
      vs[blk],
      0,
      rows,
      ts[blk],
      0,
      nb,
      q,
      oq + j0 + (j0 + kb) * ldq,
      ldq,
      ws.w
    );
    dlarfbIdentity(rows, kb, vs[blk], 0, rows, ts[blk], 0, nb, q, oq + j0 + j0 * ldq, ldq, wk);
  }
}

// ---------------------------------------------------------------------------------------------
// Complex, column-major (element offsets).

/** Unblocked complex Householder QR (LAPACK zgeqr2). tau interleaved, k complex entries. */
export function zgeqr2(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  ot: number
): void {
  const k = Math.min(m, n);
  for (let i = 0; i < k; i++) {
    const ii = oa + i + i * lda;
    zlarfg(m - i, a, ii, a, 1, ii + 1, tau, 2 * (ot + i));
    const tr = tau[2 * (ot + i)];
    const ti = -tau[2 * (ot + i) + 1]; // apply Hᴴ: conj(τ)
    if (tr === 0 && ti === 0) {
      continue;
    }
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
}

function zpackV(
  m: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  vp: Float64Array,
  ov: number,
  ldv: number
): void {
  for (let j = 0; j < k; j++) {
    const col = 2 * (ov + j * ldv);
    for (let i = 0; i < j && i < m; i++) {
      vp[col + 2 * i] = 0;
      vp[col + 2 * i + 1] = 0;
    }
    if (j < m) {
      vp[col + 2 * j] = 1;
      vp[col + 2 * j + 1] = 0;
    }
    const src = 2 * (oa + j * lda);
    for (let i = j + 1; i < m; i++) {
      vp[col + 2 * i] = a[src + 2 * i];
      vp[col + 2 * i + 1] = a[src + 2 * i + 1];
    }
  }
}

function zqrPanel(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  vp: Float64Array,
  ov: number,
  ldv: number,
  t: Float64Array,
  ott: number,
  ldt: number,
  w: Float64Array
): void {
  const k = Math.min(m, n);
  if (n <= PANEL_BASE || m <= PANEL_BASE) {
    zgeqr2(m, n, a, oa, lda, tau, otau);
    zpackV(m, k, a, oa, lda, vp, ov, ldv);
    zlarft(m, k, vp, ov, ldv, tau, otau, t, ott, ldt);
    return;
  }
  const n1 = splitPoint(k);
  const n2 = n - n1;
  zqrPanel(m, n1, a, oa, lda, tau, otau, vp, ov, ldv, t, ott, ldt, w);
  zlarfbLeft('C', m, n2, n1, vp, ov, ldv, t, ott, ldt, a, oa + n1 * lda, lda, w);
  const k2 = Math.min(m - n1, n2);
  zqrPanel(
    m - n1,
    n2,
    a,
    oa + n1 + n1 * lda,
    lda,
    tau,
    otau + n1,
    vp,
    ov + n1 + n1 * ldv,
    ldv,
    t,
    ott + n1 + n1 * ldt,
    ldt,
    w
  );
  for (let j = n1; j < n1 + k2; j++) {
    for (let i = 0; i < n1; i++) {
      vp[2 * (ov + i + j * ldv)] = 0;
      vp[2 * (ov + i + j * ldv) + 1] = 0;
    }
  }
  // T₁₂ = −T₁·(V₁ᴴV₂)·T₂ (V₂ is zero above row n1, so rows n1: suffice).
  zgemmCN(n1, k2, m - n1, vp, ov + n1, ldv, vp, ov + n1 + n1 * ldv, ldv, t, ott + n1 * ldt, ldt);
  for (let j = 0; j < k2; j++) {
    const c = ott + (n1 + j) * ldt;
    for (let p = 0; p < n1; p++) {
      let sr = 0,
        si = 0;
      for (let q = p; q < n1; q++) {
        const x = 2 * (ott + p + q * ldt);
        const y = 2 * (c + q);
        sr += t[x] * t[y] - t[x + 1] * t[y + 1];
        si += t[x] * t[y + 1] + t[x + 1] * t[y];
      }
      t[2 * (c + p)] = -sr;
      t[2 * (c + p) + 1] = -si;
    }
  }
  for (let j = k2 - 1; j >= 0; j--) {
    const c = ott + (n1 + j) * ldt;
    for (let p = 0; p < n1; p++) {
      let sr = 0,
        si = 0;
      for (let q = 0; q <= j; q++) {
        const x = 2 * (ott + p + (n1 + q) * ldt);
        const y = 2 * (ott + n1 + q + (n1 + j) * ldt);
        sr += t[x] * t[y] - t[x + 1] * t[y + 1];
        si += t[x] * t[y + 1] + t[x + 1] * t[y];
      }
      t[2 * (c + p)] = sr;
      t[2 * (c + p) + 1] = si;
    }
  }
  for (let j = 0; j < n1; j++) {
    for (let i = n1; i < n1 + k2; i++) {
      t[2 * (ott + i + j * ldt)] = 0;
      t[2 * (ott + i + j * ldt) + 1] = 0;
    }
  }
}

/** Blocked complex Householder QR (LAPACK zgeqrf), column-major. */
export function zgeqrfCM(
  m: number,
  n: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  nb = qrBlock(m, n)
): void {
  const k = Math.min(m, n);
  if (k === 0) {
    return;
  }
  if (n <= PANEL_BASE || m <= PANEL_BASE) {
    zgeqr2(m, n, a, oa, lda, tau, otau);
    return;
  }
  const ws = makeWork(m, nb, true);
  for (let j0 = 0; j0 < k; j0 += nb) {
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    zqrPanel(
      rows,
      kb,
      a,
      oa + j0 + j0 * lda,
      lda,
      tau,
      otau + j0,
      ws.vp,
      0,
      rows,
      ws.t,
      0,
      nb,
      ws.w
    );
    if (j0 + kb < n) {
      zlarfbLeft(
        'C',
        rows,
        n - j0 - kb,
        kb,
        ws.vp,
        0,
        rows,
        ws.t,
        0,
        nb,
        a,
        oa + j0 + (j0 + kb) * lda,
        lda,
        ws.w
      );
    }
  }
}

/** Applies Q ('N') or Qᴴ ('C') from the left (LAPACK zunmqr, side L), column-major. */
export function zunmqrCM(
  trans: 'N' | 'C',
  m: number,
  n: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  c: Float64Array,
  oc: number,
  ldc: number,
  nb = qrBlock(m, k)
): void {
  if (m === 0 || n === 0 || k === 0) {
    return;
  }
  if (n < UNBLOCKED_COLS) {
    zunm2r(trans, m, n, k, a, oa, lda, tau, otau, c, oc, ldc);
    return;
  }
  const ws = makeWork(m, nb, true);
  const nblocks = Math.ceil(k / nb);
  for (let b = 0; b < nblocks; b++) {
    const blk = trans === 'C' ? b : nblocks - 1 - b;
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    zpackV(rows, kb, a, oa + j0 + j0 * lda, lda, ws.vp, 0, rows);
    zlarft(rows, kb, ws.vp, 0, rows, tau, otau + j0, ws.t, 0, nb);
    zlarfbLeft(trans, rows, n, kb, ws.vp, 0, rows, ws.t, 0, nb, c, oc + j0, ldc, ws.w);
  }
}

/** Forms the first ncols columns of Q (LAPACK zungqr), column-major; q may alias a. */
export function zungqrCM(
  m: number,
  ncols: number,
  k: number,
  a: Float64Array,
  oa: number,
  lda: number,
  tau: Float64Array,
  otau: number,
  q: Float64Array,
  oq: number,
  ldq: number,
  nb = qrBlock(m, k)
): void {
  if (m === 0 || ncols === 0) {
    return;
  }
  const ws = makeWork(m, nb, true);
  const nblocks = Math.ceil(k / nb);
  const vs: Float64Array[] = [];
  const ts: Float64Array[] = [];
  for (let blk = 0; blk < nblocks; blk++) {
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    const v = new Float64Array(2 * rows * kb);
    const t = new Float64Array(2 * nb * nb);
    zpackV(rows, kb, a, oa + j0 + j0 * lda, lda, v, 0, rows);
    zlarft(rows, kb, v, 0, rows, tau, otau + j0, t, 0, nb);
    vs.push(v);
    ts.push(t);
  }
  for (let j = 0; j < ncols; j++) {
    const col = 2 * (oq + j * ldq);
    for (let i = 0; i < m; i++) {
      q[col + 2 * i] = i === j ? 1 : 0;
      q[col + 2 * i + 1] = 0;
    }
  }
  const wk = new Float64Array(2 * nb * nb);
  for (let blk = nblocks - 1; blk >= 0; blk--) {
    const j0 = blk * nb;
    const kb = Math.min(nb, k - j0);
    const rows = m - j0;
    zlarfbLeft(
      'N',
      rows,
      ncols - j0 - kb,
      kb,
      vs[blk],
      0,
      rows,
      ts[blk],
      0,
      nb,
      q,
      oq + j0 + (j0 + kb) * ldq,
      ldq,
      ws.w
    );
    zlarfbIdentity(rows, kb, vs[blk], 0, rows, ts[blk], 0, nb, q, oq + j0 + j0 * ldq, ldq, wk);
  }
}

// ---------------------------------------------------------------------------------------------
// Strided entry kernels: any strides, real or complex.

/** Copies an m×n strided block to a fresh column-major array (lda = max(1, m)). */
export function packColumnMajor(
  m: number,
  n: number,
  a: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  complex: boolean
): Float64Array {
  const out = new Float64Array((complex ? 2 : 1) * Math.max(1, m) * n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) {
      const s = oa + i * sa1 + j * sa2;
      const d = i + j * m;
      if (complex) {
        out[2 * d] = a[2 * s];
        out[2 * d + 1] = a[2 * s + 1];
      } else {
        out[d] = a[s];
      }
    }
  }
  return out;
}

/** Copies a column-major block (lda = m) back into strided storage. */
export function unpackColumnMajor(
  m: number,
  n: number,
  src: Float64Array,
  a: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  complex: boolean
): void {
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) {
      const s = i + j * m;
      const d = oa + i * sa1 + j * sa2;
      if (complex) {
        a[2 * d] = src[2 * s];
        a[2 * d + 1] = src[2 * s + 1];
      } else {
        a[d] = src[s];
      }
    }
  }
}

/**
 * Householder QR in place on any strided m×n array (real, or complex interleaved with strides
 * and offsets in complex elements). τ gets min(m, n) entries (complex: interleaved pairs) from
 * otau. Column-major input (sa1 = 1, sa2 ≥ m) is factored directly; other layouts are packed.
 */
export function geqrf(
  m: number,
  n: number,
  a: Float64Array,
  sa1: number,
  sa2: number,
  oa: number,
  tau: Float64Array,
  otau: number,
  complex = false
): void {
  if (sa1 === 1 && sa2 >= Math.max(1, m)) {
    (complex ? zgeqrfCM : dgeqrfCM)(m, n, a, oa, sa2, tau, otau);
    return;
  }
  const w = packColumnMajor(m, n, a, sa1, sa2, oa, complex);
  (complex ? zgeqrfCM : dgeqrfCM)(m, n, w, 0, Math.max(1, m), tau, otau);
  unpackColumnMajor(m, n, w, a, sa1, sa2, oa, complex);
}
