/**
 * Dense strided arrays over one Float64Array, real or complex.
 *
 * An array is `data`, a `shape`, `strides` and an `offset`. Strides and offset count *elements*:
 * for a real array element (i, j) is `data[offset + i*strides[0] + j*strides[1]]`; for a complex
 * array (interleaved re, im, as numpy stores complex128) the real part of element (i, j) is at
 * `data[2*(offset + i*strides[0] + j*strides[1])]` and the imaginary part right after it. So a
 * numpy buffer in C order, in Fortran order, or a strided view (a transpose, a column, a slice)
 * is used without a copy. Strides may be negative or zero (broadcast), as in numpy.
 *
 * ml-matrix's `Matrix` is accepted and returned at the API edge (`fromMatrix`, `toMatrix`).
 */
import { Matrix, type AbstractMatrix } from 'ml-matrix';
import { checkInteger, describe } from './errors';

export type Order = 'C' | 'F';

/** A row of nested input: a number[] or a typed array. */
export type RowLike = readonly number[] | Float64Array | Float32Array;

/**
 * Anything the friendly entry points accept as a matrix: a `Dense` (1-D or 2-D), an ml-matrix
 * `Matrix`, nested rows (each a number[] or a typed array), or a 1-D input — `number[]`,
 * `Float64Array`, `Float32Array` — which counts as one column (real).
 */
export type MatrixLike =
  Dense | AbstractMatrix | readonly RowLike[] | readonly number[] | Float64Array | Float32Array;

export class Dense {
  /** The underlying storage (interleaved re, im when `complex`). */
  readonly data: Float64Array;
  /** Extent of each axis. */
  readonly shape: readonly number[];
  /** Step between neighbours along each axis, in elements (complex elements when `complex`). */
  readonly strides: readonly number[];
  /** Index of element (0, …, 0), in elements. */
  readonly offset: number;
  /** Interleaved complex128 when true, float64 when false. */
  readonly complex: boolean;

  constructor(
    data: Float64Array,
    shape: readonly number[],
    strides?: readonly number[],
    offset = 0,
    complex = false
  ) {
    if (!(data instanceof Float64Array)) {
      throw new TypeError(`data must be a Float64Array, got ${describe(data)}`);
    }
    if (!Array.isArray(shape) || shape.length === 0) {
      throw new TypeError(`shape must be a non-empty array of integers, got ${describe(shape)}`);
    }
    shape.forEach((s, k) => checkInteger(`shape[${k}]`, s));
    const st = strides ? strides.slice() : contiguousStrides(shape, 'C');
    if (st.length !== shape.length) {
      throw new RangeError(
        `strides has ${st.length} entries but shape has ${shape.length}; they must match`
      );
    }
    st.forEach((s, k) => checkInteger(`strides[${k}]`, s, -Number.MAX_SAFE_INTEGER));
    checkInteger('offset', offset);
    const elements = complex ? data.length >> 1 : data.length;
    if (complex && data.length % 2 !== 0) {
      throw new RangeError(
        `data of a complex array needs an even length (re, im pairs), got ${data.length}`
      );
    }
    let lo = offset;
    let hi = offset;
    let empty = false;
    for (let k = 0; k < shape.length; k++) {
      if (shape[k] === 0) {
        empty = true;
      } else if (st[k] > 0) {
        hi += (shape[k] - 1) * st[k];
      } else {
        lo += (shape[k] - 1) * st[k];
      }
    }
    if (!empty && (lo < 0 || hi >= elements)) {
      throw new RangeError(
        `shape [${shape.join(', ')}] with strides [${st.join(', ')}] and offset ${offset} ` +
          `reaches element ${lo < 0 ? lo : hi}, outside data of ${elements} elements`
      );
    }
    this.data = data;
    this.shape = Object.freeze(shape.slice());
    this.strides = Object.freeze(st);
    this.offset = offset;
    this.complex = complex;
  }

  /** A new zero array. */
  static zeros(shape: readonly number[], options: { complex?: boolean; order?: Order } = {}) {
    const complex = options.complex ?? false;
    const size = shape.reduce((a, b) => a * b, 1);
    return new Dense(
      new Float64Array(complex ? 2 * size : size),
      shape,
      contiguousStrides(shape, options.order ?? 'C'),
      0,
      complex
    );
  }

  /** The n×n identity. */
  static eye(n: number, options: { complex?: boolean; order?: Order } = {}) {
    checkInteger('n', n);
    const a = Dense.zeros([n, n], options);
    for (let i = 0; i < n; i++) {
      a.set(i, i, 1);
    }
    return a;
  }

