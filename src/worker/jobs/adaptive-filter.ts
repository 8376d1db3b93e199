/**
 * The adaptive-filter job: builds x and d from the configuration (the core's configuration
 * helpers), runs the core filter chunk by chunk (a checkpoint between chunks: progress, cancel),
 * K×N sources as K independent trials, and reads the figures off the (ensemble) learning curve
 * with the core's metrics. Numerical breakdown is a warning with its sample index; caller
 * mistakes throw where they are found.
 */
import {
  createFilter,
  equalize,
  linearPrediction,
  noiseCancellation,
  systemIdentification,
  type FilterOptions
} from '../../core/filters';
import {
  MovingAverageFill,
  convergenceTime,
  ensembleAverage,
  misadjustment,
  movingAverage,
  squaredError
} from '../../core/metrics';
import type {
  AdaptiveFilterFigures,
  AdaptiveFilterResult,
  AdaptiveFilterSpec,
  ArrayData,
  JobWarning
} from '../protocol';
import { rowOf, signalShape } from './arrays';
import { keepWarm } from './warm-filters';
import type { JobContext } from './context';

/** The core filter options of a spec (one place to follow the core's option names). */
export function filterOptions(spec: AdaptiveFilterSpec, complex: boolean): FilterOptions {
  return {
    algorithm: spec.algorithm,
    taps: spec.taps,
    complex,
    precision: spec.precision,
    lambda: spec.lambda,
    delta: spec.delta,
    mu: spec.mu,
    epsilon: spec.epsilon,
    keepWeightsEvery: spec.keepEvery ?? 0
  };
}

/** Default samples per chunk: about 2²³ multiply-adds, a few milliseconds on this machine. */
export function defaultChunk(spec: AdaptiveFilterSpec): number {
  const M = spec.taps;
  const quadratic = spec.algorithm !== 'lms' && spec.algorithm !== 'nlms';
  const cost = quadratic ? M * M + 8 * M : 4 * M + 16;
  return Math.min(1 << 17, Math.max(256, Math.round((1 << 23) / cost)));
}

/** The trials' x and d rows (interleaved when complex), from the configuration. */
interface Sources {
  complex: boolean;
  K: number;
  N: number;
  x: Float64Array[];
  d: Float64Array[];
}

function sources(spec: AdaptiveFilterSpec): Sources {
  const c = spec.configuration;
  if (c === null || typeof c !== 'object') {
    throw new TypeError('configuration must be an object with a kind');
  }
  const pairOf = (
    nameA: string,
    a: ArrayData,
    nameB: string,
    b: ArrayData,
    build: (
      x: Float64Array,
      d: Float64Array,
      complex: boolean
    ) => { x: Float64Array; d: Float64Array }
  ): Sources => {
    const sa = signalShape(nameA, a);
    const sb = signalShape(nameB, b);
    if (sa.K !== sb.K || sa.N !== sb.N) {
      throw new RangeError(
        `${nameA} has shape [${a.shape.join(', ')}] but ${nameB} has shape [${b.shape.join(', ')}]; they must match`
      );
    }
    const complex = a.complex || b.complex;
    const x: Float64Array[] = [];
    const d: Float64Array[] = [];
    for (let k = 0; k < sa.K; k++) {
      const p = build(rowOf(a, k, sa.N, complex), rowOf(b, k, sa.N, complex), complex);
      x.push(p.x);
      d.push(p.d);
    }
    return { complex, K: sa.K, N: sa.N, x, d };
  };
  switch (c.kind) {
    case 'system-identification':
      return pairOf('input', c.input, 'output', c.output, systemIdentification);
    case 'noise-cancellation':
      return pairOf('reference', c.reference, 'primary', c.primary, noiseCancellation);
    case 'linear-prediction': {
      const s = signalShape('signal', c.signal);
      const x: Float64Array[] = [];
      const d: Float64Array[] = [];
      for (let k = 0; k < s.K; k++) {
        const p = linearPrediction(
          rowOf(c.signal, k, s.N, c.signal.complex),
          c.delay,
          c.signal.complex
        );
        x.push(p.x);
        d.push(p.d);
      }
      return { complex: c.signal.complex, K: s.K, N: s.N, x, d };
    }
    default:
      throw new RangeError(
        `configuration.kind must be system-identification, noise-cancellation, linear-prediction ` +
          `or equalization, got ${JSON.stringify((c as { kind: unknown }).kind)}`
      );
  }
}

