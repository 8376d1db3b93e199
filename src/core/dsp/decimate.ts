/**
 * Display decimation: a per-pixel-column envelope that keeps the first, the last, the minimum and
 * the maximum sample of each column (the M4 aggregation of U. Jugel, Z. Jerzak, G. Hackenbroich
 * and V. Markl, "M4: a visualization-oriented time series data aggregation", PVLDB 7(10), 2014):
 * a line through these points draws the same pixels as a line through every sample, so every
 * extreme survives and no sample is lost between columns or between chunks.
 *
 * Columns. The visible range [i0, i1) of n = i1 − i0 samples is split into `columns` runs of
 * consecutive samples: sample i belongs to column ⌊(i − i0)·columns / n⌋, so column c holds
 * [i0 + ⌈c·n/columns⌉, i0 + ⌈(c+1)·n/columns⌉) and every sample belongs to exactly one column.
 * When n ≤ 4·columns there is nothing to gain: every sample is output as it is.
 *
 * Output. For each column, in index order and without repeating an index: its first sample, its
 * minimum and maximum (whichever comes first first), its last sample. x receives sample indices
 * (global, i0 ≤ x < i1), y the values. At most 4·columns points are written.
 *
 * Ties. The minimum (maximum) is the earliest sample holding the smallest (largest) value; −0 and
 * +0 compare equal.
 *
 * NaN. A NaN sample is a gap in the data. It is never a minimum or a maximum. A column's first and
 * last samples are output as they are, NaN included, so a gap that reaches a column border breaks
 * the drawn line there (plotly leaves a gap at a NaN); a column whose samples are all NaN gives its
 * first and last sample, both NaN. A gap lying strictly inside one column (narrower than a column)
 * is not drawn. ±Infinity are ordinary values (they can be the minimum or maximum).
 *
 * Complex data (interleaved re, im) is enveloped per component ('real', 'imag') or by magnitude
 * ('abs'). For 'abs' the extremes are found on re² + im² (same order as |z|; values whose squares
 * overflow, |z| ≳ 1.3e154, all compare as +Infinity and the earliest wins) and y is |z| =
 * hypot(re, im), NaN when either part is NaN.
 *
 * Strides follow the core's convention (DESIGN §3): element k of a real signal is
 * `x[offset + k*stride]`; of a complex signal, `x[2*(offset + k*stride)]` (re) and the next index
 * (im). The kernels check nothing and allocate nothing; `envelope` checks its arguments once and
 * allocates the outputs only when the caller did not supply them. The kernels index with int32
 * arithmetic: the typed array must hold fewer than 2³¹ elements (`envelope` and the builder refuse
 * larger ones; 2³¹ float64 samples are 16 GiB, far above any per-run memory limit).
 *
 * SIMD. When x is a scan copy (scan-copy.ts: float64 data in WebAssembly memory) and its samples
 * are consecutive, or every other number (one part of complex data), the columns are scanned by
 * column-scan.wat with the same result; everything else is scanned here.
 */
import { checkInteger, describe } from '../errors';
import { columnScannerOf, type ColumnScanner } from './scan-copy';
import { checkSignal, type CheckedSignal } from './signal';

export type EnvelopePart = 'real' | 'imag' | 'abs';

/** Largest number of points an envelope of `columns` columns writes. */
export function envelopeCapacity(columns: number): number {
  return 4 * columns;
}

// Result of one column scan (no allocation per call): relative index of the minimum and of the
// maximum (−1 when every sample was NaN) and their values.
let scanMinK = -1;
let scanMaxK = -1;
let scanMin = 0;
let scanMax = 0;

/**
 * Radius r for the block test of scanReal: below (mx − mn)/2 by more than the rounding errors of
 * c = fl(mn/2 + mx/2) (≤ u|c| plus a subnormal's lost bit), of fl(|v − c|) and of r itself
 * (u = 2⁻⁵³; 1e−15 ≈ 9u, and 1e−300 covers errors at subnormal scale). 0 (every block scanned
 * exactly) when the range is too narrow for that or when an extreme is infinite (r is NaN then).
 */
