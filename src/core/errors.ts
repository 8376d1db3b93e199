/**
 * Argument checks shared by every entry point of the core.
 *
 * Caller mistakes throw a TypeError or RangeError whose message names the argument and the
 * offending value; numerical breakdown (rank deficiency, loss of definiteness, divergence) is
 * never thrown but reported as a status in the result (see `Health` in the filters and `rank`
 * in the QR results).
 */

/** Formats a value for an error message without dumping whole arrays. */
export function describe(value: unknown): string {
  if (typeof value === 'number') {
    return Object.is(value, -0) ? '-0' : String(value);
  }
  if (typeof value === 'string') {
    return JSON.stringify(value.length > 40 ? value.slice(0, 40) + '…' : value);
  }
  if (value === null || value === undefined) {
    return String(value);
  }
  if (ArrayBuffer.isView(value)) {
    return `${value.constructor.name}(${(value as unknown as ArrayLike<number>).length})`;
  }
  if (Array.isArray(value)) {
    return `Array(${value.length})`;
  }
  return typeof value;
}

/** Throws a TypeError unless `value` is a finite number. */
export function checkNumber(name: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new TypeError(`${name} must be a finite number, got ${describe(value)}`);
  }
  return value;
}

/** Throws unless `value` is an integer in [min, max]. */
export function checkInteger(
  name: string,
  value: unknown,
  min = 0,
  max = Number.MAX_SAFE_INTEGER
): number {
  if (typeof value !== 'number' || !Number.isInteger(value)) {
    throw new TypeError(`${name} must be an integer, got ${describe(value)}`);
  }
  if (value < min || value > max) {
    throw new RangeError(`${name} must be in [${min}, ${max}], got ${describe(value)}`);
  }
  return value;
}

/**
 * Throws a RangeError unless `lo (<|<=) value (<|<=) hi`.
 * `open` says which ends are excluded: '()', '(]', '[)', '[]'.
 */
export function checkInterval(
  name: string,
  value: unknown,
  lo: number,
  hi: number,
  open: '()' | '(]' | '[)' | '[]' = '[]'
): number {
  const v = checkNumber(name, value);
  const loOk = open[0] === '(' ? v > lo : v >= lo;
  const hiOk = open[1] === ')' ? v < hi : v <= hi;
  if (!loOk || !hiOk) {
    throw new RangeError(`${name} must be in ${open[0]}${lo}, ${hi}${open[1]}, got ${describe(v)}`);
  }
  return v;
}

/**
 * Throws a RangeError naming the first element that is NaN or ±Inf. For complex data (interleaved
 * re, im) the index reported is the complex element's index, with the part that is bad.
 */
export function checkFinite(
  name: string,
  data: ArrayLike<number>,
  complex = false,
  offset = 0,
  length = data.length - offset
): void {
  const end = offset + length;
  for (let i = offset; i < end; i++) {
    const v = data[i];
    if (v - v !== 0) {
      // NaN - NaN and Inf - Inf are both NaN: one test covers both.
      const k = i - offset;
      const where = complex
        ? `${name}[${k >> 1}] (${k & 1 ? 'imaginary' : 'real'} part)`
        : `${name}[${k}]`;
      throw new RangeError(`${where} is ${v}; inputs must be finite (no NaN or ±Infinity)`);
    }
  }
}

/** Throws a TypeError unless `value` is a Float64Array or Float32Array. */
export function checkFloatArray(name: string, value: unknown): Float64Array | Float32Array {
  if (!(value instanceof Float64Array) && !(value instanceof Float32Array)) {
    throw new TypeError(`${name} must be a Float64Array or Float32Array, got ${describe(value)}`);
  }
  return value;
}

/** Throws a RangeError when two sizes that must agree do not. */
export function checkSameLength(nameA: string, a: number, nameB: string, b: number): void {
  if (a !== b) {
    throw new RangeError(`${nameA} has length ${a} but ${nameB} has length ${b}; they must match`);
  }
}
