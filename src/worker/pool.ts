/**
 * A pool of job workers: a queue, at most `size` jobs running at once (one per worker), per-job
 * progress and cancel, a per-run memory limit checked before dispatch, and a worker that dies
 * (an uncaught error, out of memory, an exit) failing its job with the reason and being replaced.
 *
 * A queued job that is cancelled is dropped; a running one is asked to stop and stops at its
 * next chunk border; if it does not answer within `cancelGraceMs` (a long step with no chunk
 * border), its worker is terminated and replaced. Buffers are handed to a worker only after its
 * `ready` message. Outcomes are resolved, never rejected: done, failed (with the reason) or
 * cancelled, which is what the workbench lists.
 */
import { estimateJobBytes, expandSweep, specDataBytes, type MemoryEstimate } from './jobs';
import {
  PROTOCOL_VERSION,
  transferables,
  type FromWorker,
  type JobResult,
  type JobSpec,
  type JobTiming,
  type SweepSpec
} from './protocol';
import { PartReceiver } from './result-parts';
import type { TransportFactory, WorkerTransport } from './transport';

export interface PoolOptions {
  /** Makes a worker (client.ts has the browser's). */
  createTransport: TransportFactory;
  /** Workers at most (default: the number of cores the platform reports, or 2). */
  size?: number;
  /** Refuse a run whose estimated memory (inputs + results) exceeds this (default 1 GiB). */
  memoryLimitBytes?: number;
  /**
   * How long (ms) a running job may take to stop after a cancel before its worker is terminated
   * and replaced (default 500; a filter's chunk takes a few milliseconds, a projection or a
   * factorisation has no chunk border).
   */
  cancelGraceMs?: number;
  /** Consecutive workers that may fail before becoming ready before the pool gives up (3). */
  maxStartFailures?: number;
  /**
   * Bytes of named inputs (ArrayData.held) each worker keeps for later jobs (default 0: none;
   * see held-arrays.ts).
   */
  holdBytesPerWorker?: number;
}

export interface JobProgress {
  done: number;
  total: number;
  unit: 'samples' | 'steps';
  stage: string;
  /** done / total in [0, 1]. */
  fraction: number;
}

export type JobOutcome =
  | { status: 'done'; result: JobResult; timing: JobTiming }
  | { status: 'failed'; reason: string; errorName: string }
  | { status: 'cancelled'; done: number };

export interface RunOptions {
  onProgress?: (progress: JobProgress) => void;
  /**
   * Hand the spec's buffers over to the worker instead of copying them (default false): faster
   * for large arrays, but the caller's arrays are detached (empty) afterwards.
   */
  transfer?: boolean;
  /**
   * Values for the spec's named arrays sent without them (ArrayData.held) that the worker does
   * not hold: fresh copies, whose buffers are transferred. A rejection fails the job with its
   * message (cancelled when the job was cancelled meanwhile).
   */
  supply?: (names: string[]) => Promise<Record<string, Float64Array>>;
}

export interface JobHandle {
  readonly id: number;
  /** Resolves once with the outcome (never rejects). */
  readonly outcome: Promise<JobOutcome>;
  /** 'queued', 'running' or 'settled'. */
  readonly state: 'queued' | 'running' | 'settled';
  /** Drops a queued job; asks a running one to stop at its next chunk border. */
  cancel(): void;
}

export interface SweepHandle {
  /** The specs, one per value, in the order of the values. */
  readonly specs: JobSpec[];
  readonly jobs: JobHandle[];
  /** Every job's outcome, in the order of the values. */
  readonly outcome: Promise<JobOutcome[]>;
  cancel(): void;
}

interface Job {
  id: number;
  spec: JobSpec;
  options: RunOptions;
  state: 'queued' | 'running' | 'settled';
  slot: Slot | null;
  resolve: (o: JobOutcome) => void;
  cancelTimer: ReturnType<typeof setTimeout> | null;
  cancelRequested: boolean;
  lastDone: number;
  /** Result arrays received ahead of the result (result-parts.ts), made on the first part. */
  parts: PartReceiver | null;
  /** Why a part was refused (the job then fails when its result comes). */
  partError: string | null;
}

interface Slot {
  transport: WorkerTransport;
  ready: boolean;
  dead: boolean;
  job: Job | null;
}

const GiB = 2 ** 30;

function defaultSize(): number {
  const n = (globalThis as { navigator?: { hardwareConcurrency?: number } }).navigator
    ?.hardwareConcurrency;
  return typeof n === 'number' && n >= 1 ? Math.floor(n) : 2;
}