function rejectRadius(mn: number, mx: number, c: number): number {
  const r = (0.5 * mx - 0.5 * mn) * (1 - 1e-15) - 1e-15 * Math.abs(c) - 1e-300;
  return r > 0 ? r : 0;
}

/**
 * Scans `count` ≥ 1 real samples x[p], x[p + sx], … for their extremes (earliest on ties, NaN
 * skipped). Results in scanMinK, scanMaxK, scanMin, scanMax.
 */
function scanReal(x: Float64Array | Float32Array, p: number, sx: number, count: number): void {
  // Indices fit in int32 (arrays of 2³¹ elements or more are refused by `envelope` and
  // `EnvelopeBuilder.add`); saying so lets V8 index without a float-to-int check per access (the
  // column starts come from a floating division).
  p = p | 0;
  sx = sx | 0;
  count = count | 0;
  let k = 0;
  let v = x[p];
  // leading NaNs: a comparison with NaN is always false, so start from the first number
  while (v !== v) {
    k++;
    if (k === count) {
      scanMinK = -1;
      scanMaxK = -1;
      return;
    }
    p += sx;
    v = x[p];
  }
  let mn = v;
  let mx = v;
  let imn = k;
  let imx = k;
  // Eight samples at a time, one predictable branch per block: a block whose samples all lie
  // strictly inside [mn, mx] cannot hold a new extreme and is skipped; any other block is scanned
  // sample by sample as in the tail loop, so ties and NaN are treated exactly as there. The test
  // |v − c| ≥ r, c the midpoint, r a radius shrunk below the half-range by more than the rounding
  // of c, of the subtraction and of r itself (rejectRadius), never skips a sample outside
  // [mn, mx]; NaN fails it and is skipped, as it must be; r = 0 sends every block the exact way.
  let c = v;
  let r = 0;
  k++;
  p += sx;
  if (sx === 1) {
    for (; k + 7 < count; k += 8, p += 8) {
      if (
        Math.abs(x[p] - c) >= r ||
        Math.abs(x[p + 1] - c) >= r ||
        Math.abs(x[p + 2] - c) >= r ||
        Math.abs(x[p + 3] - c) >= r ||
        Math.abs(x[p + 4] - c) >= r ||
        Math.abs(x[p + 5] - c) >= r ||
        Math.abs(x[p + 6] - c) >= r ||
        Math.abs(x[p + 7] - c) >= r
      ) {
        for (let j = 0; j < 8; j++) {
          const u = x[p + j];
          if (u < mn) {
            mn = u;
            imn = k + j;
          } else if (u > mx) {
            mx = u;
            imx = k + j;
          }
        }
        c = 0.5 * mn + 0.5 * mx;
        r = rejectRadius(mn, mx, c);
      }
    }
  } else if (k + 7 < count) {
    scanStridedBlocks(x, p, sx, k, count, mn, mx, imn, imx);
    k = blockK;
    p = blockP;
    mn = scanMin;
    mx = scanMax;
    imn = scanMinK;
    imx = scanMaxK;
  }
  for (; k < count; k++, p += sx) {
    const u = x[p];
    // u < mn ≤ mx excludes u > mx; NaN fails both tests
    if (u < mn) {
      mn = u;
      imn = k;
    } else if (u > mx) {
      mx = u;
      imx = k;
    }
  }
  scanMinK = imn;
  scanMaxK = imx;
  scanMin = mn;
  scanMax = mx;
}

/**
 * scanReal's result through the SIMD scanner of a scan copy, for sx = 1 (consecutive samples) or
 * sx = 2 (the number at p, p + 2, …: lane p mod 2 of the 16-byte pairs from p − p mod 2).
 */
function scanSimd(
  f: ColumnScanner,
  x: Float64Array | Float32Array,
  p: number,
  sx: number,
  count: number
): void {
  const lane = p & 1;
  const a = sx === 1 ? f.scanReal(8 * p, count) : f.scanPair(8 * (p - lane), count, lane);
  const b = f.maxK();
  scanMinK = a;
  scanMaxK = b;
  if (a >= 0) {
    scanMin = x[p + a * sx];
    scanMax = x[p + b * sx];
  }
}

// Where scanStridedBlocks stopped (no allocation per call).
let blockK = 0;
let blockP = 0;