  /**
   * From nested arrays: `re` is a 1-D array of numbers or a list of rows (number[] or typed
   * arrays, all of one length); give `im` of the same shape for a complex array. Checks
   * finiteness and raggedness.
   */
  static fromNested(
    re: readonly number[] | readonly RowLike[],
    im?: readonly number[] | readonly RowLike[],
    order: Order = 'C'
  ): Dense {
    const shapeRe = nestedShape('re', re);
    if (im !== undefined) {
      const shapeIm = nestedShape('im', im);
      if (shapeIm.join('x') !== shapeRe.join('x')) {
        throw new RangeError(
          `im has shape ${shapeIm.join('x')} but re has shape ${shapeRe.join('x')}; they must match`
        );
      }
    }
    const complex = im !== undefined;
    const out = Dense.zeros(shapeRe, { complex, order });
    const put = (name: string, src: readonly unknown[], part: 0 | 1) => {
      if (shapeRe.length === 1) {
        for (let i = 0; i < shapeRe[0]; i++) {
          const v = finiteEntry(name, [i], src[i]);
          out.data[complex ? 2 * (out.offset + i * out.strides[0]) + part : i * out.strides[0]] = v;
        }
        return;
      }
      for (let i = 0; i < shapeRe[0]; i++) {
        const row = src[i] as readonly unknown[];
        for (let j = 0; j < shapeRe[1]; j++) {
          const v = finiteEntry(name, [i, j], row[j]);
          const e = i * out.strides[0] + j * out.strides[1];
          out.data[complex ? 2 * e + part : e] = v;
        }
      }
    };
    put('re', re as readonly unknown[], 0);
    if (im !== undefined) {
      put('im', im as readonly unknown[], 1);
    }
    return out;
  }

  /**
   * Wraps (no copy) a contiguous buffer, e.g. one received from numpy. `order` says how a 2-D
   * array is laid out ('C' row-major, numpy's default; 'F' column-major).
   */
  static fromBuffer(
    data: Float64Array,
    shape: readonly number[],
    options: { complex?: boolean; order?: Order } = {}
  ): Dense {
    const complex = options.complex ?? false;
    const size = shape.reduce((a, b) => a * b, 1);
    const need = complex ? 2 * size : size;
    if (data.length !== need) {
      throw new RangeError(
        `data has length ${data.length} but shape [${shape.join(', ')}]${complex ? ' (complex)' : ''} needs ${need}`
      );
    }
    return new Dense(data, shape, contiguousStrides(shape, options.order ?? 'C'), 0, complex);
  }

  /** From ml-matrix (real part, and optionally an imaginary part of the same size). */
  static fromMatrix(re: AbstractMatrix, im?: AbstractMatrix, order: Order = 'F'): Dense {
    if (!Matrix.isMatrix(re)) {
      throw new TypeError(`re must be an ml-matrix Matrix, got ${describe(re)}`);
    }
    if (im !== undefined) {
      if (!Matrix.isMatrix(im)) {
        throw new TypeError(`im must be an ml-matrix Matrix, got ${describe(im)}`);
      }
      if (im.rows !== re.rows || im.columns !== re.columns) {
        throw new RangeError(
          `im is ${im.rows}x${im.columns} but re is ${re.rows}x${re.columns}; they must match`
        );
      }
    }
    const complex = im !== undefined;
    const out = Dense.zeros([re.rows, re.columns], { complex, order });
    for (let i = 0; i < re.rows; i++) {
      for (let j = 0; j < re.columns; j++) {
        const v = re.get(i, j);
        if (!Number.isFinite(v)) {
          throw new RangeError(
            `re[${i}][${j}] is ${v}; inputs must be finite (no NaN or ±Infinity)`
          );
        }
        if (complex) {
          const w = im!.get(i, j);
          if (!Number.isFinite(w)) {
            throw new RangeError(
              `im[${i}][${j}] is ${w}; inputs must be finite (no NaN or ±Infinity)`
            );
          }
          out.set(i, j, v, w);
        } else {
          out.set(i, j, v);
        }
      }
    }
    return out;
  }

  get ndim(): number {
    return this.shape.length;
  }
  /** Number of rows of a 2-D array (the length of a 1-D one). */
  get rows(): number {
    return this.shape[0];
  }
  /** Number of columns of a 2-D array (1 for a 1-D one). */
  get cols(): number {
    return this.shape.length > 1 ? this.shape[1] : 1;
  }
  get size(): number {
    return this.shape.reduce((a, b) => a * b, 1);
  }

