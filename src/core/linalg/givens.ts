/**
 * Givens (plane) rotations, real and complex, generated without overflow or harmful underflow,
 * and applied to strided vector pairs. These are the building blocks for updating QR
 * factorisations one row at a time (QR-RLS and friends reuse them).
 *
 * Convention (as LAPACK's xLARTG since 3.10):
 *   real:     [ c  s ] [f]   [r]          complex:  [   c       s ] [f]   [r]
 *             [-s  c ] [g] = [0]                     [-conj(s)   c ] [g] = [0]
 * with c real ≥ 0, c² + |s|² = 1. For real f ≠ 0, r has the sign of f; for complex f ≠ 0,
 * r = f·√(|f|²+|g|²)/|f| (same phase as f); f = 0 gives c = 0 and r = |g| ≥ 0.
 *
 * The scaling follows E. Anderson, "Algorithm 978: Safe scaling in the Level 1 BLAS",
 * ACM TOMS 44(1), 2017, §4 (the algorithm behind LAPACK 3.10's dlartg/zlartg): when |f| and
 * |g| lie in [√safmin, √(safmax/2)] the direct formulas are safe; otherwise both are scaled by
 * a power-free factor u = clamp(max(|f|, |g|)) first.
 */

const SAFMIN = Math.pow(2, -1022); // smallest normal double
const SAFMAX = 1 / SAFMIN;
const RTMIN = Math.sqrt(SAFMIN);
const RTMAX_REAL = Math.sqrt(SAFMAX / 2);

/**
 * Generates a real rotation zeroing g: writes c, s, r to out[o], out[o+1], out[o+2].
 * Exactly-zero f or g are the algorithm's special cases (not rank decisions).
 */
export function givens(f: number, g: number, out: Float64Array | number[], o = 0): void {
  const f1 = Math.abs(f);
  const g1 = Math.abs(g);
  if (g === 0) {
    out[o] = 1;
    out[o + 1] = 0;
    out[o + 2] = f;
  } else if (f === 0) {
    out[o] = 0;
    out[o + 1] = g > 0 ? 1 : -1;
    out[o + 2] = g1;
  } else if (f1 > RTMIN && f1 < RTMAX_REAL && g1 > RTMIN && g1 < RTMAX_REAL) {
    const d = Math.sqrt(f * f + g * g);
    const r = f > 0 ? d : -d;
    out[o] = f1 / d;
    out[o + 1] = g / r;
    out[o + 2] = r;
  } else {
    const u = Math.min(SAFMAX, Math.max(SAFMIN, f1, g1));
    const fs = f / u;
    const gs = g / u;
    const d = Math.sqrt(fs * fs + gs * gs);
    // The sign comes from f itself: f/u may underflow to ±0.
    const r = f > 0 ? d : -d;
    out[o] = Math.abs(fs) / d;
    out[o + 1] = gs / r;
    out[o + 2] = r * u;
  }
}

/**
 * Generates a complex rotation zeroing g = (gr, gi) against f = (fr, fi): writes
 * c, s.re, s.im, r.re, r.im to out[o..o+4].
 */