/**
 * The eight-at-a-time block loop of scanReal for a stride other than 1 (a function of its own so
 * that the unit-stride loop, the common case, compiles alone), from sample k at x[p] with the
 * extremes so far. Leaves the extremes in scanMin/scanMax/scanMinK/scanMaxK and the next sample
 * in blockK/blockP.
 */
function scanStridedBlocks(
  x: Float64Array | Float32Array,
  p: number,
  sx: number,
  k: number,
  count: number,
  mn: number,
  mx: number,
  imn: number,
  imx: number
): void {
  p = p | 0;
  sx = sx | 0;
  k = k | 0;
  count = count | 0;
  let c = 0.5 * mn + 0.5 * mx;
  let r = rejectRadius(mn, mx, c);
  const s2 = 2 * sx;
  const s3 = 3 * sx;
  const s4 = 4 * sx;
  const s5 = 5 * sx;
  const s6 = 6 * sx;
  const s7 = 7 * sx;
  const s8 = 8 * sx;
  for (; k + 7 < count; k += 8, p += s8) {
    if (
      Math.abs(x[p] - c) >= r ||
      Math.abs(x[p + sx] - c) >= r ||
      Math.abs(x[p + s2] - c) >= r ||
      Math.abs(x[p + s3] - c) >= r ||
      Math.abs(x[p + s4] - c) >= r ||
      Math.abs(x[p + s5] - c) >= r ||
      Math.abs(x[p + s6] - c) >= r ||
      Math.abs(x[p + s7] - c) >= r
    ) {
      for (let j = 0, q = p; j < 8; j++, q += sx) {
        const u = x[q];
        if (u < mn) {
          mn = u;
          imn = k + j;
        } else if (u > mx) {
          mx = u;
          imx = k + j;
        }
      }
      c = 0.5 * mn + 0.5 * mx;
      r = rejectRadius(mn, mx, c);
    }
  }
  blockK = k;
  blockP = p;
  scanMin = mn;
  scanMax = mx;
  scanMinK = imn;
  scanMaxK = imx;
}

/**
 * As scanReal on the squared magnitude of complex samples; q = 2·(element index) of the first
 * sample's real part, s2 = 2·stride. scanMin/scanMax hold squared magnitudes.
 */
function scanAbs2(x: Float64Array | Float32Array, q: number, s2: number, count: number): void {
  q = q | 0;
  s2 = s2 | 0;
  count = count | 0;
  let k = 0;
  let re = x[q];
  let im = x[q + 1];
  let v = re * re + im * im;
  while (v !== v) {
    k++;
    if (k === count) {
      scanMinK = -1;
      scanMaxK = -1;
      return;
    }
    q += s2;
    re = x[q];
    im = x[q + 1];
    v = re * re + im * im;
  }
  let mn = v;
  let mx = v;
  let imn = k;
  let imx = k;
  for (k++; k < count; k++) {
    q += s2;
    re = x[q];
    im = x[q + 1];
    v = re * re + im * im;
    if (v < mn) {
      mn = v;
      imn = k;
    } else if (v > mx) {
      mx = v;
      imx = k;
    }
  }
  scanMinK = imn;
  scanMaxK = imx;
  scanMin = mn;
  scanMax = mx;
}

/** |z| of the complex sample whose real part is x[q]: NaN when a part is NaN. */
function absAt(x: Float64Array | Float32Array, q: number): number {
  const re = x[q];
  const im = x[q + 1];
  return re !== re || im !== im ? NaN : Math.hypot(re, im);
}

/** ⌈a/b⌉ for non-negative integers a, b > 0, exact below 2⁵³. */
function ceilDiv(a: number, b: number): number {
  let q = Math.floor(a / b);
  // floating division can round a quotient just below an integer up to it
  if (q * b > a) {
    q--;
  }
  return q * b === a ? q : q + 1;
}

/** Start of column c of `columns` over [i0, i0 + n). */
function columnStart(i0: number, n: number, columns: number, c: number): number {
  return i0 + ceilDiv(c * n, columns);
}

