/**
 * Base64 against Node's Buffer (RFC 4648 §4 reference implementation in Node's core).
 */
import { base64DecodedLength, decodeBase64Into, encodeBase64 } from '../../src/bridge/base64';

function bytes(n: number, seed: number): Uint8Array {
  const b = new Uint8Array(n);
  let x = seed >>> 0;
  for (let i = 0; i < n; i++) {
    x = (Math.imul(x, 1664525) + 1013904223) >>> 0; // LCG, Numerical Recipes 3rd ed. §7.1
    b[i] = x >>> 24;
  }
  return b;
}

describe('base64', () => {
  it('encodes and decodes like Buffer for every length 0..200 and a large block', () => {
    const lengths = [...Array.from({ length: 201 }, (_, i) => i), 3 * 1048576 + 1];
    for (const n of lengths) {
      const b = bytes(n, n + 1);
      const text = encodeBase64(b);
      expect(text).toBe(Buffer.from(b).toString('base64'));
      expect(base64DecodedLength(text)).toBe(n);
      const out = new Uint8Array(n + 5);
      expect(decodeBase64Into(text, out, 5)).toBe(n);
      expect(Buffer.compare(Buffer.from(out.subarray(5)), Buffer.from(b))).toBe(0);
    }
  });

  it('refuses bad text and small destinations with RangeErrors', () => {
    expect(() => decodeBase64Into('abc', new Uint8Array(10))).toThrow(/not a multiple of 4/);
    expect(() => decodeBase64Into('ab!d', new Uint8Array(10))).toThrow(
      /bad character near position 0/
    );
    expect(() => decodeBase64Into('ab=d', new Uint8Array(10))).toThrow(RangeError);
    expect(() => decodeBase64Into('abcd', new Uint8Array(2))).toThrow(
      /out is too small: 3 bytes at offset 0 do not fit in 2/
    );
    expect(() => decodeBase64Into('ab\u0141d', new Uint8Array(10))).toThrow(RangeError);
  });
});
