/**
 * Display decimation (M4: first, min, max, last per pixel column; Jugel et al., "M4: a
 * visualization-oriented time series data aggregation", PVLDB 7(10), 2014) against a naive
 * per-column scan written here from the definition: sample i of [i0, i1) belongs to column
 * ⌊(i − i0)·columns/n⌋ (computed in BigInt, independently of the kernel's column starts); a
 * column's points are its first and last sample and its earliest minimum and maximum over the
 * non-NaN samples, in index order without repeats; n ≤ 4·columns gives every sample. Random
 * signals, ranges, strides, offsets and chunk borders from fast-check 4.
 */
import fc from 'fast-check';
import {
  EnvelopeBuilder,
  envelope,
  envelopeCapacity,
  m4Envelope,
  type EnvelopePart
} from '../../../src/core/dsp';
import { gather, naive } from './envelope-reference';

const view = fc
  .record({
    n: fc.integer({ min: 0, max: 300 }),
    stride: fc.integer({ min: -3, max: 3 }).filter(s => s !== 0),
    pad: fc.integer({ min: 0, max: 4 }),
    complex: fc.boolean(),
    part: fc.constantFrom<EnvelopePart>('real', 'imag', 'abs'),
    columns: fc.integer({ min: 1, max: 40 }),
    a: fc.nat(),
    b: fc.nat()
  })
  .chain(r => {
    const W = r.complex ? 2 : 1;
    const span = r.n === 0 ? 0 : (r.n - 1) * Math.abs(r.stride) + 1;
    const len = span + r.pad;
    return fc.record({
      r: fc.constant(r),
      buf: fc.array(fc.double({ noNaN: true }), { minLength: len * W, maxLength: len * W }),
      // a coarse alphabet too, so that ties (equal minima, −0 and +0) happen often
      ties: fc.boolean()
    });
  });

function setup(r: {
  n: number;
  stride: number;
  pad: number;
  complex: boolean;
  a: number;
  b: number;
}): { offset: number; i0: number; i1: number } {
  const offset = r.stride > 0 ? r.pad % 3 : (r.n - 1) * -r.stride + (r.pad % 3);
  const lo = r.n === 0 ? 0 : r.a % (r.n + 1);
  const hi = r.n === 0 ? 0 : r.b % (r.n + 1);
  return { offset: r.n === 0 ? 0 : offset, i0: Math.min(lo, hi), i1: Math.max(lo, hi) };
}

test('random NaN-free signals, ranges, strides and offsets: identical to the naive per-column scan', () => {
  let checked = 0;
  fc.assert(
    fc.property(view, ({ r, buf, ties }) => {
      const data = Float64Array.from(buf, v =>
        ties ? [-0, 0, 1, -1, 2][(Math.abs(v) % 5) | 0] : v
      );
      const { offset, i0, i1 } = setup(r);
      const part = r.complex ? r.part : 'real';
      const sig = { data, complex: r.complex, n: r.n, stride: r.stride, offset };
      const env = envelope(sig, { columns: r.columns, i0, i1, part });
      const { v, key } = gather(data, r.n, r.stride, offset, r.complex, part);
      const ref = naive(v, key, i0, i1, r.columns);
      expect(Array.from(env.x.subarray(0, env.count))).toEqual(ref.x);
      expect(Array.from(env.y.subarray(0, env.count))).toEqual(ref.y);
      expect(env.count).toBeLessThanOrEqual(envelopeCapacity(r.columns));
      checked++;
    }),
    { numRuns: 400, seed: 1101 }
  );
  expect(checked).toBe(400);
});

test('extremes a few ulps outside the running range, at any scale, are never skipped', () => {
  // The kernel skips blocks of samples strictly inside the running [min, max] with a rounded
  // midpoint test; samples a few units in the last place beyond it (around any base value, from
  // subnormal to near overflow, with offsets) must still be found.
  fc.assert(
    fc.property(
      fc.double({ noNaN: true, noDefaultInfinity: true }),
      fc.double({ min: 0, max: 1e6, noNaN: true }),
      fc.array(fc.integer({ min: -6, max: 6 }), { minLength: 9, maxLength: 200 }),
      fc.integer({ min: 1, max: 3 }),
      (base, spread, steps, columns) => {
        const ulp = Math.max(Math.abs(base) * Number.EPSILON, Number.MIN_VALUE);
        const data = Float64Array.from(steps, (st, i) =>
          i % 3 === 0 ? base + st * ulp : base + st * ulp * (1 + spread * (i % 2))
        );
        const env = envelope(data, { columns });
        const ref = naive(data, data, 0, data.length, columns);
        expect(Array.from(env.x.subarray(0, env.count))).toEqual(ref.x);
        expect(Array.from(env.y.subarray(0, env.count))).toEqual(ref.y);
      }
    ),
    { numRuns: 500, seed: 1105 }
  );
  // A range whose midpoint rounds towards the maximum while the half-range rounds up (ties to
  // even at the scale of 5e15, where one ulp is 1): without the radius's margin the new maximum
  // 1 + 2⁻⁵² in the third block of eight would be skipped.
  const d = new Float64Array(24);
  d[0] = -1e16 + 2;
  d[3] = 1;
  d[13] = 1 + 2 ** -52;
  const e = envelope(d, { columns: 1 });
  expect(Array.from(e.x.subarray(0, e.count))).toEqual([0, 13, 23]);
  expect(e.y[1]).toBe(1 + 2 ** -52);
  // strided: the same samples every third element
  const s = new Float64Array(72);
  d.forEach((v, i) => (s[3 * i] = v));
  const f = envelope({ data: s, stride: 3, n: 24 }, { columns: 1 });
  expect(Array.from(f.x.subarray(0, f.count))).toEqual([0, 13, 23]);
});

