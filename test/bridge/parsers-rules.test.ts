/**
 * The text parsers apply the rules of a read from the kernel (helper.ts `prepare`): integers
 * beyond ±2^53 are refused rather than rounded, and so are more than two dimensions and arrays
 * with no values, with the kernel path's error codes.
 *
 * 2^53 = 9007199254740992 is the last point up to which every integer is exact in binary64
 * (IEEE 754-2019 §3.3: p = 53); 2^53 + 1 rounds to 2^53 under round-to-nearest-even, and uint64
 * max 2^64 − 1 = 18446744073709551615 rounds to 2^64 (NumPy: `float(np.uint64(2**64-1))` is
 * 1.8446744073709552e19). The texts are numpy's own repr and str forms (numpy 2.4, the
 * project's venv) and Python's json.dumps.
 */
import { BridgeError } from '../../src/bridge/errors';
import {
  checkReadable,
  parseArrayText,
  parseCsv,
  parseJsonArray,
  parseNumpyRepr,
  parseOutputData,
  parsedToArrayData
} from '../../src/bridge/parsers';

function refusal(f: () => unknown): BridgeError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(BridgeError);
    return e as BridgeError;
  }
  throw new Error('no refusal');
}

describe('integers beyond ±2^53', () => {
  it('are refused from a numpy repr, naming the index and the exact value', () => {
    // numpy: repr(np.array([9007199254740993], dtype=np.int64))
    const e = refusal(() => parseArrayText('array([9007199254740993])'));
    expect(e.code).toBe('int-precision');
    expect(e.message).toBe(
      'text[0] is 9007199254740993, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.'
    );
    // numpy: repr(np.array([0, 2**64 - 1], dtype=np.uint64))
    const u = refusal(() =>
      parseArrayText('array([                   0, 18446744073709551615], dtype=uint64)')
    );
    expect(u.code).toBe('int-precision');
    expect(u.message).toContain('text[1] is 18446744073709551615');
    // 2-D: the index in both dimensions, as the kernel path names it.
    const m = refusal(() => parseArrayText('[[1 2]\n [3 -9223372036854775808]]'));
    expect(m.message).toContain('text[1, 1] is -9223372036854775808');
  });

  it('accepts the neighbours that are exact: ±2^53 and below', () => {
    const p = parseArrayText('array([9007199254740992, -9007199254740992, 9007199254740991])');
    expect(Array.from(p.data)).toEqual([2 ** 53, -(2 ** 53), 2 ** 53 - 1]);
    expect(p.inexact).toBeNull();
    expect(refusal(() => parseArrayText('array([-9007199254740993])')).code).toBe('int-precision');
  });

  it('accepts floats written with a point or exponent however large (their text is exact)', () => {
    // numpy: repr(np.array([1e20, 2.0**60])) prints floats, which round-trip.
    const p = parseArrayText('array([1.00000000e+20, 1.15292150e+18])');
    expect(Array.from(p.data)).toEqual([1e20, 1.1529215e18]);
    expect(parseArrayText('[9007199254740993.0]').data[0]).toBe(2 ** 53);
  });

  it('are refused from JSON text, CSV and a complex part alike', () => {
    // Python: json.dumps([1, 2**53 + 1])
    expect(refusal(() => parseArrayText('[1, 9007199254740993]', 'application/json')).code).toBe(
      'int-precision'
    );
    expect(
      refusal(() => parseArrayText('1,2\n3,18446744073709551615', 'text/csv')).message
    ).toContain('text[1, 1] is 18446744073709551615');
    expect(refusal(() => parseArrayText('array([1.+9007199254740993j])')).code).toBe(
      'int-precision'
    );
  });

  it('are refused from a truncated repr, counting the shown values', () => {
    const t =
      'array([                   0,                    1, ..., 18446744073709551614,\n       18446744073709551615], shape=(1000,), dtype=uint64)';
    const e = refusal(() => parseArrayText(t));
    expect(e.message).toContain('text (value 3 shown) is 18446744073709551614');
  });

  it('are refused from JSON already parsed by the notebook (the value was rounded there)', () => {
    // JSON.parse gives 9007199254740992 for 9007199254740993 (ECMA-262 §21.1.3: the nearest
    // Number value): the digits are lost, and an integral value beyond 2^53 cannot be trusted.
    const stored = JSON.parse('[1, 9007199254740993]') as number[];
    expect(stored[1]).toBe(2 ** 53);
    const e = refusal(() => parseOutputData({ 'application/json': stored }));
    expect(e.code).toBe('int-precision');
    expect(e.message).toContain(
      'application/json[1] is 9007199254740992 as the notebook stored it'
    );
    // 2^53 itself may be 2^53 + 1 rounded; 2^53 − 1 is safe (Number.MAX_SAFE_INTEGER, ECMA-262
    // §21.1.2.6); past 2^64 no int64/uint64 can have been rounded, so a float is taken.
    expect(refusal(() => parseOutputData({ 'application/json': [[2 ** 53]] })).message).toContain(
      'application/json[0, 0]'
    );
    expect(parseOutputData({ 'application/json': [1, 2 ** 53 - 1] }).data[1]).toBe(2 ** 53 - 1);
    expect(parseOutputData({ 'application/json': [1.5, 1e21] }).data[1]).toBe(1e21);
  });

  it('the grammar parsers still describe such text, marking the first inexact value', () => {
    const p = parseNumpyRepr('array([1, 9007199254740993, 18446744073709551615], dtype=uint64)');
    expect(p.inexact).toEqual({ index: 1, text: '9007199254740993' });
    expect(parseJsonArray('[2, 9007199254740995]').inexact).toEqual({
      index: 1,
      text: '9007199254740995'
    });
    expect(parseCsv('1\n9007199254740993').inexact).toEqual({ index: 1, text: '9007199254740993' });
    expect(refusal(() => parsedToArrayData(p)).code).toBe('int-precision');
  });
});

