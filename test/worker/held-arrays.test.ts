/**
 * The inputs a job worker keeps for later jobs (src/worker/held-arrays.ts): values sent with a
 * name are kept and serve a later spec that sends the name alone, without asking; names it does
 * not hold are asked for once each; the byte budget drops the least recently used first (0
 * keeps nothing); values that do not fit the shape, and names that are not names, are refused
 * with the array's place in the spec. Plain data, no worker thread (pool.test.ts runs it there).
 */
import { HeldArrays } from '../../src/worker/held-arrays';
import type { ArrayData } from '../../src/worker/protocol';

const named = (name: string, n: number, fill?: number): ArrayData => ({
  data: fill === undefined ? new Float64Array(0) : new Float64Array(n).fill(fill),
  shape: [n],
  complex: false,
  held: name
});

const pair = (x: ArrayData, d: ArrayData) => ({
  kind: 'adaptive-filter',
  configuration: { kind: 'noise-cancellation', reference: x, primary: d }
});

const never = (): Promise<Record<string, Float64Array>> => {
  throw new Error('asked, but every name is held');
};

describe('HeldArrays', () => {
  it('keeps values sent with their names and gives them to a spec that sends the names alone', async () => {
    const h = new HeldArrays();
    const first = pair(named('x', 100, 1), named('d', 100, 2));
    await h.fill(first, 1 << 20, never);
    expect(h.names()).toEqual(['x', 'd']);
    expect(h.bytes).toBe(2 * 100 * 8);
    const again = pair(named('x', 100), named('d', 100));
    const kept = await h.fill(again, 1 << 20, never);
    expect(again.configuration.reference.data).toBe(first.configuration.reference.data);
    expect(again.configuration.primary.data[0]).toBe(2);
    expect(kept.has(again.configuration.reference.data.buffer as ArrayBuffer)).toBe(true);
  });

  it('asks once for the names it does not hold, and places the values it is sent', async () => {
    const h = new HeldArrays();
    await h.fill(pair(named('x', 10, 1), named('x2', 10, 1)), 1 << 20, never);
    const asked: string[][] = [];
    // d appears twice (as equalization's training and symbols do): asked for once
    const spec = {
      a: named('x', 10),
      b: named('d', 10),
      c: { deeper: named('d', 10) }
    };
    await h.fill(spec, 1 << 20, async names => {
      asked.push(names);
      return { d: new Float64Array(10).fill(7) };
    });
    expect(asked).toEqual([['d']]);
    expect(spec.b.data[3]).toBe(7);
    expect(spec.c.deeper.data).toBe(spec.b.data);
    expect(spec.a.data[0]).toBe(1);
  });

  it('a name sent with its values in the same spec serves its other places without asking', async () => {
    const h = new HeldArrays();
    const spec = { training: named('d', 8, 3), symbols: named('d', 8) };
    await h.fill(spec, 0, never);
    expect(spec.symbols.data).toBe(spec.training.data);
  });

  it('drops the least recently used beyond the budget; a budget of 0 keeps nothing', async () => {
    const h = new HeldArrays();
    // 100 doubles = 800 bytes each; 2000 bytes hold two
    await h.fill({ a: named('a', 100, 1) }, 2000, never);
    await h.fill({ b: named('b', 100, 2) }, 2000, never);
    await h.fill({ a: named('a', 100) }, 2000, never); // a used again: b is now the oldest
    await h.fill({ c: named('c', 100, 3) }, 2000, never);
    expect(h.names()).toEqual(['a', 'c']);
    expect(h.bytes).toBe(1600);
    const asked: string[][] = [];
    await h.fill({ b: named('b', 100) }, 0, async names => {
      asked.push(names);
      return { b: new Float64Array(100) };
    });
    expect(asked).toEqual([['b']]);
    expect(h.names()).toEqual([]);
    expect(h.bytes).toBe(0);
  });

  it('an array larger than the budget is used for its job but not kept', async () => {
    const h = new HeldArrays();
    const spec = { x: named('x', 1000, 5) };
    const kept = await h.fill(spec, 4000, never);
    expect(spec.x.data.length).toBe(1000);
    expect(kept.size).toBe(0);
    expect(h.names()).toEqual([]);
  });

  it('refuses values that do not fit the shape, and names that are not names, saying where', async () => {
    const h = new HeldArrays();
    await expect(
      h.fill(pair(named('x', 10), named('d', 10, 1)), 1 << 20, async () => ({
        x: new Float64Array(9)
      }))
    ).rejects.toThrow(/configuration\.reference \(x\) with 9 values, its shape needs 10/);
    await expect(
      h.fill(pair(named('x', 10), named('d', 10, 1)), 1 << 20, async () => ({}))
    ).rejects.toThrow(/configuration\.reference \(x\) with no values/);
    const partial = { x: { ...named('x', 10), data: new Float64Array(4) } };
    await expect(h.fill(partial, 1 << 20, never)).rejects.toThrow(
      /x has shape \[10\], which needs 10 values, but its data holds 4/
    );
    const complex = { x: { ...named('z', 3), complex: true, data: new Float64Array(3) } };
    await expect(h.fill(complex, 1 << 20, never)).rejects.toThrow(/needs 6 values/);
    for (const bad of ['', 'n'.repeat(257), 42]) {
      const spec = { x: { ...named('x', 2, 0), held: bad as string } };
      await expect(h.fill(spec, 1 << 20, never)).rejects.toThrow(
        /x\.held must be a name of 1 to 256 characters/
      );
    }
    const shapeless = { x: { ...named('x', 2, 0), shape: 'two' as unknown as number[] } };
    await expect(h.fill(shapeless, 1 << 20, never)).rejects.toThrow(/x needs a shape/);
  });

  it('a failed ask leaves what was held as it was', async () => {
    const h = new HeldArrays();
    await h.fill({ a: named('a', 10, 1) }, 1 << 20, never);
    await expect(
      h.fill({ a: named('a', 10), b: named('b', 10) }, 1 << 20, async () => {
        throw new Error('cancelled');
      })
    ).rejects.toThrow('cancelled');
    expect(h.names()).toEqual(['a']);
  });
});
