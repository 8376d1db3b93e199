/**
 * The naive M4 reference the envelope tests share, written from the definition (Jugel et al.,
 * "M4: a visualization-oriented time series data aggregation", PVLDB 7(10), 2014, and the module
 * comment of src/core/dsp/decimate.ts): sample i of [i0, i1) belongs to column
 * ⌊(i − i0)·columns/n⌋ (computed in BigInt, independently of the kernel's column starts); a
 * column's points are its first and last sample and its earliest minimum and maximum over the
 * non-NaN samples, in index order without repeats; n ≤ 4·columns gives every sample.
 */
import type { EnvelopePart } from '../../../src/core/dsp';

/** The naive reference on per-sample values v (the quantity enveloped). */
export function naive(
  v: ArrayLike<number>,
  key: ArrayLike<number>,
  i0: number,
  i1: number,
  columns: number
): { x: number[]; y: number[] } {
  const n = i1 - i0;
  const x: number[] = [];
  const y: number[] = [];
  if (n <= 0) {
    return { x, y };
  }
  if (n <= 4 * columns) {
    for (let i = i0; i < i1; i++) {
      x.push(i);
      y.push(v[i]);
    }
    return { x, y };
  }
  const members: number[][] = Array.from({ length: columns }, () => []);
  for (let i = i0; i < i1; i++) {
    const c = Number((BigInt(i - i0) * BigInt(columns)) / BigInt(n));
    members[c].push(i);
  }
  for (const idx of members) {
    let mn = -1;
    let mx = -1;
    for (const i of idx) {
      if (Number.isNaN(key[i])) {
        continue;
      }
      if (mn < 0 || key[i] < key[mn]) {
        mn = i;
      }
      if (mx < 0 || key[i] > key[mx]) {
        mx = i;
      }
    }
    const pts = [idx[0], idx[idx.length - 1]];
    if (mn >= 0) {
      pts.push(mn, mx);
    }
    const uniq = [...new Set(pts)].sort((a, b) => a - b);
    for (const i of uniq) {
      x.push(i);
      y.push(v[i]);
    }
  }
  return { x, y };
}

/** The values of a strided view of `buf`: sample k at buf[offset + k*stride] (complex: ×2). */
export function gather(
  buf: Float64Array,
  n: number,
  stride: number,
  offset: number,
  complex: boolean,
  part: EnvelopePart
): { v: number[]; key: number[] } {
  const v: number[] = [];
  const key: number[] = [];
  for (let k = 0; k < n; k++) {
    if (!complex) {
      v.push(buf[offset + k * stride]);
      key.push(buf[offset + k * stride]);
      continue;
    }
    const re = buf[2 * (offset + k * stride)];
    const im = buf[2 * (offset + k * stride) + 1];
    if (part === 'real') {
      v.push(re);
      key.push(re);
    } else if (part === 'imag') {
      v.push(im);
      key.push(im);
    } else {
      // the documented ordering key for |z| is re² + im²; the value drawn is hypot(re, im)
      v.push(Number.isNaN(re) || Number.isNaN(im) ? NaN : Math.hypot(re, im));
      key.push(re * re + im * im);
    }
  }
  return { v, key };
}
