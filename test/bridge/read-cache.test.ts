/**
 * The copies kept by the bridge (src/bridge/read-cache.ts): least recently used out first within
 * the byte budget, fresh copies handed out, the header check. Common practice (an LRU cache), no
 * outside source; the end-to-end check against the kernel's SHA-256 is
 * test/integration/reuse.test.ts.
 */
import { ReadCache } from '../../src/bridge/read-cache';
import type { ArrayData } from '../../src/bridge';

const arr = (n: number, v: number): ArrayData => ({
  data: new Float64Array(n).fill(v),
  shape: [n],
  complex: false,
  dtype: 'float64'
});
const D = (c: string): string => c.repeat(64);

test('keeps copies within the budget, least recently used out first', () => {
  const c = new ReadCache(3 * 800);
  c.keep('a', D('a'), arr(100, 1));
  c.keep('b', D('b'), arr(100, 2));
  c.keep('c', D('c'), arr(100, 3));
  expect(c.bytes).toBe(2400);
  // using a makes b the oldest
  expect(c.held('a')?.digest).toBe(D('a'));
  c.keep('d', D('d'), arr(100, 4));
  expect(c.held('b')).toBeNull();
  expect(c.held('a')).not.toBeNull();
  expect(c.bytes).toBe(2400);
  // an array larger than the budget is not kept, and replaces nothing but its own key
  c.keep('a', D('e'), arr(1000, 5));
  expect(c.held('a')).toBeNull();
  expect(c.bytes).toBe(1600);
  // a lower budget drops at once
  c.budgetBytes = 800;
  expect(c.bytes).toBe(800);
  expect(c.held('d')?.digest).toBe(D('d'));
  c.budgetBytes = 0;
  expect(c.bytes).toBe(0);
  expect(c.held('d')).toBeNull();
  expect(() => (c.budgetBytes = NaN)).toThrow(/budgetBytes must be a finite number ≥ 0, got NaN/);
});

test('hands out fresh copies; what a caller does to one reaches neither the copy kept nor another', () => {
  const c = new ReadCache(1 << 20);
  const a = arr(10, 7);
  c.keep('x', D('f'), a);
  a.data.fill(0); // the array read, changed by its user after it was kept
  const h = c.held('x')!;
  const one = h.take();
  const two = h.take();
  expect(Array.from(one.data)).toEqual(new Array(10).fill(7));
  one.data[0] = -1;
  one.shape.push(1);
  expect(two.data[0]).toBe(7);
  expect(h.take().shape).toEqual([10]);
  expect(c.counts).toEqual({ reused: 3, sent: 1 });
  // a held copy stays usable after it was evicted
  c.clear();
  expect(h.take().data[3]).toBe(7);
});

test('fits: shape, complex, dtype and size must all match the header', () => {
  const c = new ReadCache(1 << 20);
  c.keep('m', D('0'), {
    data: new Float64Array(12),
    shape: [3, 2],
    complex: true,
    dtype: 'complex64'
  });
  const h = c.held('m')!;
  const head = { shape: [3, 2], complex: true, dtype: 'complex64', nbytes: 96 };
  expect(h.fits(head)).toBe(true);
  expect(h.fits({ ...head, shape: [2, 3] })).toBe(false);
  expect(h.fits({ ...head, shape: [6] })).toBe(false);
  expect(h.fits({ ...head, complex: false })).toBe(false);
  expect(h.fits({ ...head, dtype: 'complex128' })).toBe(false);
  expect(h.fits({ ...head, nbytes: 48 })).toBe(false);
});

test('shared readers (who never write into what they read) get the kept array itself, others a copy', () => {
  const c = new ReadCache(1 << 20);
  const a = arr(10, 3);
  // kept from a shared reader: no second copy is made
  c.keep('x', D('a'), a, true);
  expect(c.bytes).toBe(80);
  const h = c.held('x')!;
  expect(h.take(true).data).toBe(a.data);
  expect(h.take(true).data).toBe(h.take(true).data);
  // a reader that may write gets its own copy, equal in value
  const own = h.take();
  expect(own.data).not.toBe(a.data);
  expect(Array.from(own.data)).toEqual(Array.from(a.data));
  own.data.fill(-1);
  expect(h.take(true).data[0]).toBe(3);
  // kept from a reader that may write: the cache holds a copy, shared readers get that copy
  const b = arr(4, 9);
  c.keep('y', D('b'), b);
  const kept = c.held('y')!.take(true).data;
  expect(kept).not.toBe(b.data);
  b.data.fill(0);
  expect(Array.from(kept)).toEqual([9, 9, 9, 9]);
  expect(c.counts).toEqual({ reused: 6, sent: 2 });
});

test('a kept array whose buffer was moved away (detached) is dropped, so the bytes are sent again', () => {
  const c = new ReadCache(1 << 20);
  const a = arr(8, 1);
  c.keep('x', D('a'), a, true);
  structuredClone(a.data.buffer, { transfer: [a.data.buffer] }); // detaches it, as a transfer to a worker does
  expect(a.data.byteLength).toBe(0);
  expect(c.held('x')).toBeNull();
  expect(c.bytes).toBe(0);
});