export class WorkerPool {
  /** Workers at most. */
  readonly size: number;
  readonly memoryLimitBytes: number;

  constructor(options: PoolOptions) {
    if (typeof options?.createTransport !== 'function') {
      throw new TypeError('createTransport must be a function that makes a worker');
    }
    const size = options.size ?? defaultSize();
    if (!Number.isInteger(size) || size < 1 || size > 256) {
      throw new RangeError(`size must be an integer in [1, 256], got ${String(options.size)}`);
    }
    const limit = options.memoryLimitBytes ?? GiB;
    if (!(limit > 0)) {
      throw new RangeError(`memoryLimitBytes must be > 0, got ${String(limit)}`);
    }
    this.size = size;
    this.memoryLimitBytes = limit;
    this._create = options.createTransport;
    this._grace = options.cancelGraceMs ?? 500;
    this._maxStartFailures = options.maxStartFailures ?? 3;
    this.holdBytesPerWorker = options.holdBytesPerWorker ?? 0;
  }

  /** Bytes of named inputs each worker keeps for later jobs (0: none); applies to next jobs. */
  get holdBytesPerWorker(): number {
    return this._holdBytes;
  }
  set holdBytesPerWorker(v: number) {
    if (!(v >= 0) || !Number.isFinite(v)) {
      throw new RangeError(`holdBytesPerWorker must be a finite number ≥ 0, got ${String(v)}`);
    }
    this._holdBytes = v;
  }

  /** Jobs waiting for a worker. */
  get queued(): number {
    return this._queue.length;
  }

  /** Jobs running now. */
  get running(): number {
    return this._slots.filter(s => s.job !== null).length;
  }

  /** Workers alive (started lazily, kept while the pool lives). */
  get workers(): number {
    return this._slots.length;
  }

  /** Memory a spec would need (inputs copied to the worker plus results). */
  estimate(spec: JobSpec): MemoryEstimate {
    const e = estimateJobBytes(spec);
    const inputs = specDataBytes(spec);
    return { bytes: e.bytes + inputs, detail: `inputs ${mb(inputs)}, ${e.detail}` };
  }

  /** Queues a job. */
  run(spec: JobSpec, options: RunOptions = {}): JobHandle {
    const id = ++this._nextId;
    let resolve!: (o: JobOutcome) => void;
    const outcome = new Promise<JobOutcome>(r => (resolve = r));
    const job: Job = {
      id,
      spec,
      options,
      state: 'queued',
      slot: null,
      resolve,
      cancelTimer: null,
      cancelRequested: false,
      lastDone: 0,
      parts: null,
      partError: null
    };
    const handle: JobHandle = {
      id,
      outcome,
      get state() {
        return job.state;
      },
      cancel: () => this._cancel(job)
    };
    if (this._disposed) {
      this._settle(job, {
        status: 'failed',
        reason: 'the job pool was shut down',
        errorName: 'Error'
      });
      return handle;
    }
    let refusal: string | null = null;
    try {
      const est = this.estimate(spec);
      if (est.bytes > this.memoryLimitBytes) {
        refusal =
          `this run needs about ${mb(est.bytes)} (${est.detail}), above the per-run memory limit of ` +
          `${mb(this.memoryLimitBytes)}; use fewer samples or trials, keep the weights less often, ` +
          `or raise the limit in the settings`;
      }
    } catch (reason) {
      refusal = `the job spec is not valid: ${reason instanceof Error ? reason.message : String(reason)}`;
    }
    if (refusal !== null) {
      this._settle(job, { status: 'failed', reason: refusal, errorName: 'RangeError' });
      return handle;
    }
    this._queue.push(job);
    this._pump();
    return handle;
  }

  /** Expands a sweep into one job per value and queues them all (they run in parallel). */
  runSweep(
    sweep: SweepSpec,
    options: {
      onProgress?: (index: number, progress: JobProgress) => void;
      transfer?: boolean;
    } = {}
  ): SweepHandle {
    // each job's buffers are copied at postMessage anyway; own copies only when they move
    const specs = expandSweep(sweep, { copyData: options.transfer === true });
    const jobs = specs.map((spec, k) =>
      this.run(spec, {
        transfer: options.transfer,
        onProgress: options.onProgress ? p => options.onProgress!(k, p) : undefined
      })
    );
    return {
      specs,
      jobs,
      outcome: Promise.all(jobs.map(j => j.outcome)),
      cancel: () => jobs.forEach(j => j.cancel())
    };
  }

