/**
 * LMS (and the shared kernel of NLMS): w(n) = w(n−1) + μ(n)·u(n)·e*(n), e(n) = d(n) − w(n−1)ᴴu(n)
 * (Haykin, Adaptive Filter Theory, 4th ed., ch. 5 and 6; Sayed, Fundamentals of Adaptive
 * Filtering, 2003, ch. 5). LMS uses μ(n) = μ; NLMS uses μ(n) = μ/(ε + ‖u(n)‖²) (see nlms.ts).
 * The conversion factor is γ(n) = 1 − μ(n)‖u(n)‖², so ε(n) = γ(n) e(n).
 *
 * LMS's stability depends on the data, so it is not a creation error: after each chunk the
 * input power σ̂² (mean |x|² over everything seen) gives the mean-square bound for white input,
 * 2/(σ̂²(M+2)) real and 2/(σ̂²(M+1)) complex (independence theory, Gaussian data; Haykin 4th ed.
 * ch. 6; Sayed 2003 §23 (from memory)); μ above it raises a 'step-size' warning. For coloured
 * input the true bound is lower; the warning is a guide, not a guarantee.
 */
import { AdaptiveFilter, HEALTH_ALPHA, pushSample, pushSampleC } from './base';
import type { ChunkBuffers, FilterChunk, FilterOptions, Real } from './types';

export class LmsFilter extends AdaptiveFilter {
  protected w!: Real;
  /** True for NLMS. */
  protected normalised: boolean;
  private powSum = 0;
  private powCount = 0;

  constructor(options: FilterOptions) {
    const normalised = options.algorithm === 'nlms';
    super({ ...options, algorithm: normalised ? 'nlms' : 'lms' });
    this.normalised = normalised;
    this.reset();
  }

  private get il(): boolean {
    return this.complex || this.f32;
  }

  protected init(): void {
    this.w = this.zeroed(this.w, (this.f32 ? 2 : this.complex ? 2 : 1) * this.M);
    this.powSum = 0;
    this.powCount = 0;
  }

  /** Mean-square step-size bound for white input of the power seen so far (NaN before any input). */
  stepBound(): number {
    const s2 = this.powSum / this.powCount;
    return 2 / (s2 * (this.M + (this.complex ? 1 : 2)));
  }

  override process(x: unknown, d: unknown, out?: ChunkBuffers): FilterChunk {
    const res = super.process(x, d, out);
    if (!this.normalised && res.length > 0) {
      // Input power from the regressors actually used (the delay line or the rows).
      const X = this.lastX;
      if (X) {
        let s = 0;
        for (let k = 0; k < X.length; k++) {
          s += X[k] * X[k];
        }
        this.powSum += s;
        this.powCount += X.length / (this.complex ? 2 : 1);
      }
      const bound = this.stepBound();
      if (this.options.mu > bound) {
        const idx = this.t - 1;
        this.flag(
          'step-size',
          idx,
          `μ = ${this.options.mu} exceeds the mean-square bound ${bound.toPrecision(4)} estimated ` +
            `from the input power ${(this.powSum / this.powCount).toPrecision(4)} (white-input ` +
            `theory) at sample ${idx}; LMS may diverge`
        );
      }
    }
    return res;
  }

  private lastX: Real | null = null;

  protected kernel(
    x: Real,
    d: Real,
    n: number,
    y: Real,
    e: Real,
    ep: Real,
    g: Real,
    traj: Float64Array,
    tIdx: Float64Array
  ): void {
    // the chunk's input, for the power estimate behind the step-size warning
    this.lastX = x;
    super.kernel(x, d, n, y, e, ep, g, traj, tIdx);
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
    // The delay-line kernel's prologue reads the chunk's first sample.
    if (this.transversal && n > 0) {
      this.kernelRT(x, d, n, y, e, ep, g, traj, tIdx);
    } else {
      this.kernelRRows(x, d, n, y, e, ep, g, traj, tIdx);
    }
  }

