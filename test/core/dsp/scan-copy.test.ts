/**
 * The SIMD column scans (src/core/dsp/column-scan.wat, used through scan copies) give exactly the
 * envelope the definition gives: checked against the naive M4 reference of envelope-reference.ts
 * (Jugel et al., PVLDB 7(10), 2014) on random data with ties, ±0, ±Infinity and NaN, and against
 * NumPy 2 in the project's venv (per-column min, max, argmin and argmax of a reshaped array;
 * numpy.argmin/argmax return the first occurrence, as documented for numpy.argmax). The
 * assembled module must match its text source (scripts/build-wasm.mjs --check).
 */
import { spawnSync } from 'child_process';
import fc from 'fast-check';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import {
  envelope,
  m4Envelope,
  ScanCopies,
  SCAN_COPY_SLICE,
  scanCopiesAvailable,
  scanCopy,
  type EnvelopePart
} from '../../../src/core/dsp';
import { gather, naive } from './envelope-reference';

const root = path.resolve(__dirname, '../../..');

test('the module in column-scan-wasm.ts is column-scan.wat assembled (wabt)', () => {
  const r = spawnSync(process.execPath, [path.join(root, 'scripts/build-wasm.mjs'), '--check'], {
    encoding: 'utf8'
  });
  expect(r.stdout + r.stderr).toContain('matches');
  expect(r.status).toBe(0);
});

test('WebAssembly SIMD is there in Node 20 (else the checks below would test the JavaScript scan)', () => {
  expect(scanCopiesAvailable()).toBe(true);
  const x = Float64Array.from([3, -1, 2]);
  const c = scanCopy(x);
  expect(c).not.toBeNull();
  expect(c).not.toBe(x);
  expect(Array.from(c!)).toEqual([3, -1, 2]);
  expect(c!.buffer).not.toBe(x.buffer);
});

/** Values drawn from a small alphabet half of the time (ties, ±0, ±Infinity, NaN). */
const sample = fc.oneof(fc.double(), fc.constantFrom(0, -0, 1, -1, 2, Infinity, -Infinity, NaN));

// Columns of up to 3000 samples: the module's whole blocks (128 real or 64 complex samples), its
// tail and its fall-back search all occur.
test('random unit-stride real and complex (real or imaginary part) data: the naive envelope', () => {
  let checked = 0;
  fc.assert(
    fc.property(
      fc.record({
        n: fc.integer({ min: 1, max: 3000 }),
        offset: fc.integer({ min: 0, max: 3 }),
        complex: fc.boolean(),
        part: fc.constantFrom<EnvelopePart>('real', 'imag'),
        columns: fc.integer({ min: 1, max: 20 }),
        a: fc.nat(),
        b: fc.nat(),
        seed: fc.array(sample, { minLength: 1, maxLength: 64 })
      }),
      ({ n, offset, complex, part, columns, a, b, seed }) => {
        const W = complex ? 2 : 1;
        const plain = new Float64Array((n + offset) * W);
        for (let i = 0; i < plain.length; i++) {
          // the seed array repeated and scaled: long enough columns with ties inside them
          plain[i] = seed[i % seed.length] * (1 + ((i * 7) % 3));
        }
        const copy = scanCopy(plain)!;
        const lo = a % (n + 1);
        const hi = b % (n + 1);
        const i0 = Math.min(lo, hi);
        const i1 = Math.max(lo, hi);
        const p = complex ? part : 'real';
        const env = envelope(
          { data: copy, complex, n, stride: 1, offset },
          { columns, i0, i1, part: p }
        );
        const { v, key } = gather(plain, n, 1, offset, complex, p);
        const ref = naive(v, key, i0, i1, columns);
        expect(Array.from(env.x.subarray(0, env.count))).toEqual(ref.x);
        expect(Array.from(env.y.subarray(0, env.count))).toEqual(ref.y);
        checked++;
      }
    ),
    { numRuns: 500, seed: 1201 }
  );
  expect(checked).toBe(500);
});

test('stride 2 over a real array (even and odd offsets): the scan of the same view of the original', () => {
  fc.assert(
    fc.property(
      fc.array(sample, { minLength: 2, maxLength: 3000 }),
      fc.integer({ min: 0, max: 1 }),
      fc.integer({ min: 1, max: 12 }),
      (arr, ox, columns) => {
        const plain = Float64Array.from(arr);
        const copy = scanCopy(plain)!;
        const n = Math.floor((plain.length - ox + 1) / 2);
        const xa = new Float64Array(4 * columns);
        const ya = new Float64Array(4 * columns);
        const xb = new Float64Array(4 * columns);
        const yb = new Float64Array(4 * columns);
        const ca = m4Envelope(plain, 2, ox, 0, n, columns, xa, ya);
        const cb = m4Envelope(copy, 2, ox, 0, n, columns, xb, yb);
        expect(cb).toBe(ca);
        expect(Array.from(xb.subarray(0, cb))).toEqual(Array.from(xa.subarray(0, ca)));
        expect(Array.from(yb.subarray(0, cb))).toEqual(Array.from(ya.subarray(0, ca)));
        // and the JavaScript scan itself against the definition
        const v = Array.from({ length: n }, (_, k) => plain[ox + 2 * k]);
        const ref = naive(v, v, 0, n, columns);
        expect(Array.from(xa.subarray(0, ca))).toEqual(ref.x);
      }
    ),
    { numRuns: 300, seed: 1202 }
  );
});