/** Runs an adaptive-filter spec. */
export async function runAdaptiveFilter(
  spec: AdaptiveFilterSpec,
  ctx: JobContext
): Promise<AdaptiveFilterResult> {
  if (spec.configuration?.kind === 'equalization') {
    return runEqualizer(spec, ctx);
  }
  const src = sources(spec);
  const { complex, K, N } = src;
  const M = spec.taps;
  if (Number.isInteger(M) && M > N) {
    throw new RangeError(`taps M = ${M} is longer than the signal (${N} samples)`);
  }
  const opts = filterOptions(spec, complex);
  const probe = createFilter(opts); // checks every option before any work
  const f32 = probe.f32;
  const W = complex ? 2 : 1;
  const L = probe.weightLength;
  const keep = opts.keepWeightsEvery ?? 0;
  const rows = keep > 0 ? Math.floor(N / keep) : 0;
  const chunk = spec.chunkSize === undefined ? defaultChunk(spec) : checkChunk(spec.chunkSize);
  const y = new Float64Array(K * N * W);
  const e = new Float64Array(K * N * W);
  const weights = new Float64Array(K * L);
  const traj = new Float64Array(K * rows * L);
  const trajIndex = new Float64Array(rows);
  const trajIndexScratch = new Float64Array(rows); // trials after the first (same indices)
  const mk = (n: number) => (f32 ? new Float32Array(n) : new Float64Array(n));
  const cn = Math.min(chunk, N);
  // scratch for the outputs not returned (and, in float32, for y and e before widening)
  const ePost = mk(cn * W);
  const gamma = mk(cn);
  const y32 = f32 ? mk(cn * W) : null;
  const e32 = f32 ? mk(cn * W) : null;
  const warnings: JobWarning[] = [];
  // one trial's learning curve |e(n)|² and its smoothed copy are made chunk by chunk, so that
  // they can be sent ahead (an ensemble's mean is known at the end)
  const curve1 = K === 1 ? new Float64Array(N) : null;
  const window = figureWindow(spec, N);
  const smoothing =
    curve1 && window > 1 && N > 0 ? new MovingAverageFill(curve1, Math.min(window, N)) : null;
  const total = K * N;
  let energyD = 0;
  let energyE = 0;
  for (let k = 0; k < K; k++) {
    const filt = k === 0 ? probe : createFilter(opts);
    const xk = f32 ? Float32Array.from(src.x[k]) : src.x[k];
    const dk = f32 ? Float32Array.from(src.d[k]) : src.d[k];
    let trajRow = k * rows;
    for (let s = 0; s < N; s += chunk) {
      const n = Math.min(chunk, N - s);
      const yo = (y32 ?? y.subarray((k * N + s) * W, (k * N + s + n) * W)) as Float64Array;
      const eo = (e32 ?? e.subarray((k * N + s) * W, (k * N + s + n) * W)) as Float64Array;
      const r = filt.process(xk.subarray(s * W, (s + n) * W), dk.subarray(s * W, (s + n) * W), {
        y: yo,
        e: eo,
        ePost,
        gamma,
        trajectory: traj.subarray(trajRow * L),
        trajectoryIndex: (k === 0 ? trajIndex : trajIndexScratch).subarray(trajRow - k * rows)
      });
      if (y32 && e32) {
        y.set(y32.subarray(0, n * W), (k * N + s) * W);
        e.set(e32.subarray(0, n * W), (k * N + s) * W);
      }
      trajRow += r.trajectoryIndex.length;
      const filled = (k * N + s + n) * W;
      ctx.part?.('output', y, filled);
      ctx.part?.('error', e, filled);
      if (curve1) {
        squaredError(e.subarray(s * W, (s + n) * W), complex, curve1.subarray(s, s + n));
        ctx.part?.('learningCurve', curve1, s + n);
        if (smoothing) {
          // (advanced whether or not the runner takes parts: the figures read it)
          const done = smoothing.advance(s + n);
          ctx.part?.('learningCurveSmoothed', smoothing.out, done);
        }
      }
      await ctx.checkpoint(k * N + s + n, total, K > 1 ? `trial ${k + 1} of ${K}` : 'filtering');
    }
    weights.set(filt.weights(), k * L);
    for (const ev of filt.health().events) {
      warnings.push({
        kind: ev.kind,
        message: ev.message,
        index: ev.index,
        ...(K > 1 ? { trial: k } : {})
      });
    }
    const dk64 = src.d[k];
    for (let i = 0; i < N * W; i++) {
      energyD += dk64[i] * dk64[i];
    }
  }
  keepWarm(opts);
  const curves = curve1 ?? squaredError(e, complex); // K·N values, trial-major
  for (let i = 0; i < curves.length; i++) {
    energyE += curves[i];
  }
  const band = K > 1 ? ensembleAverage(curves, { K }) : null;
  const curve = band ? band.mean : curves;
  let smoothed: Float64Array | null = null;
  const figures = readFigures(
    spec,
    curve,
    N,
    warnings,
    sm => (smoothed = sm === curve ? null : sm),
    smoothing?.out
  );
  figures.errorReductionDb = energyE > 0 ? 10 * Math.log10(energyD / energyE) : null;
  const shape = (...s: number[]) => (K > 1 ? [K, ...s] : s);
  return {
    kind: 'adaptive-filter',
    status: warnings.length ? 'warning' : 'ok',
    warnings,
    algorithm: spec.algorithm,
    complex,
    K,
    N,
    taps: M,
    output: { data: y, shape: shape(N), complex },
    error: { data: e, shape: shape(N), complex },
    weights: { data: weights, shape: shape(M), complex },
    trajectory: rows > 0 ? { data: traj, shape: shape(rows, M), complex } : null,
    trajectoryIndex: rows > 0 ? trajIndex : null,
    learningCurve: curve,
    learningCurveSmoothed: smoothed,
    learningCurveLower: band ? band.lower : null,
    learningCurveUpper: band ? band.upper : null,
    figures,
    decisions: null
  };
}

