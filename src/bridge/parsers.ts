/**
 * Fallback parsers for arrays printed in notebook outputs, for non-Python kernels and for
 * notebooks whose kernel is gone: numpy's repr and str forms, JSON lists and CSV text.
 *
 * The text is tokenised and checked against a small grammar of numbers, brackets and
 * separators; nothing in it is ever evaluated. Values are exactly what the text shows (a
 * printed float64 has only the digits numpy printed), and `truncated` says when numpy
 * summarised the array with `...`, so the values are incomplete.
 *
 * The grammar parsers (`parseNumpyRepr`, `parseJsonArray`, `parseCsv`) describe any text they
 * can read. The entry points that hand values on ({@link parseArrayText},
 * {@link parseOutputData}, {@link parsedToArrayData}) apply the rules a read from the kernel
 * applies, with the same error codes ({@link BridgeError}): an integer beyond ±2^53, which
 * float64 cannot hold exactly (`int-precision`), more than two dimensions (`ndim`) and no
 * values (`empty`) are refused, never rounded or passed on.
 */
import { BridgeError } from './errors';

/** An array recovered from text. */
export interface ParsedArray {
  /** Shown values, C order; complex interleaved (re, im). */
  data: Float64Array;
  /** Shape of the values shown (elided parts removed when truncated). */
  shape: number[];
  /** The full shape when known: the shown shape, or numpy's `shape=(...)` when truncated. */
  fullShape: number[] | null;
  complex: boolean;
  /** The dtype the text names (`dtype=float32`), `bool` for True/False, else null. */
  dtype: string | null;
  /** True when the text elided values (`...`): `data` is incomplete. */
  truncated: boolean;
  /** Which grammar matched. */
  format: 'numpy-repr' | 'numpy-str' | 'json' | 'csv';
  /** CSV only: the header row, when the first row was not numeric. */
  columns?: string[];
  /**
   * The first value written as an integer beyond ±2^53 (which float64 cannot hold, so `data`
   * has it rounded): its position among the shown values (C order) and its text; `rounded`
   * when the value came parsed already (JSON data) and may have been rounded there. Absent or
   * null when every integer is exact.
   */
  inexact?: { index: number; text: string; rounded?: boolean } | null;
}

/** 2^53: the integers up to it in magnitude are exact in float64 (IEEE 754-2019 §3.3). */
const EXACT_LIMIT = BigInt(2) ** BigInt(53);

/** True for an integer literal (optional sign, digits only) beyond ±2^53. */
function beyondExact(token: string): boolean {
  const digits = token.replace(/^[+-]/, '');
  return /^\d+$/.test(digits) && digits.length >= 16 && BigInt(digits) > EXACT_LIMIT;
}

/** Largest text accepted (characters). */
export const MAX_TEXT_LENGTH = 64 * 1024 * 1024;