test("every column's minimum and maximum (and first and last sample) are among the points", () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ noNaN: true, min: -1e6, max: 1e6 }), { minLength: 50, maxLength: 2000 }),
      fc.integer({ min: 1, max: 12 }),
      (arr, columns) => {
        const data = Float64Array.from(arr);
        const n = data.length;
        const env = envelope(data, { columns });
        const xs = Array.from(env.x.subarray(0, env.count));
        // columns from the definition, in BigInt
        const col = (i: number) => Number((BigInt(i) * BigInt(columns)) / BigInt(n));
        for (let c = 0; c < columns; c++) {
          const idx = [...Array(n).keys()].filter(i => col(i) === c);
          const vals = idx.map(i => data[i]);
          const inCol = xs.filter(i => col(i) === c).map(i => data[i]);
          if (n > 4 * columns) {
            expect(inCol.length).toBeLessThanOrEqual(4);
          }
          expect(Math.min(...inCol)).toBe(Math.min(...vals));
          expect(Math.max(...inCol)).toBe(Math.max(...vals));
          expect(xs).toContain(idx[0]);
          expect(xs).toContain(idx[idx.length - 1]);
        }
        // draw order: strictly increasing sample indices
        for (let k = 1; k < xs.length; k++) {
          expect(xs[k]).toBeGreaterThan(xs[k - 1]);
        }
      }
    ),
    { numRuns: 100, seed: 1102 }
  );
});

test('chunked input (any split, any order of arrival) gives exactly the one-shot envelope', () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ noNaN: true }), { minLength: 1, maxLength: 400 }),
      fc.array(fc.nat(), { maxLength: 12 }),
      fc.integer({ min: 1, max: 30 }),
      fc.boolean(),
      fc.constantFrom<EnvelopePart>('real', 'imag', 'abs'),
      fc.nat(),
      fc.nat(),
      fc.nat(),
      (arr, cuts, columns, complex, part, a, b, seed) => {
        const W = complex ? 2 : 1;
        const n = Math.floor(arr.length / W);
        const data = Float64Array.from(arr.slice(0, n * W));
        const i0 = Math.min(a % (n + 1), b % (n + 1));
        const i1 = Math.max(a % (n + 1), b % (n + 1));
        const p = complex ? part : 'real';
        const one = envelope({ data, complex, n }, { columns, i0, i1, part: p });
        // chunk borders anywhere in [0, n], delivered in a shuffled order
        const borders = [...new Set([0, n, ...cuts.map(c => c % (n + 1))])].sort((u, v) => u - v);
        const chunks: [number, number][] = [];
        for (let k = 0; k + 1 < borders.length; k++) {
          chunks.push([borders[k], borders[k + 1]]);
        }
        let s = seed;
        for (let k = chunks.length - 1; k > 0; k--) {
          s = (s * 1103515245 + 12345) % 2147483648;
          const j = s % (k + 1);
          [chunks[k], chunks[j]] = [chunks[j], chunks[k]];
        }
        const bld = new EnvelopeBuilder({ i0, i1, columns, complex, part: p });
        for (const [u, v] of chunks) {
          bld.add(data.slice(u * W, v * W), u);
        }
        expect(bld.received).toBe(i1 - i0);
        const x = new Float64Array(envelopeCapacity(columns));
        const y = new Float64Array(envelopeCapacity(columns));
        const cnt = bld.write(x, y);
        expect(cnt).toBe(one.count);
        expect(Array.from(x.subarray(0, cnt))).toEqual(Array.from(one.x.subarray(0, one.count)));
        expect(Array.from(y.subarray(0, cnt))).toEqual(Array.from(one.y.subarray(0, one.count)));
      }
    ),
    { numRuns: 300, seed: 1103 }
  );
});

