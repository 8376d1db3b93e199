/**
 * Long series drawn through the core's M4 envelope (first, last, minimum and maximum sample of
 * each pixel column): at most four points per column reach plotly, and the envelope is rebuilt
 * for the visible range on every zoom and pan, so a zoom to fewer samples than four per column
 * draws every sample. The values plotted and exported come from the core (`envelope`, `toDb`);
 * this module only picks ranges and maps sample indices to the axis.
 */
import { envelope, ScanCopies, toDb, type EnvelopePart } from '../../core';
import type { ResultArray } from '../../model/workbench/runs';

/** What of a sample is drawn: a component, the magnitude, the phase (radians). */
export type LinePart = 'real' | 'imag' | 'abs' | 'phase';

/** A strided view of one series of a result (a row of a K×N array, a tap of a trajectory). */
export interface LineSignal {
  data: Float64Array;
  complex: boolean;
  n: number;
  stride: number;
  offset: number;
}

/** A long series of a plot. */
export interface LineSource {
  /** Legend name. */
  name: string;
  signal: LineSignal;
  part: LinePart;
  /** Draw 10·log10 of the values (they are powers). */
  db?: boolean;
  /** x of each sample when not uniform (increasing, length n); otherwise x = index · dx. */
  xTable?: Float64Array;
  /** Axis units per sample for uniform series (1/fs for seconds, 1 for samples). */
  dx: number;
  /** Palette index. */
  color: number;
  dash?: 'dot' | 'dash';
  /** Fill to the previous trace (a band's upper edge). */
  fill?: boolean;
  /** Thin, pale line (a band edge). */
  faint?: boolean;
  /** Second y-axis (lower subplot). */
  lower?: boolean;
  /** Hidden from the legend. */
  noLegend?: boolean;
}

/** A visible x-range in axis units, or null for everything. */
export type XRange = readonly [number, number] | null;

/** Row `row` of a result array of shape [N] or [K, N] (samples along the last axis). */
export function rowOf(a: ResultArray, row = 0): LineSignal {
  const n = a.shape.length === 0 ? 1 : a.shape[a.shape.length - 1];
  const rows = a.shape.length > 1 ? a.data.length / (a.complex ? 2 : 1) / n : 1;
  if (row < 0 || row >= rows) {
    throw new RangeError(`row ${row} is outside this array's ${rows} rows`);
  }
  return { data: a.data, complex: a.complex, n, stride: 1, offset: row * n };
}

/** Number of rows (trials, channels) of a result array; 1 for a 1-D array. */
export function rowCount(a: ResultArray): number {
  if (a.shape.length < 2) {
    return 1;
  }
  return a.shape.slice(0, -1).reduce((p, q) => p * q, 1);
}

/** Lower bound: first index i with t[i] ≥ v (t increasing). */
function lowerBound(t: Float64Array, v: number): number {
  let lo = 0;
  let hi = t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid] < v) {
      lo = mid + 1;
    } else {
      hi = mid;
    }
  }
  return lo;
}

/**
 * The samples [i0, i1) of a series that a visible x-range shows, with one sample either side so
 * the line runs to the plot's edges.
 */
export function indexRange(src: LineSource, range: XRange): [number, number] {
  const n = src.signal.n;
  if (!range || n === 0) {
    return [0, n];
  }
  const [a, b] = range[0] <= range[1] ? range : [range[1], range[0]];
  let i0: number;
  let i1: number;
  if (src.xTable) {
    i0 = lowerBound(src.xTable, a) - 1;
    i1 = lowerBound(src.xTable, b) + 1;
  } else {
    i0 = Math.floor(a / src.dx) - 1;
    i1 = Math.ceil(b / src.dx) + 2;
  }
  i0 = Math.max(0, Math.min(n, i0));
  i1 = Math.max(i0, Math.min(n, i1));
  return [i0, i1];
}

/**
 * The page's scan copies (core dsp/scan-copy.ts): a series of which a range of 2²⁰ samples or
 * more is drawn is copied into WebAssembly memory in idle time, 4 MiB per idle callback; its
 * later envelopes (pan, redraw, zoom out) scan the copy with SIMD, about 1.5× faster. Copies live
 * as long as their arrays, 256 MiB at most. The arrays drawn are never changed in place (run
 * results are final), so a copy stays true.
 */
const scanCopies = new ScanCopies({ schedule: whenIdle });

function whenIdle(work: () => void): void {
  if (typeof requestIdleCallback === 'function') {
    requestIdleCallback(() => work(), { timeout: 1000 });
  } else {
    setTimeout(work, 0);
  }
}

/** Points of a series to draw: x in axis units, y as drawn. */
export interface LinePoints {
  x: Float64Array;
  y: Float64Array;
  /** The sample index of each point. */
  index: Float64Array;
}

/**
 * The series' samples [i0, i1) enveloped into `columns` pixel columns (at most 4·columns
 * points; every sample when the range holds no more than that).
 */
export function linePoints(src: LineSource, i0: number, i1: number, columns: number): LinePoints {
  const s = src.signal;
  const part: EnvelopePart = src.part === 'phase' ? 'abs' : src.part;
  // the SIMD scan serves unit-stride samples and one part of complex ones, not |z|
  const simd = s.stride === 1 && (!s.complex || part !== 'abs');
  const data = simd ? scanCopies.forEnvelope(s.data, i1 - i0) : s.data;
  const env = envelope(
    { data, complex: s.complex, n: s.n, stride: s.stride, offset: s.offset },
    { columns: Math.max(1, columns), i0, i1, part: s.complex ? part : 'real' }
  );
  const count = env.count;
  const index = env.x.slice(0, count);
  let y: Float64Array = env.y.slice(0, count);
  if (src.part === 'phase' && s.complex) {
    // The phase is read at the samples the magnitude's envelope keeps (its extremes and column
    // borders); when zoomed to ≤ 4 samples per column that is every sample.
    for (let k = 0; k < count; k++) {
      const q = 2 * (s.offset + index[k] * s.stride);
      y[k] = Math.atan2(s.data[q + 1], s.data[q]);
    }
  }
  if (src.db) {
    y = toDb(y);
  }
  const x = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    x[k] = src.xTable ? src.xTable[index[k]] : index[k] * src.dx;
  }
  return { x, y, index };
}

/** Every sample of [i0, i1) as drawn (for the CSV export). */
export function fullPoints(src: LineSource, i0: number, i1: number): LinePoints {
  // An envelope of ⌈n/4⌉ columns keeps every sample (nothing to gain at ≤ 4 per column).
  return linePoints(src, i0, i1, Math.max(1, Math.ceil((i1 - i0) / 4)));
}
