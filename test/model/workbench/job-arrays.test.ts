/**
 * The worker's copies of a run's inputs made a slice at a time: the same arrays as the one-go
 * copy (samples-last layouts kept, samples-first layouts transposed as numpy's `m.T.ravel()`),
 * the event loop given back between slices, and a cancel honoured at the next slice border.
 */
import type { ArrayData as KernelArray } from '../../../src/bridge';
import { CopyCancelled, jobArrayInSlices } from '../../../src/model/workbench/job-arrays';
import { jobArray, jobSpec, jobSpecInSlices } from '../../../src/model/workbench/job-spec';
import { cancellation } from './fixtures';

function kernel(data: number[], shape: number[], complex = false): KernelArray {
  return {
    data: Float64Array.from(data),
    shape,
    complex,
    dtype: complex ? 'complex128' : 'float64'
  };
}

const pick = (samplesAxis: 0 | 1, shape: number[]) => ({
  ref: { kind: 'variable' as const, name: 'm' },
  shape,
  layout: { samplesAxis, rows: 'trials' as const }
});

describe('copies in slices', () => {
  it('copies a 1-D array in slices with a pause between them, into a buffer of its own', async () => {
    const a = kernel(
      Array.from({ length: 10 }, (_, i) => i * 1.5),
      [10]
    );
    let pauses = 0;
    const c = await jobArrayInSlices(
      a,
      null,
      async () => void pauses++,
      () => false,
      3
    );
    expect(Array.from(c.data)).toEqual(Array.from(a.data));
    expect(c.data.buffer).not.toBe(a.data.buffer);
    expect(pauses).toBe(3); // slices [0,3) [3,6) [6,9) [9,10): a pause before each but the first
  });

  it('transposes a samples-first 2-D array in whole-row slices, complex pairs kept together', async () => {
    // 5 rows (samples) × 3 columns (trials): numpy's m.T.ravel() is the expected order.
    const rows = 5;
    const cols = 3;
    const data = Array.from({ length: rows * cols * 2 }, (_, i) => i + 0.25);
    const m = kernel(data, [rows, cols], true);
    const oneGo = jobArray(m, pick(0, [rows, cols]));
    let pauses = 0;
    const sliced = await jobArrayInSlices(
      m,
      pick(0, [rows, cols]),
      async () => void pauses++,
      () => false,
      6
    );
    expect(sliced.shape).toEqual([cols, rows]);
    expect(Array.from(sliced.data)).toEqual(Array.from(oneGo.data));
    // element [j, i] of the result is element [i, j] of the source (re and im)
    for (let i = 0; i < rows; i++) {
      for (let j = 0; j < cols; j++) {
        expect(sliced.data[2 * (j * rows + i)]).toBe(data[2 * (i * cols + j)]);
        expect(sliced.data[2 * (j * rows + i) + 1]).toBe(data[2 * (i * cols + j) + 1]);
      }
    }
    expect(pauses).toBe(rows - 1); // one row of 3 complex values (6 doubles) per slice
  });

  it('stops at the next slice border once cancelled', async () => {
    const a = kernel(
      Array.from({ length: 100 }, (_, i) => i),
      [100]
    );
    let pauses = 0;
    await expect(
      jobArrayInSlices(
        a,
        null,
        async () => void pauses++,
        () => pauses >= 2,
        10
      )
    ).rejects.toBeInstanceOf(CopyCancelled);
    expect(pauses).toBe(2);
  });

  it('builds the same job spec as the one-go copy, with distinct buffers for every array', async () => {
    const inputs = {
      arrays: { x: kernel([1, 2, 3, 4], [4]), d: kernel([5, 6, 7, 8], [4]) },
      fs: 4000
    };
    const p = cancellation({ taps: 2 });
    const a = jobSpec(p, inputs);
    const b = await jobSpecInSlices(p, inputs, async () => undefined);
    const plain = (s: unknown): unknown =>
      JSON.parse(
        JSON.stringify(s, (_k, v: unknown) => (v instanceof Float64Array ? Array.from(v) : v))
      );
    expect(plain(b)).toEqual(plain(a));
    if (b.kind !== 'adaptive-filter' || b.configuration.kind !== 'noise-cancellation') {
      throw new Error('expected a noise-cancellation job');
    }
    expect(b.configuration.reference.data.buffer).not.toBe(inputs.arrays.x.data.buffer);
    expect(b.configuration.primary.data.buffer).not.toBe(inputs.arrays.d.data.buffer);
  });
});

describe('the default pause', () => {
  it('is a macrotask: it has not ended after every pending microtask has run', async () => {
    const { macrotaskPause } = await import('../../../src/model/workbench/job-arrays');
    let done = false;
    const p = macrotaskPause().then(() => (done = true));
    for (let i = 0; i < 1000; i++) {
      await Promise.resolve();
    }
    expect(done).toBe(false);
    await p;
    expect(done).toBe(true);
    // and the copy made with it is whole
    const a = kernel(
      Array.from({ length: 40 }, (_, i) => i),
      [40]
    );
    const c = await jobArrayInSlices(a, null, macrotaskPause, () => false, 4);
    expect(Array.from(c.data)).toEqual(Array.from(a.data));
  });
});