function checkChunk(c: unknown): number {
  if (typeof c !== 'number' || !Number.isInteger(c) || c < 1) {
    throw new RangeError(`chunkSize must be an integer ≥ 1, got ${String(c)}`);
  }
  return c;
}

/**
 * Figures read off a learning curve: final MSE (mean over the last `window` samples), steady
 * state (mean over the tail), convergence time (±marginDb, smoothed by `window`), misadjustment
 * against a stated J_min (Haykin, Adaptive Filter Theory, 4th ed., §5.4, 𝓜 = J_ex(∞)/J_min).
 * A figure that cannot be read (a curve with NaN after a breakdown, a zero steady state) is null.
 */
export function readFigures(
  spec: Pick<AdaptiveFilterSpec, 'window' | 'tail' | 'marginDb' | 'fs' | 'minMse'>,
  curve: Float64Array,
  N: number,
  warnings: JobWarning[],
  keepSmoothed?: (smoothed: Float64Array) => void,
  smoothedAlready?: Float64Array
): AdaptiveFilterFigures {
  const window = figureWindow(spec, N);
  const tailIn = spec.tail ?? 0.1;
  const tail = tailIn > 0 && tailIn < 1 ? Math.max(1, Math.round(tailIn * N)) : tailIn;
  if (!Number.isInteger(tail) || tail < 1 || tail > N) {
    throw new RangeError(
      `tail must be a fraction in (0, 1) or a count in [1, ${N}], got ${String(spec.tail)}`
    );
  }
  const marginDb = spec.marginDb ?? 1;
  if (!(marginDb > 0) || !Number.isFinite(marginDb)) {
    throw new RangeError(`marginDb must be > 0, got ${String(spec.marginDb)}`);
  }
  if (spec.fs !== undefined && !(spec.fs > 0 && Number.isFinite(spec.fs))) {
    throw new RangeError(`fs must be a sample rate > 0 in Hz, got ${String(spec.fs)}`);
  }
  if (spec.minMse !== undefined && !(spec.minMse > 0 && Number.isFinite(spec.minMse))) {
    throw new RangeError(`minMse must be > 0, got ${String(spec.minMse)}`);
  }
  const db = (v: number) => (Number.isFinite(v) && v >= 0 ? 10 * Math.log10(v) : null);
  let finite = true;
  for (let i = 0; i < curve.length; i++) {
    const v = curve[i];
    if (v - v !== 0) {
      finite = false;
      break;
    }
  }
  let finalMse = NaN;
  let steady = NaN;
  let conv: number | null = null;
  if (finite && N > 0) {
    // one smoothing serves the final MSE and the convergence time (convergenceTime with
    // `window` smooths the same way)
    const sm = window > 1 ? (smoothedAlready ?? movingAverage(curve, Math.min(window, N))) : curve;
    keepSmoothed?.(sm);
    finalMse = sm[N - 1];
    // the core's steadyStateMse (same sum, same order) without its finiteness pass, done above
    steady = tailMean(curve, tail);
    const steadySm = tailMean(sm, tail);
    if (steadySm > 0) {
      const t = convergenceTime(sm, { marginDb, steadyState: steadySm });
      if (t < 0) {
        warnings.push({
          kind: 'not-converged',
          message: `the smoothed learning curve does not stay within ±${marginDb} dB of its steady state`
        });
      } else {
        conv = t;
      }
    }
  }
  const fin = (v: number) => (Number.isFinite(v) ? v : null);
  return {
    finalMseDb: db(finalMse),
    steadyStateMseDb: db(steady),
    convergenceSamples: conv,
    convergenceSeconds: conv !== null && spec.fs !== undefined ? conv / spec.fs : null,
    misadjustment:
      spec.minMse !== undefined && Number.isFinite(steady)
        ? fin(misadjustment(steady, spec.minMse))
        : null,
    errorReductionDb: null,
    symbolErrorRate: null,
    window,
    tail,
    marginDb
  };
}

