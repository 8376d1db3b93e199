/**
 * Base64 (RFC 4648 §4, standard alphabet with padding) straight into and out of byte arrays,
 * without `atob`/`btoa` binary strings or Node's Buffer, so it runs the same in the browser,
 * a worker and Node on payloads of tens of megabytes.
 */

const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const ENC = new Uint8Array(64);
const DEC = new Int16Array(256).fill(-1);
for (let i = 0; i < 64; i++) {
  ENC[i] = ALPHABET.charCodeAt(i);
  DEC[ALPHABET.charCodeAt(i)] = i;
}

/** Number of bytes `text` decodes to, or -1 if its length or padding is not valid base64. */
export function base64DecodedLength(text: string): number {
  const n = text.length;
  if (n % 4 !== 0) {
    return -1;
  }
  if (n === 0) {
    return 0;
  }
  const pad = text.charCodeAt(n - 1) === 61 ? (text.charCodeAt(n - 2) === 61 ? 2 : 1) : 0;
  return (n / 4) * 3 - pad;
}

/**
 * Decodes `text` into `out` at `offset`; returns the number of bytes written. Throws a
 * RangeError on a character outside the alphabet, bad padding, or too small a destination.
 */
export function decodeBase64Into(text: string, out: Uint8Array, offset = 0): number {
  const len = base64DecodedLength(text);
  if (len < 0) {
    throw new RangeError(`text is not base64: length ${text.length} is not a multiple of 4`);
  }
  if (offset < 0 || offset + len > out.length) {
    throw new RangeError(
      `out is too small: ${len} bytes at offset ${offset} do not fit in ${out.length}`
    );
  }
  const n = text.length;
  let o = offset;
  for (let i = 0; i < n; i += 4) {
    const c0 = DEC[text.charCodeAt(i) & 0xff];
    const c1 = DEC[text.charCodeAt(i + 1) & 0xff];
    const ch2 = text.charCodeAt(i + 2);
    const ch3 = text.charCodeAt(i + 3);
    const last = i + 4 === n;
    const c2 = last && ch2 === 61 && ch3 === 61 ? 0 : DEC[ch2 & 0xff];
    const c3 = last && ch3 === 61 ? 0 : DEC[ch3 & 0xff];
    if (
      (c0 | c1 | c2 | c3) < 0 ||
      text.charCodeAt(i) > 0xff ||
      text.charCodeAt(i + 1) > 0xff ||
      ch2 > 0xff ||
      ch3 > 0xff
    ) {
      throw new RangeError(`text is not base64: bad character near position ${i}`);
    }
    const v = (c0 << 18) | (c1 << 12) | (c2 << 6) | c3;
    out[o++] = v >>> 16;
    if (o < offset + len) {
      out[o++] = (v >>> 8) & 0xff;
    }
    if (o < offset + len) {
      out[o++] = v & 0xff;
    }
  }
  return len;
}

const ascii = new TextDecoder('latin1');

/** Encodes `bytes` as base64 text. */
export function encodeBase64(bytes: Uint8Array): string {
  const n = bytes.length;
  const out = new Uint8Array(Math.ceil(n / 3) * 4);
  let o = 0;
  let i = 0;
  for (; i + 2 < n; i += 3) {
    const v = (bytes[i] << 16) | (bytes[i + 1] << 8) | bytes[i + 2];
    out[o++] = ENC[v >>> 18];
    out[o++] = ENC[(v >>> 12) & 63];
    out[o++] = ENC[(v >>> 6) & 63];
    out[o++] = ENC[v & 63];
  }
  if (i < n) {
    const b1 = i + 1 < n ? bytes[i + 1] : 0;
    const v = (bytes[i] << 16) | (b1 << 8);
    out[o++] = ENC[v >>> 18];
    out[o++] = ENC[(v >>> 12) & 63];
    out[o++] = i + 1 < n ? ENC[(v >>> 6) & 63] : 61;
    out[o++] = 61;
  }
  return ascii.decode(out);
}
