/**
 * The page's recycler of input buffers handed back by the workers
 * (src/model/workbench/buffer-recycler.ts): exact sizes only, the newest first, a bound on the
 * bytes held (the oldest go), and everything let go a while after the last buffer came back.
 */
import { BufferRecycler } from '../../../src/model/workbench/buffer-recycler';

describe('BufferRecycler', () => {
  afterEach(() => jest.useRealTimers());

  it('hands out a held buffer of exactly the size asked for, else a fresh one', () => {
    const r = new BufferRecycler(1 << 20, 1000);
    const a = new ArrayBuffer(800);
    const b = new ArrayBuffer(1600);
    r.give([a, b]);
    expect(r.heldBytes).toBe(2400);
    const got = r.doubles(100);
    expect(got.buffer).toBe(a);
    expect(got.length).toBe(100);
    expect(r.heldBytes).toBe(1600);
    const other = r.doubles(100); // none of that size left
    expect(other.buffer).not.toBe(a);
    expect(other.buffer).not.toBe(b);
    expect(r.doubles(200).buffer).toBe(b);
    expect(r.heldBytes).toBe(0);
  });

  it('keeps at most its bound, dropping the oldest; ignores empty and oversized buffers', () => {
    const r = new BufferRecycler(2000, 1000);
    const first = new ArrayBuffer(800);
    const second = new ArrayBuffer(800);
    const third = new ArrayBuffer(800);
    r.give([first, second, new ArrayBuffer(0), new ArrayBuffer(4000)]);
    r.give([third]);
    expect(r.heldBytes).toBe(1600);
    const got = [r.doubles(100).buffer, r.doubles(100).buffer];
    expect(got).toEqual([third, second]); // the newest first; the first was dropped
    expect(got).not.toContain(first);
  });

  it('lets everything go a while after the last buffer came back', () => {
    jest.useFakeTimers();
    const r = new BufferRecycler(1 << 20, 1000);
    r.give([new ArrayBuffer(800)]);
    jest.advanceTimersByTime(900);
    r.give([new ArrayBuffer(800)]); // the hold starts again
    jest.advanceTimersByTime(900);
    expect(r.heldBytes).toBe(1600);
    jest.advanceTimersByTime(200);
    expect(r.heldBytes).toBe(0);
  });
});
