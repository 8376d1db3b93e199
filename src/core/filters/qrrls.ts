/**
 * QR-RLS: exponentially weighted least squares through the square-root information factor.
 *
 * With Φ(n) = λΦ(n−1) + u(n)u(n)ᴴ = R(n)ᴴR(n) (R upper triangular, real positive diagonal) and
 * p(n) = R(n)⁻ᴴz(n), z(n) = λz(n−1) + u(n)d*(n), one sample is the Givens annihilation
 *
 *     [ √λ R(n−1)   √λ p(n−1)   0 ]        [ R(n)   p(n)           * ]
 *   Q [ u(n)ᴴ       d*(n)       1 ]   =    [ 0ᵀ     γ^½(n) e*(n)   γ^½(n) ]
 *
 * (Haykin, Adaptive Filter Theory, 4th ed., ch. 13 "Square-root adaptive filtering", QR-RLS
 * table; Sayed, Fundamentals of Adaptive Filtering, 2003, ch. 12, §12.4 (from memory)). Row j of
 * the rotated pair uses c = √λR_jj/ρ, s = b/ρ, ρ = √(λR_jj² + |b|²) on [R row j; last row]:
 * R ← c·R + s̄·r, r ← −s·R + c·r, so γ^½(n) = Π c_j (the last column) and the a-priori error
 * comes out of the rotated d* without any back substitution. The weights w(n) = R(n)⁻¹p(n) are
 * formed by back substitution only when asked (`weights()`, trajectory rows).
 *
 * Per sample (real): 3M² + O(M) flops, M square roots and M divisions.
 */
import { AdaptiveFilter, HEALTH_ALPHA, pushSample, pushSampleC } from './base';
import type { FilterOptions, Real } from './types';

export class QrRlsFilter extends AdaptiveFilter {
  /** R, upper triangle, row-major M×M (interleaved complex, or always interleaved in float32). */
  protected R!: Real;
  /** p = R⁻ᴴ z. */
  protected p!: Real;
  /** Work row (the annihilated u(n)ᴴ). */
  protected r!: Real;

  constructor(options: FilterOptions) {
    super({ ...options, algorithm: 'qr-rls' });
    this.reset();
  }

  /** Interleaved storage (complex, or the float32 emulation that serves real and complex). */
  private get il(): boolean {
    return this.complex || this.f32;
  }

  protected init(): void {
    const M = this.M;
    const w = this.il ? 2 : 1;
    this.R = this.zeroed(this.R, w * M * M);
    this.p = this.zeroed(this.p, w * M);
    this.r = this.zeroed(this.r, w * M);
    const sd = this.f32
      ? Math.fround(Math.sqrt(Math.fround(this.options.delta)))
      : Math.sqrt(this.options.delta);
    for (let j = 0; j < M; j++) {
      this.R[w * (j * M + j)] = sd;
    }
  }

  /** A copy of the upper-triangular factor R(n) as a row-major M×M Float64Array (interleaved when complex). */
  factor(): Float64Array {
    const M = this.M;
    const out = new Float64Array((this.complex ? 2 : 1) * M * M);
    const R = this.R;
    for (let q = 0; q < M * M; q++) {
      if (this.complex) {
        out[2 * q] = R[2 * q];
        out[2 * q + 1] = R[2 * q + 1];
      } else {
        out[q] = R[this.il ? 2 * q : q];
      }
    }
    return out;
  }

  /** Back substitution R w = p (in double, whatever the precision of the state). */
  protected writeWeights(out: Float64Array, o: number): void {
    const M = this.M;
    const R = this.R;
    const p = this.p;
    if (!this.il) {
      for (let i = M - 1; i >= 0; i--) {
        let s = p[i];
        const b = i * M;
        for (let k = i + 1; k < M; k++) {
          s -= R[b + k] * out[o + k];
        }
        out[o + i] = s / R[b + i];
      }
      return;
    }
    // Interleaved: solve into out (complex layout), then compact for real float32.
    const cx = this.complex;
    for (let i = M - 1; i >= 0; i--) {
      let sr = p[2 * i];
      let si = p[2 * i + 1];
      const b = i * M;
      for (let k = i + 1; k < M; k++) {
        const tr = R[2 * (b + k)];
        const ti = R[2 * (b + k) + 1];
        const wr = cx ? out[o + 2 * k] : out[o + k];
        const wi = cx ? out[o + 2 * k + 1] : 0;
        sr -= tr * wr - ti * wi;
        si -= tr * wi + ti * wr;
      }
      const dg = R[2 * (b + i)];
      if (cx) {
        out[o + 2 * i] = sr / dg;
        out[o + 2 * i + 1] = si / dg;
      } else {
        out[o + i] = sr / dg;
      }
    }
  }