/**
 * M4 envelope of real samples (or one component of complex ones, through stride and offset):
 * samples [i0, i1) of the signal whose element k is x[ox + k*sx], into `columns` columns.
 * Writes at most 4·columns points to xOut/yOut from index 0 and returns how many. Unchecked.
 */
export function m4Envelope(
  x: Float64Array | Float32Array,
  sx: number,
  ox: number,
  i0: number,
  i1: number,
  columns: number,
  xOut: Float64Array,
  yOut: Float64Array
): number {
  const n = i1 - i0;
  if (n <= 0) {
    return 0;
  }
  let w = 0;
  if (n <= 4 * columns) {
    let p = ox + i0 * sx;
    for (let i = i0; i < i1; i++) {
      xOut[w] = i;
      yOut[w] = x[p];
      w++;
      p += sx;
    }
    return w;
  }
  // A scan copy (scan-copy.ts) is scanned with SIMD when its samples are consecutive or every
  // other number (one part of complex data); same result as scanReal.
  const simd = sx === 1 || sx === 2 ? columnScannerOf(x) : undefined;
  let s = i0;
  for (let c = 0; c < columns; c++) {
    const e = columnStart(i0, n, columns, c + 1);
    const count = e - s;
    const p = ox + s * sx;
    if (simd === undefined) {
      scanReal(x, p, sx, count);
    } else {
      scanSimd(simd, x, p, sx, count);
    }
    // first sample
    xOut[w] = s;
    yOut[w] = x[p];
    w++;
    let last = s;
    if (scanMinK >= 0) {
      const lo = scanMinK < scanMaxK ? scanMinK : scanMaxK;
      const hi = scanMinK < scanMaxK ? scanMaxK : scanMinK;
      const vlo = scanMinK < scanMaxK ? scanMin : scanMax;
      const vhi = scanMinK < scanMaxK ? scanMax : scanMin;
      if (s + lo !== last) {
        last = s + lo;
        xOut[w] = last;
        yOut[w] = vlo;
        w++;
      }
      if (s + hi !== last) {
        last = s + hi;
        xOut[w] = last;
        yOut[w] = vhi;
        w++;
      }
    }
    if (e - 1 !== last) {
      xOut[w] = e - 1;
      yOut[w] = x[p + (count - 1) * sx];
      w++;
    }
    s = e;
  }
  return w;
}

/**
 * M4 envelope of the magnitude |z| of complex samples [i0, i1); element k of the signal is
 * (x[2(ox + k sx)], x[2(ox + k sx) + 1]). As `m4Envelope` otherwise. Unchecked.
 */
export function m4EnvelopeAbs(
  x: Float64Array | Float32Array,
  sx: number,
  ox: number,
  i0: number,
  i1: number,
  columns: number,
  xOut: Float64Array,
  yOut: Float64Array
): number {
  const n = i1 - i0;
  if (n <= 0) {
    return 0;
  }
  const s2 = 2 * sx;
  let w = 0;
  if (n <= 4 * columns) {
    let q = 2 * (ox + i0 * sx);
    for (let i = i0; i < i1; i++) {
      xOut[w] = i;
      yOut[w] = absAt(x, q);
      w++;
      q += s2;
    }
    return w;
  }
  let s = i0;
  for (let c = 0; c < columns; c++) {
    const e = columnStart(i0, n, columns, c + 1);
    const count = e - s;
    const q = 2 * (ox + s * sx);
    scanAbs2(x, q, s2, count);
    xOut[w] = s;
    yOut[w] = absAt(x, q);
    w++;
    let last = s;
    if (scanMinK >= 0) {
      const lo = scanMinK < scanMaxK ? scanMinK : scanMaxK;
      const hi = scanMinK < scanMaxK ? scanMaxK : scanMinK;
      if (s + lo !== last) {
        last = s + lo;
        xOut[w] = last;
        yOut[w] = absAt(x, q + lo * s2);
        w++;
      }
      if (s + hi !== last) {
        last = s + hi;
        xOut[w] = last;
        yOut[w] = absAt(x, q + hi * s2);
        w++;
      }
    }
    if (e - 1 !== last) {
      xOut[w] = e - 1;
      yOut[w] = absAt(x, q + (count - 1) * s2);
      w++;
    }
    s = e;
  }
  return w;
}

