/**
 * Inverse QR-RLS: propagates a square root S of P(n) = Φ(n)⁻¹ = S Sᴴ (S upper triangular) by
 * Givens rotations of the pre-array (Haykin, Adaptive Filter Theory, 4th ed., ch. 13, the inverse
 * QR-RLS algorithm; Alexander and Ghirnikar, IEEE Trans. Signal Processing 41(1), 1993):
 *
 *   [ 1    λ^−½ u(n)ᴴS(n−1) ]  Θ  =  [ γ^−½(n)          0ᵀ   ]
 *   [ 0    λ^−½ S(n−1)      ]        [ g(n) γ^−½(n)     S(n) ]
 *
 * where the rotations act on columns (0, j+1), j = 0, …, M−1 (forward order keeps S upper
 * triangular), g(n) = P(n)u(n) is the gain, γ(n) the conversion factor. Every sample then sets
 * w(n) = w(n−1) + g(n) e*(n), so the weights are always at hand.
 *
 * Storage: Sᵀ row-major (row j holds column j of S, entries 0…j), so both the inner product
 * b_j = λ^−½ Σ_{i≤j} ū_i S_ij and the rotation of column j run over contiguous memory.
 * Per sample (real): 4M² + O(M) flops, M square roots and M divisions.
 */
import { AdaptiveFilter, HEALTH_ALPHA, pushSample, pushSampleC } from './base';
import type { FilterOptions, Real } from './types';

export class InverseQrRlsFilter extends AdaptiveFilter {
  /** Sᵀ, lower triangle, row-major (interleaved complex, or always interleaved in float32). */
  protected T!: Real;
  protected w!: Real;
  /** Work column: g γ^−½ accumulates here. */
  protected v!: Real;
  /** Work: the inner products b_j = Σ_{k≤j} S_kj u_k of the coming sample (float64; interleaved when complex). */
  protected bNext!: Float64Array;

  constructor(options: FilterOptions) {
    super({ ...options, algorithm: 'inverse-qr-rls' });
    this.reset();
  }

  private get il(): boolean {
    return this.complex || this.f32;
  }

  protected init(): void {
    const M = this.M;
    const w = this.il ? 2 : 1;
    this.T = this.zeroed(this.T, w * M * M);
    this.w = this.zeroed(this.w, w * M);
    this.v = this.zeroed(this.v, w * M);
    if (this.bNext === undefined || this.bNext.length !== w * M) {
      this.bNext = new Float64Array(w * M);
    }
    const s = this.f32
      ? Math.fround(1 / Math.fround(Math.sqrt(Math.fround(this.options.delta))))
      : 1 / Math.sqrt(this.options.delta);
    for (let j = 0; j < M; j++) {
      this.T[w * (j * M + j)] = s;
    }
  }

  /** A copy of P(n) = S Sᴴ, row-major M×M (interleaved when complex), formed in double. */
  inverseCorrelation(): Float64Array {
    const M = this.M;
    const cx = this.complex;
    const W = this.il ? 2 : 1;
    const T = this.T;
    const P = new Float64Array((cx ? 2 : 1) * M * M);
    // P_ik = Σ_j S_ij conj(S_kj), S_ij = T[j][i], nonzero for i ≤ j.
    for (let i = 0; i < M; i++) {
      for (let k = 0; k < M; k++) {
        let sr = 0;
        let si = 0;
        for (let j = Math.max(i, k); j < M; j++) {
          const ar = T[W * (j * M + i)];
          const ai = W === 2 ? T[W * (j * M + i) + 1] : 0;
          const br = T[W * (j * M + k)];
          const bi = W === 2 ? T[W * (j * M + k) + 1] : 0;
          sr += ar * br + ai * bi;
          si += ai * br - ar * bi;
        }
        if (cx) {
          P[2 * (i * M + k)] = sr;
          P[2 * (i * M + k) + 1] = si;
        } else {
          P[i * M + k] = sr;
        }
      }
    }
    return P;
  }

  protected writeWeights(out: Float64Array, o: number): void {
    const w = this.w;
    if (this.complex || !this.il) {
      for (let k = 0; k < w.length; k++) {
        out[o + k] = w[k];
      }
    } else {
      for (let k = 0; k < this.M; k++) {
        out[o + k] = w[2 * k];
      }
    }
  }