describe('shapes the kernel path refuses', () => {
  it('refuses empty arrays in every form numpy prints them', () => {
    for (const t of [
      'array([], dtype=float64)', // repr(np.array([]))
      '[]', // str(np.array([]))
      'array([], shape=(0, 3), dtype=float64)' // repr(np.zeros((0, 3)))
    ]) {
      const e = refusal(() => parseArrayText(t));
      expect(e.code).toBe('empty');
    }
    expect(
      refusal(() => parseArrayText('array([], shape=(0, 3), dtype=float64)')).message
    ).toContain('shape (0, 3)');
    expect(refusal(() => parseArrayText('[]')).message).toContain('shape (0,)');
    expect(refusal(() => parseOutputData({ 'application/json': [] })).code).toBe('empty');
  });

  it('refuses more than two dimensions, even when a lower form would parse', () => {
    // repr(np.arange(8.0).reshape(2, 2, 2))
    const t = 'array([[[0., 1.],\n        [2., 3.]],\n\n       [[4., 5.],\n        [6., 7.]]])';
    const e = refusal(() => parseArrayText(t));
    expect(e.code).toBe('ndim');
    expect(e.message).toContain('shape (2, 2, 2)');
    expect(
      refusal(() => parseOutputData({ 'application/json': [[[1]]], 'text/plain': '[1]' })).code
    ).toBe('ndim');
    // A truncated 3-D repr is refused by its declared shape.
    expect(
      refusal(() => parseArrayText('array([[[0., 1., ..., 8., 9.]]], shape=(1, 1, 1000))')).message
    ).toContain('shape (1, 1, 1000)');
  });

  it('accepts the neighbours: 1-D, 2-D, one value, one row', () => {
    expect(parseArrayText('[5.]').shape).toEqual([1]);
    expect(parseArrayText('[[1., 2.]]').shape).toEqual([1, 2]);
    expect(parseArrayText('array([[1.],\n       [2.]])').shape).toEqual([2, 1]);
    expect(checkReadable(parseNumpyRepr('[1 2 3]')).shape).toEqual([3]);
    expect(parsedToArrayData(parseNumpyRepr('[[1, 2], [3, 4]]')).shape).toEqual([2, 2]);
  });

  it('parsedToArrayData refuses empty and 3-D arrays as reading does', () => {
    expect(refusal(() => parsedToArrayData(parseNumpyRepr('[[[1.]]]'))).code).toBe('ndim');
    expect(refusal(() => parsedToArrayData(parseNumpyRepr('[]'))).code).toBe('empty');
  });
});
