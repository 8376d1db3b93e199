/**
 * The workbench's runner on the worker pool: a set-up and its inputs become a job spec, the job
 * runs in a worker (progress from the core's chunks, cancel at the next chunk border), and its
 * result becomes the run's figures and arrays. A refused, failed or dying job is a failed run
 * with the reason; the pool's memory estimate is checked before anything is dispatched.
 */
import type { WorkerPool } from '../../worker/pool';
import { jobSpec } from './job-spec';
import { outcomeOf } from './outcome';
import type { Trans } from './rules';
import type { IRunner, RunHandle, RunInputs, RunOutcome } from './runs';
import type { SetupParams } from './setup';

export class PoolRunner implements IRunner {
  constructor(
    private readonly _pool: () => Pick<WorkerPool, 'run'>,
    private readonly _trans: Trans
  ) {}

  start(
    params: Exclude<SetupParams, { tool: 'sweep' }>,
    inputs: RunInputs,
    onProgress: (fraction: number) => void
  ): RunHandle {
    const trans = this._trans;
    // jobSpec copies every array, so handing the copies over to the worker loses nothing.
    const job = this._pool().run(jobSpec(params, inputs), {
      transfer: true,
      onProgress: p => onProgress(p.fraction)
    });
    const result = job.outcome.then((o): RunOutcome => {
      switch (o.status) {
        case 'done':
          return outcomeOf(trans, o.result, o.timing);
        case 'failed':
          return { status: 'failed', messages: [o.reason], figures: [], arrays: {}, computeMs: 0 };
        case 'cancelled':
          return { status: 'cancelled', messages: [], figures: [], arrays: {}, computeMs: 0 };
      }
    });
    return { result, cancel: () => job.cancel() };
  }
}
