/**
 * Level-1/2 kernels: each behaviour (stride, offset, empty, negative stride, overflow) against
 * plain formulas. Semantics: reference BLAS (Lawson et al., ACM TOMS 5, 1979; Dongarra et al.,
 * ACM TOMS 14, 1988).
 */
import {
  daxpy,
  dcopy,
  ddot,
  dgemv,
  dger,
  dnrm2,
  dscal,
  dswap,
  dznrm2,
  idamax,
  izamax,
  zaxpy,
  zdotc,
  zdotu,
  zdscal,
  zgemv,
  zgerc,
  zgeru,
  zscal,
  zswap,
  zcopy
} from '../../../src/core/linalg';
import { Rng } from './helpers';

const f = (xs: number[]) => Float64Array.from(xs);

describe('real level-1 kernels', () => {
  test('ddot with unit, non-unit and negative strides and offsets', () => {
    const x = f([9, 1, 9, 2, 9, 3]);
    const y = f([4, 5, 6]);
    expect(ddot(3, x, 2, 1, y, 1, 0)).toBe(1 * 4 + 2 * 5 + 3 * 6);
    // negative stride walks backwards from the offset (caller gives the start element)
    expect(ddot(3, x, -2, 5, y, 1, 0)).toBe(3 * 4 + 2 * 5 + 1 * 6);
    expect(ddot(0, x, 1, 0, y, 1, 0)).toBe(0);
    expect(ddot(3, f([1, 2, 3]), 1, 0, y, 1, 0)).toBe(32);
  });

  test('dnrm2 is exact on simple cases and safe against overflow and underflow', () => {
    expect(dnrm2(2, f([3, 4]), 1, 0)).toBe(5);
    expect(dnrm2(0, f([]), 1, 0)).toBe(0);
    // Naive √(Σx²) overflows to Inf here and underflows to 0 below (common practice: this is
    // why the reference dnrm2 scales; Anderson, ACM TOMS 44, 2017).
    const big = dnrm2(2, f([3e300, 4e300]), 1, 0);
    expect(Math.abs(big - 5e300) / 5e300).toBeLessThan(4e-16);
    const tiny = dnrm2(2, f([3e-300, 4e-300]), 1, 0);
    expect(Math.abs(tiny - 5e-300) / 5e-300).toBeLessThan(4e-16);
    const sub = dnrm2(2, f([3 * 2 ** -1074, 4 * 2 ** -1074]), 1, 0);
    expect(sub).toBe(5 * 2 ** -1074);
    // mixed magnitudes: big dominates
    expect(dnrm2(3, f([1e-300, 1, 1e300]), 1, 0)).toBe(1e300);
    expect(dnrm2(3, f([1e-170, 3, 4]), 1, 0)).toBe(5);
    // strided
    expect(dnrm2(2, f([3, 99, 4]), 2, 0)).toBe(5);
  });

  test('dnrm2 agrees with a long-hand sum on random vectors', () => {
    const rng = new Rng(7);
    for (let t = 0; t < 50; t++) {
      const n = rng.int(1, 200);
      const x = new Float64Array(n).map(() => rng.normal());
      let s = 0;
      for (const v of x) {
        s += v * v;
      }
      expect(Math.abs(dnrm2(n, x, 1, 0) - Math.sqrt(s))).toBeLessThan(n * 2.3e-16 * Math.sqrt(s));
    }
  });

  test('daxpy, dscal, dcopy, dswap, idamax', () => {
    const y = f([1, 1, 1, 1]);
    daxpy(2, 2, f([1, 2]), 1, 0, y, 2, 1);
    expect(Array.from(y)).toEqual([1, 3, 1, 5]);
    const x = f([1, 2, 3]);
    dscal(2, -1, x, 2, 0);
    expect(Array.from(x)).toEqual([-1, 2, -3]);
    const c = new Float64Array(3);
    dcopy(3, x, -1, 2, c, 1, 0);
    expect(Array.from(c)).toEqual([-3, 2, -1]);
    const a = f([1, 2]);
    const b = f([3, 4]);
    dswap(2, a, 1, 0, b, 1, 0);
    expect(Array.from(a)).toEqual([3, 4]);
    expect(idamax(3, f([1, -5, 5]), 1, 0)).toBe(1);
    expect(idamax(0, f([]), 1, 0)).toBe(-1);
  });
});

describe('real level-2 kernels on row- and column-major storage', () => {
  // A = [1 2 3; 4 5 6]
  const colMajor = f([1, 4, 2, 5, 3, 6]);
  const rowMajor = f([1, 2, 3, 4, 5, 6]);
  test.each([
    ['column-major', colMajor, 1, 2],
    ['row-major', rowMajor, 3, 1]
  ])('dgemv N and T (%s)', (_name, a, s1, s2) => {
    const y = f([100, 200]);
    dgemv('N', 2, 3, 2, a, s1, s2, 0, f([1, 1, 1]), 1, 0, 0.5, y, 1, 0);
    expect(Array.from(y)).toEqual([2 * 6 + 50, 2 * 15 + 100]);
    const z = f([NaN, NaN, NaN]);
    dgemv('T', 2, 3, 1, a, s1, s2, 0, f([1, -1]), 1, 0, 0, z, 1, 0);
    expect(Array.from(z)).toEqual([-3, -3, -3]);
  });
  test.each([
    ['column-major', 1, 2],
    ['row-major', 3, 1]
  ])('dger (%s)', (_name, s1, s2) => {
    const a = new Float64Array(6);
    dger(2, 3, 2, f([1, 2]), 1, 0, f([1, 0, -1]), 1, 0, a, s1, s2, 0);
    const at = (i: number, j: number) => a[i * s1 + j * s2];
    expect([at(0, 0), at(0, 1), at(0, 2), at(1, 0), at(1, 1), at(1, 2)]).toEqual([
      2, 0, -2, 4, 0, -4
    ]);
  });
});