  /** Element index (not data index) of (i, j). */
  index(i: number, j = 0): number {
    return this.offset + i * this.strides[0] + (this.shape.length > 1 ? j * this.strides[1] : 0);
  }

  /** Real part of element (i, j) (j ignored for 1-D). */
  get(i: number, j = 0): number {
    const e = this.index(i, j);
    return this.complex ? this.data[2 * e] : this.data[e];
  }

  /** Imaginary part of element (i, j); 0 for a real array. */
  getIm(i: number, j = 0): number {
    return this.complex ? this.data[2 * this.index(i, j) + 1] : 0;
  }

  set(i: number, j: number, re: number, im = 0): void {
    const e = this.index(i, j);
    if (this.complex) {
      this.data[2 * e] = re;
      this.data[2 * e + 1] = im;
    } else {
      this.data[e] = re;
    }
  }

  /** Transpose without copy (reverses the axes). Not conjugated: see `conjTranspose`. */
  transpose(): Dense {
    return new Dense(
      this.data,
      this.shape.slice().reverse(),
      this.strides.slice().reverse(),
      this.offset,
      this.complex
    );
  }
  get T(): Dense {
    return this.transpose();
  }

  /** Conjugate transpose (a view for real arrays, a copy for complex ones). */
  conjTranspose(): Dense {
    if (!this.complex) {
      return this.transpose();
    }
    const t = this.transpose().copy('C');
    for (let k = 1; k < t.data.length; k += 2) {
      t.data[k] = -t.data[k];
    }
    return t;
  }

  /** Rows [r0, r1) and columns [c0, c1) as a view (no copy). */
  slice(r0: number, r1: number, c0 = 0, c1 = this.cols): Dense {
    checkInteger('r0', r0, 0, this.rows);
    checkInteger('r1', r1, r0, this.rows);
    if (this.ndim === 1) {
      return new Dense(this.data, [r1 - r0], this.strides, this.index(r0), this.complex);
    }
    checkInteger('c0', c0, 0, this.cols);
    checkInteger('c1', c1, c0, this.cols);
    return new Dense(
      this.data,
      [r1 - r0, c1 - c0],
      this.strides,
      r1 > r0 && c1 > c0 ? this.index(r0, c0) : this.offset,
      this.complex
    );
  }

  /** Column j of a 2-D array as a 1-D view. */
  col(j: number): Dense {
    checkInteger('j', j, 0, this.cols - 1);
    return new Dense(this.data, [this.rows], [this.strides[0]], this.index(0, j), this.complex);
  }

  /** Row i of a 2-D array as a 1-D view. */
  row(i: number): Dense {
    checkInteger('i', i, 0, this.rows - 1);
    return new Dense(this.data, [this.cols], [this.strides[1]], this.index(i, 0), this.complex);
  }

  /** This 1-D array as an n×1 view (a 2-D array is returned unchanged). */
  asColumn(): Dense {
    if (this.ndim !== 1) {
      return this;
    }
    return new Dense(this.data, [this.rows, 1], [this.strides[0], 1], this.offset, this.complex);
  }

  isCContiguous(): boolean {
    return stridesEqual(this.shape, this.strides, contiguousStrides(this.shape, 'C'));
  }
  isFContiguous(): boolean {
    return stridesEqual(this.shape, this.strides, contiguousStrides(this.shape, 'F'));
  }

