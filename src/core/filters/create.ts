/**
 * The factory and the one-shot runner over the streaming interface.
 */
import { checkInteger } from '../errors';
import { type AdaptiveFilter, resolveOptions, toFlat } from './base';
import { InverseQrRlsFilter } from './iqrrls';
import { LmsFilter } from './lms';
import { NlmsFilter } from './nlms';
import { QrRlsFilter } from './qrrls';
import { RlsFilter } from './rls';
import type { FilterChunk, FilterOptions, Health, Real } from './types';

/** Creates a streaming adaptive filter of the chosen algorithm. */
export function createFilter(options: FilterOptions): AdaptiveFilter {
  const o = resolveOptions(options);
  switch (o.algorithm) {
    case 'qr-rls':
      return new QrRlsFilter(options);
    case 'inverse-qr-rls':
      return new InverseQrRlsFilter(options);
    case 'rls':
    case 'rls-textbook':
      return new RlsFilter(options);
    case 'nlms':
      return new NlmsFilter(options);
    default:
      return new LmsFilter(options);
  }
}

/** A whole run: the chunk outputs over the full signal plus the final weights and health. */
export interface FilterRun extends FilterChunk {
  /** w(N) (interleaved when complex). */
  weights: Float64Array;
  health: Health;
}

/** Options of {@link runFilter}: the filter's plus the chunk size used internally. */
export interface RunOptions extends FilterOptions {
  /** Samples per chunk (default: the whole signal in one chunk). */
  chunkSize?: number;
}

/**
 * Runs a new filter over the whole of x and d (see AdaptiveFilter.process for the layouts).
 * Checks that M does not exceed the signal length.
 */
export function runFilter(x: unknown, d: unknown, options: RunOptions): FilterRun {
  const o = resolveOptions(options);
  const cx = o.complex;
  const f32 = o.precision === 'float32';
  const X = toFlat('x', x, f32, cx, o.input === 'regressor' ? (cx ? 2 : 1) * o.taps : undefined);
  const D = toFlat('d', d, f32, cx);
  const W = cx ? 2 : 1;
  const N = D.length / W;
  if (o.input === 'transversal' && X.length === D.length && o.taps > N) {
    throw new RangeError(`options.taps (M = ${o.taps}) exceeds the signal length ${N}`);
  }
  const filter = createFilter(options);
  const chunk =
    options.chunkSize === undefined ? N : checkInteger('options.chunkSize', options.chunkSize, 1);
  if (chunk >= N) {
    const r = filter.process(X, D);
    return { ...r, weights: filter.weights(), health: filter.health() };
  }
  const per = (o.input === 'transversal' ? 1 : o.taps) * W;
  if (X.length !== N * per) {
    // Let process() produce the detailed message.
    filter.process(X, D);
  }
  const mk = (l: number): Real => (f32 ? new Float32Array(l) : new Float64Array(l));
  const y = mk(N * W);
  const e = mk(N * W);
  const ep = mk(N * W);
  const g = mk(N);
  const trajParts: Float64Array[] = [];
  const idxParts: Float64Array[] = [];
  for (let s = 0; s < N; s += chunk) {
    const n = Math.min(chunk, N - s);
    const r = filter.process(X.subarray(s * per, (s + n) * per), D.subarray(s * W, (s + n) * W));
    y.set(r.y, s * W);
    e.set(r.e, s * W);
    ep.set(r.ePost, s * W);
    g.set(r.gamma, s);
    trajParts.push(r.trajectory);
    idxParts.push(r.trajectoryIndex);
  }
  return {
    start: 0,
    length: N,
    y,
    e,
    ePost: ep,
    gamma: g,
    trajectory: concat(trajParts),
    trajectoryIndex: concat(idxParts),
    weights: filter.weights(),
    health: filter.health()
  };
}

function concat(parts: Float64Array[]): Float64Array {
  const out = new Float64Array(parts.reduce((a, p) => a + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}
