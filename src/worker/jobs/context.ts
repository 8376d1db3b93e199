/**
 * What a job sees of its runner: a checkpoint between chunks that reports progress, yields to
 * the event loop (so that a cancel message can arrive) and stops the job when it was cancelled.
 * Jobs are pure functions of their spec and this context, so they run the same in a worker, in
 * a test, or on the main thread.
 */
import type { PartKey } from '../protocol';

/** Thrown by a checkpoint after a cancel; the runner turns it into a `cancelled` message. */
export class JobCancelled extends Error {
  constructor(readonly done: number) {
    super(`the job was cancelled after ${done} units of work`);
    this.name = 'JobCancelled';
  }
}

export interface JobContext {
  /**
   * Called between chunks with the work done so far: reports progress, lets pending messages
   * in, and throws JobCancelled when the job was cancelled meanwhile.
   */
  checkpoint(done: number, total: number, stage: string): Promise<void>;
  /**
   * Says that the leading `filled` values of `array`, the result's array `key`, are final: a
   * runner may send them ahead of the result (result-parts.ts). The job keeps writing the rest
   * and returns the whole array in its result as usual. Absent: nothing is sent ahead.
   */
  part?(key: PartKey, array: Float64Array, filled: number): void;
}

/** A context that never yields nor cancels (a direct call, e.g. in a test or a benchmark). */
export const directContext: JobContext = {
  checkpoint: () => Promise.resolve()
};
