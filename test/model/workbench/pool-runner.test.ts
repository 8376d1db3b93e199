/**
 * The workbench's runner on the pool (src/model/workbench/pool-runner.ts), with a recording
 * stand-in for the pool: runs started together make their workers' copies one run after
 * another, in the order they started, so the first run's job is handed to the pool before the
 * later runs' copies begin; a run cancelled while it waits for its turn copies nothing and
 * says cancelled; the job gets copies, never the run's own arrays.
 */
import type { ArrayData as KernelArray } from '../../../src/bridge';
import { PoolRunner } from '../../../src/model/workbench/pool-runner';
import type { RunInputs } from '../../../src/model/workbench/runs';
import type { JobHandle, JobOutcome, RunOptions, WorkerPool } from '../../../src/worker/pool';
import type { ArrayData, JobSpec } from '../../../src/worker/protocol';
import { cancellation, variable } from './fixtures';

/** Resolves once `ok()` holds (checked every few milliseconds; the test's timeout bounds it). */
async function until(ok: () => boolean): Promise<void> {
  while (!ok()) {
    await new Promise(r => setTimeout(r, 5));
  }
}

const trans = { __: (s: string) => s, _n: (s: string) => s, _p: (_c: string, s: string) => s };

function inputs(n: number): RunInputs {
  const a = (seed: number): KernelArray => ({
    data: Float64Array.from({ length: n }, (_, i) => Math.sin(seed + i)),
    shape: [n],
    complex: false,
    dtype: 'float64'
  });
  return { arrays: { x: a(1), d: a(2) }, fs: 8000 };
}

/** A pool that records what happens, in order, and never finishes a job. */
function recordingPool(log: string[]): Pick<WorkerPool, 'run'> {
  let id = 0;
  return {
    run: (spec: JobSpec): JobHandle => {
      const tag = spec.kind === 'adaptive-filter' ? `λ ${spec.lambda}` : spec.kind;
      log.push(`dispatch ${tag}`);
      return {
        id: ++id,
        outcome: new Promise<JobOutcome>(() => undefined),
        state: 'running',
        cancel: () => undefined
      } as unknown as JobHandle;
    }
  };
}

describe('PoolRunner', () => {
  it('copies one run after another, so the first job is dispatched before the next copy starts', async () => {
    const log: string[] = [];
    // every slice border is logged
    const pause = async (): Promise<void> => {
      log.push('slice');
      await new Promise(r => setTimeout(r, 0));
    };
    const runner = new PoolRunner(() => recordingPool(log), trans as never, pause);
    const shared = inputs(1 << 19); // 2 slices of 2^18 doubles per array
    for (const lambda of [0.99, 0.995, 0.998]) {
      runner.start(cancellation({ lambda }), shared, () => undefined);
    }
    await until(() => log.filter(l => l.startsWith('dispatch')).length === 3);
    const dispatches = log.filter(l => l.startsWith('dispatch'));
    expect(dispatches).toEqual(['dispatch λ 0.99', 'dispatch λ 0.995', 'dispatch λ 0.998']);
    // no slice of a later run's copy before the earlier run's job was dispatched
    const first = log.indexOf('dispatch λ 0.99');
    const second = log.indexOf('dispatch λ 0.995');
    const slicesBefore = log.slice(0, first).filter(l => l.startsWith('slice')).length;
    const slicesBetween = log.slice(first + 1, second).filter(l => l.startsWith('slice')).length;
    // x and d, two slices each: one pause between each array's two slices
    expect(slicesBefore).toBe(2);
    expect(slicesBetween).toBe(2);
  });

  it('a run cancelled while waiting for its turn copies nothing and is cancelled', async () => {
    const log: string[] = [];
    let pauses = 0;
    const runner = new PoolRunner(
      () => recordingPool(log),
      trans as never,
      () =>
        new Promise<void>(r => {
          pauses++;
          setTimeout(r, 0);
        })
    );
    const shared = inputs(1 << 19);
    runner.start(cancellation({ lambda: 0.99 }), shared, () => undefined);
    const waiting = runner.start(cancellation({ lambda: 0.995 }), shared, () => undefined);
    waiting.cancel();
    const third = runner.start(cancellation({ lambda: 0.998 }), shared, () => undefined);
    expect((await waiting.result).status).toBe('cancelled');
    await until(() => log.length === 2);
    expect(log).toEqual(['dispatch λ 0.99', 'dispatch λ 0.998']);
    // one pause in each of x's and d's copies, for the two runs copied: none for the cancelled
    expect(pauses).toBe(4);
    third.cancel();
  });

  it("gives the job copies of the run's arrays, never the arrays themselves", async () => {
    const specs: JobSpec[] = [];
    const pool: Pick<WorkerPool, 'run'> = {
      run: (spec: JobSpec) => {
        specs.push(spec);
        return {
          outcome: new Promise<JobOutcome>(() => undefined),
          cancel: () => undefined
        } as unknown as JobHandle;
      }
    };
    const runner = new PoolRunner(
      () => pool,
      trans as never,
      async () => undefined
    );
    const shared = inputs(1000);
    runner.start(cancellation(), shared, () => undefined);
    await until(() => specs.length > 0);
    expect(specs).toHaveLength(1);
    const s = specs[0] as Extract<JobSpec, { kind: 'adaptive-filter' }>;
    const c = s.configuration as {
      reference: { data: Float64Array };
      primary: { data: Float64Array };
    };
    expect(c.reference.data).not.toBe(shared.arrays.x.data);
    expect(Array.from(c.reference.data)).toEqual(Array.from(shared.arrays.x.data));
    expect(Array.from(c.primary.data)).toEqual(Array.from(shared.arrays.d.data));
  });
});