  /**
   * Real float64, tapped-delay input: the weight update of sample i and the output and ‖u‖² of
   * sample i+1 share one pass over w (w is loaded once and stored once per sample), which gives
   * the same w(i), y(i+1) and ‖u(i+1)‖² as two passes up to the order of the partial sums.
   */
  private kernelRT(
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
    const w = this.w as Float64Array;
    const ub = this.ub as Float64Array;
    const mu = this.options.mu;
    const eps = this.options.epsilon;
    const nrm = this.normalised;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    // Prologue: y(0) and ‖u(0)‖² of the chunk's first sample.
    pos = pushSample(ub, pos, M, x[0]);
    let y0 = 0;
    let y1 = 0;
    let y2 = 0;
    let y3 = 0;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    // Same partial-sum order as the fused pass below (bit-identical chunked and one-shot runs):
    // entry k goes to partial sum k mod 4, so that no sum is longer than ⌈M/4⌉ (the chain
    // through y and e sets the rate at small M).
    const M14 = (M - 1) & ~3;
    let k = 0;
    for (; k < M; k += 4) {
      const q = pos + k;
      const u0 = ub[q];
      y0 += w[k] * u0;
      s0 += u0 * u0;
      if (k + 1 < M) {
        const u1 = ub[q + 1];
        y1 += w[k + 1] * u1;
        s1 += u1 * u1;
      }
      if (k + 2 < M) {
        const u2 = ub[q + 2];
        y2 += w[k + 2] * u2;
        s2 += u2 * u2;
      }
      if (k + 3 < M) {
        const u3 = ub[q + 3];
        y3 += w[k + 3] * u3;
        s3 += u3 * u3;
      }
    }
    // Entries M14 … M−2 of the fused pass's tail, and the last one, M−1, in partial sum
    // (M−1) mod 4.
    const tail = M - 1 - M14;
    let yv = y0 + y1 + (y2 + y3);
    let uu = s0 + s1 + (s2 + s3);
    for (let i = 0; i < n; i++) {
      const dv = d[i];
      const ev = dv - yv;
      const step = nrm ? mu / (eps + uu) : mu;
      const se = step * ev;
      const gam = 1 - step * uu;
      y[i] = yv;
      e[i] = ev;
      g[i] = gam;
      ep[i] = gam * ev;
      // u(i) sits at `pos`; u(i+1) at `nx` once x(i+1) is written (doubled buffer).
      const last = i + 1 === n;
      const nx = pos === 0 ? M - 1 : pos - 1;
      y0 = 0;
      y1 = 0;
      y2 = 0;
      y3 = 0;
      s0 = 0;
      s1 = 0;
      s2 = 0;
      s3 = 0;
      k = 0;
      if (last) {
        for (; k < M; k++) {
          w[k] += se * ub[pos + k];
        }
      } else {
        const xn = x[i + 1];
        // Before overwriting slot nx (and nx + M), the fused loop needs u(i) intact: u(i)
        // occupies pos … pos+M−1, and nx + M = pos + M − 1 only when pos ≥ 1, i.e. the last
        // entry of u(i), the oldest one, which drops out of u(i+1). So update that weight first.
        w[M - 1] += se * ub[pos + M - 1];
        ub[nx] = xn;
        ub[nx + M] = xn;
        const M1 = M - 1;
        for (; k < M14; k += 4) {
          const q = pos + k;
          const r = nx + k;
          const w0 = w[k] + se * ub[q];
          const w1 = w[k + 1] + se * ub[q + 1];
          const w2 = w[k + 2] + se * ub[q + 2];
          const w3 = w[k + 3] + se * ub[q + 3];
          w[k] = w0;
          w[k + 1] = w1;
          w[k + 2] = w2;
          w[k + 3] = w3;
          const v0 = ub[r];
          const v1 = ub[r + 1];
          const v2 = ub[r + 2];
          const v3 = ub[r + 3];
          y0 += w0 * v0;
          y1 += w1 * v1;
          y2 += w2 * v2;
          y3 += w3 * v3;
          s0 += v0 * v0;
          s1 += v1 * v1;
          s2 += v2 * v2;
          s3 += v3 * v3;
        }
        if (tail > 0) {
          const wk = w[k] + se * ub[pos + k];
          w[k] = wk;
          const v = ub[nx + k];
          y0 += wk * v;
          s0 += v * v;
          if (tail > 1) {
            const wk1 = w[k + 1] + se * ub[pos + k + 1];
            w[k + 1] = wk1;
            const v1 = ub[nx + k + 1];
            y1 += wk1 * v1;
            s1 += v1 * v1;
            if (tail > 2) {
              const wk2 = w[k + 2] + se * ub[pos + k + 2];
              w[k + 2] = wk2;
              const v2 = ub[nx + k + 2];
              y2 += wk2 * v2;
              s2 += v2 * v2;
            }
          }
        }
        const vl = ub[nx + M1];
        const tl = w[M1] * vl;
        const sl = vl * vl;
        if (tail === 0) {
          y0 += tl;
          s0 += sl;
        } else if (tail === 1) {
          y1 += tl;
          s1 += sl;
        } else if (tail === 2) {
          y2 += tl;
          s2 += sl;
        } else {
          y3 += tl;
          s3 += sl;
        }
        pos = nx;
      }
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
      yv = y0 + y1 + (y2 + y3);
      uu = s0 + s1 + (s2 + s3);
    }
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  private kernelRRows(
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
    const M4 = M & ~3;
    const w = this.w as Float64Array;
    const ub = this.ub as Float64Array;
    const mu = this.options.mu;
    const eps = this.options.epsilon;
    const nrm = this.normalised;
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
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
      // One pass for y and ‖u‖², four partial sums each (breaks the add latency chain).
      let y0 = 0;
      let y1 = 0;
      let y2 = 0;
      let y3 = 0;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      let k = 0;
      for (; k < M4; k += 4) {
        const q = uo + k;
        const u0 = ub[q];
        const u1 = ub[q + 1];
        const u2 = ub[q + 2];
        const u3 = ub[q + 3];
        y0 += w[k] * u0;
        y1 += w[k + 1] * u1;
        y2 += w[k + 2] * u2;
        y3 += w[k + 3] * u3;
        s0 += u0 * u0;
        s1 += u1 * u1;
        s2 += u2 * u2;
        s3 += u3 * u3;
      }
      for (; k < M; k++) {
        const u = ub[uo + k];
        y0 += w[k] * u;
        s0 += u * u;
      }
      const yv = y0 + y1 + (y2 + y3);
      const uu = s0 + s1 + (s2 + s3);
      const dv = d[i];
      const ev = dv - yv;
      const step = nrm ? mu / (eps + uu) : mu;
      const se = step * ev;
      k = 0;
      for (; k < M4; k += 4) {
        const q = uo + k;
        w[k] += se * ub[q];
        w[k + 1] += se * ub[q + 1];
        w[k + 2] += se * ub[q + 2];
        w[k + 3] += se * ub[q + 3];
      }
      for (; k < M; k++) {
        w[k] += se * ub[uo + k];
      }
      const gam = 1 - step * uu;
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
    const w = this.w as Float64Array;
    const ub = this.ub as Float64Array;
    const mu = this.options.mu;
    const eps = this.options.epsilon;
    const nrm = this.normalised;
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
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
      let yr = 0;
      let yi = 0;
      let uu = 0;
      for (let k = 0; k < M2; k += 2) {
        const wr = w[k];
        const wi = w[k + 1];
        const ur = ub[uo + k];
        const ui = ub[uo + k + 1];
        yr += wr * ur + wi * ui;
        yi += wr * ui - wi * ur;
        uu += ur * ur + ui * ui;
      }
      const dvr = d[2 * i];
      const dvi = d[2 * i + 1];
      const er = dvr - yr;
      const ei = dvi - yi;
      const step = nrm ? mu / (eps + uu) : mu;
      // w += step u e*
      const qr = step * er;
      const qi = -step * ei;
      for (let k = 0; k < M2; k += 2) {
        const ur = ub[uo + k];
        const ui = ub[uo + k + 1];
        w[k] += ur * qr - ui * qi;
        w[k + 1] += ur * qi + ui * qr;
      }
      const gam = 1 - step * uu;
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
    const w = this.w as Float32Array;
    const ub = this.ub as Float32Array;
    const mu = Math.fround(this.options.mu);
    const eps = Math.fround(this.options.epsilon);
    const nrm = this.normalised;
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
      let uu = 0;
      for (let k = 0; k < M; k++) {
        const wr = w[2 * k];
        const wi = w[2 * k + 1];
        const ur = ub[uo + W * k];
        const ui = cx ? ub[uo + 2 * k + 1] : 0;
        yr = Math.fround(yr + Math.fround(Math.fround(wr * ur) + Math.fround(wi * ui)));
        yi = Math.fround(yi + Math.fround(Math.fround(wr * ui) - Math.fround(wi * ur)));
        uu = Math.fround(uu + Math.fround(Math.fround(ur * ur) + Math.fround(ui * ui)));
      }
      const dvr = d[W * i];
      const dvi = cx ? d[2 * i + 1] : 0;
      const er = Math.fround(dvr - yr);
      const ei = Math.fround(dvi - yi);
      const step = nrm ? Math.fround(mu / Math.fround(eps + uu)) : mu;
      const qr = Math.fround(step * er);
      const qi = Math.fround(-step * ei);
      for (let k = 0; k < M; k++) {
        const ur = ub[uo + W * k];
        const ui = cx ? ub[uo + 2 * k + 1] : 0;
        w[2 * k] = Math.fround(w[2 * k] + Math.fround(Math.fround(ur * qr) - Math.fround(ui * qi)));
        w[2 * k + 1] = Math.fround(
          w[2 * k + 1] + Math.fround(Math.fround(ur * qi) + Math.fround(ui * qr))
        );
      }
      const gam = Math.fround(1 - Math.fround(step * uu));
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