/**
 * The learning curve's smoothing window for the figures, in samples: the spec's, or N/50 within
 * [1, 1024] (a window longer than the curve averages all of it).
 */
function figureWindow(spec: Pick<AdaptiveFilterSpec, 'window'>, N: number): number {
  const window = spec.window ?? Math.min(1024, Math.max(1, Math.round(N / 50)));
  if (!Number.isInteger(window) || window < 1) {
    throw new RangeError(`window must be an integer ≥ 1, got ${String(spec.window)}`);
  }
  return window;
}

/** Mean of the last `tail` values, summed in order (as the core's steadyStateMse). */
function tailMean(c: Float64Array, tail: number): number {
  let s = 0;
  for (let i = c.length - tail; i < c.length; i++) {
    s += c[i];
  }
  return s / tail;
}

/** Equalization (1-D sources): the core's equalizer in one call, then the same figures. */
async function runEqualizer(
  spec: AdaptiveFilterSpec,
  ctx: JobContext
): Promise<AdaptiveFilterResult> {
  const c = spec.configuration;
  if (c.kind !== 'equalization') {
    throw new Error('unreachable');
  }
  const sr = signalShape('received', c.received);
  const st = signalShape('training', c.training);
  if (sr.K !== 1 || st.K !== 1) {
    throw new RangeError('equalization takes 1-D received and training sequences');
  }
  const complex = c.received.complex || c.training.complex;
  const N = sr.N;
  if (Number.isInteger(spec.taps) && spec.taps > N) {
    throw new RangeError(`taps M = ${spec.taps} is longer than the signal (${N} samples)`);
  }
  let training = rowOf(c.training, 0, st.N, complex);
  if (c.trainingLength !== undefined) {
    if (!Number.isInteger(c.trainingLength) || c.trainingLength < 0 || c.trainingLength > st.N) {
      throw new RangeError(
        `trainingLength must be an integer in [0, ${st.N}] (the training sequence's length), got ${String(c.trainingLength)}`
      );
    }
    training = training.subarray(0, c.trainingLength * (complex ? 2 : 1));
  }
  await ctx.checkpoint(0, N, 'equalizing');
  const r = equalize(rowOf(c.received, 0, N, complex), training, {
    ...filterOptions(spec, complex),
    delay: c.delay,
    decisionDirected: c.decisionDirected,
    constellation: c.constellation,
    symbols: c.symbols
      ? rowOf(c.symbols, 0, signalShape('symbols', c.symbols).N, complex)
      : undefined
  });
  await ctx.checkpoint(N, N, 'equalizing');
  keepWarm(filterOptions(spec, complex));
  const warnings: JobWarning[] = r.health.events.map(ev => ({
    kind: ev.kind,
    message: ev.message,
    index: ev.index
  }));
  const e = Float64Array.from(r.e);
  const curve = squaredError(e, complex);
  let smoothed: Float64Array | null = null;
  const figures = readFigures(
    spec,
    curve,
    N,
    warnings,
    sm => (smoothed = sm === curve ? null : sm)
  );
  figures.symbolErrorRate = r.symbolErrorRate;
  const M = spec.taps;
  const rows = r.trajectoryIndex.length;
  return {
    kind: 'adaptive-filter',
    status: warnings.length ? 'warning' : 'ok',
    warnings,
    algorithm: spec.algorithm,
    complex,
    K: 1,
    N,
    taps: M,
    output: { data: Float64Array.from(r.y), shape: [N], complex },
    error: { data: e, shape: [N], complex },
    weights: { data: r.weights, shape: [M], complex },
    trajectory: rows > 0 ? { data: r.trajectory, shape: [rows, M], complex } : null,
    trajectoryIndex: rows > 0 ? r.trajectoryIndex : null,
    learningCurve: curve,
    learningCurveSmoothed: smoothed,
    learningCurveLower: null,
    learningCurveUpper: null,
    figures,
    decisions: r.decisions
  };
}
