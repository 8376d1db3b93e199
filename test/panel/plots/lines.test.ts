// Long series through the core's M4 envelope (U. Jugel et al., "M4: a visualization-oriented
// time series data aggregation", PVLDB 7(10), 2014: first, last, minimum and maximum of each
// pixel column draw the same line pixels as all samples).
import {
  fullPoints,
  indexRange,
  linePoints,
  rowCount,
  rowOf,
  type LineSource
} from '../../../src/panel/plots/lines';
import { rng, vec } from './fixtures';

function source(data: Float64Array, over: Partial<LineSource> = {}): LineSource {
  return {
    name: 's',
    signal: { data, complex: false, n: data.length, stride: 1, offset: 0 },
    part: 'real',
    dx: 1,
    color: 0,
    ...over
  };
}

describe('rows of result arrays', () => {
  test('a K×N array gives row views without copying', () => {
    const a = vec(Float64Array.from([1, 2, 3, 4, 5, 6]), false, [2, 3]);
    expect(rowCount(a)).toBe(2);
    const r = rowOf(a, 1);
    expect(r).toMatchObject({ n: 3, stride: 1, offset: 3 });
    expect(r.data).toBe(a.data);
    expect(() => rowOf(a, 2)).toThrow(/row 2 is outside this array's 2 rows/);
  });
});

describe('visible range to sample indices', () => {
  test('uniform series in seconds take one sample either side', () => {
    const s = source(new Float64Array(1000), { dx: 1 / 100 });
    expect(indexRange(s, null)).toEqual([0, 1000]);
    expect(indexRange(s, [1, 2])).toEqual([99, 202]);
    expect(indexRange(s, [2, 1])).toEqual([99, 202]);
    expect(indexRange(s, [-5, 50])).toEqual([0, 1000]);
  });
  test('non-uniform series search their x table', () => {
    const s = source(new Float64Array(5), { xTable: Float64Array.from([0, 10, 20, 30, 40]) });
    expect(indexRange(s, [15, 25])).toEqual([1, 4]);
  });
});

describe('points drawn', () => {
  const N = 1_000_000;
  const r = rng(3);
  const data = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    data[i] = r() - 0.5;
  }
  data[123_457] = 5; // a single spike must survive decimation
  data[876_543] = -5;

  test('the whole trace stays within 4 points per column and keeps every extreme', () => {
    const p = linePoints(source(data), 0, N, 500);
    expect(p.y.length).toBeLessThanOrEqual(2000);
    expect(Math.max(...p.y)).toBe(5);
    expect(Math.min(...p.y)).toBe(-5);
    expect(p.index[0]).toBe(0);
    expect(p.index[p.index.length - 1]).toBe(N - 1);
  });

  test('zoomed to 1000 samples, every sample is drawn', () => {
    const s = source(data, { dx: 1e-3 });
    const [i0, i1] = indexRange(s, [500, 500.999]);
    const p = linePoints(s, i0, i1, 500);
    expect(p.y.length).toBe(i1 - i0);
    expect(i1 - i0).toBeGreaterThanOrEqual(1000);
    for (let k = 0; k < p.y.length; k++) {
      expect(p.y[k]).toBe(data[i0 + k]);
      expect(p.x[k]).toBeCloseTo((i0 + k) * 1e-3, 12);
    }
  });

  test('powers in dB are 10·log10 of the values (definition of the decibel)', () => {
    const p = fullPoints(source(Float64Array.from([1, 10, 100, 0.001]), { db: true }), 0, 4);
    expect(Array.from(p.y)).toEqual([0, 10, 20, -30]);
  });

  test('complex series: magnitude, parts and the phase at the drawn samples', () => {
    // z = 3 + 4j → |z| = 5, arg z = atan2(4, 3) (common practice)
    const z = Float64Array.from([3, 4, -1, 0, 0, -2]);
    const sig = { data: z, complex: true, n: 3, stride: 1, offset: 0 };
    const abs = fullPoints(source(z, { signal: sig, part: 'abs' }), 0, 3);
    expect(Array.from(abs.y)).toEqual([5, 1, 2]);
    const im = fullPoints(source(z, { signal: sig, part: 'imag' }), 0, 3);
    expect(Array.from(im.y)).toEqual([4, 0, -2]);
    const ph = fullPoints(source(z, { signal: sig, part: 'phase' }), 0, 3);
    expect(ph.y[0]).toBeCloseTo(Math.atan2(4, 3), 15);
    expect(ph.y[1]).toBeCloseTo(Math.PI, 15);
    expect(ph.y[2]).toBeCloseTo(-Math.PI / 2, 15);
  });

  test('strided series (one tap of a trajectory) read their own samples', () => {
    const t = Float64Array.from([0, 1, 2, 10, 11, 12, 20, 21, 22]); // 3 rows × 3 taps
    const s = source(t, {
      signal: { data: t, complex: false, n: 3, stride: 3, offset: 1 },
      xTable: Float64Array.from([5, 15, 25])
    });
    const p = fullPoints(s, 0, 3);
    expect(Array.from(p.y)).toEqual([1, 11, 21]);
    expect(Array.from(p.x)).toEqual([5, 15, 25]);
  });
});