export function givensComplex(
  fr: number,
  fi: number,
  gr: number,
  gi: number,
  out: Float64Array | number[],
  o = 0
): void {
  let c: number;
  let sr: number;
  let si: number;
  let rr: number;
  let ri: number;
  if (gr === 0 && gi === 0) {
    c = 1;
    sr = 0;
    si = 0;
    rr = fr;
    ri = fi;
  } else if (fr === 0 && fi === 0) {
    c = 0;
    if (gr === 0) {
      const d = Math.abs(gi);
      rr = d;
      sr = gr / d;
      si = -gi / d;
    } else if (gi === 0) {
      const d = Math.abs(gr);
      rr = d;
      sr = gr / d;
      si = -gi / d;
    } else {
      const g1 = Math.max(Math.abs(gr), Math.abs(gi));
      if (g1 > RTMIN && g1 < RTMAX_REAL) {
        const d = Math.sqrt(gr * gr + gi * gi);
        sr = gr / d;
        si = -gi / d;
        rr = d;
      } else {
        const u = Math.min(SAFMAX, Math.max(SAFMIN, g1));
        const gsr = gr / u;
        const gsi = gi / u;
        const d = Math.sqrt(gsr * gsr + gsi * gsi);
        sr = gsr / d;
        si = -gsi / d;
        rr = d * u;
      }
    }
    ri = 0;
  } else {
    const f1 = Math.max(Math.abs(fr), Math.abs(fi));
    const g1 = Math.max(Math.abs(gr), Math.abs(gi));
    let rtmax = Math.sqrt(SAFMAX / 4);
    if (f1 > RTMIN && f1 < rtmax && g1 > RTMIN && g1 < rtmax) {
      // Unscaled.
      const f2 = fr * fr + fi * fi;
      const g2 = gr * gr + gi * gi;
      const h2 = f2 + g2;
      if (f2 >= h2 * SAFMIN) {
        c = Math.sqrt(f2 / h2);
        rr = fr / c;
        ri = fi / c;
        rtmax *= 2;
        if (f2 > RTMIN && h2 < rtmax) {
          const q = 1 / Math.sqrt(f2 * h2);
          // s = conj(g)·f/√(f2·h2)
          const tr = fr * q;
          const ti = fi * q;
          sr = gr * tr + gi * ti;
          si = gr * ti - gi * tr;
        } else {
          // s = conj(g)·r/h2
          const tr = rr / h2;
          const ti = ri / h2;
          sr = gr * tr + gi * ti;
          si = gr * ti - gi * tr;
        }
      } else {
        const d = Math.sqrt(f2 * h2);
        c = f2 / d;
        if (c >= SAFMIN) {
          rr = fr / c;
          ri = fi / c;
        } else {
          rr = fr * (h2 / d);
          ri = fi * (h2 / d);
        }
        const tr = fr / d;
        const ti = fi / d;
        sr = gr * tr + gi * ti;
        si = gr * ti - gi * tr;
      }
    } else {
      // Scaled.
      const u = Math.min(SAFMAX, Math.max(SAFMIN, f1, g1));
      const gsr = gr / u;
      const gsi = gi / u;
      const g2 = gsr * gsr + gsi * gsi;
      let fsr: number;
      let fsi: number;
      let f2: number;
      let h2: number;
      let w: number;
      if (f1 / u < RTMIN) {
        // f is tiny against g: scale it on its own to keep its digits.
        const v = Math.min(SAFMAX, Math.max(SAFMIN, f1));
        w = v / u;
        fsr = fr / v;
        fsi = fi / v;
        f2 = fsr * fsr + fsi * fsi;
        h2 = f2 * w * w + g2;
      } else {
        w = 1;
        fsr = fr / u;
        fsi = fi / u;
        f2 = fsr * fsr + fsi * fsi;
        h2 = f2 + g2;
      }
      if (f2 >= h2 * SAFMIN) {
        c = Math.sqrt(f2 / h2);
        rr = fsr / c;
        ri = fsi / c;
        rtmax *= 2;
        if (f2 > RTMIN && h2 < rtmax) {
          const q = 1 / Math.sqrt(f2 * h2);
          const tr = fsr * q;
          const ti = fsi * q;
          sr = gsr * tr + gsi * ti;
          si = gsr * ti - gsi * tr;
        } else {
          const tr = rr / h2;
          const ti = ri / h2;
          sr = gsr * tr + gsi * ti;
          si = gsr * ti - gsi * tr;
        }
      } else {
        const d = Math.sqrt(f2 * h2);
        c = f2 / d;
        if (c >= SAFMIN) {
          rr = fsr / c;
          ri = fsi / c;
        } else {
          rr = fsr * (h2 / d);
          ri = fsi * (h2 / d);
        }
        const tr = fsr / d;
        const ti = fsi / d;
        sr = gsr * tr + gsi * ti;
        si = gsr * ti - gsi * tr;
      }
      c *= w;
      rr *= u;
      ri *= u;
    }
  }
  out[o] = c;
  out[o + 1] = sr;
  out[o + 2] = si;
  out[o + 3] = rr;
  out[o + 4] = ri;
}

/**
 * Applies a real rotation to the pair (x, y): x ← c·x + s·y, y ← −s·x + c·y.
 */
export function drot(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  c: number,
  s: number
): void {
  let ix = ox;
  let iy = oy;
  for (let i = 0; i < n; i++) {
    const a = x[ix];
    const b = y[iy];
    x[ix] = c * a + s * b;
    y[iy] = c * b - s * a;
    ix += sx;
    iy += sy;
  }
}

/**
 * Applies a complex rotation (c real, s = (sr, si)) to the pair (x, y), strides and offsets in
 * complex elements: x ← c·x + s·y, y ← −conj(s)·x + c·y.
 */
export function zrot(
  n: number,
  x: Float64Array,
  sx: number,
  ox: number,
  y: Float64Array,
  sy: number,
  oy: number,
  c: number,
  sr: number,
  si: number
): void {
  let ix = 2 * ox;
  let iy = 2 * oy;
  for (let i = 0; i < n; i++) {
    const ar = x[ix];
    const ai = x[ix + 1];
    const br = y[iy];
    const bi = y[iy + 1];
    x[ix] = c * ar + (sr * br - si * bi);
    x[ix + 1] = c * ai + (sr * bi + si * br);
    // −conj(s)·a = −(sr − i si)(ar + i ai)
    y[iy] = c * br - (sr * ar + si * ai);
    y[iy + 1] = c * bi - (sr * ai - si * ar);
    ix += 2 * sx;
    iy += 2 * sy;
  }
}