  /** Cancels everything and stops every worker. */
  dispose(): void {
    if (this._disposed) {
      return;
    }
    this._disposed = true;
    for (const job of this._queue.splice(0)) {
      this._settle(job, { status: 'cancelled', done: 0 });
    }
    for (const slot of this._slots.splice(0)) {
      slot.dead = true;
      if (slot.job) {
        this._settle(slot.job, { status: 'cancelled', done: slot.job.lastDone });
      }
      slot.transport.terminate();
    }
  }

  get isDisposed(): boolean {
    return this._disposed;
  }

  private _pump(): void {
    if (this._disposed) {
      return;
    }
    for (const slot of this._slots) {
      if (this._queue.length === 0) {
        return;
      }
      if (slot.ready && !slot.dead && slot.job === null) {
        this._dispatch(slot, this._queue.shift()!);
      }
    }
    // more work than idle ready workers: start workers up to the size
    const starting = this._slots.filter(s => !s.ready && !s.dead).length;
    let want = Math.min(this._queue.length - starting, this.size - this._slots.length);
    while (want-- > 0) {
      if (!this._spawn()) {
        return;
      }
    }
  }

  private _spawn(): boolean {
    let transport: WorkerTransport;
    try {
      transport = this._create();
    } catch (reason) {
      this._failAllQueued(`a job worker could not be started: ${text(reason)}`);
      return false;
    }
    const slot: Slot = { transport, ready: false, dead: false, job: null };
    this._slots.push(slot);
    transport.onMessage(m => this._onMessage(slot, m));
    transport.onFailure(reason => this._onFailure(slot, reason));
    return true;
  }

  private _dispatch(slot: Slot, job: Job): void {
    job.state = 'running';
    job.slot = slot;
    slot.job = job;
    const transfer = job.options.transfer ? transferables(job.spec) : [];
    // Result arrays are sent ahead (result-parts.ts) only for a job that runs alone: the page
    // takes each part on its own thread (≈ 0.1–0.2 s of copying for a 1e6-sample filter), which
    // spares the drawing of a lone run's result a collection, but among jobs running side by
    // side (a sweep) competes with the workers for the cores: traced, a sweep of four on two
    // workers took the page's thread 0.75–1.28 s with parts, 0.41–0.43 s without.
    const partsAhead =
      this._queue.length === 0 && this._slots.every(s => s === slot || s.job === null);
    try {
      slot.transport.postMessage(
        { type: 'run', id: job.id, spec: job.spec, holdBytes: this._holdBytes, partsAhead },
        transfer
      );
    } catch (reason) {
      slot.job = null;
      this._settle(job, {
        status: 'failed',
        reason: `the job could not be sent to its worker: ${text(reason)}`,
        errorName: 'DataCloneError'
      });
      this._pump();
    }
  }

  private _onMessage(slot: Slot, m: FromWorker): void {
    if (slot.dead || m === null || typeof m !== 'object') {
      return;
    }
    if (m.type === 'ready') {
      if (m.protocol !== PROTOCOL_VERSION) {
        this._onFailure(
          slot,
          `the job worker speaks protocol ${String(m.protocol)}, this page ${PROTOCOL_VERSION} (reload the page)`
        );
        return;
      }
      slot.ready = true;
      this._startFailures = 0;
      this._pump();
      return;
    }
    const job = slot.job;
    if (!job || job.id !== m.id) {
      return; // a late message of a job already settled (e.g. cancelled by termination)
    }
    switch (m.type) {
      case 'need':
        this._supply(slot, job, m.names);
        return;
      case 'progress':
        job.lastDone = m.done;
        if (job.options.onProgress && job.state === 'running') {
          try {
            job.options.onProgress({
              done: m.done,
              total: m.total,
              unit: m.unit,
              stage: m.stage,
              fraction: m.total > 0 ? Math.min(1, m.done / m.total) : 0
            });
          } catch (reason) {
            console.error('Perpend: a progress callback failed', reason);
          }
        }
        return;
      case 'part':
        if (job.partError === null) {
          job.parts ??= new PartReceiver();
          job.partError = job.parts.take(m);
        }
        return;
      case 'result': {
        slot.job = null;
        const whole =
          job.partError === null ? (job.parts?.fill(m.result) ?? { result: m.result }) : null;
        job.parts = null;
        if (whole === null || 'error' in whole) {
          this._settle(job, {
            status: 'failed',
            reason: whole?.error ?? job.partError ?? '',
            errorName: 'ProtocolError'
          });
        } else {
          this._settle(job, { status: 'done', result: whole.result, timing: m.timing });
        }
        break;
      }
      case 'failed':
        slot.job = null;
        this._settle(job, { status: 'failed', reason: m.error.message, errorName: m.error.name });
        break;
      case 'cancelled':
        slot.job = null;
        this._settle(job, { status: 'cancelled', done: m.done });
        break;
    }
    this._pump();
  }