/** Largest typed-array length the kernels index (int32 arithmetic). */
const MAX_INDEXABLE = 0x7fffffff;

function checkIndexable(name: string, sig: CheckedSignal): CheckedSignal {
  if (sig.data.length > MAX_INDEXABLE) {
    throw new RangeError(
      `${name} is backed by ${sig.data.length} numbers; the envelope indexes at most ${MAX_INDEXABLE} (2³¹ − 1)`
    );
  }
  return sig;
}

export interface EnvelopeOptions {
  /** Number of pixel columns (≥ 1). */
  columns: number;
  /** Visible range [i0, i1) in sample indices; default the whole signal. */
  i0?: number;
  i1?: number;
  /** For complex signals: which envelope ('real', 'imag' or 'abs'; default 'abs'). */
  part?: EnvelopePart;
  /** Complex interleaved data when the signal is given as a bare typed array. */
  complex?: boolean;
  /** Output buffers of length ≥ 4·columns (allocated when absent). */
  x?: Float64Array;
  y?: Float64Array;
}

export interface Envelope {
  /** Sample indices of the points, increasing (the first `count` entries are valid). */
  x: Float64Array;
  /** Values at those points: samples, or |z| for complex 'abs'. */
  y: Float64Array;
  /** Number of points written. */
  count: number;
}

/**
 * The M4 envelope of a signal's samples [i0, i1) for `columns` pixel columns (see the module
 * comment for columns, ties and NaN). Checks its arguments once; the kernels allocate nothing.
 */
export function envelope(signal: unknown, options: EnvelopeOptions): Envelope {
  const sig = checkIndexable('signal', checkSignal('signal', signal, options?.complex ?? false));
  const columns = checkInteger('options.columns', options.columns, 1, 1 << 24);
  const i0 = checkInteger('options.i0', options.i0 ?? 0, 0, sig.n);
  const i1 = checkInteger('options.i1', options.i1 ?? sig.n, i0, sig.n);
  const part = options.part ?? (sig.complex ? 'abs' : 'real');
  if (part !== 'real' && part !== 'imag' && part !== 'abs') {
    throw new RangeError(`options.part must be 'real', 'imag' or 'abs', got ${describe(part)}`);
  }
  if (!sig.complex && part !== 'real') {
    throw new RangeError(`options.part ${describe(part)} needs complex data; this signal is real`);
  }
  const cap = envelopeCapacity(columns);
  const xOut = options.x ?? new Float64Array(Math.min(cap, i1 - i0));
  const yOut = options.y ?? new Float64Array(Math.min(cap, i1 - i0));
  for (const [nm, b] of [
    ['options.x', xOut],
    ['options.y', yOut]
  ] as const) {
    if (!(b instanceof Float64Array)) {
      throw new TypeError(`${nm} must be a Float64Array, got ${describe(b)}`);
    }
    if (b.length < Math.min(cap, i1 - i0)) {
      throw new RangeError(
        `${nm} has length ${b.length}; this envelope needs ${Math.min(cap, i1 - i0)} (4·columns, or the range when shorter)`
      );
    }
  }
  let count: number;
  if (!sig.complex) {
    count = m4Envelope(sig.data, sig.stride, sig.offset, i0, i1, columns, xOut, yOut);
  } else if (part === 'abs') {
    count = m4EnvelopeAbs(sig.data, sig.stride, sig.offset, i0, i1, columns, xOut, yOut);
  } else {
    count = m4Envelope(
      sig.data,
      2 * sig.stride,
      2 * sig.offset + (part === 'imag' ? 1 : 0),
      i0,
      i1,
      columns,
      xOut,
      yOut
    );
  }
  return { x: xOut, y: yOut, count };
}

/**
 * The same envelope built from chunks as they arrive (a large array read from the kernel in
 * pieces): `add` each chunk with the global index of its first sample, in any order, then `write`.
 * Once every sample of [i0, i1) has been added, `write` gives exactly what `envelope` gives on the
 * whole signal; before that it gives the envelope of what has arrived (a column's first or last
 * sample is left out until it arrives). State: 8·columns numbers, allocated once.
 */