  /** Σ_{k≤j} T[b+k]·u[o+k] in four partial sums, in a fixed order. */
  private dotTri(T: Float64Array, b: number, u: Float64Array, o: number, j: number): number {
    let a0 = 0;
    let a1 = 0;
    let a2 = 0;
    let a3 = 0;
    let k = 0;
    const k4 = (j + 1) & ~3;
    for (; k < k4; k += 4) {
      const q = b + k;
      const v4 = o + k;
      a0 += T[q] * u[v4];
      a1 += T[q + 1] * u[v4 + 1];
      a2 += T[q + 2] * u[v4 + 2];
      a3 += T[q + 3] * u[v4 + 3];
    }
    for (; k <= j; k++) {
      a0 += T[b + k] * u[o + k];
    }
    return a0 + a1 + (a2 + a3);
  }

  /**
   * Real float64. The inner products b_j(n) = Σ_{k≤j} S_kj(n−1) u_k(n) use column j before this
   * sample's rotation j, the only one that changes it; so within a chunk they are formed for the
   * next sample while the rotation writes the new column (S is read once per sample instead of
   * twice). The first sample of a chunk forms them in a pass of their own. Every value sees the
   * same operations in the same order either way (four partial sums as in dotTri), so chunked and
   * one-shot runs agree bit for bit.
   */
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
    const T = this.T as Float64Array;
    const w = this.w as Float64Array;
    const v = this.v as Float64Array;
    const bn = this.bNext;
    const ub = this.ub as Float64Array;
    const isl = 1 / Math.sqrt(this.options.lambda);
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    // True when bn holds b(n) for this sample and u(n) is in place (formed by the last pass).
    let ready = false;
    for (let i = 0; i < n; i++) {
      let ua = ub;
      let uo = 0;
      if (!tv) {
        ua = x;
        uo = i * M;
      } else {
        if (!ready) {
          pos = pushSample(ub, pos, M, x[i]);
        }
        uo = pos;
      }
      if (!ready) {
        for (let j = 0; j < M; j++) {
          bn[j] = this.dotTri(T, j * M, ua, uo, j);
        }
      }
      let yv = 0;
      for (let k = 0; k < M; k++) {
        yv += w[k] * ua[uo + k];
        v[k] = 0;
      }
      const dv = d[i];
      const ev = dv - yv;
      // u(n+1) for the next sample's inner products (u(n) is not needed any more); on the last
      // sample of the chunk they are formed with u(n) and discarded.
      ready = i + 1 < n;
      const va = ua;
      let vo = uo;
      if (ready) {
        if (tv) {
          pos = pushSample(ub, pos, M, x[i + 1]);
          vo = pos;
        } else {
          vo = (i + 1) * M;
        }
      }
      let eta = 1;
      // Columns j and j+1 are rotated in one pass over v (loaded and stored once per pair);
      // every element sees the same operations in the same order as one column at a time.
      for (let j = 0; j < M; j += 2) {
        const two = j + 1 < M;
        const b0 = j * M;
        const b1 = b0 + M;
        const a = bn[j] * isl;
        const etaN = Math.sqrt(eta * eta + a * a);
        const inv = 1 / etaN;
        const c = eta * inv;
        const s = a * inv;
        const cs = c * isl;
        const ss = s * isl;
        const k4 = (j + 1) & ~3;
        let d0 = 0;
        let d1 = 0;
        let d2 = 0;
        let d3 = 0;
        if (!two) {
          let k = 0;
          for (; k < k4; k += 4) {
            const q = b0 + k;
            const z = vo + k;
            const v0 = v[k];
            const v1 = v[k + 1];
            const v2 = v[k + 2];
            const v3 = v[k + 3];
            const h0 = T[q];
            const h1 = T[q + 1];
            const h2 = T[q + 2];
            const h3 = T[q + 3];
            v[k] = c * v0 + ss * h0;
            v[k + 1] = c * v1 + ss * h1;
            v[k + 2] = c * v2 + ss * h2;
            v[k + 3] = c * v3 + ss * h3;
            const n0 = cs * h0 - s * v0;
            const n1 = cs * h1 - s * v1;
            const n2 = cs * h2 - s * v2;
            const n3 = cs * h3 - s * v3;
            T[q] = n0;
            T[q + 1] = n1;
            T[q + 2] = n2;
            T[q + 3] = n3;
            d0 += n0 * va[z];
            d1 += n1 * va[z + 1];
            d2 += n2 * va[z + 2];
            d3 += n3 * va[z + 3];
          }
          for (; k <= j; k++) {
            const vk = v[k];
            const tk = T[b0 + k];
            v[k] = c * vk + ss * tk;
            const nk = cs * tk - s * vk;
            T[b0 + k] = nk;
            d0 += nk * va[vo + k];
          }
          bn[j] = d0 + d1 + (d2 + d3);
          eta = etaN;
          break;
        }
        const a1 = bn[j + 1] * isl;
        const etaN1 = Math.sqrt(etaN * etaN + a1 * a1);
        const inv1 = 1 / etaN1;
        const c1 = etaN * inv1;
        const s1 = a1 * inv1;
        const cs1 = c1 * isl;
        const ss1 = s1 * isl;
        let e0 = 0;
        let e1 = 0;
        let e2 = 0;
        let e3 = 0;
        let k = 0;
        for (; k < k4; k += 4) {
          const q = b0 + k;
          const q1 = b1 + k;
          const z = vo + k;
          const v0 = v[k];
          const v1 = v[k + 1];
          const h0 = T[q];
          const h1 = T[q + 1];
          const n0 = cs * h0 - s * v0;
          const n1 = cs * h1 - s * v1;
          T[q] = n0;
          T[q + 1] = n1;
          const w0 = c * v0 + ss * h0;
          const w1 = c * v1 + ss * h1;
          const g0 = T[q1];
          const g1 = T[q1 + 1];
          v[k] = c1 * w0 + ss1 * g0;
          v[k + 1] = c1 * w1 + ss1 * g1;
          const m0 = cs1 * g0 - s1 * w0;
          const m1 = cs1 * g1 - s1 * w1;
          T[q1] = m0;
          T[q1 + 1] = m1;
          const u0 = va[z];
          const u1 = va[z + 1];
          d0 += n0 * u0;
          d1 += n1 * u1;
          e0 += m0 * u0;
          e1 += m1 * u1;
          const v2 = v[k + 2];
          const v3 = v[k + 3];
          const h2 = T[q + 2];
          const h3 = T[q + 3];
          const n2 = cs * h2 - s * v2;
          const n3 = cs * h3 - s * v3;
          T[q + 2] = n2;
          T[q + 3] = n3;
          const w2 = c * v2 + ss * h2;
          const w3 = c * v3 + ss * h3;
          const g2 = T[q1 + 2];
          const g3 = T[q1 + 3];
          v[k + 2] = c1 * w2 + ss1 * g2;
          v[k + 3] = c1 * w3 + ss1 * g3;
          const m2 = cs1 * g2 - s1 * w2;
          const m3 = cs1 * g3 - s1 * w3;
          T[q1 + 2] = m2;
          T[q1 + 3] = m3;
          const u2 = va[z + 2];
          const u3 = va[z + 3];
          d2 += n2 * u2;
          d3 += n3 * u3;
          e2 += m2 * u2;
          e3 += m3 * u3;
        }
        // Tail k = k4…j: column j adds to its first partial sum (as dotTri does); column j+1
        // keeps four partial sums up to its own k4, which is k4 + 4 when j ≡ 2 (mod 4).
        const split = ((j + 2) & ~3) > k4;
        for (; k <= j; k++) {
          const vk = v[k];
          const tk = T[b0 + k];
          const nk = cs * tk - s * vk;
          T[b0 + k] = nk;
          const wk = c * vk + ss * tk;
          const gk = T[b1 + k];
          v[k] = c1 * wk + ss1 * gk;
          const mk = cs1 * gk - s1 * wk;
          T[b1 + k] = mk;
          const uk = va[vo + k];
          d0 += nk * uk;
          const t = mk * uk;
          if (!split || k === k4) {
            e0 += t;
          } else if (k === k4 + 1) {
            e1 += t;
          } else {
            e2 += t;
          }
        }
        // k = j+1: column j+1 only (column j has no entry there)
        const vk = v[j + 1];
        const gk = T[b1 + j + 1];
        v[j + 1] = c1 * vk + ss1 * gk;
        const mk = cs1 * gk - s1 * vk;
        T[b1 + j + 1] = mk;
        const t = mk * va[vo + j + 1];
        if (split) {
          e3 += t;
        } else {
          e0 += t;
        }
        bn[j] = d0 + d1 + (d2 + d3);
        bn[j + 1] = e0 + e1 + (e2 + e3);
        eta = etaN1;
      }
      const ginv = ev / eta;
      for (let k = 0; k < M; k++) {
        w[k] += v[k] * ginv;
      }
      const gam = 1 / (eta * eta);
      y[i] = yv;
      e[i] = ev;
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
        this.writeWeights(traj, row * M);
        tIdx[row++] = t0 + i;
      }
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  /** Complex float64, with the lookahead of kernelR (one accumulator pair, k ascending, both ways). */
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
    const T = this.T as Float64Array;
    const w = this.w as Float64Array;
    const v = this.v as Float64Array;
    const bn = this.bNext;
    const ub = this.ub as Float64Array;
    const isl = 1 / Math.sqrt(this.options.lambda);
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    let ready = false;
    for (let i = 0; i < n; i++) {
      let ua = ub;
      let uo = 0;
      if (!tv) {
        ua = x;
        uo = i * M2;
      } else {
        if (!ready) {
          pos = pushSampleC(ub, pos, M, x[2 * i], x[2 * i + 1]);
        }
        uo = 2 * pos;
      }
      if (!ready) {
        // b_j = Σ ū_k S_kj over the columns before this sample's rotations
        for (let j = 0; j < M; j++) {
          const b0 = 2 * j * M;
          let ar = 0;
          let ai = 0;
          for (let k = 0; k <= 2 * j; k += 2) {
            const tr = T[b0 + k];
            const ti = T[b0 + k + 1];
            const ur = ua[uo + k];
            const ui = ua[uo + k + 1];
            ar += ur * tr + ui * ti;
            ai += ur * ti - ui * tr;
          }
          bn[2 * j] = ar;
          bn[2 * j + 1] = ai;
        }
      }
      // y = wᴴu
      let yr = 0;
      let yi = 0;
      for (let k = 0; k < M2; k += 2) {
        const wr = w[k];
        const wi = w[k + 1];
        const ur = ua[uo + k];
        const ui = ua[uo + k + 1];
        yr += wr * ur + wi * ui;
        yi += wr * ui - wi * ur;
        v[k] = 0;
        v[k + 1] = 0;
      }
      const dvr = d[2 * i];
      const dvi = d[2 * i + 1];
      const er = dvr - yr;
      const ei = dvi - yi;
      // u(n+1) for the next sample's inner products (on the chunk's last sample they are formed
      // with u(n) and discarded)
      ready = i + 1 < n;
      const va = ua;
      let vo = uo;
      if (ready) {
        if (tv) {
          pos = pushSampleC(ub, pos, M, x[2 * i + 2], x[2 * i + 3]);
          vo = 2 * pos;
        } else {
          vo = (i + 1) * M2;
        }
      }
      let eta = 1;
      for (let j = 0; j < M; j++) {
        const b0 = 2 * j * M;
        const ar = bn[2 * j] * isl;
        const ai = bn[2 * j + 1] * isl;
        const etaN = Math.sqrt(eta * eta + ar * ar + ai * ai);
        const inv = 1 / etaN;
        const c = eta * inv;
        const sr = ar * inv;
        const si = ai * inv;
        const cs = c * isl;
        const ssr = sr * isl;
        const ssi = si * isl;
        let nr = 0;
        let ni = 0;
        for (let k = 0; k <= 2 * j; k += 2) {
          const vr = v[k];
          const vi = v[k + 1];
          const tr = T[b0 + k];
          const ti = T[b0 + k + 1];
          // v ← c v + s̄ λ^−½ S ;  S ← c λ^−½ S − s v
          v[k] = c * vr + (ssr * tr + ssi * ti);
          v[k + 1] = c * vi + (ssr * ti - ssi * tr);
          const tr1 = cs * tr - (sr * vr - si * vi);
          const ti1 = cs * ti - (sr * vi + si * vr);
          T[b0 + k] = tr1;
          T[b0 + k + 1] = ti1;
          const ur = va[vo + k];
          const ui = va[vo + k + 1];
          nr += ur * tr1 + ui * ti1;
          ni += ur * ti1 - ui * tr1;
        }
        bn[2 * j] = nr;
        bn[2 * j + 1] = ni;
        eta = etaN;
      }
      // w += g e*, g = v / η
      const qr = er / eta;
      const qi = -ei / eta;
      for (let k = 0; k < M2; k += 2) {
        const vr = v[k];
        const vi = v[k + 1];
        w[k] += vr * qr - vi * qi;
        w[k + 1] += vr * qi + vi * qr;
      }
      const gam = 1 / (eta * eta);
      y[2 * i] = yr;
      y[2 * i + 1] = yi;
      e[2 * i] = er;
      e[2 * i + 1] = ei;
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
        this.writeWeights(traj, row * M2);
        tIdx[row++] = t0 + i;
      }
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  /** Float32 emulation (see QrRlsFilter.kernel32 for the conventions). */
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
    const W = cx ? 2 : 1;
    const T = this.T as Float32Array;
    const w = this.w as Float32Array;
    const v = this.v as Float32Array;
    const ub = this.ub as Float32Array;
    const isl = Math.fround(1 / Math.fround(Math.sqrt(Math.fround(this.options.lambda))));
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    const L = cx ? M2 : M;
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
      let yr = 0;
      let yi = 0;
      for (let k = 0; k < M; k++) {
        const wr = w[2 * k];
        const wi = w[2 * k + 1];
        const ur = ub[uo + W * k];
        const ui = cx ? ub[uo + 2 * k + 1] : 0;
        yr = Math.fround(yr + Math.fround(Math.fround(wr * ur) + Math.fround(wi * ui)));
        yi = Math.fround(yi + Math.fround(Math.fround(wr * ui) - Math.fround(wi * ur)));
        v[2 * k] = 0;
        v[2 * k + 1] = 0;
      }
      const dvr = d[W * i];
      const dvi = cx ? d[2 * i + 1] : 0;
      const er = Math.fround(dvr - yr);
      const ei = Math.fround(dvi - yi);
      let eta = 1;
      for (let j = 0; j < M; j++) {
        const b0 = 2 * j * M;
        let ar = 0;
        let ai = 0;
        for (let k = 0; k <= j; k++) {
          const tr = T[b0 + 2 * k];
          const ti = T[b0 + 2 * k + 1];
          const ur = ub[uo + W * k];
          const ui = cx ? ub[uo + 2 * k + 1] : 0;
          ar = Math.fround(ar + Math.fround(Math.fround(ur * tr) + Math.fround(ui * ti)));
          ai = Math.fround(ai + Math.fround(Math.fround(ur * ti) - Math.fround(ui * tr)));
        }
        ar = Math.fround(ar * isl);
        ai = Math.fround(ai * isl);
        const etaN = Math.fround(
          Math.sqrt(
            Math.fround(
              Math.fround(eta * eta) + Math.fround(Math.fround(ar * ar) + Math.fround(ai * ai))
            )
          )
        );
        const inv = Math.fround(1 / etaN);
        const c = Math.fround(eta * inv);
        const sr = Math.fround(ar * inv);
        const si = Math.fround(ai * inv);
        const cs = Math.fround(c * isl);
        const ssr = Math.fround(sr * isl);
        const ssi = Math.fround(si * isl);
        for (let k = 0; k <= 2 * j; k += 2) {
          const vr = v[k];
          const vi = v[k + 1];
          const tr = T[b0 + k];
          const ti = T[b0 + k + 1];
          v[k] = Math.fround(
            Math.fround(c * vr) + Math.fround(Math.fround(ssr * tr) + Math.fround(ssi * ti))
          );
          v[k + 1] = Math.fround(
            Math.fround(c * vi) + Math.fround(Math.fround(ssr * ti) - Math.fround(ssi * tr))
          );
          T[b0 + k] = Math.fround(
            Math.fround(cs * tr) - Math.fround(Math.fround(sr * vr) - Math.fround(si * vi))
          );
          T[b0 + k + 1] = Math.fround(
            Math.fround(cs * ti) - Math.fround(Math.fround(sr * vi) + Math.fround(si * vr))
          );
        }
        eta = etaN;
      }
      const qr = Math.fround(er / eta);
      const qi = Math.fround(-ei / eta);
      for (let k = 0; k < M2; k += 2) {
        const vr = v[k];
        const vi = v[k + 1];
        w[k] = Math.fround(w[k] + Math.fround(Math.fround(vr * qr) - Math.fround(vi * qi)));
        w[k + 1] = Math.fround(w[k + 1] + Math.fround(Math.fround(vr * qi) + Math.fround(vi * qr)));
      }
      const gam = Math.fround(1 / Math.fround(eta * eta));
      y[W * i] = yr;
      e[W * i] = er;
      ep[W * i] = Math.fround(gam * er);
      if (cx) {
        y[2 * i + 1] = yi;
        e[2 * i + 1] = ei;
        ep[2 * i + 1] = Math.fround(gam * ei);
      }
      g[i] = gam;
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