  private _onFailure(slot: Slot, reason: string): void {
    if (slot.dead) {
      return;
    }
    slot.dead = true;
    const i = this._slots.indexOf(slot);
    if (i >= 0) {
      this._slots.splice(i, 1);
    }
    try {
      slot.transport.terminate();
    } catch {
      // already gone
    }
    const job = slot.job;
    slot.job = null;
    if (job) {
      if (job.cancelRequested) {
        this._settle(job, { status: 'cancelled', done: job.lastDone });
      } else {
        this._settle(job, {
          status: 'failed',
          reason: `the job worker stopped: ${reason}`,
          errorName: 'WorkerError'
        });
      }
    }
    if (!slot.ready) {
      this._startFailures++;
      if (this._startFailures >= this._maxStartFailures) {
        this._failAllQueued(
          `job workers fail to start (${this._startFailures} in a row): ${reason}`
        );
        this._startFailures = 0;
        return;
      }
    }
    this._pump();
  }

  /** Sends a worker the named inputs it asked for (or why it cannot have them). */
  private _supply(slot: Slot, job: Job, names: string[]): void {
    const post = (arrays: Record<string, Float64Array> | null, error: string): void => {
      if (slot.dead || slot.job !== job) {
        return; // the job was settled meanwhile (its worker stopped)
      }
      try {
        if (arrays) {
          const transfer = transferables(arrays);
          slot.transport.postMessage({ type: 'supply', id: job.id, arrays }, transfer);
        } else {
          slot.transport.postMessage({ type: 'supply', id: job.id, error }, []);
        }
      } catch (reason) {
        if (arrays) {
          post(null, `the inputs could not be sent to the worker: ${text(reason)}`);
        }
      }
    };
    const supply = job.options.supply;
    if (!supply) {
      post(null, `the worker does not hold ${names.join(', ')} and nothing can send them`);
      return;
    }
    let pending: Promise<Record<string, Float64Array>>;
    try {
      pending = supply(names);
    } catch (reason) {
      pending = Promise.reject(reason);
    }
    pending.then(
      arrays => post(arrays, ''),
      reason => post(null, text(reason))
    );
  }

  private _cancel(job: Job): void {
    if (job.state === 'settled') {
      return;
    }
    if (job.state === 'queued') {
      const i = this._queue.indexOf(job);
      if (i >= 0) {
        this._queue.splice(i, 1);
      }
      this._settle(job, { status: 'cancelled', done: 0 });
      return;
    }
    if (job.cancelRequested) {
      return;
    }
    job.cancelRequested = true;
    const slot = job.slot!;
    try {
      slot.transport.postMessage({ type: 'cancel', id: job.id }, []);
    } catch {
      // the worker is gone: its failure handler settles the job
    }
    job.cancelTimer = setTimeout(() => {
      if (job.state !== 'settled' && slot.job === job) {
        // no chunk border in sight: stop the worker itself and start a fresh one
        this._onFailure(slot, 'terminated after a cancel it did not answer');
      }
    }, this._grace);
  }

  private _settle(job: Job, outcome: JobOutcome): void {
    if (job.state === 'settled') {
      return;
    }
    job.state = 'settled';
    job.parts = null;
    if (job.cancelTimer !== null) {
      clearTimeout(job.cancelTimer);
      job.cancelTimer = null;
    }
    job.resolve(outcome);
  }

  private _failAllQueued(reason: string): void {
    for (const job of this._queue.splice(0)) {
      this._settle(job, { status: 'failed', reason, errorName: 'WorkerError' });
    }
  }

  private readonly _create: TransportFactory;
  private readonly _grace: number;
  private readonly _maxStartFailures: number;
  private readonly _queue: Job[] = [];
  private readonly _slots: Slot[] = [];
  private _nextId = 0;
  private _holdBytes = 0;
  private _startFailures = 0;
  private _disposed = false;
}

function mb(bytes: number): string {
  return `${(bytes / 2 ** 20).toFixed(1)} MB`;
}

function text(reason: unknown): string {
  return reason instanceof Error ? reason.message : String(reason);
}
