/**
 * SHA-256 digests of cell sources, for checking a cell against the kernel's input history
 * without sending its text (see {@link KernelBridge.verifyCells}).
 *
 * Normalisation, the same on both sides: the source loses its trailing line feeds ("\n") and
 * nothing else, then is encoded as UTF-8. IPython's `HistoryManager.store_inputs` does exactly
 * `source_raw.rstrip("\n")` before storing (IPython 9.17, `IPython/core/history.py`), and the
 * helper applies the same `rstrip("\n")` again, so the rule holds whatever IPython stored.
 * Other whitespace counts: a cell whose only edit is a trailing space no longer matches.
 */

/** A lowercase SHA-256 hex digest: the only form of digest that reaches kernel code. */
export const DIGEST_PATTERN = /^[0-9a-f]{64}$/;

/** The text that is hashed: `source` without its trailing "\n" characters. */
export function normalizeSource(source: string): string {
  let end = source.length;
  while (end > 0 && source.charCodeAt(end - 1) === 0x0a) {
    end--;
  }
  return source.slice(0, end);
}

/**
 * True when `s` is well-formed UTF-16 (no lone surrogate). A lone surrogate has no UTF-8 form:
 * the browser's encoder would replace it and Python's would refuse it, so such a source cannot
 * be checked.
 */
export function isWellFormed(s: string): boolean {
  return !/[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/.test(s);
}

/**
 * The SHA-256 hex digest of a cell's source after {@link normalizeSource}, as UTF-8. Uses Web
 * Crypto (`crypto.subtle.digest`) when the page has it, and {@link sha256Hex} otherwise (a page
 * served over plain http from another host is not a secure context, and has no `crypto.subtle`).
 * Throws a TypeError for a non-string and a RangeError for a lone surrogate.
 */
export async function sourceDigest(source: string): Promise<string> {
  if (typeof source !== 'string') {
    throw new TypeError(`source must be a string, got ${typeof source}`);
  }
  if (!isWellFormed(source)) {
    throw new RangeError('source must be well-formed text, got a lone UTF-16 surrogate');
  }
  const bytes = new TextEncoder().encode(normalizeSource(source));
  const subtle = (globalThis as { crypto?: { subtle?: SubtleCrypto } }).crypto?.subtle;
  if (subtle && typeof subtle.digest === 'function') {
    const d = await subtle.digest('SHA-256', bytes);
    return toHex(new Uint8Array(d));
  }
  return sha256Hex(bytes);
}

function toHex(b: Uint8Array): string {
  let s = '';
  for (let i = 0; i < b.length; i++) {
    s += (b[i] < 16 ? '0' : '') + b[i].toString(16);
  }
  return s;
}

// FIPS 180-4 §4.2.2: the first 32 bits of the fractional parts of the cube roots of the first
// 64 primes.
const K = new Uint32Array([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
  0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
  0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
  0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
  0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
  0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
  0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
  0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2
]);

/**
 * SHA-256 of `bytes` as lowercase hex, in plain JavaScript (FIPS 180-4 §5.1.1 padding, §6.2.2
 * computation). The fallback of {@link sourceDigest}; synchronous.
 */
export function sha256Hex(bytes: Uint8Array): string {
  if (!(bytes instanceof Uint8Array)) {
    throw new TypeError(`bytes must be a Uint8Array, got ${typeof bytes}`);
  }
  const n = bytes.length;
  // Message, a 1 bit, zeros, and the length in bits as a 64-bit big-endian integer.
  const padded = new Uint8Array(Math.ceil((n + 9) / 64) * 64);
  padded.set(bytes);
  padded[n] = 0x80;
  const view = new DataView(padded.buffer);
  const bits = n * 8;
  view.setUint32(padded.length - 8, Math.floor(bits / 0x100000000));
  view.setUint32(padded.length - 4, bits >>> 0);
  // FIPS 180-4 §5.3.3: initial hash value.
  const H = new Uint32Array([
    0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19
  ]);
  const W = new Uint32Array(64);
  for (let off = 0; off < padded.length; off += 64) {
    for (let t = 0; t < 16; t++) {
      W[t] = view.getUint32(off + 4 * t);
    }
    for (let t = 16; t < 64; t++) {
      const w15 = W[t - 15];
      const w2 = W[t - 2];
      const s0 = ((w15 >>> 7) | (w15 << 25)) ^ ((w15 >>> 18) | (w15 << 14)) ^ (w15 >>> 3);
      const s1 = ((w2 >>> 17) | (w2 << 15)) ^ ((w2 >>> 19) | (w2 << 13)) ^ (w2 >>> 10);
      W[t] = (W[t - 16] + s0 + W[t - 7] + s1) >>> 0;
    }
    let a = H[0];
    let b = H[1];
    let c = H[2];
    let d = H[3];
    let e = H[4];
    let f = H[5];
    let g = H[6];
    let h = H[7];
    for (let t = 0; t < 64; t++) {
      const S1 = ((e >>> 6) | (e << 26)) ^ ((e >>> 11) | (e << 21)) ^ ((e >>> 25) | (e << 7));
      const ch = (e & f) ^ (~e & g);
      const T1 = (h + S1 + ch + K[t] + W[t]) >>> 0;
      const S0 = ((a >>> 2) | (a << 30)) ^ ((a >>> 13) | (a << 19)) ^ ((a >>> 22) | (a << 10));
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const T2 = (S0 + maj) >>> 0;
      h = g;
      g = f;
      f = e;
      e = (d + T1) >>> 0;
      d = c;
      c = b;
      b = a;
      a = (T1 + T2) >>> 0;
    }
    H[0] += a;
    H[1] += b;
    H[2] += c;
    H[3] += d;
    H[4] += e;
    H[5] += f;
    H[6] += g;
    H[7] += h;
  }
  let s = '';
  for (let i = 0; i < 8; i++) {
    s += H[i].toString(16).padStart(8, '0');
  }
  return s;
}