test('NaN: gaps at column borders stay gaps, all-NaN columns give NaN ends, NaN is never an extreme', () => {
  // 20 samples, 2 columns of 10: [0, 10) and [10, 20)
  const d = Float64Array.from({ length: 20 }, (_, i) => Math.sin(i));
  d[0] = NaN; // the first column starts in a gap
  d[5] = NaN; // a gap strictly inside a column: not drawn
  d[9] = NaN; // ... and ends in one: the line breaks at the border
  const e = envelope(d, { columns: 2 });
  const xs = Array.from(e.x.subarray(0, e.count));
  const ys = Array.from(e.y.subarray(0, e.count));
  expect(xs[0]).toBe(0);
  expect(ys[0]).toBeNaN();
  expect(xs).toContain(9);
  expect(ys[xs.indexOf(9)]).toBeNaN();
  expect(xs).not.toContain(5);
  // the extremes of the finite samples of column 0 (sin 1…8 without 5)
  const fin = [1, 2, 3, 4, 6, 7, 8];
  const mn = fin.reduce((a, i) => (d[i] < d[a] ? i : a));
  const mx = fin.reduce((a, i) => (d[i] > d[a] ? i : a));
  expect(xs).toContain(mn);
  expect(xs).toContain(mx);
  // all-NaN column: its first and last samples, both NaN
  const g = new Float64Array(40).fill(NaN);
  for (let i = 20; i < 40; i++) {
    g[i] = i;
  }
  const f = envelope(g, { columns: 2 });
  expect(Array.from(f.x.subarray(0, f.count))).toEqual([0, 19, 20, 39]);
  expect(f.y[0]).toBeNaN();
  expect(f.y[1]).toBeNaN();
  // random NaN gaps against the naive scan (which skips NaN in min/max by its own code)
  fc.assert(
    fc.property(
      fc.array(fc.oneof(fc.double({ noNaN: true }), fc.constant(NaN)), {
        minLength: 1,
        maxLength: 300
      }),
      fc.integer({ min: 1, max: 20 }),
      (arr, columns) => {
        const data = Float64Array.from(arr);
        const env = envelope(data, { columns });
        const ref = naive(data, data, 0, data.length, columns);
        expect(Array.from(env.x.subarray(0, env.count))).toEqual(ref.x);
        expect(Array.from(env.y.subarray(0, env.count))).toEqual(ref.y);
      }
    ),
    { numRuns: 200, seed: 1104 }
  );
});

test('a long signal: 1e5 samples into 1000 columns, against the naive scan', () => {
  let s = 12345;
  const data = new Float64Array(100000);
  for (let i = 0; i < data.length; i++) {
    s = (s * 16807) % 2147483647;
    data[i] = Math.sin(i / 300) + s / 2147483647 - 0.5;
  }
  const env = envelope(data, { columns: 1000, i0: 777, i1: 99001 });
  const ref = naive(data, data, 777, 99001, 1000);
  expect(Array.from(env.x.subarray(0, env.count))).toEqual(ref.x);
  expect(Array.from(env.y.subarray(0, env.count))).toEqual(ref.y);
  expect(env.count).toBeGreaterThan(2000);
  // the kernel writes into the caller's buffers from index 0 and returns the count
  const x = new Float64Array(4000);
  const y = new Float64Array(4000);
  expect(m4Envelope(data, 1, 0, 777, 99001, 1000, x, y)).toBe(env.count);
  expect(Array.from(x.subarray(0, env.count))).toEqual(ref.x);
});

test('few samples per column: every sample as it is; an empty range: no point', () => {
  const d = Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]);
  const e = envelope(d, { columns: 2 });
  expect(Array.from(e.x.subarray(0, e.count))).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  expect(Array.from(e.y.subarray(0, e.count))).toEqual(Array.from(d));
  expect(envelope(d, { columns: 3, i0: 4, i1: 4 }).count).toBe(0);
  // one column over 9 samples: first 3, min 1 (earliest), max 9, last 5
  const f = envelope(Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6, 5]), { columns: 1 });
  expect(Array.from(f.x.subarray(0, f.count))).toEqual([0, 1, 5, 8]);
  expect(Array.from(f.y.subarray(0, f.count))).toEqual([3, 1, 9, 5]);
});

test('bad arguments throw clear errors naming the argument', () => {
  const d = new Float64Array(10);
  expect(() => envelope(d, { columns: 0 })).toThrow(/options.columns must be in \[1/);
  expect(() => envelope(d, { columns: 2, i1: 11 })).toThrow(/options.i1 must be in \[0, 10\]/);
  expect(() => envelope(d, { columns: 2, i0: 5, i1: 4 })).toThrow(/options.i1 must be in \[5/);
  expect(() => envelope({ data: d, stride: 0 }, { columns: 2 })).toThrow(/stride must not be 0/);
  expect(() => envelope({ data: d, n: 6, stride: 2 }, { columns: 2 })).toThrow(
    /sample 5 would be at element 10, outside the 10 elements/
  );
  expect(() => envelope(d, { columns: 2, part: 'abs' })).toThrow(/needs complex data/);
  expect(() => envelope(new Float64Array(3), { columns: 1, complex: true })).toThrow(
    /\(re, im\) pairs/
  );
  expect(() => envelope([1, 2, 3], { columns: 1 })).toThrow(/must be a Float64Array/);
  expect(() => envelope(new Float64Array(100), { columns: 2, x: new Float64Array(7) })).toThrow(
    /options.x has length 7; this envelope needs 8/
  );
  const b = new EnvelopeBuilder({ i0: 0, i1: 100, columns: 4 });
  expect(() => b.add(new Float64Array(4), -1)).toThrow(/start must be in \[0/);
  expect(() => b.add({ data: new Float64Array(4), complex: true }, 0)).toThrow(/chunk is complex/);
});
