/**
 * Configurations: helpers that build x and d from the user's arrays for the four classic uses
 * of an adaptive filter (Haykin, Adaptive Filter Theory, 4th ed., Introduction §5 (the four
 * classes of application: identification, inverse modelling, prediction, interference
 * cancelling) (from memory)), and the equalizer with training and decision-directed modes.
 */
import { checkInteger, describe } from '../errors';
import { toFlat } from './base';
import { createFilter, runFilter, type FilterRun } from './create';
import type { FilterOptions, Real } from './types';

export interface Configured {
  x: Float64Array;
  d: Float64Array;
}

function pair(nameA: string, a: unknown, nameB: string, b: unknown, complex: boolean): Configured {
  const x = toFlat(nameA, a, false, complex) as Float64Array;
  const d = toFlat(nameB, b, false, complex) as Float64Array;
  if (x.length !== d.length) {
    const w = complex ? 2 : 1;
    throw new RangeError(
      `${nameA} has length ${x.length / w} but ${nameB} has length ${d.length / w}; they must match`
    );
  }
  return { x, d };
}

/** System identification: the unknown system's input drives the filter, its output is d. */
export function systemIdentification(input: unknown, output: unknown, complex = false): Configured {
  return pair('input', input, 'output', output, complex);
}

/**
 * Noise cancellation: the reference sensor (correlated with the interference only) drives the
 * filter and the primary sensor is d; the error e = d − y is the cleaned signal.
 */
export function noiseCancellation(
  reference: unknown,
  primary: unknown,
  complex = false
): Configured {
  return pair('reference', reference, 'primary', primary, complex);
}

/**
 * Linear prediction `delay` steps ahead (default 1, one-step): x(n) = s(n − delay), d(n) = s(n);
 * the weights are the predictor coefficients and e the prediction error.
 */
export function linearPrediction(signal: unknown, delay = 1, complex = false): Configured {
  const s = toFlat('signal', signal, false, complex) as Float64Array;
  const W = complex ? 2 : 1;
  const n = s.length / W;
  checkInteger('delay', delay, 1, Math.max(1, n - 1));
  const x = new Float64Array(s.length);
  x.set(s.subarray(0, (n - delay) * W), delay * W);
  return { x, d: Float64Array.from(s) };
}

/** Named constellations (points interleaved re, im). */
export type Constellation = 'bpsk' | 'qpsk' | 'pam4' | 'qam16';

export function constellationPoints(
  c: Constellation | ArrayLike<number>,
  complex: boolean
): Float64Array {
  if (typeof c !== 'string') {
    const p = Float64Array.from(c);
    if (p.length === 0 || (complex && p.length % 2 !== 0)) {
      throw new RangeError(`constellation must be a non-empty list of points, got ${describe(c)}`);
    }
    return p;
  }
  const s = Math.SQRT1_2;
  const pts: Record<Constellation, number[]> = {
    bpsk: [-1, 0, 1, 0],
    qpsk: [s, s, -s, s, -s, -s, s, -s],
    pam4: [-3, 0, -1, 0, 1, 0, 3, 0],
    qam16: []
  };
  for (const a of [-3, -1, 1, 3]) {
    for (const b of [-3, -1, 1, 3]) {
      pts.qam16.push(a, b);
    }
  }
  const p = pts[c];
  if (!p) {
    throw new RangeError(
      `constellation must be one of bpsk, qpsk, pam4, qam16 or a list of points, got ${describe(c)}`
    );
  }
  if (!complex) {
    if (c === 'qpsk' || c === 'qam16') {
      throw new RangeError(`constellation ${c} needs a complex filter (options.complex = true)`);
    }
    return Float64Array.from(p.filter((_, k) => k % 2 === 0));
  }
  return Float64Array.from(p);
}