describe('PoolRunner with workers that keep inputs', () => {
  /** A pool that keeps inputs and records each job's spec and options. */
  function keepingPool(hold: number) {
    const jobs: Array<{ spec: JobSpec; options: RunOptions }> = [];
    const pool = {
      holdBytesPerWorker: hold,
      run: (spec: JobSpec, options: RunOptions = {}) => {
        jobs.push({ spec, options });
        return {
          outcome: new Promise<JobOutcome>(() => undefined),
          cancel: () => undefined
        } as unknown as JobHandle;
      }
    };
    return { pool, jobs };
  }

  /** x of 2 channels × 6 samples laid out with the samples along axis 0 (6×2 in the kernel). */
  function digested(): RunInputs {
    const base = inputs(12);
    return {
      fs: 8000,
      arrays: {
        x: { ...base.arrays.x, shape: [6, 2], digest: 'a'.repeat(64) },
        d: { ...base.arrays.d, shape: [2, 6], digest: 'b'.repeat(64) }
      }
    };
  }
  const layout = { samplesAxis: 0 as const, rows: 'channels' as const };
  const twoD = () =>
    cancellation({
      x: { ref: { kind: 'variable', name: 'reference' }, shape: [6, 2], layout },
      d: {
        ref: { kind: 'variable', name: 'primary' },
        shape: [2, 6],
        layout: { samplesAxis: 1, rows: 'channels' }
      }
    });

  it("sends the sources' names and no values, and copies only what the worker asks for", async () => {
    const { pool, jobs } = keepingPool(1 << 20);
    let pauses = 0;
    const runner = new PoolRunner(
      () => pool,
      trans as never,
      async () => {
        pauses++;
      }
    );
    const shared = digested();
    runner.start(twoD(), shared, () => undefined);
    await until(() => jobs.length > 0);
    const c = (jobs[0].spec as Extract<JobSpec, { kind: 'adaptive-filter' }>).configuration as {
      reference: ArrayData;
      primary: ArrayData;
    };
    // the name holds the kernel's digest with the job's shape (transposed to K×N) and layout
    const xName = `${'a'.repeat(64)}:2x6:real:transposed`;
    const dName = `${'b'.repeat(64)}:2x6:real`;
    expect(c.reference).toMatchObject({ shape: [2, 6], complex: false, held: xName });
    expect(c.primary).toMatchObject({ shape: [2, 6], complex: false, held: dName });
    expect(c.reference.data.length + c.primary.data.length).toBe(0);
    expect(pauses).toBe(0); // nothing copied before the worker asks
    const sent = await jobs[0].options.supply!([xName]);
    expect(Object.keys(sent)).toEqual([xName]);
    // x[i, j] (6×2) becomes row j of the job's 2×6
    const x = shared.arrays.x.data;
    const want = [0, 2, 4, 6, 8, 10, 1, 3, 5, 7, 9, 11].map(i => x[i]);
    expect(Array.from(sent[xName])).toEqual(want);
    expect(sent[xName]).not.toBe(x);
    await expect(jobs[0].options.supply!(['c'.repeat(64)])).rejects.toThrow(
      /internal: the worker asked for c+, which this run does not name/
    );
  });

  it('a copy the worker asks for stops at a cancel', async () => {
    const { pool, jobs } = keepingPool(1 << 20);
    const runner = new PoolRunner(
      () => pool,
      trans as never,
      async () => undefined
    );
    const shared = inputs(1 << 19);
    shared.arrays.x.digest = 'a'.repeat(64);
    shared.arrays.d.digest = 'b'.repeat(64);
    const h = runner.start(cancellation(), shared, () => undefined);
    await until(() => jobs.length > 0);
    h.cancel();
    await expect(jobs[0].options.supply!([`${'a'.repeat(64)}:524288:real`])).rejects.toThrow(
      'cancelled'
    );
  });

  it('copies as before when a source has no digest, for other tools, or with a budget of 0', async () => {
    const cases: Array<[number, RunInputs, Parameters<PoolRunner['start']>[0]]> = [];
    const noDigest = digested();
    delete noDigest.arrays.d.digest;
    cases.push([1 << 20, noDigest, twoD()]);
    cases.push([0, digested(), twoD()]);
    const span = digested();
    span.arrays.matrix = { ...span.arrays.d };
    cases.push([1 << 20, span, { tool: 'span', matrix: variable('m'), rankTolerance: null }]);
    for (const [hold, shared, params] of cases) {
      const { pool, jobs } = keepingPool(hold);
      const runner = new PoolRunner(
        () => pool,
        trans as never,
        async () => undefined
      );
      runner.start(params, shared, () => undefined);
      await until(() => jobs.length > 0);
      expect(JSON.stringify(jobs[0].spec)).not.toMatch(/held/);
      expect(jobs[0].options.supply).toBeUndefined();
    }
  });
});