const REAL = /[+-]?(?:nan|inf(?:inity)?|(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)/iy;

function toNumber(token: string): number {
  const t = token.toLowerCase();
  const neg = t.startsWith('-');
  const body = t.replace(/^[+-]/, '');
  if (body === 'nan') {
    return NaN;
  }
  if (body === 'inf' || body === 'infinity') {
    return neg ? -Infinity : Infinity;
  }
  return Number(t);
}

type Tok =
  | { k: '[' | ']' | ',' | '...'; pos: number }
  | {
      k: 'n';
      re: number;
      im: number;
      cplx: boolean;
      bool: boolean;
      pos: number;
      /** The text of an integer part beyond ±2^53 (rounded in re/im). */
      big?: string;
    };

function describePos(text: string, pos: number): string {
  const before = text.slice(0, pos);
  const line = before.split('\n').length;
  const col = pos - before.lastIndexOf('\n');
  const near = JSON.stringify(text.slice(pos, pos + 20));
  return `at line ${line}, column ${col} (near ${near})`;
}

function scanReal(s: string, i: number): string | null {
  REAL.lastIndex = i;
  const m = REAL.exec(s);
  return m ? m[0] : null;
}

/** Scans a real, complex (numpy `1.+2.j`, Python `(1+2j)`, `2j`) or bool token at `i`. */
function scanNumber(s: string, i: number): { tok: Tok; end: number } | null {
  const pos = i;
  if (s.startsWith('True', i) && !/\w/.test(s[i + 4] ?? '')) {
    return { tok: { k: 'n', re: 1, im: 0, cplx: false, bool: true, pos }, end: i + 4 };
  }
  if (s.startsWith('False', i) && !/\w/.test(s[i + 5] ?? '')) {
    return { tok: { k: 'n', re: 0, im: 0, cplx: false, bool: true, pos }, end: i + 5 };
  }
  if (s.startsWith('true', i) && !/\w/.test(s[i + 4] ?? '')) {
    return { tok: { k: 'n', re: 1, im: 0, cplx: false, bool: true, pos }, end: i + 4 };
  }
  if (s.startsWith('false', i) && !/\w/.test(s[i + 5] ?? '')) {
    return { tok: { k: 'n', re: 0, im: 0, cplx: false, bool: true, pos }, end: i + 5 };
  }
  let j = i;
  const paren = s[j] === '(';
  if (paren) {
    j++;
    while (s[j] === ' ') {
      j++;
    }
  }
  const a = scanReal(s, j);
  if (a === null) {
    return null;
  }
  j += a.length;
  let re = toNumber(a);
  let im = 0;
  let cplx = false;
  let big = beyondExact(a) ? a : undefined;
  if (s[j] === 'j' || s[j] === 'J') {
    im = re;
    re = 0;
    cplx = true;
    j++;
  } else {
    // numpy pads the real part to align columns ("1. +2.j"), so spaces may come before the
    // imaginary part; a real followed by a signed real ending in "j" is one complex value.
    let k = j;
    while (s[k] === ' ') {
      k++;
    }
    if (s[k] === '+' || s[k] === '-') {
      const b = scanReal(s, k);
      if (b !== null && (s[k + b.length] === 'j' || s[k + b.length] === 'J')) {
        im = toNumber(b);
        cplx = true;
        j = k + b.length + 1;
        big = big ?? (beyondExact(b) ? b : undefined);
      }
    }
  }
  if (paren) {
    while (s[j] === ' ') {
      j++;
    }
    if (s[j] !== ')') {
      return null;
    }
    j++;
  }
  if (/[\w.]/.test(s[j] ?? '')) {
    return null;
  }
  return {
    tok: { k: 'n', re, im, cplx, bool: false, pos, ...(big !== undefined ? { big } : {}) },
    end: j
  };
}

function tokenize(s: string, start: number, end: number, argName: string): Tok[] {
  const toks: Tok[] = [];
  let i = start;
  while (i < end) {
    const c = s[i];
    if (c === ' ' || c === '\n' || c === '\r' || c === '\t') {
      i++;
      continue;
    }
    if (c === '[' || c === ']' || c === ',') {
      toks.push({ k: c, pos: i });
      i++;
      continue;
    }
    if (s.startsWith('...', i)) {
      toks.push({ k: '...', pos: i });
      i += 3;
      continue;
    }
    const n = scanNumber(s, i);
    if (!n || n.end > end) {
      throw new RangeError(
        `${argName} is not an array of numbers: unexpected text ${describePos(s, i)}`
      );
    }
    toks.push(n.tok);
    i = n.end;
  }
  return toks;
}

type Node = Array<Node | Tok | '...'>;

/** Recursive descent over `[ item (,? item)* ]`; commas optional (numpy's str form). */
function parseList(
  toks: Tok[],
  at: { i: number },
  text: string,
  argName: string,
  depth: number
): Node {
  if (depth > 32) {
    throw new RangeError(`${argName} nests brackets more than 32 deep`);
  }
  const open = toks[at.i];
  if (!open || open.k !== '[') {
    throw new RangeError(
      `${argName} is not an array: expected "[" ${describePos(text, open ? open.pos : text.length)}`
    );
  }
  at.i++;
  const items: Node = [];
  let needItem = false;
  for (;;) {
    const t = toks[at.i];
    if (!t) {
      throw new RangeError(`${argName} is not an array: a "[" is never closed`);
    }
    if (t.k === ']') {
      if (needItem) {
        throw new RangeError(
          `${argName} is not an array: "," before "]" ${describePos(text, t.pos)}`
        );
      }
      at.i++;
      return items;
    }
    if (t.k === ',') {
      if (items.length === 0 || needItem) {
        throw new RangeError(
          `${argName} is not an array: unexpected "," ${describePos(text, t.pos)}`
        );
      }
      needItem = true;
      at.i++;
      continue;
    }
    needItem = false;
    if (t.k === '[') {
      items.push(parseList(toks, at, text, argName, depth + 1));
    } else if (t.k === '...') {
      items.push('...');
      at.i++;
    } else {
      items.push(t);
      at.i++;
    }
  }
}

interface Flat {
  values: Array<Extract<Tok, { k: 'n' }>>;
  shape: number[];
  truncated: boolean;
}

/** Checks the nested lists are rectangular and flattens them in C order. */
function flatten(node: Node, argName: string): Flat {
  const shape: number[] = [];
  const values: Flat['values'] = [];
  let truncated = false;
  const walk = (n: Node, d: number): void => {
    const items = n.filter(x => x !== '...');
    if (items.length !== n.length) {
      truncated = true;
    }
    if (shape.length === d) {
      shape.push(items.length);
    } else if (shape[d] !== items.length) {
      throw new RangeError(
        `${argName} is not rectangular: rows of ${shape[d]} and ${items.length} values at depth ${d + 1}`
      );
    }
    const lists = items.filter(x => Array.isArray(x)).length;
    if (lists !== 0 && lists !== items.length) {
      throw new RangeError(
        `${argName} is not rectangular: numbers and lists mixed at depth ${d + 1}`
      );
    }
    if (lists === 0) {
      if (items.length > 0 && shape.length !== d + 1) {
        throw new RangeError(
          `${argName} is not rectangular: numbers at depth ${d + 1}, lists elsewhere`
        );
      }
      for (const x of items) {
        values.push(x as Extract<Tok, { k: 'n' }>);
      }
      return;
    }
    for (const x of items) {
      walk(x as Node, d + 1);
    }
  };
  walk(node, 0);
  return { values, shape, truncated };
}

/**
 * Rounds to the nearest IEEE 754 binary16 value (ties to even), as numpy does when it reads
 * a decimal into float16 (IEEE 754-2019 §3.6 binary16: 11-bit significand, emin = −14).
 * Checked against numpy's float16 in the repr corpus.
 */
export function roundToFloat16(x: number): number {
  if (!Number.isFinite(x) || x === 0) {
    return x;
  }
  const a = Math.abs(x);
  // 65520 = (2 − 2^−11)·2^15: from here on the nearest binary16 is infinity.
  if (a >= 65520) {
    return x > 0 ? Infinity : -Infinity;
  }
  let e = Math.floor(Math.log2(a));
  if (2 ** e > a) {
    e--;
  } else if (2 ** (e + 1) <= a) {
    e++;
  }
  if (e < -14) {
    e = -14;
  }
  const q = 2 ** (e - 10);
  const n = a / q;
  const fl = Math.floor(n);
  const d = n - fl;
  const r = d > 0.5 ? fl + 1 : d < 0.5 ? fl : fl % 2 === 0 ? fl : fl + 1;
  return (x < 0 ? -1 : 1) * r * q;
}

function rounder(dtype: string | null): ((x: number) => number) | null {
  if (dtype === null) {
    return null;
  }
  if (/^(float32|complex64|[<>=|]?[fc]4|[<>=|]?c8)$/.test(dtype)) {
    return Math.fround;
  }
  if (/^(float16|[<>=|]?f2)$/.test(dtype)) {
    return roundToFloat16;
  }
  return null;
}

function pack(
  values: Flat['values'],
  forceComplex: boolean
): { data: Float64Array; complex: boolean } {
  const complex = forceComplex || values.some(v => v.cplx);
  const data = new Float64Array(values.length * (complex ? 2 : 1));
  if (complex) {
    for (let i = 0; i < values.length; i++) {
      data[2 * i] = values[i].re;
      data[2 * i + 1] = values[i].im;
    }
  } else {
    for (let i = 0; i < values.length; i++) {
      data[i] = values[i].re;
    }
  }
  return { data, complex };
}

function firstInexact(values: Flat['values']): ParsedArray['inexact'] {
  const i = values.findIndex(v => v.big !== undefined);
  return i < 0 ? null : { index: i, text: values[i].big! };
}

function checkText(argName: string, text: unknown): string {
  if (typeof text !== 'string') {
    throw new TypeError(`${argName} must be a string, got ${text === null ? 'null' : typeof text}`);
  }
  if (text.length > MAX_TEXT_LENGTH) {
    throw new RangeError(
      `${argName} is ${text.length} characters long, over the limit of ${MAX_TEXT_LENGTH}`
    );
  }
  return text;
}

const DTYPE_NAME =
  /^(bool|u?int(8|16|32|64)|float(16|32|64|96|128)|complex(64|128|192|256)|longlong|ulonglong|longdouble|clongdouble|int|float|complex|object|str\d*|<U\d+)$/;
const DTYPE_CODE = /^[<>=|]?[biufc]\d{1,2}$/;

/**
 * Parses numpy's repr (`array([...], dtype=..., shape=(...))`) or str (`[1. 2. 3.]`) of an
 * array of any dimension, including complex (`1.+2.j`), nan, inf, -0., True/False, line
 * wrapping and `...` summaries. Throws a RangeError naming the position of anything else.
 */
export function parseNumpyRepr(text: string, argName = 'text'): ParsedArray {
  const s = checkText(argName, text).trim();
  let body = s;
  let dtype: string | null = null;
  let declaredShape: number[] | null = null;
  let format: ParsedArray['format'] = 'numpy-str';
  const m = /^array\(/.exec(s);
  if (m) {
    format = 'numpy-repr';
    if (!s.endsWith(')')) {
      throw new RangeError(`${argName} is not a numpy repr: it does not end with ")"`);
    }
    // The list ends at the bracket that closes the first "["; keyword arguments follow.
    let depth = 0;
    let close = -1;
    for (let i = m[0].length; i < s.length - 1; i++) {
      const c = s[i];
      if (c === '[') {
        depth++;
      } else if (c === ']') {
        depth--;
        if (depth === 0) {
          close = i;
          break;
        }
      }
    }
    if (close < 0) {
      throw new RangeError(`${argName} is not a numpy repr: its brackets do not balance`);
    }
    body = s.slice(m[0].length, close + 1);
    const rest = s.slice(close + 1, s.length - 1).trim();
    if (rest.length > 0) {
      const kw = /^,\s*(dtype|shape)=\s*/;
      let r = rest;
      while (r.length > 0) {
        const k = kw.exec(r);
        if (!k) {
          throw new RangeError(
            `${argName} is not a numpy repr: unexpected ${JSON.stringify(r.slice(0, 30))} after the values`
          );
        }
        r = r.slice(k[0].length);
        if (k[1] === 'dtype') {
          const d = /^('([^'\n]{1,20})'|"([^"\n]{1,20})"|([A-Za-z_][\w]{0,19}))/.exec(r);
          const name = d ? (d[2] ?? d[3] ?? d[4]) : null;
          if (!d || !name || !(DTYPE_NAME.test(name) || DTYPE_CODE.test(name))) {
            throw new RangeError(
              `${argName} has a dtype Perpend does not read: ${JSON.stringify(r.slice(0, 30))}`
            );
          }
          dtype = name;
          r = r.slice(d[0].length).trim();
        } else {
          const sh = /^\(\s*((?:\d+\s*,\s*)*\d*)\s*\)/.exec(r);
          if (!sh) {
            throw new RangeError(
              `${argName} has a malformed shape=: ${JSON.stringify(r.slice(0, 30))}`
            );
          }
          declaredShape = sh[1]
            .split(',')
            .map(x => x.trim())
            .filter(x => x.length > 0)
            .map(Number);
          r = r.slice(sh[0].length).trim();
        }
      }
    }
  } else if (!s.startsWith('[')) {
    throw new RangeError(
      `${argName} is not a numpy array repr: it starts with ${JSON.stringify(s.slice(0, 20))}`
    );
  }
  const toks = tokenize(body, 0, body.length, argName);
  const at = { i: 0 };
  const tree = parseList(toks, at, body, argName, 0);
  if (at.i !== toks.length) {
    throw new RangeError(
      `${argName} has text after the array ${describePos(body, toks[at.i].pos)}`
    );
  }
  if (dtype !== null && /^(object|str\d*|<U\d+)$/.test(dtype)) {
    throw new RangeError(`${argName} has dtype ${dtype}: Perpend reads numbers only`);
  }
  const flat = flatten(tree, argName);
  const forceComplex = dtype !== null && /^(complex|[<>=|]?c)/.test(dtype);
  const { data, complex } = pack(flat.values, forceComplex);
  // The text shows decimals; the array held float32/float16 values: round as numpy reads.
  const round = rounder(dtype);
  if (round) {
    for (let i = 0; i < data.length; i++) {
      data[i] = round(data[i]);
    }
  }
  if (dtype === null && flat.values.length > 0 && flat.values.every(v => v.bool)) {
    dtype = 'bool';
  }
  return {
    data,
    shape: flat.shape,
    fullShape: flat.truncated ? declaredShape : (declaredShape ?? flat.shape),
    complex,
    dtype,
    truncated: flat.truncated,
    format,
    inexact: firstInexact(flat.values)
  };
}

/**
 * Parses a JSON list of numbers (any nesting, rectangular), also accepting the NaN,
 * Infinity and -Infinity that Python's json module writes. `value` may be the text or an
 * already-parsed JSON value (an output's application/json data).
 */
export function parseJsonArray(value: unknown, argName = 'value'): ParsedArray {
  if (typeof value !== 'string') {
    const unsafe: { first: ParsedArray['inexact'] } = { first: null };
    const text = jsonValueToText(value, argName, unsafe);
    const p = parseJsonArray(text, argName);
    return { ...p, inexact: p.inexact ?? unsafe.first };
  }
  const s = checkText(argName, value).trim();
  if (!s.startsWith('[')) {
    throw new RangeError(
      `${argName} is not a JSON list: it starts with ${JSON.stringify(s.slice(0, 20))}`
    );
  }
  const toks = tokenize(s, 0, s.length, argName);
  for (const t of toks) {
    if (t.k === '...') {
      throw new RangeError(`${argName} is not JSON: "..." ${describePos(s, t.pos)}`);
    }
    if (t.k === 'n' && t.cplx) {
      throw new RangeError(`${argName} is not JSON: a complex number ${describePos(s, t.pos)}`);
    }
  }
  const at = { i: 0 };
  const tree = parseList(toks, at, s, argName, 0);
  if (at.i !== toks.length) {
    throw new RangeError(`${argName} has text after the list ${describePos(s, toks[at.i].pos)}`);
  }
  const flat = flatten(tree, argName);
  const { data } = pack(flat.values, false);
  return {
    data,
    shape: flat.shape,
    fullShape: flat.shape,
    complex: false,
    dtype: flat.values.length > 0 && flat.values.every(v => v.bool) ? 'bool' : null,
    truncated: false,
    format: 'json',
    inexact: firstInexact(flat.values)
  };
}

function jsonValueToText(
  value: unknown,
  argName: string,
  unsafe: { first: ParsedArray['inexact'] }
): string {
  // Walk the value rather than JSON.stringify it blindly: only arrays, numbers and booleans
  // are allowed; anything else is refused with its path.
  const parts: string[] = [];
  let count = 0;
  const walk = (v: unknown, path: string, depth: number): void => {
    if (depth > 32) {
      throw new RangeError(`${argName} nests lists more than 32 deep`);
    }
    if (Array.isArray(v)) {
      parts.push('[');
      v.forEach((x, i) => {
        if (i > 0) {
          parts.push(',');
        }
        walk(x, `${path}[${i}]`, depth + 1);
      });
      parts.push(']');
    } else if (typeof v === 'number') {
      parts.push(
        Number.isNaN(v)
          ? 'NaN'
          : v === Infinity
            ? 'Infinity'
            : v === -Infinity
              ? '-Infinity'
              : Object.is(v, -0)
                ? '-0'
                : String(v)
      );
      // Parsed already (by the notebook): an integral value beyond 2^53 − 1 may be the
      // rounding of another integer (2^53 + 1 parses as 2^53), so it cannot be trusted. Up to
      // 2^64, the range of int64 and uint64; floats that large and integral are refused too.
      if (
        unsafe.first === null &&
        Number.isInteger(v) &&
        !Number.isSafeInteger(v) &&
        Math.abs(v) <= 2 ** 64
      ) {
        unsafe.first = { index: count, text: String(v), rounded: true };
      }
      count++;
    } else if (typeof v === 'boolean') {
      parts.push(v ? 'true' : 'false');
      count++;
    } else {
      throw new TypeError(
        `${argName}${path} must be a number or a list, got ${v === null ? 'null' : typeof v}`
      );
    }
  };
  walk(value, '', 0);
  return parts.join('');
}

/**
 * Parses CSV text of numbers: delimiter detected (comma, semicolon, tab, or runs of spaces),
 * an optional header row of names, `#` comment lines skipped; one column gives a 1-D array,
 * several give rows × columns. Complex cells (`1+2j`) are accepted.
 */
export function parseCsv(text: string, argName = 'text'): ParsedArray {
  const s = checkText(argName, text);
  const lines = s
    .split(/\r\n|\n|\r/)
    .filter(l => l.trim().length > 0 && !l.trimStart().startsWith('#'));
  if (lines.length === 0) {
    throw new RangeError(`${argName} has no data rows`);
  }
  const first = lines[0];
  const delim = first.includes('\t')
    ? '\t'
    : first.includes(';')
      ? ';'
      : first.includes(',')
        ? ','
        : null;
  const split = (l: string): string[] =>
    delim === null ? l.trim().split(/\s+/) : l.split(delim).map(c => c.trim());
  let columns: string[] | undefined;
  const rows: Array<Extract<Tok, { k: 'n' }>[]> = [];
  lines.forEach((line, li) => {
    const cells = split(line);
    const parsed: Array<Extract<Tok, { k: 'n' }> | null> = cells.map(c => {
      const n = c.length > 0 ? scanNumber(c, 0) : null;
      return n && n.end === c.length && n.tok.k === 'n' ? n.tok : null;
    });
    if (li === 0 && parsed.every(p => p === null)) {
      columns = cells.map(c => c.replace(/^"(.*)"$/, '$1').slice(0, 100));
      return;
    }
    const bad = parsed.findIndex(p => p === null);
    if (bad >= 0) {
      throw new RangeError(
        `${argName} line ${li + 1}, column ${bad + 1}: ${JSON.stringify(cells[bad].slice(0, 30))} is not a number`
      );
    }
    if (rows.length > 0 && cells.length !== rows[0].length) {
      throw new RangeError(
        `${argName} line ${li + 1} has ${cells.length} values; earlier rows have ${rows[0].length}`
      );
    }
    if (columns && cells.length !== columns.length) {
      throw new RangeError(
        `${argName} line ${li + 1} has ${cells.length} values; the header has ${columns.length}`
      );
    }
    rows.push(parsed as Array<Extract<Tok, { k: 'n' }>>);
  });
  if (rows.length === 0) {
    throw new RangeError(`${argName} has a header but no data rows`);
  }
  const ncol = rows[0].length;
  const { data, complex } = pack(rows.flat(), false);
  const shape = ncol === 1 ? [rows.length] : [rows.length, ncol];
  return {
    data,
    shape,
    fullShape: shape,
    complex,
    dtype: null,
    truncated: false,
    format: 'csv',
    inexact: firstInexact(rows.flat()),
    ...(columns ? { columns } : {})
  };
}

/**
 * Tries, in order, numpy repr/str, JSON and CSV, and returns the first that parses, or
 * throws a RangeError listing why each failed. `mimeType` narrows the choice
 * (`application/json` → JSON; `text/csv` → CSV).
 */
export function parseArrayText(text: unknown, mimeType?: string): ParsedArray {
  return checkReadable(parseAnyText(text, mimeType), 'text');
}

function parseAnyText(text: unknown, mimeType?: string): ParsedArray {
  if (mimeType === 'application/json') {
    return parseJsonArray(text);
  }
  const s = checkText('text', text);
  if (mimeType === 'text/csv') {
    return parseCsv(s);
  }
  const errors: string[] = [];
  const t = s.trim();
  if (t.startsWith('array(') || t.startsWith('[')) {
    try {
      return parseNumpyRepr(t);
    } catch (e) {
      errors.push(`numpy: ${(e as Error).message}`);
    }
    if (t.startsWith('[')) {
      try {
        return parseJsonArray(t);
      } catch (e) {
        errors.push(`JSON: ${(e as Error).message}`);
      }
    }
  }
  try {
    return parseCsv(s);
  } catch (e) {
    errors.push(`CSV: ${(e as Error).message}`);
  }
  throw new RangeError(`text is not an array Perpend can read (${errors.join('; ')})`);
}

/**
 * Applies the rules of a read from the kernel to parsed text: refuses (with a
 * {@link BridgeError} of the kernel path's code) an integer beyond ±2^53, more than two
 * dimensions, and no values.
 */
export function checkReadable(p: ParsedArray, argName = 'text'): ParsedArray {
  const shape = p.fullShape ?? p.shape;
  if (shape.length > 2) {
    throw new BridgeError(
      'ndim',
      `${argName} holds an array of shape (${shape.join(', ')}): Perpend reads 1-D and 2-D arrays. Print a slice of it instead.`
    );
  }
  const n = p.data.length / (p.complex ? 2 : 1);
  if (n === 0 || shape.some(d => d === 0)) {
    throw new BridgeError(
      'empty',
      `${argName} holds an empty array (shape (${shape.join(', ')}${shape.length === 1 ? ',' : ''})): there is nothing to read.`
    );
  }
  if (p.inexact) {
    const at = p.truncated
      ? `value ${p.inexact.index + 1} shown`
      : `[${unravel(p.inexact.index, p.shape).join(', ')}]`;
    if (p.inexact.rounded) {
      throw new BridgeError(
        'int-precision',
        `${argName}${at} is ${p.inexact.text} as the notebook stored it, beyond ±(2^53 − 1): an integer that large may already have been rounded when the notebook read its JSON, so the array was not read. Read it from the kernel instead.`
      );
    }
    throw new BridgeError(
      'int-precision',
      `${argName}${p.truncated ? ` (${at})` : at} is ${p.inexact.text.replace(/^\+/, '')}, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.`
    );
  }
  return p;
}

function unravel(flat: number, shape: number[]): number[] {
  const idx = new Array<number>(shape.length).fill(0);
  let r = flat;
  for (let d = shape.length - 1; d >= 0; d--) {
    idx[d] = r % shape[d];
    r = Math.floor(r / shape[d]);
  }
  return idx;
}

/**
 * Parses an output's MIME bundle as stored in a notebook (`text/plain` may be a string or
 * nbformat's list of lines): `application/json` first, then `text/csv`, then `text/plain`
 * (numpy repr/str, JSON, CSV). HTML and other rich types are never looked at. Throws a
 * RangeError when nothing in the bundle is an array of numbers.
 */
export function parseOutputData(bundle: unknown): ParsedArray {
  if (typeof bundle !== 'object' || bundle === null || Array.isArray(bundle)) {
    throw new TypeError(
      `bundle must be a MIME bundle object, got ${bundle === null ? 'null' : typeof bundle}`
    );
  }
  const b = bundle as Record<string, unknown>;
  const text = (v: unknown): string | null =>
    typeof v === 'string'
      ? v
      : Array.isArray(v) && v.every(x => typeof x === 'string')
        ? v.join('')
        : null;
  const errors: string[] = [];
  // The first form that parses decides; a refusal by the kernel's rules is final (another
  // form of the same output holds the same array).
  if (b['application/json'] !== undefined) {
    let p: ParsedArray | null = null;
    try {
      p = parseJsonArray(b['application/json'], 'application/json');
    } catch (e) {
      errors.push((e as Error).message);
    }
    if (p) {
      return checkReadable(p, 'application/json');
    }
  }
  const csv = text(b['text/csv']);
  if (csv !== null) {
    let p: ParsedArray | null = null;
    try {
      p = parseCsv(csv, 'text/csv');
    } catch (e) {
      errors.push((e as Error).message);
    }
    if (p) {
      return checkReadable(p, 'text/csv');
    }
  }
  const plain = text(b['text/plain']);
  if (plain !== null) {
    let p: ParsedArray | null = null;
    try {
      p = parseAnyText(plain);
    } catch (e) {
      errors.push((e as Error).message);
    }
    if (p) {
      return checkReadable(p, 'text/plain');
    }
  }
  throw new RangeError(
    errors.length > 0
      ? errors.join('; ')
      : 'bundle has no application/json, text/csv or text/plain data'
  );
}

/**
 * The {@link ParsedArray} as the bridge's ArrayData shape (C order, complex interleaved),
 * for the panel. Refuses truncated text (its values are incomplete) with a RangeError that
 * says so; pass `allowTruncated` to take the shown values anyway. Refuses, as a read from the
 * kernel does, integers beyond ±2^53, more than two dimensions and no values
 * ({@link checkReadable}).
 */
export function parsedToArrayData(
  p: ParsedArray,
  allowTruncated = false
): { data: Float64Array; shape: number[]; complex: boolean; dtype: string } {
  if (p.truncated && !allowTruncated) {
    throw new RangeError(
      `the printed array was truncated by numpy ("..."${p.fullShape ? `, full shape (${p.fullShape.join(', ')})` : ''}): its values are incomplete; read it from the kernel, or print it with np.set_printoptions(threshold=sys.maxsize)`
    );
  }
  checkReadable(p);
  return {
    data: p.data,
    shape: p.shape.slice(),
    complex: p.complex,
    dtype: p.dtype ?? (p.complex ? 'complex128' : 'float64')
  };
}
