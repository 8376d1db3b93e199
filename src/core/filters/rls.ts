/**
 * Conventional exponentially weighted RLS: the Riccati update of P(n) = Φ(n)⁻¹ (Haykin, Adaptive
 * Filter Theory, 4th ed., ch. 9, Table 9.1; Sayed, Fundamentals of Adaptive Filtering, 2003,
 * ch. 11 (from memory)):
 *
 *   π = P(n−1)u,  α = λ + uᴴπ,  k = π/α,  e = d − w(n−1)ᴴu,  w(n) = w(n−1) + k e*,
 *   P(n) = λ⁻¹ (P(n−1) − k πᴴ),  γ(n) = λ/α.
 *
 * Default variant (`rls`): only the upper triangle of P is stored and updated (the lower one is
 * its conjugate), so P stays exactly Hermitian; π is formed from the upper triangle. Per sample
 * (real): about 3.5M² flops.
 *
 * Unsymmetrised textbook form (`rls-textbook`, to compare against): the same formulas applied to
 * every entry of the full matrix, P(n) = λ⁻¹(P(n−1) − k πᴴ), with nothing that keeps P
 * Hermitian. k πᴴ = ππᴴ/α is Hermitian, so the anti-Hermitian part D of P is not damped at all:
 * D(n) = λ⁻¹D(n−1) + rounding, i.e. it grows like λ⁻ⁿ from the first rounding errors (Verhaegen,
 * "Round-off error propagation in four generally-applicable, recursive, least-squares estimation
 * schemes", Automatica 25(3), 1989; Haykin, 4th ed., §13.1 on the numerical instability of
 * conventional RLS (from memory)). In float64 at λ = 0.999 that takes P apart within about
 * 1e5 samples. The health monitor forms Pᴴu as well (ψ, an extra M² multiply-adds that only the
 * textbook form pays) and reports the relative asymmetry ‖(P − Pᴴ)u‖/‖Pu‖ and any loss of
 * positive definiteness, each with its sample index. For complex data α uses the real part of
 * uᴴPu. About 7M² flops per sample.
 */
import { AdaptiveFilter, HEALTH_ALPHA, pushSample, pushSampleC } from './base';
import type { FilterOptions, Real } from './types';

export class RlsFilter extends AdaptiveFilter {
  /** P, row-major M×M (interleaved complex, or always interleaved in float32). */
  protected P!: Real;
  protected w!: Real;
  /** Work: π = Pu. */
  protected pi!: Real;
  /** Work: the next sample's π, formed while P is updated (float64 default variant; interleaved when complex). */
  protected piNext!: Float64Array;
  /** Work: ψ = uᴴP (textbook form only). */
  protected psi!: Real;
  /** True for the unsymmetrised textbook form (`rls-textbook`): every entry of P updated. */
  readonly textbook: boolean;

  constructor(options: FilterOptions & { textbook?: boolean }) {
    const textbook = options.textbook ?? options.algorithm === 'rls-textbook';
    super({ ...options, algorithm: textbook ? 'rls-textbook' : 'rls' });
    this.textbook = textbook;
    this.reset();
  }

  private get il(): boolean {
    return this.complex || this.f32;
  }

  protected init(): void {
    const M = this.M;
    const w = this.il ? 2 : 1;
    this.P = this.zeroed(this.P, w * M * M);
    this.w = this.zeroed(this.w, w * M);
    this.pi = this.zeroed(this.pi, w * M);
    this.psi = this.zeroed(this.psi, w * M);
    const pl = (this.complex ? 2 : 1) * M;
    if (this.piNext === undefined || this.piNext.length !== pl) {
      this.piNext = new Float64Array(pl);
    } else {
      this.piNext.fill(0);
    }
    const s = this.f32 ? Math.fround(1 / Math.fround(this.options.delta)) : 1 / this.options.delta;
    for (let j = 0; j < M; j++) {
      this.P[w * (j * M + j)] = s;
    }
  }