/** Index of the nearest constellation point to (re, im). */
function nearest(pts: Float64Array, complex: boolean, re: number, im: number): number {
  let best = 0;
  let bd = Infinity;
  const W = complex ? 2 : 1;
  for (let k = 0; k < pts.length / W; k++) {
    const dr = re - pts[W * k];
    const di = complex ? im - pts[W * k + 1] : 0;
    const dd = dr * dr + di * di;
    if (dd < bd) {
      bd = dd;
      best = k;
    }
  }
  return best;
}

export interface EqualizerOptions extends FilterOptions {
  /** Decision delay Δ: y(n) estimates the symbol sent at n − Δ. */
  delay: number;
  /** After the training symbols, keep adapting on the decisions (default false: weights frozen). */
  decisionDirected?: boolean;
  /** Constellation for decisions (default bpsk real, qpsk complex). */
  constellation?: Constellation | ArrayLike<number>;
  /** The full transmitted sequence, when known, to count symbol errors after the training part. */
  symbols?: unknown;
}

export interface EqualizerResult extends FilterRun {
  /** Decision for each n ≥ Δ (index n − Δ), interleaved when complex. */
  decisions: Float64Array;
  /** Number of training symbols used. */
  trainingLength: number;
  /** Symbol errors and rate after the training part (null without `symbols`). */
  symbolErrors: number | null;
  symbolErrorRate: number | null;
  /** Symbols counted for the rate. */
  symbolsCounted: number;
}

/**
 * Adaptive equalization: d(n) = training(n − Δ) while n − Δ < training length (d = 0 before Δ,
 * the symbols before the start being taken as zero); afterwards either decision-directed
 * adaptation, d(n) = dec(y(n)), or the weights frozen at the end of training. Decisions are the
 * nearest constellation points. Transversal input only (the received signal).
 */