  /** A contiguous copy in the given order. */
  copy(order: Order = 'C'): Dense {
    const f = this.complex ? 2 : 1;
    if (
      (order === 'F' && this.isFContiguous()) ||
      (order === 'C' && this.isCContiguous()) ||
      (this.ndim === 1 && this.strides[0] === 1)
    ) {
      const start = f * this.offset;
      return new Dense(
        this.data.slice(start, start + f * this.size),
        this.shape,
        contiguousStrides(this.shape, order),
        0,
        this.complex
      );
    }
    const out = Dense.zeros(this.shape, { complex: this.complex, order });
    if (this.ndim === 1) {
      for (let i = 0; i < this.rows; i++) {
        out.set(i, 0, this.get(i), this.getIm(i));
      }
      return out;
    }
    if (this.ndim !== 2) {
      throw new RangeError(`copy supports 1-D and 2-D arrays, got ${this.ndim}-D`);
    }
    const m = this.rows;
    const n = this.cols;
    const [s0, s1] = this.strides;
    const [t0, t1] = out.strides;
    const src = this.data;
    const dst = out.data;
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < m; i++) {
        const a = this.offset + i * s0 + j * s1;
        const b = i * t0 + j * t1;
        if (this.complex) {
          dst[2 * b] = src[2 * a];
          dst[2 * b + 1] = src[2 * a + 1];
        } else {
          dst[b] = src[a];
        }
      }
    }
    return out;
  }

  /** A complex copy (imaginary parts zero when this array is real). */
  toComplex(): Dense {
    if (this.complex) {
      return this.copy('C');
    }
    const out = Dense.zeros(this.shape, { complex: true });
    for (let i = 0; i < this.rows; i++) {
      for (let j = 0; j < (this.ndim > 1 ? this.cols : 1); j++) {
        out.set(i, j, this.get(i, j));
      }
    }
    return out;
  }

  /** Real parts as nested arrays (1-D: number[]; 2-D: number[][]). */
  toNested(): number[][] | number[] {
    if (this.ndim === 1) {
      return Array.from({ length: this.rows }, (_, i) => this.get(i));
    }
    return Array.from({ length: this.rows }, (_, i) =>
      Array.from({ length: this.cols }, (_, j) => this.get(i, j))
    );
  }

  /** Imaginary parts as nested arrays (zeros for a real array). */
  toNestedIm(): number[][] | number[] {
    if (this.ndim === 1) {
      return Array.from({ length: this.rows }, (_, i) => this.getIm(i));
    }
    return Array.from({ length: this.rows }, (_, i) =>
      Array.from({ length: this.cols }, (_, j) => this.getIm(i, j))
    );
  }

  /**
   * As an ml-matrix Matrix (1-D arrays become a column). ml-matrix is real-only: a complex array
   * throws a TypeError unless `part` says which part to take ('re' or 'im').
   */
  toMatrix(part?: 're' | 'im'): Matrix {
    if (part === 'im') {
      return this.toMatrixIm();
    }
    if (this.complex && part !== 're') {
      throw new TypeError(
        "this array is complex but ml-matrix's Matrix is real: call toMatrix('re') and toMatrix('im')"
      );
    }
    const a = this.asColumn();
    const m = new Matrix(a.rows, a.cols);
    for (let i = 0; i < a.rows; i++) {
      for (let j = 0; j < a.cols; j++) {
        m.set(i, j, a.get(i, j));
      }
    }
    return m;
  }

  /** Imaginary part as an ml-matrix Matrix (zeros for a real array). */
  toMatrixIm(): Matrix {
    const a = this.asColumn();
    const m = new Matrix(a.rows, a.cols);
    for (let i = 0; i < a.rows; i++) {
      for (let j = 0; j < a.cols; j++) {
        m.set(i, j, a.getIm(i, j));
      }
    }
    return m;
  }
}

/** Strides of a contiguous array of this shape, in elements. */
export function contiguousStrides(shape: readonly number[], order: Order): number[] {
  const st = new Array<number>(shape.length);
  let s = 1;
  if (order === 'C') {
    for (let k = shape.length - 1; k >= 0; k--) {
      st[k] = s;
      s *= Math.max(shape[k], 1);
    }
  } else {
    for (let k = 0; k < shape.length; k++) {
      st[k] = s;
      s *= Math.max(shape[k], 1);
    }
  }
  return st;
}

function stridesEqual(shape: readonly number[], a: readonly number[], b: readonly number[]) {
  for (let k = 0; k < shape.length; k++) {
    if (shape[k] > 1 && a[k] !== b[k]) {
      return false;
    }
  }
  return true;
}

function isRow(r: unknown): r is RowLike {
  return Array.isArray(r) || r instanceof Float64Array || r instanceof Float32Array;
}

function nestedShape(name: string, v: readonly unknown[]): number[] {
  if (!Array.isArray(v)) {
    throw new TypeError(`${name} must be an array of numbers or of rows, got ${describe(v)}`);
  }
  if (v.length === 0) {
    throw new RangeError(`${name} is empty; give at least one element`);
  }
  if (!isRow(v[0])) {
    return [v.length];
  }
  const n = (v[0] as unknown[]).length;
  if (n === 0) {
    throw new RangeError(`${name}[0] is an empty row; give at least one column`);
  }
  for (let i = 0; i < v.length; i++) {
    const row = v[i];
    if (!isRow(row)) {
      throw new TypeError(`${name}[${i}] must be an array (a row), got ${describe(row)}`);
    }
    if (row.length !== n) {
      throw new RangeError(
        `${name} is ragged: row ${i} has ${row.length} entries but row 0 has ${n}`
      );
    }
  }
  return [v.length, n];
}