  protected kernelR(
    x: Float64Array,
    d: Float64Array,
    n: number,
    y: Float64Array,
    e: Float64Array,
    ep: Float64Array,
    g: Float64Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void {
    const M = this.M;
    const R = this.R as Float64Array;
    const p = this.p as Float64Array;
    const r = this.r as Float64Array;
    const ub = this.ub as Float64Array;
    const sl = Math.sqrt(this.options.lambda);
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const L = M;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    for (let i = 0; i < n; i++) {
      let uo = 0;
      if (tv) {
        pos = pushSample(ub, pos, M, x[i]);
        uo = pos;
      } else {
        const b = i * M;
        for (let k = 0; k < M; k++) {
          ub[k] = x[b + k];
        }
      }
      for (let k = 0; k < M; k++) {
        r[k] = ub[uo + k];
      }
      const dv = d[i];
      let dr = dv;
      let gs = 1;
      // Rows j and j+1 are rotated in one pass over the work row (it is loaded and stored once
      // per pair); every element sees the same operations in the same order as one row at a time.
      let j = 0;
      // Four rows per pass while they last (the work row is loaded and stored once per four).
      // The entry that becomes the next rotation's b is formed as (a·u − b·√λ·t)/ρ rather than
      // c·u − s√λ·t: its products run while the square root and the division are in flight, which
      // shortens the serial chain from one rotation to the next (the same value up to rounding).
      // Likewise 1/ρ is formed as ρ·(1/ρ²), so that the square root and the division run side by
      // side instead of one after the other (within about an ulp of 1/ρ; same range, since ρ² is
      // formed either way).
      for (; j + 3 < M; j += 4) {
        const jj0 = j * M + j;
        const jj1 = jj0 + M + 1;
        const jj2 = jj1 + M + 1;
        const jj3 = jj2 + M + 1;
        // rotation j, and its action on columns j+1 … j+3
        const a0 = sl * R[jj0];
        const b0 = r[j];
        const h0 = a0 * a0 + b0 * b0;
        const rho0 = Math.sqrt(h0);
        const inv0 = rho0 * (1 / h0);
        const c0 = a0 * inv0;
        const s0 = b0 * inv0;
        R[jj0] = rho0;
        const cs0 = c0 * sl;
        const ss0 = s0 * sl;
        let t = R[jj0 + 1];
        let u1 = r[j + 1];
        R[jj0 + 1] = cs0 * t + s0 * u1;
        u1 = (a0 * u1 - b0 * sl * t) * inv0;
        t = R[jj0 + 2];
        let u2 = r[j + 2];
        R[jj0 + 2] = cs0 * t + s0 * u2;
        u2 = c0 * u2 - ss0 * t;
        t = R[jj0 + 3];
        let u3 = r[j + 3];
        R[jj0 + 3] = cs0 * t + s0 * u3;
        u3 = c0 * u3 - ss0 * t;
        let pj = p[j];
        p[j] = cs0 * pj + s0 * dr;
        dr = c0 * dr - ss0 * pj;
        gs *= c0;
        // rotation j+1 on columns j+2, j+3
        const a1 = sl * R[jj1];
        const h1 = a1 * a1 + u1 * u1;
        const rho1 = Math.sqrt(h1);
        const inv1 = rho1 * (1 / h1);
        const c1 = a1 * inv1;
        const s1 = u1 * inv1;
        R[jj1] = rho1;
        const cs1 = c1 * sl;
        const ss1 = s1 * sl;
        t = R[jj1 + 1];
        R[jj1 + 1] = cs1 * t + s1 * u2;
        u2 = (a1 * u2 - u1 * sl * t) * inv1;
        t = R[jj1 + 2];
        R[jj1 + 2] = cs1 * t + s1 * u3;
        u3 = c1 * u3 - ss1 * t;
        pj = p[j + 1];
        p[j + 1] = cs1 * pj + s1 * dr;
        dr = c1 * dr - ss1 * pj;
        gs *= c1;
        // rotation j+2 on column j+3
        const a2 = sl * R[jj2];
        const h2 = a2 * a2 + u2 * u2;
        const rho2 = Math.sqrt(h2);
        const inv2 = rho2 * (1 / h2);
        const c2 = a2 * inv2;
        const s2 = u2 * inv2;
        R[jj2] = rho2;
        const cs2 = c2 * sl;
        const ss2 = s2 * sl;
        t = R[jj2 + 1];
        R[jj2 + 1] = cs2 * t + s2 * u3;
        u3 = (a2 * u3 - u2 * sl * t) * inv2;
        pj = p[j + 2];
        p[j + 2] = cs2 * pj + s2 * dr;
        dr = c2 * dr - ss2 * pj;
        gs *= c2;
        // rotation j+3
        const a3 = sl * R[jj3];
        const h3 = a3 * a3 + u3 * u3;
        const rho3 = Math.sqrt(h3);
        const inv3 = rho3 * (1 / h3);
        const c3 = a3 * inv3;
        const s3 = u3 * inv3;
        R[jj3] = rho3;
        const cs3 = c3 * sl;
        const ss3 = s3 * sl;
        pj = p[j + 3];
        p[j + 3] = cs3 * pj + s3 * dr;
        dr = c3 * dr - ss3 * pj;
        gs *= c3;
        // columns j+4 … M−1: the four rotations in turn on each entry of the work row
        let q0 = jj0 + 4;
        let q1 = jj1 + 3;
        let q2 = jj2 + 2;
        let q3 = jj3 + 1;
        let k = j + 4;
        for (; k + 1 < M; k += 2, q0 += 2, q1 += 2, q2 += 2, q3 += 2) {
          let rk = r[k];
          let rl = r[k + 1];
          const t0 = R[q0];
          const u0 = R[q0 + 1];
          R[q0] = cs0 * t0 + s0 * rk;
          R[q0 + 1] = cs0 * u0 + s0 * rl;
          rk = c0 * rk - ss0 * t0;
          rl = c0 * rl - ss0 * u0;
          const t1 = R[q1];
          const u1 = R[q1 + 1];
          R[q1] = cs1 * t1 + s1 * rk;
          R[q1 + 1] = cs1 * u1 + s1 * rl;
          rk = c1 * rk - ss1 * t1;
          rl = c1 * rl - ss1 * u1;
          const t2 = R[q2];
          const u2 = R[q2 + 1];
          R[q2] = cs2 * t2 + s2 * rk;
          R[q2 + 1] = cs2 * u2 + s2 * rl;
          rk = c2 * rk - ss2 * t2;
          rl = c2 * rl - ss2 * u2;
          const t3 = R[q3];
          const u3 = R[q3 + 1];
          R[q3] = cs3 * t3 + s3 * rk;
          R[q3 + 1] = cs3 * u3 + s3 * rl;
          r[k] = c3 * rk - ss3 * t3;
          r[k + 1] = c3 * rl - ss3 * u3;
        }
        for (; k < M; k++, q0++, q1++, q2++, q3++) {
          let rk = r[k];
          const t0 = R[q0];
          R[q0] = cs0 * t0 + s0 * rk;
          rk = c0 * rk - ss0 * t0;
          const t1 = R[q1];
          R[q1] = cs1 * t1 + s1 * rk;
          rk = c1 * rk - ss1 * t1;
          const t2 = R[q2];
          R[q2] = cs2 * t2 + s2 * rk;
          rk = c2 * rk - ss2 * t2;
          const t3 = R[q3];
          R[q3] = cs3 * t3 + s3 * rk;
          r[k] = c3 * rk - ss3 * t3;
        }
      }
      for (; j + 1 < M; j += 2) {
        const jj = j * M + j;
        const a = sl * R[jj];
        const b = r[j];
        const rho = Math.sqrt(a * a + b * b);
        const inv = 1 / rho;
        const c = a * inv;
        const s = b * inv;
        R[jj] = rho;
        const cs = c * sl;
        const ss = s * sl;
        const th = R[jj + 1];
        const rh = r[j + 1];
        R[jj + 1] = cs * th + s * rh;
        const b1 = c * rh - ss * th;
        const pj = p[j];
        p[j] = cs * pj + s * dr;
        dr = c * dr - ss * pj;
        gs *= c;
        const j1 = j + 1;
        const jj1 = jj + M + 1;
        const a1 = sl * R[jj1];
        const rho1 = Math.sqrt(a1 * a1 + b1 * b1);
        const inv1 = 1 / rho1;
        const c1 = a1 * inv1;
        const s1 = b1 * inv1;
        R[jj1] = rho1;
        const cs1 = c1 * sl;
        const ss1 = s1 * sl;
        let k = j + 2;
        let q = jj + 2;
        let q1 = jj1 + 1;
        const k2 = k + ((M - k) & ~1);
        for (; k < k2; k += 2, q += 2, q1 += 2) {
          const tq = R[q];
          const tu = R[q + 1];
          const rk = r[k];
          const ru = r[k + 1];
          R[q] = cs * tq + s * rk;
          R[q + 1] = cs * tu + s * ru;
          const rk1 = c * rk - ss * tq;
          const ru1 = c * ru - ss * tu;
          const tq1 = R[q1];
          const tu1 = R[q1 + 1];
          R[q1] = cs1 * tq1 + s1 * rk1;
          R[q1 + 1] = cs1 * tu1 + s1 * ru1;
          r[k] = c1 * rk1 - ss1 * tq1;
          r[k + 1] = c1 * ru1 - ss1 * tu1;
        }
        for (; k < M; k++, q++, q1++) {
          const tq = R[q];
          const rk = r[k];
          R[q] = cs * tq + s * rk;
          const rk1 = c * rk - ss * tq;
          const tq1 = R[q1];
          R[q1] = cs1 * tq1 + s1 * rk1;
          r[k] = c1 * rk1 - ss1 * tq1;
        }
        const pj1 = p[j1];
        p[j1] = cs1 * pj1 + s1 * dr;
        dr = c1 * dr - ss1 * pj1;
        gs *= c1;
      }
      if (j < M) {
        // odd M: the last row (a single entry)
        const jj = j * M + j;
        const a = sl * R[jj];
        const b = r[j];
        const rho = Math.sqrt(a * a + b * b);
        const inv = 1 / rho;
        const c = a * inv;
        const s = b * inv;
        R[jj] = rho;
        const pj = p[j];
        p[j] = c * sl * pj + s * dr;
        dr = c * dr - s * sl * pj;
        gs *= c;
      }
      const ev = dr / gs;
      const gam = gs * gs;
      e[i] = ev;
      y[i] = dv - ev;
      g[i] = gam;
      ep[i] = gam * ev;
      const ee = ev * ev;
      pe += (ee - pe) * HEALTH_ALPHA;
      pd += (dv * dv - pd) * HEALTH_ALPHA;
      if (!(pe <= thr * pd) && !(this.hMask & 1)) {
        this.hPe = pe;
        this.hPd = pd;
        this.checkError(ee, t0 + i);
      }
      if (dec > 0 && ++dc === dec) {
        dc = 0;
        this.writeWeights(traj, row * L);
        tIdx[row++] = t0 + i;
      }
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  protected kernelC(
    x: Float64Array,
    d: Float64Array,
    n: number,
    y: Float64Array,
    e: Float64Array,
    ep: Float64Array,
    g: Float64Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void {
    const M = this.M;
    const M2 = 2 * M;
    const R = this.R as Float64Array;
    const p = this.p as Float64Array;
    const r = this.r as Float64Array;
    const ub = this.ub as Float64Array;
    const sl = Math.sqrt(this.options.lambda);
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const L = M2;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    for (let i = 0; i < n; i++) {
      let uo = 0;
      if (tv) {
        pos = pushSampleC(ub, pos, M, x[2 * i], x[2 * i + 1]);
        uo = 2 * pos;
      } else {
        const b = i * M2;
        for (let k = 0; k < M2; k++) {
          ub[k] = x[b + k];
        }
      }
      // Last row of the pre-array: u(n)ᴴ.
      for (let k = 0; k < M2; k += 2) {
        r[k] = ub[uo + k];
        r[k + 1] = -ub[uo + k + 1];
      }
      const dvr = d[2 * i];
      const dvi = d[2 * i + 1];
      let dr = dvr;
      let di = -dvi;
      let gs = 1;
      let j = 0;
      // Rows j and j+1 in one pass over the work row (loaded and stored once per pair); every
      // element sees the same operations in the same order as one row at a time.
      for (; j + 1 < M; j += 2) {
        const jj = 2 * (j * M + j);
        const a = sl * R[jj];
        const br = r[2 * j];
        const bi = r[2 * j + 1];
        const h = a * a + br * br + bi * bi;
        const rho = Math.sqrt(h);
        const inv = rho * (1 / h);
        const c = a * inv;
        const sr = br * inv;
        const si = bi * inv;
        R[jj] = rho;
        const cs = c * sl;
        const ssr = sr * sl;
        const ssi = si * sl;
        // row j on entry j+1, which then makes rotation j+1
        const tr0 = R[jj + 2];
        const ti0 = R[jj + 3];
        const rr0 = r[2 * j + 2];
        const ri0 = r[2 * j + 3];
        R[jj + 2] = cs * tr0 + sr * rr0 + si * ri0;
        R[jj + 3] = cs * ti0 + sr * ri0 - si * rr0;
        const br1 = c * rr0 - (ssr * tr0 - ssi * ti0);
        const bi1 = c * ri0 - (ssr * ti0 + ssi * tr0);
        const pr = p[2 * j];
        const pim = p[2 * j + 1];
        p[2 * j] = cs * pr + sr * dr + si * di;
        p[2 * j + 1] = cs * pim + sr * di - si * dr;
        let ndr = c * dr - (ssr * pr - ssi * pim);
        di = c * di - (ssr * pim + ssi * pr);
        dr = ndr;
        gs *= c;
        const jj1 = jj + 2 * M + 2;
        const a1 = sl * R[jj1];
        const h1 = a1 * a1 + br1 * br1 + bi1 * bi1;
        const rho1 = Math.sqrt(h1);
        const inv1 = rho1 * (1 / h1);
        const c1 = a1 * inv1;
        const sr1 = br1 * inv1;
        const si1 = bi1 * inv1;
        R[jj1] = rho1;
        const cs1 = c1 * sl;
        const ssr1 = sr1 * sl;
        const ssi1 = si1 * sl;
        for (let k = 2 * (j + 2), q = jj + 4, q1 = jj1 + 2; k < M2; k += 2, q += 2, q1 += 2) {
          const tr = R[q];
          const ti = R[q + 1];
          const rr = r[k];
          const ri = r[k + 1];
          R[q] = cs * tr + sr * rr + si * ri;
          R[q + 1] = cs * ti + sr * ri - si * rr;
          const rr1 = c * rr - (ssr * tr - ssi * ti);
          const ri1 = c * ri - (ssr * ti + ssi * tr);
          const tr1 = R[q1];
          const ti1 = R[q1 + 1];
          R[q1] = cs1 * tr1 + sr1 * rr1 + si1 * ri1;
          R[q1 + 1] = cs1 * ti1 + sr1 * ri1 - si1 * rr1;
          r[k] = c1 * rr1 - (ssr1 * tr1 - ssi1 * ti1);
          r[k + 1] = c1 * ri1 - (ssr1 * ti1 + ssi1 * tr1);
        }
        const pr1 = p[2 * j + 2];
        const pim1 = p[2 * j + 3];
        p[2 * j + 2] = cs1 * pr1 + sr1 * dr + si1 * di;
        p[2 * j + 3] = cs1 * pim1 + sr1 * di - si1 * dr;
        ndr = c1 * dr - (ssr1 * pr1 - ssi1 * pim1);
        di = c1 * di - (ssr1 * pim1 + ssi1 * pr1);
        dr = ndr;
        gs *= c1;
      }
      for (; j < M; j++) {
        const jj = 2 * (j * M + j);
        const a = sl * R[jj];
        const br = r[2 * j];
        const bi = r[2 * j + 1];
        // 1/ρ as ρ·(1/ρ²): the square root and the division run side by side (see kernelR)
        const h = a * a + br * br + bi * bi;
        const rho = Math.sqrt(h);
        const inv = rho * (1 / h);
        const c = a * inv;
        const sr = br * inv;
        const si = bi * inv;
        R[jj] = rho;
        const cs = c * sl;
        const ssr = sr * sl;
        const ssi = si * sl;
        for (let k = 2 * (j + 1), q = jj + 2; k < M2; k += 2, q += 2) {
          const tr = R[q];
          const ti = R[q + 1];
          const rr = r[k];
          const ri = r[k + 1];
          R[q] = cs * tr + sr * rr + si * ri;
          R[q + 1] = cs * ti + sr * ri - si * rr;
          r[k] = c * rr - (ssr * tr - ssi * ti);
          r[k + 1] = c * ri - (ssr * ti + ssi * tr);
        }
        const pr = p[2 * j];
        const pi = p[2 * j + 1];
        p[2 * j] = cs * pr + sr * dr + si * di;
        p[2 * j + 1] = cs * pi + sr * di - si * dr;
        const ndr = c * dr - (ssr * pr - ssi * pi);
        di = c * di - (ssr * pi + ssi * pr);
        dr = ndr;
        gs *= c;
      }
      // The rotated d* is γ^½ e*.
      const er = dr / gs;
      const ei = -di / gs;
      const gam = gs * gs;
      e[2 * i] = er;
      e[2 * i + 1] = ei;
      y[2 * i] = dvr - er;
      y[2 * i + 1] = dvi - ei;
      g[i] = gam;
      ep[2 * i] = gam * er;
      ep[2 * i + 1] = gam * ei;
      const ee = er * er + ei * ei;
      pe += (ee - pe) * HEALTH_ALPHA;
      pd += (dvr * dvr + dvi * dvi - pd) * HEALTH_ALPHA;
      if (!(pe <= thr * pd) && !(this.hMask & 1)) {
        this.hPe = pe;
        this.hPd = pd;
        this.checkError(ee, t0 + i);
      }
      if (dec > 0 && ++dc === dec) {
        dc = 0;
        this.writeWeights(traj, row * L);
        tIdx[row++] = t0 + i;
      }
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  /**
   * Float32 emulation, real and complex in one loop (state interleaved; for real data every
   * imaginary part is an exact zero, so each complex operation rounds exactly like its real
   * counterpart). Math.fround after every +, −, ×, ÷ and √; no fused multiply-add; subnormals
   * are kept (many single-precision targets flush them to zero). Math.fround and Math.sqrt are
   * written out in full in every kernel: V8's optimising compiler inlines them in that form only
   * (through a local alias they were called as functions, boxing each argument — seen as
   * scavenges under --trace-gc).
   */
  protected kernel32(
    x: Float32Array,
    d: Float32Array,
    n: number,
    y: Float32Array,
    e: Float32Array,
    ep: Float32Array,
    g: Float32Array,
    traj: Float64Array,
    tIdx: Float64Array
  ): void {
    const M = this.M;
    const M2 = 2 * M;
    const cx = this.complex;
    const R = this.R as Float32Array;
    const p = this.p as Float32Array;
    const r = this.r as Float32Array;
    const ub = this.ub as Float32Array;
    const sl = Math.fround(Math.sqrt(Math.fround(this.options.lambda)));
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const L = cx ? M2 : M;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    const W = cx ? 2 : 1;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    for (let i = 0; i < n; i++) {
      let uo = 0;
      if (tv) {
        pos = pos === 0 ? M - 1 : pos - 1;
        for (let q = 0; q < W; q++) {
          const xv = x[W * i + q];
          ub[W * pos + q] = xv;
          ub[W * (pos + M) + q] = xv;
        }
        uo = W * pos;
      } else {
        const b = i * M * W;
        for (let k = 0; k < M * W; k++) {
          ub[k] = x[b + k];
        }
      }
      for (let k = 0; k < M; k++) {
        r[2 * k] = ub[uo + W * k];
        r[2 * k + 1] = cx ? -ub[uo + 2 * k + 1] : 0;
      }
      const dvr = d[W * i];
      const dvi = cx ? d[2 * i + 1] : 0;
      let dr = dvr;
      let di = -dvi;
      let gs = 1;
      for (let j = 0; j < M; j++) {
        const jj = 2 * (j * M + j);
        const a = Math.fround(sl * R[jj]);
        const br = r[2 * j];
        const bi = r[2 * j + 1];
        const rho = Math.fround(
          Math.sqrt(
            Math.fround(
              Math.fround(a * a) + Math.fround(Math.fround(br * br) + Math.fround(bi * bi))
            )
          )
        );
        const inv = Math.fround(1 / rho);
        const c = Math.fround(a * inv);
        const sr = Math.fround(br * inv);
        const si = Math.fround(bi * inv);
        R[jj] = rho;
        const cs = Math.fround(c * sl);
        const ssr = Math.fround(sr * sl);
        const ssi = Math.fround(si * sl);
        for (let k = 2 * (j + 1), q = jj + 2; k < M2; k += 2, q += 2) {
          const tr = R[q];
          const ti = R[q + 1];
          const rr = r[k];
          const ri = r[k + 1];
          R[q] = Math.fround(
            Math.fround(Math.fround(cs * tr) + Math.fround(sr * rr)) + Math.fround(si * ri)
          );
          R[q + 1] = Math.fround(
            Math.fround(Math.fround(cs * ti) + Math.fround(sr * ri)) - Math.fround(si * rr)
          );
          r[k] = Math.fround(
            Math.fround(c * rr) - Math.fround(Math.fround(ssr * tr) - Math.fround(ssi * ti))
          );
          r[k + 1] = Math.fround(
            Math.fround(c * ri) - Math.fround(Math.fround(ssr * ti) + Math.fround(ssi * tr))
          );
        }
        const pr = p[2 * j];
        const pi = p[2 * j + 1];
        p[2 * j] = Math.fround(
          Math.fround(Math.fround(cs * pr) + Math.fround(sr * dr)) + Math.fround(si * di)
        );
        p[2 * j + 1] = Math.fround(
          Math.fround(Math.fround(cs * pi) + Math.fround(sr * di)) - Math.fround(si * dr)
        );
        const ndr = Math.fround(
          Math.fround(c * dr) - Math.fround(Math.fround(ssr * pr) - Math.fround(ssi * pi))
        );
        di = Math.fround(
          Math.fround(c * di) - Math.fround(Math.fround(ssr * pi) + Math.fround(ssi * pr))
        );
        dr = ndr;
        gs = Math.fround(gs * c);
      }
      const er = Math.fround(dr / gs);
      const ei = Math.fround(-di / gs);
      const gam = Math.fround(gs * gs);
      e[W * i] = er;
      y[W * i] = Math.fround(dvr - er);
      ep[W * i] = Math.fround(gam * er);
      if (cx) {
        e[2 * i + 1] = ei;
        y[2 * i + 1] = Math.fround(dvi - ei);
        ep[2 * i + 1] = Math.fround(gam * ei);
      }
      g[i] = gam;
      // The health monitor runs in double: it is not part of the emulated arithmetic.
      const ee = er * er + ei * ei;
      pe += (ee - pe) * HEALTH_ALPHA;
      pd += (dvr * dvr + dvi * dvi - pd) * HEALTH_ALPHA;
      if (!(pe <= thr * pd) && !(this.hMask & 1)) {
        this.hPe = pe;
        this.hPd = pd;
        this.checkError(ee, t0 + i);
      }
      if (dec > 0 && ++dc === dec) {
        dc = 0;
        this.writeWeights(traj, row * L);
        tIdx[row++] = t0 + i;
      }
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }
}
