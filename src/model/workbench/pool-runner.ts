/**
 * The workbench's runner on the worker pool: a set-up and its inputs become a job spec, the job
 * runs in a worker (progress from the core's chunks, cancel at the next chunk border), and its
 * result becomes the run's figures and arrays. A refused, failed or dying job is a failed run
 * with the reason; the pool's memory estimate is checked before anything is dispatched.
 */
import type { WorkerPool } from '../../worker/pool';
import type { JobSpec } from '../../worker/protocol';
import { CopyCancelled, macrotaskPause, type Pause } from './job-arrays';
import { jobSpecInSlices } from './job-spec';
import { outcomeOf } from './outcome';
import type { Trans } from './rules';
import type { IRunner, RunHandle, RunInputs, RunOutcome } from './runs';
import type { SetupParams } from './setup';

export class PoolRunner implements IRunner {
  /** The copies of the runs started so far, one run after another (see `start`). */
  private _copying: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly _pool: () => Pick<WorkerPool, 'run'>,
    private readonly _trans: Trans,
    private readonly _pause: Pause = macrotaskPause
  ) {}

  start(
    params: Exclude<SetupParams, { tool: 'sweep' }>,
    inputs: RunInputs,
    onProgress: (fraction: number) => void
  ): RunHandle {
    const trans = this._trans;
    let cancelled = false;
    let job: ReturnType<Pick<WorkerPool, 'run'>['run']> | null = null;
    const ended = (status: 'failed' | 'cancelled', messages: string[] = []): RunOutcome => ({
      status,
      messages,
      figures: [],
      arrays: {},
      computeMs: 0
    });
    const result = (async (): Promise<RunOutcome> => {
      let spec: JobSpec;
      // The worker's own copies, a slice at a time (the page keeps painting meanwhile), made
      // one run after another in the order the runs started: a sweep's runs all start at once,
      // and copied side by side their jobs would all wait for the last copy; this way the
      // first job goes to a worker as soon as its own copies are made.
      const turn = this._copying.then(() =>
        jobSpecInSlices(params, inputs, this._pause, () => cancelled)
      );
      // the chain holds no spec (a copy made for a run cancelled meanwhile is let go)
      this._copying = turn.then(
        () => undefined,
        () => undefined
      );
      try {
        spec = await turn;
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
      job = this._pool().run(spec, {
        transfer: true,
        onProgress: p => onProgress(p.fraction)
      });
      const o = await job.outcome;
      switch (o.status) {
        case 'done':
          return outcomeOf(trans, o.result, o.timing);
        case 'failed':
          return ended('failed', [o.reason]);
        case 'cancelled':
          return ended('cancelled');
      }
    })();
    return {
      result,
      cancel: () => {
        cancelled = true;
        job?.cancel();
      }
    };
  }
}