describe('complex kernels (interleaved, strides in complex elements)', () => {
  test('zdotc conjugates x, zdotu does not', () => {
    const x = f([1, 2, 3, -1]); // 1+2i, 3−i
    const y = f([0, 1, 2, 2]); // i, 2+2i
    const out = new Float64Array(2);
    zdotc(2, x, 1, 0, y, 1, 0, out);
    // conj(1+2i)·i + conj(3−i)(2+2i) = (2 + i) + (3+i)(2+2i) = (2+i) + (4+8i) = 6 + 9i
    expect(Array.from(out)).toEqual([6, 9]);
    zdotu(2, x, 1, 0, y, 1, 0, out);
    // (1+2i)i + (3−i)(2+2i) = (−2+i) + (8+4i) = 6+5i
    expect(Array.from(out)).toEqual([6, 5]);
  });
  test('dznrm2 overflow-safe', () => {
    expect(dznrm2(1, f([3e300, 4e300]), 1, 0) / 5e300).toBeCloseTo(1, 15);
    expect(dznrm2(2, f([1, 0, 0, 99, 0, 0]), 2, 0)).toBe(1);
  });
  test('zaxpy, zscal, zdscal, zcopy, zswap, izamax', () => {
    const y = f([1, 1, 0, 0]);
    zaxpy(2, 0, 1, f([1, 0, 0, 1]), 1, 0, y, 1, 0); // y += i·x
    expect(Array.from(y)).toEqual([1, 2, -1, 0]);
    const x = f([1, 1]);
    zscal(1, 0, 1, x, 1, 0);
    expect(Array.from(x)).toEqual([-1, 1]);
    zdscal(1, 2, x, 1, 0);
    expect(Array.from(x)).toEqual([-2, 2]);
    const c = new Float64Array(4);
    zcopy(2, f([1, 2, 3, 4]), -1, 1, c, 1, 0);
    expect(Array.from(c)).toEqual([3, 4, 1, 2]);
    const a = f([1, 2]);
    const b = f([3, 4]);
    zswap(1, a, 1, 0, b, 1, 0);
    expect(Array.from(a)).toEqual([3, 4]);
    expect(izamax(2, f([1, 1, -3, 0]), 1, 0)).toBe(1);
  });
  test('zgemv N, T, C and zgerc/zgeru against element-wise formulas', () => {
    const rng = new Rng(3);
    const m = 3;
    const n = 4;
    const a = new Float64Array(2 * m * n).map(() => rng.normal());
    const x4 = new Float64Array(8).map(() => rng.normal());
    const x3 = new Float64Array(6).map(() => rng.normal());
    const at = (i: number, j: number) => [a[2 * (i + j * m)], a[2 * (i + j * m) + 1]];
    const y = new Float64Array(6);
    zgemv('N', m, n, 1, 0, a, 1, m, 0, x4, 1, 0, 0, 0, y, 1, 0);
    for (let i = 0; i < m; i++) {
      let re = 0;
      let im = 0;
      for (let j = 0; j < n; j++) {
        const [ar, ai] = at(i, j);
        re += ar * x4[2 * j] - ai * x4[2 * j + 1];
        im += ar * x4[2 * j + 1] + ai * x4[2 * j];
      }
      expect(y[2 * i]).toBeCloseTo(re, 13);
      expect(y[2 * i + 1]).toBeCloseTo(im, 13);
    }
    for (const tr of ['T', 'C'] as const) {
      const z = new Float64Array(8);
      zgemv(tr, m, n, 1, 0, a, 1, m, 0, x3, 1, 0, 0, 0, z, 1, 0);
      for (let j = 0; j < n; j++) {
        let re = 0;
        let im = 0;
        for (let i = 0; i < m; i++) {
          const [ar, ai0] = at(i, j);
          const ai = tr === 'C' ? -ai0 : ai0;
          re += ar * x3[2 * i] - ai * x3[2 * i + 1];
          im += ar * x3[2 * i + 1] + ai * x3[2 * i];
        }
        expect(z[2 * j]).toBeCloseTo(re, 13);
        expect(z[2 * j + 1]).toBeCloseTo(im, 13);
      }
    }
    const g = new Float64Array(2 * m * n);
    zgerc(m, n, 1, 0, x3, 1, 0, x4, 1, 0, g, 1, m, 0);
    const h = new Float64Array(2 * m * n);
    zgeru(m, n, 1, 0, x3, 1, 0, x4, 1, 0, h, 1, m, 0);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < n; j++) {
        const k = 2 * (i + j * m);
        const [xr, xi] = [x3[2 * i], x3[2 * i + 1]];
        const [yr, yi] = [x4[2 * j], x4[2 * j + 1]];
        expect(g[k]).toBeCloseTo(xr * yr + xi * yi, 13);
        expect(g[k + 1]).toBeCloseTo(xi * yr - xr * yi, 13);
        expect(h[k]).toBeCloseTo(xr * yr - xi * yi, 13);
        expect(h[k + 1]).toBeCloseTo(xi * yr + xr * yi, 13);
      }
    }
  });
});