export class EnvelopeBuilder {
  readonly i0: number;
  readonly i1: number;
  readonly columns: number;
  readonly complex: boolean;
  readonly part: EnvelopePart;
  /** Samples of [i0, i1) added so far (each counted once per `add`). */
  received = 0;
  private readonly passthrough: boolean;
  // per column: first value, last value, min index/value, max index/value (index −1: none yet)
  private readonly first: Float64Array;
  private readonly lastV: Float64Array;
  private readonly have: Uint8Array;
  private readonly minK: Float64Array;
  private readonly minV: Float64Array;
  private readonly maxK: Float64Array;
  private readonly maxV: Float64Array;
  // the values drawn at the extremes (|z| from hypot for 'abs', as the one-shot kernel gives)
  private readonly minY: Float64Array;
  private readonly maxY: Float64Array;
  private readonly starts: Float64Array;

  constructor(options: {
    i0: number;
    i1: number;
    columns: number;
    complex?: boolean;
    part?: EnvelopePart;
  }) {
    this.i0 = checkInteger('options.i0', options.i0, 0);
    this.i1 = checkInteger('options.i1', options.i1, this.i0);
    this.columns = checkInteger('options.columns', options.columns, 1, 1 << 24);
    this.complex = options.complex ?? false;
    this.part = options.part ?? (this.complex ? 'abs' : 'real');
    if (this.part !== 'real' && this.part !== 'imag' && this.part !== 'abs') {
      throw new RangeError(
        `options.part must be 'real', 'imag' or 'abs', got ${describe(this.part)}`
      );
    }
    if (!this.complex && this.part !== 'real') {
      throw new RangeError(`options.part ${describe(this.part)} needs complex data`);
    }
    const n = this.i1 - this.i0;
    this.passthrough = n <= 4 * this.columns;
    const W = this.passthrough ? n : this.columns;
    this.first = new Float64Array(W);
    this.lastV = new Float64Array(W);
    this.have = new Uint8Array(W);
    this.minK = new Float64Array(this.passthrough ? 0 : W).fill(-1);
    this.minV = new Float64Array(this.passthrough ? 0 : W);
    this.maxK = new Float64Array(this.passthrough ? 0 : W).fill(-1);
    this.maxV = new Float64Array(this.passthrough ? 0 : W);
    this.minY = new Float64Array(this.passthrough ? 0 : W);
    this.maxY = new Float64Array(this.passthrough ? 0 : W);
    this.starts = new Float64Array(this.passthrough ? 0 : W + 1);
    if (!this.passthrough) {
      for (let c = 0; c <= W; c++) {
        this.starts[c] = columnStart(this.i0, n, W, c);
      }
    }
  }

  /** Forgets every sample added (same range and columns). */
  reset(): void {
    this.received = 0;
    this.have.fill(0);
    this.minK.fill(-1);
    this.maxK.fill(-1);
  }

  /** Value of sample j of a chunk (the envelope's quantity: a component or |z|). */
  private value(sig: CheckedSignal, j: number): number {
    if (!this.complex) {
      return sig.data[sig.offset + j * sig.stride];
    }
    const q = 2 * (sig.offset + j * sig.stride);
    return this.part === 'abs' ? absAt(sig.data, q) : sig.data[q + (this.part === 'imag' ? 1 : 0)];
  }

