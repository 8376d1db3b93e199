/**
 * The workbench's runner on the worker pool: a set-up and its inputs become a job spec, the job
 * runs in a worker (progress from the core's chunks, cancel at the next chunk border), and its
 * result becomes the run's figures and arrays. A refused, failed or dying job is a failed run
 * with the reason; the pool's memory estimate is checked before anything is dispatched.
 */
import type { JobHandle, WorkerPool } from '../../worker/pool';
import type { JobSpec } from '../../worker/protocol';
import { CopyCancelled, macrotaskPause, type Pause } from './job-arrays';
import { jobSpecInSlices, namedJobSpec } from './job-spec';
import { outcomeOf } from './outcome';
import type { Trans } from './rules';
import type { IRunner, RunHandle, RunInputs, RunOutcome } from './runs';
import type { SetupParams } from './setup';

export class PoolRunner implements IRunner {
  /** The copies of the runs started so far, one run after another (see `start`). */
  private _copying: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly _pool: () => Pick<WorkerPool, 'run'> &
      Partial<Pick<WorkerPool, 'holdBytesPerWorker'>>,
    private readonly _trans: Trans,
    private readonly _pause: Pause = macrotaskPause
  ) {}

  start(
    params: Exclude<SetupParams, { tool: 'sweep' }>,
    inputs: RunInputs,
    onProgress: (fraction: number) => void
  ): RunHandle {
    let cancelled = false;
    let job: JobHandle | null = null;
    // Copies for the worker, one run's after another in the order they are asked for: a
    // sweep's runs all start at once, and copied side by side their jobs would all wait for the
    // last copy; this way the first job goes to a worker as soon as its own copies are made.
    const inTurn = <T>(copy: () => Promise<T>): Promise<T> => {
      const turn = this._copying.then(copy);
      // the chain holds no copy (one made for a run cancelled meanwhile is let go)
      this._copying = turn.then(
        () => undefined,
        () => undefined
      );
      return turn;
    };
    const result = (async (): Promise<RunOutcome> => {
      const pool = this._pool();
      // Workers that keep inputs are sent the sources' names; one that does not hold them asks,
      // and gets copies then. Nothing is copied for a re-run or a sweep's next job on a worker
      // that has them.
      let named: ReturnType<typeof namedJobSpec> = null;
      try {
        named = (pool.holdBytesPerWorker ?? 0) > 0 ? namedJobSpec(params, inputs) : null;
      } catch (e) {
        return ended('failed', [e instanceof Error ? e.message : String(e)]);
      }
      if (named) {
        const copies = named.copies;
        job = pool.run(named.spec, {
          transfer: true,
          onProgress: p => onProgress(p.fraction),
          supply: names => inTurn(() => copies(names, this._pause, () => cancelled))
        });
        return this._outcome(job);
      }
      let spec: JobSpec;
      // The worker's own copies, a slice at a time (the page keeps painting meanwhile).
      try {
        spec = await inTurn(() => jobSpecInSlices(params, inputs, this._pause, () => cancelled));
      } catch (e) {
        if (e instanceof CopyCancelled) {
          return ended('cancelled');
        }
        return ended('failed', [e instanceof Error ? e.message : String(e)]);
      }
      if (cancelled) {
        return ended('cancelled');
      }
      // The copies are the job's own, so handing them over to the worker loses nothing.
      job = pool.run(spec, {
        transfer: true,
        onProgress: p => onProgress(p.fraction)
      });
      return this._outcome(job);
    })();
    return {
      result,
      cancel: () => {
        cancelled = true;
        job?.cancel();
      }
    };
  }

  private async _outcome(job: JobHandle): Promise<RunOutcome> {
    const o = await job.outcome;
    switch (o.status) {
      case 'done':
        return outcomeOf(this._trans, o.result, o.timing);
      case 'failed':
        return ended('failed', [o.reason]);
      case 'cancelled':
        return ended('cancelled');
    }
  }
}

/** A run that ended without a result. */
function ended(status: 'failed' | 'cancelled', messages: string[] = []): RunOutcome {
  return { status, messages, figures: [], arrays: {}, computeMs: 0 };
}