export function equalize(
  received: unknown,
  training: unknown,
  options: EqualizerOptions
): EqualizerResult {
  const cx = options.complex ?? false;
  const W = cx ? 2 : 1;
  const x = toFlat('received', received, false, cx) as Float64Array;
  const t = toFlat('training', training, false, cx) as Float64Array;
  const N = x.length / W;
  const Nt = t.length / W;
  const delay = checkInteger('options.delay', options.delay, 0, Math.max(0, N - 1));
  if ((options.input ?? 'transversal') !== 'transversal') {
    throw new RangeError(
      `options.input must be 'transversal' for equalization, got ${describe(options.input)}`
    );
  }
  const pts = constellationPoints(options.constellation ?? (cx ? 'qpsk' : 'bpsk'), cx);
  const trainEnd = Math.min(N, delay + Nt); // samples n < trainEnd use training symbols
  const dTrain = new Float64Array(trainEnd * W);
  dTrain.set(t.subarray(0, (trainEnd - delay) * W), delay * W);
  const { decisionDirected = false, constellation: _c, symbols: _s, delay: _d, ...fopts } = options;
  const filt = createFilter(fopts);
  const first = filt.process(x.subarray(0, trainEnd * W), dTrain);
  const y = new Float64Array(N * W);
  const e = new Float64Array(N * W);
  const ep = new Float64Array(N * W);
  const g = new Float64Array(N);
  y.set(first.y, 0);
  e.set(first.e, 0);
  ep.set(first.ePost, 0);
  g.set(first.gamma, 0);
  const trajParts: Float64Array[] = [first.trajectory];
  const idxParts: Float64Array[] = [first.trajectoryIndex];
  if (trainEnd < N) {
    if (decisionDirected) {
      // One sample at a time: d(n) is the decision on y(n) = w(n−1)ᴴu(n), which the filter
      // computes first; a one-sample chunk with d = decision gives exactly that update.
      const xb = new Float64Array(W);
      const db = new Float64Array(W);
      for (let n = trainEnd; n < N; n++) {
        xb[0] = x[W * n];
        if (cx) {
          xb[1] = x[W * n + 1];
        }
        // y(n) = w(n−1)ᴴu(n), computed here to make the decision before the update.
        const w = filt.weights();
        let yr = 0;
        let yi = 0;
        for (let k = 0; k < filt.M; k++) {
          const idx = n - k;
          if (idx < 0) {
            break;
          }
          const ur = x[W * idx];
          const ui = cx ? x[W * idx + 1] : 0;
          const wr = w[W * k];
          const wi = cx ? w[W * k + 1] : 0;
          yr += wr * ur + wi * ui;
          yi += wr * ui - wi * ur;
        }
        const k = nearest(pts, cx, yr, yi);
        db[0] = pts[W * k];
        if (cx) {
          db[1] = pts[W * k + 1];
        }
        const r = filt.process(xb, db);
        y.set(r.y, W * n);
        e.set(r.e, W * n);
        ep.set(r.ePost, W * n);
        g[n] = r.gamma[0];
        trajParts.push(r.trajectory);
        idxParts.push(r.trajectoryIndex);
      }
    } else {
      const w = filt.weights();
      for (let n = trainEnd; n < N; n++) {
        let yr = 0;
        let yi = 0;
        for (let k = 0; k < filt.M && n - k >= 0; k++) {
          const ur = x[W * (n - k)];
          const ui = cx ? x[W * (n - k) + 1] : 0;
          const wr = w[W * k];
          const wi = cx ? w[W * k + 1] : 0;
          yr += wr * ur + wi * ui;
          yi += wr * ui - wi * ur;
        }
        y[W * n] = yr;
        if (cx) {
          y[W * n + 1] = yi;
        }
        g[n] = 1;
      }
    }
  }
  // decisions and errors against the transmitted symbols
  const decisions = new Float64Array(Math.max(0, N - delay) * W);
  for (let n = delay; n < N; n++) {
    const k = nearest(pts, cx, y[W * n], cx ? y[W * n + 1] : 0);
    decisions[W * (n - delay)] = pts[W * k];
    if (cx) {
      decisions[W * (n - delay) + 1] = pts[W * k + 1];
    }
    if (n >= trainEnd) {
      // the a-priori error against the decision (no reference after training)
      e[W * n] = decisions[W * (n - delay)] - y[W * n];
      if (cx) {
        e[W * n + 1] = decisions[W * (n - delay) + 1] - y[W * n + 1];
      }
    }
  }
  let symbolErrors: number | null = null;
  let symbolErrorRate: number | null = null;
  let counted = 0;
  if (options.symbols !== undefined) {
    const s = toFlat('options.symbols', options.symbols, false, cx) as Float64Array;
    symbolErrors = 0;
    for (let m = Nt; m < Math.min(s.length / W, N - delay); m++) {
      const ks = nearest(pts, cx, s[W * m], cx ? s[W * m + 1] : 0);
      const kd = nearest(pts, cx, decisions[W * m], cx ? decisions[W * m + 1] : 0);
      counted++;
      if (ks !== kd) {
        symbolErrors++;
      }
    }
    symbolErrorRate = counted > 0 ? symbolErrors / counted : null;
  }
  const cat = (parts: Float64Array[]) => {
    const out = new Float64Array(parts.reduce((a, p) => a + p.length, 0));
    let o = 0;
    for (const p of parts) {
      out.set(p, o);
      o += p.length;
    }
    return out;
  };
  return {
    start: 0,
    length: N,
    y: y as Real,
    e,
    ePost: ep,
    gamma: g,
    trajectory: cat(trajParts),
    trajectoryIndex: cat(idxParts),
    weights: filt.weights(),
    health: filt.health(),
    decisions,
    trainingLength: trainEnd - delay,
    symbolErrors,
    symbolErrorRate,
    symbolsCounted: counted
  };
}

/** Convenience: runs a configuration's x and d through a new filter. */
export function runConfigured(c: Configured, options: FilterOptions): FilterRun {
  return runFilter(c.x, c.d, options);
}