  /**
   * Adds a chunk: its sample j has global index start + j. Samples outside [i0, i1) are ignored.
   * The chunk is a typed array (contiguous) or a `SignalView`, complex as the builder.
   */
  add(chunk: unknown, start: number): this {
    const sig = checkIndexable('chunk', checkSignal('chunk', chunk, this.complex));
    if (sig.complex !== this.complex) {
      throw new RangeError(
        `chunk is ${sig.complex ? 'complex' : 'real'} but the builder is ${this.complex ? 'complex' : 'real'}`
      );
    }
    checkInteger('start', start, 0);
    const g0 = Math.max(start, this.i0);
    const g1 = Math.min(start + sig.n, this.i1);
    if (g1 <= g0) {
      return this;
    }
    this.received += g1 - g0;
    if (this.passthrough) {
      for (let g = g0; g < g1; g++) {
        this.first[g - this.i0] = this.value(sig, g - start);
        this.have[g - this.i0] = 1;
      }
      return this;
    }
    // first column touched: the last start ≤ g0
    let c = Math.min(
      this.columns - 1,
      Math.floor(((g0 - this.i0) * this.columns) / (this.i1 - this.i0))
    );
    while (this.starts[c] > g0) {
      c--;
    }
    while (c + 1 < this.columns && this.starts[c + 1] <= g0) {
      c++;
    }
    for (; c < this.columns && this.starts[c] < g1; c++) {
      const s = this.starts[c];
      const e = this.starts[c + 1];
      const a = Math.max(s, g0);
      const b = Math.min(e, g1);
      if (a === s) {
        this.first[c] = this.value(sig, s - start);
        this.have[c] |= 1;
      }
      if (b === e) {
        this.lastV[c] = this.value(sig, e - 1 - start);
        this.have[c] |= 2;
      }
      if (this.complex && this.part === 'abs') {
        scanAbs2(sig.data, 2 * (sig.offset + (a - start) * sig.stride), 2 * sig.stride, b - a);
      } else {
        const W = this.complex ? 2 : 1;
        scanReal(
          sig.data,
          W * (sig.offset + (a - start) * sig.stride) + (this.part === 'imag' ? 1 : 0),
          W * sig.stride,
          b - a
        );
      }
      if (scanMinK >= 0) {
        const kmn = a + scanMinK;
        const kmx = a + scanMaxK;
        const mk = this.minK[c];
        if (mk < 0 || scanMin < this.minV[c] || (scanMin === this.minV[c] && kmn < mk)) {
          this.minK[c] = kmn;
          this.minV[c] = scanMin;
          this.minY[c] = this.value(sig, kmn - start);
        }
        const xk = this.maxK[c];
        if (xk < 0 || scanMax > this.maxV[c] || (scanMax === this.maxV[c] && kmx < xk)) {
          this.maxK[c] = kmx;
          this.maxV[c] = scanMax;
          this.maxY[c] = this.value(sig, kmx - start);
        }
      }
    }
    return this;
  }

  /** Writes the envelope of what has arrived into xOut/yOut (length ≥ 4·columns) and returns the count. */
  write(xOut: Float64Array, yOut: Float64Array): number {
    const need = Math.min(envelopeCapacity(this.columns), this.i1 - this.i0);
    if (!(xOut instanceof Float64Array) || !(yOut instanceof Float64Array)) {
      throw new TypeError('xOut and yOut must be Float64Arrays');
    }
    if (xOut.length < need || yOut.length < need) {
      throw new RangeError(
        `xOut and yOut need length ${need}, got ${xOut.length} and ${yOut.length}`
      );
    }
    let w = 0;
    if (this.passthrough) {
      for (let k = 0; k < this.first.length; k++) {
        if (this.have[k]) {
          xOut[w] = this.i0 + k;
          yOut[w] = this.first[k];
          w++;
        }
      }
      return w;
    }
    for (let c = 0; c < this.columns; c++) {
      const s = this.starts[c];
      const e = this.starts[c + 1];
      let last = -1;
      if (this.have[c] & 1) {
        xOut[w] = s;
        yOut[w] = this.first[c];
        w++;
        last = s;
      }
      if (this.minK[c] >= 0) {
        const mnFirst = this.minK[c] < this.maxK[c];
        const lo = mnFirst ? this.minK[c] : this.maxK[c];
        const hi = mnFirst ? this.maxK[c] : this.minK[c];
        const vlo = mnFirst ? this.minY[c] : this.maxY[c];
        const vhi = mnFirst ? this.maxY[c] : this.minY[c];
        if (lo !== last) {
          last = lo;
          xOut[w] = lo;
          yOut[w] = vlo;
          w++;
        }
        if (hi !== last) {
          last = hi;
          xOut[w] = hi;
          yOut[w] = vhi;
          w++;
        }
      }
      if (this.have[c] & 2 && e - 1 !== last) {
        xOut[w] = e - 1;
        yOut[w] = this.lastV[c];
        w++;
      }
    }
    return w;
  }
}