  /** A copy of P(n), row-major M×M (interleaved when complex); the default variant fills the lower triangle from the upper. */
  inverseCorrelation(): Float64Array {
    const M = this.M;
    const cx = this.complex;
    const W = this.il ? 2 : 1;
    const P = this.P;
    const out = new Float64Array((cx ? 2 : 1) * M * M);
    for (let i = 0; i < M; i++) {
      for (let j = 0; j < M; j++) {
        const mirror = !this.textbook && j < i;
        const q = mirror ? j * M + i : i * M + j;
        const re = P[W * q];
        const im = W === 2 ? P[W * q + 1] : 0;
        if (cx) {
          out[2 * (i * M + j)] = re;
          out[2 * (i * M + j) + 1] = mirror ? -im : im;
        } else {
          out[i * M + j] = re;
        }
      }
    }
    return out;
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

  /** Slow path: reports a loss of definiteness or symmetry at `index`. */
  private report(q: number, diagBad: boolean, asym: number, index: number): void {
    if ((this.hMask & 4) === 0 && (!(q >= 0) || diagBad)) {
      this.flag(
        'indefinite',
        index,
        diagBad
          ? `P lost positive definiteness (a diagonal entry ≤ 0) at sample ${index}`
          : `P lost positive definiteness (uᴴPu = ${q.toExponential(3)}) at sample ${index}`
      );
    }
    if ((this.hMask & 8) === 0 && asym > this.options.asymmetryTolerance) {
      this.flag(
        'asymmetry',
        index,
        `P lost symmetry: ‖(P − Pᴴ)u‖/‖Pu‖ = ${asym.toExponential(3)} > ${this.options.asymmetryTolerance} at sample ${index} ` +
          `(the unsymmetrised textbook form does not keep P Hermitian; 'rls' does)`
      );
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
    if (this.textbook) {
      this.kernelRTextbook(x, d, n, y, e, ep, g, traj, tIdx);
    } else {
      this.kernelRSym(x, d, n, y, e, ep, g, traj, tIdx);
    }
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
    if (this.textbook) {
      this.kernelCTextbook(x, d, n, y, e, ep, g, traj, tIdx);
    } else {
      this.kernelCSym(x, d, n, y, e, ep, g, traj, tIdx);
    }
  }

  /**
   * Real float64, default (upper-triangle) variant. Within a chunk the update of P(n) and the
   * next sample's π = P(n)u(n+1) are one pass over the triangle: each updated entry is used for
   * π while it is still in a register, so P is read once per sample instead of twice (the
   * separate passes were L2-bandwidth bound at M = 128). The arithmetic and its order are those
   * of the two-pass form, so the results are bit-identical to it; the last sample of a chunk,
   * whose successor is not known yet, takes the two passes.
   */
  private kernelRSym(
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
    const P = this.P as Float64Array;
    const w = this.w as Float64Array;
    const ub = this.ub as Float64Array;
    const lam = this.options.lambda;
    const il = 1 / lam;
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pa = this.pi as Float64Array;
    let pb = this.piNext;
    let pos = this.upos;
    let dc = this.dcount;
    let row = 0;
    let pe = this.hPe;
    let pd = this.hPd;
    // True when pa already holds P(n−1)u(n) and u(n) is in place (formed by the fused pass).
    let ready = false;
    for (let i = 0; i < n; i++) {
      let ua = ub;
      let uo = 0;
      if (!tv) {
        ua = x;
        uo = i * M;
      } else if (!ready) {
        pos = pushSample(ub, pos, M, x[i]);
      }
      if (tv) {
        uo = pos;
      }
      if (!ready) {
        symvUpper(M, P, ua, uo, pa);
      }
      let yv = 0;
      let q = 0;
      for (let k = 0; k < M; k++) {
        const uk = ua[uo + k];
        yv += w[k] * uk;
        q += uk * pa[k];
      }
      const alpha = lam + q;
      const ia = 1 / alpha;
      const dv = d[i];
      const ev = dv - yv;
      const eka = ev * ia;
      for (let k = 0; k < M; k++) {
        w[k] += pa[k] * eka;
        pb[k] = 0;
      }
      let diagBad = false;
      ready = i + 1 < n;
      if (ready) {
        // u(n+1): the delay line moves on now (u(n) is not needed any more).
        let va = ub;
        let vo = 0;
        if (tv) {
          pos = pushSample(ub, pos, M, x[i + 1]);
          vo = pos;
        } else {
          va = x;
          vo = (i + 1) * M;
        }
        for (let r = 0; r < M; r++) {
          const b = r * M;
          const kr = pa[r] * ia;
          const vr = va[vo + r];
          const prr = (P[b + r] - kr * pa[r]) * il;
          P[b + r] = prr;
          if (!(prr > 0)) {
            diagBad = true;
          }
          let a0 = pb[r] + prr * vr;
          let a1 = 0;
          let a2 = 0;
          let a3 = 0;
          let j = r + 1;
          const j4 = j + ((M - j) & ~3);
          for (; j < j4; j += 4) {
            const q4 = b + j;
            const v = vo + j;
            const p0 = (P[q4] - kr * pa[j]) * il;
            const p1 = (P[q4 + 1] - kr * pa[j + 1]) * il;
            const p2 = (P[q4 + 2] - kr * pa[j + 2]) * il;
            const p3 = (P[q4 + 3] - kr * pa[j + 3]) * il;
            P[q4] = p0;
            P[q4 + 1] = p1;
            P[q4 + 2] = p2;
            P[q4 + 3] = p3;
            a0 += p0 * va[v];
            a1 += p1 * va[v + 1];
            a2 += p2 * va[v + 2];
            a3 += p3 * va[v + 3];
            pb[j] += p0 * vr;
            pb[j + 1] += p1 * vr;
            pb[j + 2] += p2 * vr;
            pb[j + 3] += p3 * vr;
          }
          for (; j < M; j++) {
            const p0 = (P[b + j] - kr * pa[j]) * il;
            P[b + j] = p0;
            a0 += p0 * va[vo + j];
            pb[j] += p0 * vr;
          }
          pb[r] = a0 + a1 + (a2 + a3);
        }
        const t = pa;
        pa = pb;
        pb = t;
      } else {
        for (let r = 0; r < M; r++) {
          const b = r * M;
          const kr = pa[r] * ia;
          for (let j = r; j < M; j++) {
            P[b + j] = (P[b + j] - kr * pa[j]) * il;
          }
          if (!(P[b + r] > 0)) {
            diagBad = true;
          }
        }
      }
      if (!(q >= 0) || diagBad) {
        this.report(q, diagBad, 0, t0 + i);
      }
      const gam = lam * ia;
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
    this.pi = pa;
    this.piNext = pb;
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  /** Real float64, textbook form: every entry of P updated, the asymmetry monitor formed alongside. */
  private kernelRTextbook(
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
    const P = this.P as Float64Array;
    const w = this.w as Float64Array;
    const pi = this.pi as Float64Array;
    const psi = this.psi as Float64Array;
    const ub = this.ub as Float64Array;
    const lam = this.options.lambda;
    const il = 1 / lam;
    const tol = this.options.asymmetryTolerance;
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
      let yv = 0;
      for (let k = 0; k < M; k++) {
        yv += w[k] * ub[uo + k];
        pi[k] = 0;
      }
      for (let k = 0; k < M; k++) {
        psi[k] = 0;
      }
      // π = P u over the full matrix; ψ = uᵀP only for the asymmetry monitor.
      for (let r = 0; r < M; r++) {
        const b = r * M;
        const ur = ub[uo + r];
        let acc = 0;
        for (let j = 0; j < M; j++) {
          const prj = P[b + j];
          acc += prj * ub[uo + j];
          psi[j] += ur * prj;
        }
        pi[r] = acc;
      }
      let dn = 0;
      let nn = 0;
      for (let k = 0; k < M; k++) {
        const t = pi[k] - psi[k];
        dn += t * t;
        nn += pi[k] * pi[k];
      }
      const asym = Math.sqrt(dn / nn);
      let q = 0;
      for (let k = 0; k < M; k++) {
        q += ub[uo + k] * pi[k];
      }
      const alpha = lam + q;
      const ia = 1 / alpha;
      const dv = d[i];
      const ev = dv - yv;
      const eka = ev * ia;
      for (let k = 0; k < M; k++) {
        w[k] += pi[k] * eka;
      }
      let diagBad = false;
      for (let r = 0; r < M; r++) {
        const b = r * M;
        const kr = pi[r] * ia;
        for (let j = 0; j < M; j++) {
          P[b + j] = (P[b + j] - kr * pi[j]) * il;
        }
        if (!(P[b + r] > 0)) {
          diagBad = true;
        }
      }
      if (!(q >= 0) || diagBad || asym > tol) {
        this.report(q, diagBad, asym, t0 + i);
      }
      const gam = lam * ia;
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

  /**
   * Complex float64, default variant, with the fused pass of kernelRSym: the update of the upper
   * triangle of P and the next sample's π = P(n)u(n+1) (P Hermitian) in one pass; the same
   * arithmetic in the same order as the two-pass form.
   */
  private kernelCSym(
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
    const P = this.P as Float64Array;
    const w = this.w as Float64Array;
    const ub = this.ub as Float64Array;
    const lam = this.options.lambda;
    const il = 1 / lam;
    const tv = this.transversal;
    const dec = this.options.keepWeightsEvery;
    const thr = this.options.divergenceThreshold;
    const t0 = this.t;
    let pa = this.pi as Float64Array;
    let pb = this.piNext;
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
        // π = P u with P Hermitian, upper triangle stored (diagonal real).
        for (let k = 0; k < M2; k++) {
          pa[k] = 0;
        }
        for (let r = 0; r < M; r++) {
          const b = 2 * r * M;
          const ur = ua[uo + 2 * r];
          const ui = ua[uo + 2 * r + 1];
          const prr = P[b + 2 * r];
          let ar = pa[2 * r] + prr * ur;
          let ai = pa[2 * r + 1] + prr * ui;
          for (let j = r + 1; j < M; j++) {
            const pr = P[b + 2 * j];
            const pim = P[b + 2 * j + 1];
            const vr = ua[uo + 2 * j];
            const vi = ua[uo + 2 * j + 1];
            ar += pr * vr - pim * vi;
            ai += pr * vi + pim * vr;
            // lower entry conj(P_rj) times u_r
            pa[2 * j] += pr * ur + pim * ui;
            pa[2 * j + 1] += pr * ui - pim * ur;
          }
          pa[2 * r] = ar;
          pa[2 * r + 1] = ai;
        }
      }
      let yr = 0;
      let yi = 0;
      let q = 0;
      for (let k = 0; k < M2; k += 2) {
        const wr = w[k];
        const wi = w[k + 1];
        const ur = ua[uo + k];
        const ui = ua[uo + k + 1];
        yr += wr * ur + wi * ui;
        yi += wr * ui - wi * ur;
        q += ur * pa[k] + ui * pa[k + 1];
      }
      const alpha = lam + q;
      const ia = 1 / alpha;
      const dvr = d[2 * i];
      const dvi = d[2 * i + 1];
      const er = dvr - yr;
      const ei = dvi - yi;
      // w += k e*, k = π/α
      const qr = er * ia;
      const qi = -ei * ia;
      for (let k = 0; k < M2; k += 2) {
        const pr = pa[k];
        const pim = pa[k + 1];
        w[k] += pr * qr - pim * qi;
        w[k + 1] += pr * qi + pim * qr;
        pb[k] = 0;
        pb[k + 1] = 0;
      }
      let diagBad = false;
      // u(n+1), when this chunk holds it (u(n) is not needed any more); otherwise the update
      // runs with u(n) and the π it forms is discarded.
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
      for (let r = 0; r < M; r++) {
        const b = 2 * r * M;
        const kr = pa[2 * r] * ia;
        const ki = pa[2 * r + 1] * ia;
        // diagonal: P_rr − |π_r|²/α, kept real
        const prr = (P[b + 2 * r] - (kr * pa[2 * r] + ki * pa[2 * r + 1])) * il;
        P[b + 2 * r] = prr;
        if (!(prr > 0)) {
          diagBad = true;
        }
        const ur = va[vo + 2 * r];
        const ui = va[vo + 2 * r + 1];
        let ar = pb[2 * r] + prr * ur;
        let ai = pb[2 * r + 1] + prr * ui;
        for (let j = r + 1; j < M; j++) {
          const pr0 = pa[2 * j];
          const pim0 = pa[2 * j + 1];
          // P_rj − k_r conj(π_j)
          const pr = (P[b + 2 * j] - (kr * pr0 + ki * pim0)) * il;
          const pim = (P[b + 2 * j + 1] - (ki * pr0 - kr * pim0)) * il;
          P[b + 2 * j] = pr;
          P[b + 2 * j + 1] = pim;
          const vr = va[vo + 2 * j];
          const vi = va[vo + 2 * j + 1];
          ar += pr * vr - pim * vi;
          ai += pr * vi + pim * vr;
          pb[2 * j] += pr * ur + pim * ui;
          pb[2 * j + 1] += pr * ui - pim * ur;
        }
        pb[2 * r] = ar;
        pb[2 * r + 1] = ai;
      }
      const t = pa;
      pa = pb;
      pb = t;
      if (!(q >= 0) || diagBad) {
        this.report(q, diagBad, 0, t0 + i);
      }
      const gam = lam * ia;
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
    this.pi = pa;
    this.piNext = pb;
    this.upos = pos;
    this.dcount = dc;
    this.hPe = pe;
    this.hPd = pd;
  }

  /** Complex float64, textbook form (as kernelR). */
  private kernelCTextbook(
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
    const P = this.P as Float64Array;
    const w = this.w as Float64Array;
    const pi = this.pi as Float64Array;
    const psi = this.psi as Float64Array;
    const ub = this.ub as Float64Array;
    const lam = this.options.lambda;
    const il = 1 / lam;
    const tol = this.options.asymmetryTolerance;
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
      for (let k = 0; k < M2; k += 2) {
        const wr = w[k];
        const wi = w[k + 1];
        const ur = ub[uo + k];
        const ui = ub[uo + k + 1];
        yr += wr * ur + wi * ui;
        yi += wr * ui - wi * ur;
        pi[k] = 0;
        pi[k + 1] = 0;
        psi[k] = 0;
        psi[k + 1] = 0;
      }
      for (let r = 0; r < M; r++) {
        const b = 2 * r * M;
        const ur = ub[uo + 2 * r];
        const ui = ub[uo + 2 * r + 1];
        let ar = 0;
        let ai = 0;
        for (let j = 0; j < M; j++) {
          const pr = P[b + 2 * j];
          const pim = P[b + 2 * j + 1];
          const vr = ub[uo + 2 * j];
          const vi = ub[uo + 2 * j + 1];
          ar += pr * vr - pim * vi;
          ai += pr * vi + pim * vr;
          // ψ_j += conj(u_r) P_rj
          psi[2 * j] += ur * pr + ui * pim;
          psi[2 * j + 1] += ur * pim - ui * pr;
        }
        pi[2 * r] = ar;
        pi[2 * r + 1] = ai;
      }
      // (Pᴴu)_j = conj(ψ_j)
      let dn = 0;
      let nn = 0;
      for (let k = 0; k < M2; k += 2) {
        const tr = pi[k] - psi[k];
        const ti = pi[k + 1] + psi[k + 1];
        dn += tr * tr + ti * ti;
        nn += pi[k] * pi[k] + pi[k + 1] * pi[k + 1];
      }
      const asym = Math.sqrt(dn / nn);
      let q = 0;
      for (let k = 0; k < M2; k += 2) {
        q += ub[uo + k] * pi[k] + ub[uo + k + 1] * pi[k + 1];
      }
      const alpha = lam + q;
      const ia = 1 / alpha;
      const dvr = d[2 * i];
      const dvi = d[2 * i + 1];
      const er = dvr - yr;
      const ei = dvi - yi;
      // w += k e*, k = π/α
      const qr = er * ia;
      const qi = -ei * ia;
      for (let k = 0; k < M2; k += 2) {
        const pr = pi[k];
        const pim = pi[k + 1];
        w[k] += pr * qr - pim * qi;
        w[k + 1] += pr * qi + pim * qr;
      }
      let diagBad = false;
      for (let r = 0; r < M; r++) {
        const b = 2 * r * M;
        const kr = pi[2 * r] * ia;
        const ki = pi[2 * r + 1] * ia;
        for (let j = 0; j < M; j++) {
          // P_rj − k_r conj(π_j), every entry
          const pr = pi[2 * j];
          const pim = pi[2 * j + 1];
          P[b + 2 * j] = (P[b + 2 * j] - (kr * pr + ki * pim)) * il;
          P[b + 2 * j + 1] = (P[b + 2 * j + 1] - (ki * pr - kr * pim)) * il;
        }
        if (!(P[b + 2 * r] > 0)) {
          diagBad = true;
        }
      }
      if (!(q >= 0) || diagBad || asym > tol) {
        this.report(q, diagBad, asym, t0 + i);
      }
      const gam = lam * ia;
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

  /** Float32 emulation of both variants (see QrRlsFilter.kernel32 for the conventions). */
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
    const P = this.P as Float32Array;
    const w = this.w as Float32Array;
    const pi = this.pi as Float32Array;
    const psi = this.psi as Float32Array;
    const ub = this.ub as Float32Array;
    const lam = Math.fround(this.options.lambda);
    const il = Math.fround(1 / lam);
    const textbook = this.textbook;
    const tol = this.options.asymmetryTolerance;
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
        pi[2 * k] = 0;
        pi[2 * k + 1] = 0;
        psi[2 * k] = 0;
        psi[2 * k + 1] = 0;
      }
      let asym = 0;
      if (!textbook) {
        for (let r = 0; r < M; r++) {
          const b = 2 * r * M;
          const ur = ub[uo + W * r];
          const ui = cx ? ub[uo + 2 * r + 1] : 0;
          const prr = P[b + 2 * r];
          let ar = Math.fround(pi[2 * r] + Math.fround(prr * ur));
          let ai = Math.fround(pi[2 * r + 1] + Math.fround(prr * ui));
          for (let j = r + 1; j < M; j++) {
            const pr = P[b + 2 * j];
            const pim = P[b + 2 * j + 1];
            const vr = ub[uo + W * j];
            const vi = cx ? ub[uo + 2 * j + 1] : 0;
            ar = Math.fround(ar + Math.fround(Math.fround(pr * vr) - Math.fround(pim * vi)));
            ai = Math.fround(ai + Math.fround(Math.fround(pr * vi) + Math.fround(pim * vr)));
            pi[2 * j] = Math.fround(
              pi[2 * j] + Math.fround(Math.fround(pr * ur) + Math.fround(pim * ui))
            );
            pi[2 * j + 1] = Math.fround(
              pi[2 * j + 1] + Math.fround(Math.fround(pr * ui) - Math.fround(pim * ur))
            );
          }
          pi[2 * r] = ar;
          pi[2 * r + 1] = ai;
        }
      } else {
        for (let r = 0; r < M; r++) {
          const b = 2 * r * M;
          const ur = ub[uo + W * r];
          const ui = cx ? ub[uo + 2 * r + 1] : 0;
          let ar = 0;
          let ai = 0;
          for (let j = 0; j < M; j++) {
            const pr = P[b + 2 * j];
            const pim = P[b + 2 * j + 1];
            const vr = ub[uo + W * j];
            const vi = cx ? ub[uo + 2 * j + 1] : 0;
            ar = Math.fround(ar + Math.fround(Math.fround(pr * vr) - Math.fround(pim * vi)));
            ai = Math.fround(ai + Math.fround(Math.fround(pr * vi) + Math.fround(pim * vr)));
            psi[2 * j] = Math.fround(
              psi[2 * j] + Math.fround(Math.fround(ur * pr) + Math.fround(ui * pim))
            );
            psi[2 * j + 1] = Math.fround(
              psi[2 * j + 1] + Math.fround(Math.fround(ur * pim) - Math.fround(ui * pr))
            );
          }
          pi[2 * r] = ar;
          pi[2 * r + 1] = ai;
        }
        // The monitor's asymmetry measure runs in double.
        let dn = 0;
        let nn = 0;
        for (let k = 0; k < M2; k += 2) {
          const tr = pi[k] - psi[k];
          const ti = pi[k + 1] + psi[k + 1];
          dn += tr * tr + ti * ti;
          nn += pi[k] * pi[k] + pi[k + 1] * pi[k + 1];
        }
        asym = Math.sqrt(dn / nn);
      }
      let q = 0;
      for (let k = 0; k < M; k++) {
        const ur = ub[uo + W * k];
        const ui = cx ? ub[uo + 2 * k + 1] : 0;
        q = Math.fround(
          q + Math.fround(Math.fround(ur * pi[2 * k]) + Math.fround(ui * pi[2 * k + 1]))
        );
      }
      const alpha = Math.fround(lam + q);
      const ia = Math.fround(1 / alpha);
      const dvr = d[W * i];
      const dvi = cx ? d[2 * i + 1] : 0;
      const er = Math.fround(dvr - yr);
      const ei = Math.fround(dvi - yi);
      const qr = Math.fround(er * ia);
      const qi = Math.fround(-ei * ia);
      for (let k = 0; k < M2; k += 2) {
        const pr = pi[k];
        const pim = pi[k + 1];
        w[k] = Math.fround(w[k] + Math.fround(Math.fround(pr * qr) - Math.fround(pim * qi)));
        w[k + 1] = Math.fround(
          w[k + 1] + Math.fround(Math.fround(pr * qi) + Math.fround(pim * qr))
        );
      }
      let diagBad = false;
      if (!textbook) {
        for (let r = 0; r < M; r++) {
          const b = 2 * r * M;
          const kr = Math.fround(pi[2 * r] * ia);
          const ki = Math.fround(pi[2 * r + 1] * ia);
          P[b + 2 * r] = Math.fround(
            Math.fround(
              P[b + 2 * r] -
                Math.fround(Math.fround(kr * pi[2 * r]) + Math.fround(ki * pi[2 * r + 1]))
            ) * il
          );
          if (!(P[b + 2 * r] > 0)) {
            diagBad = true;
          }
          for (let j = r + 1; j < M; j++) {
            const pr = pi[2 * j];
            const pim = pi[2 * j + 1];
            P[b + 2 * j] = Math.fround(
              Math.fround(
                P[b + 2 * j] - Math.fround(Math.fround(kr * pr) + Math.fround(ki * pim))
              ) * il
            );
            P[b + 2 * j + 1] = Math.fround(
              Math.fround(
                P[b + 2 * j + 1] - Math.fround(Math.fround(ki * pr) - Math.fround(kr * pim))
              ) * il
            );
          }
        }
      } else {
        for (let r = 0; r < M; r++) {
          const b = 2 * r * M;
          const kr = Math.fround(pi[2 * r] * ia);
          const ki = Math.fround(pi[2 * r + 1] * ia);
          for (let j = 0; j < M; j++) {
            const pr = pi[2 * j];
            const pim = pi[2 * j + 1];
            P[b + 2 * j] = Math.fround(
              Math.fround(
                P[b + 2 * j] - Math.fround(Math.fround(kr * pr) + Math.fround(ki * pim))
              ) * il
            );
            P[b + 2 * j + 1] = Math.fround(
              Math.fround(
                P[b + 2 * j + 1] - Math.fround(Math.fround(ki * pr) - Math.fround(kr * pim))
              ) * il
            );
          }
          if (!(P[b + 2 * r] > 0)) {
            diagBad = true;
          }
        }
      }
      if (!(q >= 0) || diagBad || asym > tol) {
        this.report(q, diagBad, asym, t0 + i);
      }
      const gam = Math.fround(lam * ia);
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

/**
 * π = P·u for symmetric P held in its upper triangle (row-major M×M), u = ua[uo..uo+M): row r's
 * dot product in four partial sums, the transposed contributions added into π as the row passes.
 */
function symvUpper(M: number, P: Float64Array, ua: Float64Array, uo: number, pi: Float64Array) {
  for (let k = 0; k < M; k++) {
    pi[k] = 0;
  }
  for (let r = 0; r < M; r++) {
    const b = r * M;
    const ur = ua[uo + r];
    let a0 = pi[r] + P[b + r] * ur;
    let a1 = 0;
    let a2 = 0;
    let a3 = 0;
    let j = r + 1;
    const j4 = j + ((M - j) & ~3);
    for (; j < j4; j += 4) {
      const q = b + j;
      const v = uo + j;
      const p0 = P[q];
      const p1 = P[q + 1];
      const p2 = P[q + 2];
      const p3 = P[q + 3];
      a0 += p0 * ua[v];
      a1 += p1 * ua[v + 1];
      a2 += p2 * ua[v + 2];
      a3 += p3 * ua[v + 3];
      pi[j] += p0 * ur;
      pi[j + 1] += p1 * ur;
      pi[j + 2] += p2 * ur;
      pi[j + 3] += p3 * ur;
    }
    for (; j < M; j++) {
      const prj = P[b + j];
      a0 += prj * ua[uo + j];
      pi[j] += prj * ur;
    }
    pi[r] = a0 + a1 + (a2 + a3);
  }
}
