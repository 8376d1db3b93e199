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
import type { JobHandle, JobOutcome, WorkerPool } from '../../../src/worker/pool';
import type { JobSpec } from '../../../src/worker/protocol';
import { cancellation } from './fixtures';

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
