/**
 * Source digests: SHA-256 against FIPS 180-4's own examples and Node's crypto module, and the
 * normalisation rule shared with the kernel helper (trailing "\n" dropped, nothing else).
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import path from 'node:path';
import {
  DIGEST_PATTERN,
  isWellFormed,
  normalizeSource,
  sha256Hex,
  sourceDigest
} from '../../src/bridge/digest';

const PYTHON = path.resolve(__dirname, '../../.venv/bin/python');
const utf8 = (s: string): Uint8Array => new TextEncoder().encode(s);

describe('sha256Hex (the fallback without Web Crypto)', () => {
  it('gives the digests of the FIPS 180-4 examples', () => {
    // NIST, "Secure Hash Standard" FIPS 180-4 (2015), and NIST's SHA-256 example document
    // (Cryptographic Standards and Guidelines, examples "SHA256.pdf"): one block "abc", two
    // blocks of 448 bits, and one million "a" (FIPS 180-2 Appendix B.3).
    expect(sha256Hex(utf8('abc'))).toBe(
      'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'
    );
    expect(sha256Hex(utf8('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq'))).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1'
    );
    expect(sha256Hex(utf8('a'.repeat(1000000)))).toBe(
      'cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0'
    );
    // The empty message (common practice; recomputed below against node:crypto too).
    expect(sha256Hex(new Uint8Array(0))).toBe(
      'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'
    );
  });

  it('agrees with node:crypto on every length around the block and padding boundaries', () => {
    // Node's crypto module (OpenSSL) is the reference; lengths 0..200 cross 55/56/64 bytes.
    const all = new Uint8Array(200);
    for (let i = 0; i < all.length; i++) {
      all[i] = (i * 131 + 7) & 0xff;
    }
    for (let n = 0; n <= all.length; n++) {
      const b = all.subarray(0, n);
      expect(sha256Hex(b)).toBe(createHash('sha256').update(b).digest('hex'));
    }
  });

  it('refuses what is not bytes', () => {
    expect(() => sha256Hex('abc' as unknown as Uint8Array)).toThrow(
      'bytes must be a Uint8Array, got string'
    );
  });
});

describe('sourceDigest', () => {
  it('drops trailing line feeds only, and hashes UTF-8', async () => {
    expect(normalizeSource('x = 1\n\n')).toBe('x = 1');
    expect(normalizeSource('x = 1 \n')).toBe('x = 1 ');
    expect(normalizeSource('\n\nx\n y\r\n')).toBe('\n\nx\n y\r');
    expect(normalizeSource('\n')).toBe('');
    const d = await sourceDigest('σ = np.ones(3)  # µ\n');
    expect(d).toMatch(DIGEST_PATTERN);
    expect(d).toBe(createHash('sha256').update('σ = np.ones(3)  # µ', 'utf8').digest('hex'));
    expect(await sourceDigest('a\n')).toBe(await sourceDigest('a'));
    expect(await sourceDigest('a ')).not.toBe(await sourceDigest('a'));
  });

  it('gives what the helper computes in Python for the same text', async () => {
    // Python's hashlib with the helper's rule: s.rstrip("\n").encode("utf-8").
    const texts = ['', 'x', 'x\n', 'a = 1\nb = 2\n\n', 'tab\t ', 'wide 😀 𝑥', 'crlf\r\n'];
    const r = spawnSync(
      PYTHON,
      [
        '-c',
        'import hashlib, json, sys\n' +
          'print(json.dumps([hashlib.sha256(s.rstrip("\\n").encode("utf-8")).hexdigest() for s in json.load(sys.stdin)]))'
      ],
      { input: JSON.stringify(texts), encoding: 'utf8' }
    );
    expect(r.stderr).toBe('');
    const expected = JSON.parse(r.stdout) as string[];
    for (let i = 0; i < texts.length; i++) {
      expect(await sourceDigest(texts[i])).toBe(expected[i]);
      expect(sha256Hex(utf8(normalizeSource(texts[i])))).toBe(expected[i]);
    }
  });

  it('refuses lone surrogates and non-strings', async () => {
    expect(isWellFormed('a😀b')).toBe(true);
    expect(isWellFormed('a\uD83Db')).toBe(false);
    expect(isWellFormed('a\uDE00')).toBe(false);
    await expect(sourceDigest('x\uD800')).rejects.toThrow(RangeError);
    await expect(sourceDigest(3 as unknown as string)).rejects.toThrow(
      'source must be a string, got number'
    );
  });
});
