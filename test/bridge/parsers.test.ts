/**
 * The fallback text parsers against a corpus of real numpy output
 * (scripts/fixtures/gen_reprs.py: numpy's repr and str under varied print options, with the
 * values numpy itself reads back from that text), plus JSON, CSV and hostile text.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  parseArrayText,
  parseCsv,
  parseJsonArray,
  parseNumpyRepr,
  parseOutputData,
  parsedToArrayData
} from '../../src/bridge/parsers';

interface Case {
  id: string;
  repr: string;
  str: string;
  shape: number[];
  full_shape: number[];
  truncated: boolean;
  complex: boolean;
  repr_dtype: string | null;
  values: string[];
  text_values: string[];
  dtype_numpy: string;
}
const corpus = JSON.parse(
  readFileSync(path.resolve(__dirname, '../fixtures/reprs/corpus.json'), 'utf8')
) as { numpy: string; cases: Case[] };

const dec = (v: string): number =>
  v === 'nan'
    ? NaN
    : v === 'inf'
      ? Infinity
      : v === '-inf'
        ? -Infinity
        : v === '-0'
          ? -0
          : Number(v);

function expectValues(got: Float64Array, want: string[], id: string): void {
  expect(got.length).toBe(want.length);
  for (let i = 0; i < want.length; i++) {
    // Exact: both sides parse the same decimal text with correctly rounded conversion
    // (IEEE 754-2019 §5.12; Python float() and ECMAScript Number()).
    if (!Object.is(got[i], dec(want[i]))) {
      throw new Error(`${id}[${i}]: got ${got[i]}, want ${want[i]}`);
    }
  }
}

describe('numpy repr corpus', () => {
  it('has the generated cases', () => {
    expect(corpus.cases.length).toBeGreaterThan(400);
    expect(corpus.cases.some(c => c.truncated)).toBe(true);
    expect(corpus.cases.some(c => c.complex)).toBe(true);
  });

  it.each(corpus.cases.map(c => [c.id, c] as [string, Case]))('repr %s', (id, c) => {
    const p = parseNumpyRepr(c.repr);
    expect(p.format).toBe('numpy-repr');
    expect(p.truncated).toBe(c.truncated);
    expect(p.shape).toEqual(c.shape);
    expect(p.complex).toBe(c.complex);
    expect(p.dtype).toBe(c.repr_dtype);
    if (!c.truncated || p.fullShape !== null) {
      expect(p.fullShape).toEqual(c.full_shape);
    }
    expectValues(p.data, c.values, id);
  });

  it.each(
    corpus.cases.filter(c => c.full_shape.every(n => n > 0)).map(c => [c.id, c] as [string, Case])
  )('str %s', (id, c) => {
    const p = parseNumpyRepr(c.str);
    expect(p.format).toBe('numpy-str');
    expect(p.truncated).toBe(c.truncated);
    expect(p.shape).toEqual(c.shape);
    // The str form names no dtype: its values are the decimals as float64.
    expectValues(p.data, c.text_values, id);
  });
});

describe('numpy repr details', () => {
  it('reads complex, nan, inf and negative zero', () => {
    const p = parseNumpyRepr('array([nan+nanj, inf-infj,  1. +2.j, -0.-0.j])');
    expect(p.complex).toBe(true);
    expect(Array.from(p.data)).toEqual([NaN, NaN, Infinity, -Infinity, 1, 2, -0, -0]);
    expect(Object.is(p.data[6], -0) && Object.is(p.data[7], -0)).toBe(true);
  });

  it('reports truncation and the declared shape', () => {
    const p = parseNumpyRepr('array([0., 1., 2., ..., 7., 8., 9.], shape=(1000,))');
    expect(p).toMatchObject({ truncated: true, shape: [6], fullShape: [1000] });
  });

  it('reads Python complex literals in lists and a quoted dtype', () => {
    const p = parseNumpyRepr("array([(1+2j), 2j, (-0-1j)], dtype='>c16')");
    expect(Array.from(p.data)).toEqual([1, 2, 0, 2, -0, -1]);
    expect(p.dtype).toBe('>c16');
  });

  it('refuses what is not an array of numbers, naming where', () => {
    expect(() => parseNumpyRepr("array(['a', 'b'], dtype='<U1')")).toThrow(
      /unexpected text at line 1, column 2/
    );
    expect(() => parseNumpyRepr('array([1, 2], dtype=object)')).toThrow(/dtype object/);
    expect(() => parseNumpyRepr('array([[1, 2], [3]])')).toThrow(
      /not rectangular: rows of 2 and 1/
    );
    expect(() => parseNumpyRepr('np.float64(1.5)')).toThrow(/starts with "np.float64\(1.5\)"/);
    expect(() => parseNumpyRepr('[1, 2')).toThrow(/never closed/);
    expect(() => parseNumpyRepr(42 as unknown as string)).toThrow(TypeError);
  });

  it('never evaluates hostile text: code, calls and names are syntax errors', () => {
    const hostile = [
      "array([__import__('os').system('echo pwned')])",
      'array([1, 2]); import os',
      'array([1, 2], dtype=__import__("os"))',
      '[1, 2] + [open("/etc/passwd").read()]',
      'array([1e5, 2]\n)\nos.system("x")',
      '[1, 2, eval("3")]',
      '[1, 2, 0x10]',
      '[1, 2, 1_000]',
      '[<script>alert(1)</script>]',
      '[1, 2, ${process.exit(1)}]'
    ];
    for (const h of hostile) {
      expect(() => parseNumpyRepr(h)).toThrow(RangeError);
      expect(() => parseArrayText(h)).toThrow(RangeError);
    }
  });

  it('bounds the nesting depth', () => {
    expect(() => parseNumpyRepr('['.repeat(40) + '1' + ']'.repeat(40))).toThrow(/32 deep/);
  });
});

describe('JSON lists', () => {
  it('reads nested lists, NaN/Infinity as Python writes them, and booleans', () => {
    const p = parseJsonArray('[[1, -0.0, NaN], [Infinity, -Infinity, 2.5e-3]]');
    expect(p.shape).toEqual([2, 3]);
    expect(Array.from(p.data)).toEqual([1, -0, NaN, Infinity, -Infinity, 0.0025]);
    expect(parseJsonArray('[true, false]')).toMatchObject({ dtype: 'bool', shape: [2] });
  });

  it('accepts parsed JSON values and refuses anything but numbers and lists', () => {
    expect(
      Array.from(
        parseJsonArray([
          [1, 2],
          [3, 4]
        ]).data
      )
    ).toEqual([1, 2, 3, 4]);
    expect(() => parseJsonArray([1, '2'])).toThrow(
      /value\[1\] must be a number or a list, got string/
    );
    expect(() => parseJsonArray([1, { toString: () => '2' }])).toThrow(TypeError);
    expect(() => parseJsonArray('[1, "2"]')).toThrow(RangeError);
    expect(() => parseJsonArray('{"a": 1}')).toThrow(/not a JSON list/);
  });
});

describe('CSV', () => {
  it('reads columns with a header, detecting the delimiter', () => {
    const p = parseCsv('t,x,y\n0,1.5,-2\n1,nan,3e-3\n');
    expect(p).toMatchObject({ shape: [2, 3], columns: ['t', 'x', 'y'], format: 'csv' });
    expect(Array.from(p.data)).toEqual([0, 1.5, -2, 1, NaN, 0.003]);
    expect(Array.from(parseCsv('1;2\r\n3;4').data)).toEqual([1, 2, 3, 4]);
    expect(Array.from(parseCsv('1\t2\n3\t4').data)).toEqual([1, 2, 3, 4]);
    expect(parseCsv('# comment\n 1  2\n 3  4\n').shape).toEqual([2, 2]);
    expect(parseCsv('5\n6\n7').shape).toEqual([3]);
  });

  it('reads complex cells', () => {
    const p = parseCsv('1+2j,3\n-1-1j,0');
    expect(p.complex).toBe(true);
    expect(Array.from(p.data)).toEqual([1, 2, 3, 0, -1, -1, 0, 0]);
  });

  it('refuses ragged rows and text cells, naming the line and column', () => {
    expect(() => parseCsv('1,2\n3')).toThrow(/line 2 has 1 values; earlier rows have 2/);
    expect(() => parseCsv('1,2\n3,=cmd|calc')).toThrow(
      /line 2, column 2: "=cmd\|calc" is not a number/
    );
  });
});

describe('parseArrayText', () => {
  it('picks the format', () => {
    expect(parseArrayText('array([1., 2.])').format).toBe('numpy-repr');
    expect(parseArrayText('[1. 2.]').format).toBe('numpy-str');
    expect(parseArrayText('[1, NaN]').format).toBe('numpy-str');
    expect(parseArrayText('[1, 2]', 'application/json').format).toBe('json');
    expect(parseArrayText('1,2\n3,4').format).toBe('csv');
  });
});

describe('notebook outputs', () => {
  it('parses MIME bundles as stored in notebooks, never looking at HTML', () => {
    const p = parseOutputData({
      'text/plain': ['array([1., 2.,\n', '       3.])'],
      'text/html': '<b onclick="x()">1</b>'
    });
    expect(Array.from(p.data)).toEqual([1, 2, 3]);
    expect(parseOutputData({ 'application/json': [[1, 2]], 'text/plain': 'junk' }).shape).toEqual([
      1, 2
    ]);
    expect(() => parseOutputData({ 'text/html': '<table><tr><td>1</td></tr></table>' })).toThrow(
      /no application\/json, text\/csv or text\/plain/
    );
    expect(() => parseOutputData('array([1])')).toThrow(TypeError);
  });

  it('refuses truncated text unless asked, saying why', () => {
    const p = parseNumpyRepr('array([0., 1., 2., ..., 7., 8., 9.], shape=(1000,))');
    expect(() => parsedToArrayData(p)).toThrow(
      /truncated by numpy \("...", full shape \(1000\)\): its values are incomplete/
    );
    expect(parsedToArrayData(p, true).shape).toEqual([6]);
    expect(parsedToArrayData(parseNumpyRepr('array([1, 2], dtype=int8)'))).toMatchObject({
      dtype: 'int8',
      complex: false
    });
  });
});