function finiteEntry(name: string, at: number[], v: unknown): number {
  const where = `${name}${at.map(k => `[${k}]`).join('')}`;
  if (typeof v !== 'number') {
    throw new TypeError(`${where} must be a number, got ${describe(v)}`);
  }
  if (!Number.isFinite(v)) {
    throw new RangeError(`${where} is ${v}; inputs must be finite (no NaN or ±Infinity)`);
  }
  return v;
}

/**
 * Turns any accepted matrix input into a 2-D Dense (a 1-D input becomes a column). Nested arrays,
 * typed arrays and ml-matrix matrices are copied; a Dense is used as is (a view). Checks
 * finiteness. A value of another type is a TypeError naming `name`.
 */
export function toDense(name: string, a: unknown): Dense {
  let d: Dense;
  if (a instanceof Dense) {
    d = a.asColumn();
  } else if (Matrix.isMatrix(a)) {
    try {
      d = Dense.fromMatrix(a as AbstractMatrix);
    } catch (e) {
      throw rename(e, name);
    }
  } else if (a instanceof Float64Array || a instanceof Float32Array) {
    if (a.length === 0) {
      throw new RangeError(`${name} is empty; give at least one element`);
    }
    d = new Dense(Float64Array.from(a), [a.length, 1], [1, 1]);
  } else if (Array.isArray(a)) {
    try {
      d = Dense.fromNested(a as number[][]).asColumn();
    } catch (e) {
      throw rename(e, name);
    }
  } else {
    throw new TypeError(
      `${name} must be a Dense array, an ml-matrix Matrix or nested number arrays, got ` +
        `${describe(a)} (a 1-D number[], Float64Array or Float32Array also counts, as one column)`
    );
  }
  if (d.ndim !== 2) {
    throw new RangeError(`${name} must be 1-D or 2-D, got ${d.ndim}-D`);
  }
  checkFiniteDense(name, d);
  return d;
}

/**
 * True when a `MatrixLike` input is 1-D (a 1-D Dense, a flat number[] or a typed array): the
 * friendly functions then return a 1-D result where numpy would. Not part of the public API.
 */
export function isVectorInput(a: unknown): boolean {
  if (a instanceof Dense) {
    return a.ndim === 1;
  }
  if (a instanceof Float64Array || a instanceof Float32Array) {
    return true;
  }
  return Array.isArray(a) && a.length > 0 && !isRow(a[0]);
}

/** An n×1 result as a 1-D view of the same data (unchanged when it has more columns). */
export function asVector(x: Dense): Dense {
  if (x.ndim !== 2 || x.cols !== 1) {
    return x;
  }
  return new Dense(x.data, [x.rows], [x.strides[0]], x.offset, x.complex);
}

function rename(e: unknown, name: string): unknown {
  if (e instanceof Error) {
    const msg = e.message.replace(/^(re|im)\b/, name);
    return e instanceof RangeError ? new RangeError(msg) : new TypeError(msg);
  }
  return e;
}

/**
 * Throws a RangeError naming the first (i, j) that is NaN or ±Inf. A value that is not a `Dense`
 * is converted as every friendly entry point does (`toDense`), which checks it the same way or
 * throws a TypeError naming `name`.
 */
export function checkFiniteDense(name: string, a: MatrixLike): void {
  if (!(a instanceof Dense)) {
    toDense(name, a);
    return;
  }
  if (a.isCContiguous() || a.isFContiguous()) {
    // One linear sweep over the buffer; only on failure find the first bad (i, j) in row order.
    const f = a.complex ? 2 : 1;
    const d = a.data;
    const end = f * (a.offset + a.size);
    let bad = false;
    for (let e = f * a.offset; e < end; e++) {
      const v = d[e];
      if (v - v !== 0) {
        bad = true;
        break;
      }
    }
    if (!bad) {
      return;
    }
  }
  const m = a.rows;
  const n = a.cols;
  const s0 = a.strides[0];
  const s1 = a.ndim > 1 ? a.strides[1] : 0;
  const d = a.data;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      const e = a.offset + i * s0 + j * s1;
      if (a.complex) {
        const re = d[2 * e];
        const im = d[2 * e + 1];
        if (re - re !== 0 || im - im !== 0) {
          throw new RangeError(
            `${name}[${i}][${j}] is ${re - re !== 0 ? re : im} (${re - re !== 0 ? 'real' : 'imaginary'} part); inputs must be finite (no NaN or ±Infinity)`
          );
        }
      } else {
        const v = d[e];
        if (v - v !== 0) {
          throw new RangeError(
            `${name}[${i}][${j}] is ${v}; inputs must be finite (no NaN or ±Infinity)`
          );
        }
      }
    }
  }
}