test('1e6 samples in 1000 columns: minima, maxima and their first positions as NumPy gives them', () => {
  const python = path.join(root, '.venv', 'bin', 'python');
  if (!fs.existsSync(python)) {
    throw new Error(
      `the NumPy check needs the project's Python at ${path.relative(root, python)}: ` +
        'create it with `python3 -m venv .venv && .venv/bin/pip install --retries 0 numpy scipy`'
    );
  }
  const N = 1_000_000;
  const C = 1000;
  let s = 20261203;
  const plain = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    s = (s * 16807) % 2147483647;
    // a slow tone plus uniform noise, rounded so that equal values (ties) occur in a column
    plain[i] = Math.round(1000 * (Math.sin(i / 5000) + s / 2147483647 - 0.5)) / 1000;
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-scan-'));
  try {
    const file = path.join(dir, 'x.f64');
    fs.writeFileSync(file, Buffer.from(plain.buffer));
    const py = `
import sys, json, numpy as np
r = np.fromfile(sys.argv[1], dtype='<f8').reshape(${C}, -1)
print(json.dumps({'imin': r.argmin(axis=1).tolist(), 'imax': r.argmax(axis=1).tolist(),
                  'vmin': r.min(axis=1).tolist(), 'vmax': r.max(axis=1).tolist()}))
`;
    const out = spawnSync(python, ['-c', py, file], { encoding: 'utf8', maxBuffer: 1 << 24 });
    expect(out.status).toBe(0);
    const np = JSON.parse(out.stdout) as Record<'imin' | 'imax' | 'vmin' | 'vmax', number[]>;
    const copy = scanCopy(plain)!;
    const env = envelope(copy, { columns: C });
    const xs = Array.from(env.x.subarray(0, env.count));
    const ys = Array.from(env.y.subarray(0, env.count));
    const per = N / C;
    let ties = 0;
    for (let c = 0; c < C; c++) {
      // the column's points: at most 4, all inside [c·per, (c+1)·per)
      const pts = xs.map((x, k) => [x, ys[k]]).filter(([x]) => x >= c * per && x < (c + 1) * per);
      const ix = pts.map(([x]) => x);
      const imin = c * per + np.imin[c];
      const imax = c * per + np.imax[c];
      expect(ix).toContain(imin);
      expect(ix).toContain(imax);
      expect(pts.find(([x]) => x === imin)![1]).toBe(np.vmin[c]);
      expect(pts.find(([x]) => x === imax)![1]).toBe(np.vmax[c]);
      // every other point is the column's first or last sample
      for (const x of ix) {
        expect([c * per, (c + 1) * per - 1, imin, imax]).toContain(x);
      }
      for (let i = c * per; i < (c + 1) * per; i++) {
        if (i !== imin && plain[i] === np.vmin[c]) {
          ties++;
        }
      }
    }
    // the data has ties of the minimum after its first position, so "first" was exercised
    expect(ties).toBeGreaterThan(50);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
});

describe('ScanCopies', () => {
  test('copies a long range in slices when scheduled, then hands out the copy', () => {
    const queue: (() => void)[] = [];
    const copies = new ScanCopies({ minLength: 1000, schedule: w => queue.push(w) });
    const x = Float64Array.from({ length: 2 * SCAN_COPY_SLICE + 5 }, (_, i) => Math.sin(i));
    // a short range: no copy
    expect(copies.forEnvelope(x, 999)).toBe(x);
    expect(queue).toHaveLength(0);
    // a long one: the copy starts, x serves until it is filled
    expect(copies.forEnvelope(x, 1000)).toBe(x);
    expect(copies.liveBytes).toBe(x.byteLength);
    let slices = 0;
    while (queue.length) {
      expect(copies.forEnvelope(x, x.length)).toBe(x);
      queue.shift()!();
      slices++;
    }
    expect(slices).toBe(3);
    const c = copies.forEnvelope(x, 1);
    expect(c).not.toBe(x);
    expect(c.length).toBe(x.length);
    expect(c.every((v, i) => v === x[i])).toBe(true);
    // the envelope of the copy is the envelope of x
    const e1 = envelope(x, { columns: 100 });
    const e2 = envelope(c, { columns: 100 });
    expect(Array.from(e2.x)).toEqual(Array.from(e1.x));
    expect(Array.from(e2.y)).toEqual(Array.from(e1.y));
  });

  test('without a schedule the copy is made at once; float32 data and budgets are respected', () => {
    const copies = new ScanCopies({ minLength: 10, budgetBytes: 8 * 100 });
    const a = new Float64Array(100).fill(1);
    const b = new Float64Array(100).fill(2);
    const ca = copies.forEnvelope(a, 100);
    expect(ca).not.toBe(a);
    expect(ca).toEqual(a);
    // the budget (one array of 100) is spent: b stays as it is, and is not tried again
    expect(copies.forEnvelope(b, 100)).toBe(b);
    expect(copies.forEnvelope(b, 100)).toBe(b);
    const f = new Float32Array(100);
    expect(copies.forEnvelope(f, 100)).toBe(f);
  });
});
