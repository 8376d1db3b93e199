/**
 * The clock of one request. A request's timeout counts from the moment the kernel starts it
 * (its `busy` status), not from queueing behind a running cell; progress restarts the clock.
 * A request the kernel never starts while idle is taken as lost after the same time.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { BridgeError } from './errors';

/** One request in flight: its state, its timeout, and how to fail it. */
export class Op {
  started = false;
  private _timer: ReturnType<typeof setTimeout> | null = null;
  private _guard: ReturnType<typeof setTimeout> | null = null;
  private _done = false;
  readonly promise: Promise<never>;
  private _reject!: (e: BridgeError) => void;

  constructor(
    readonly label: string,
    private readonly _timeoutMs: number,
    private readonly _trans: TranslationBundle,
    private readonly _changed: () => void
  ) {
    // Rejected by the bridge on timeout or kernel events; raced against the real work.
    this.promise = new Promise<never>((_, reject) => {
      this._reject = reject;
    });
    this.promise.catch(() => undefined);
  }

  get done(): boolean {
    return this._done;
  }

  /** The kernel went busy for this request: the clock starts. */
  start(): void {
    if (this._done) {
      return;
    }
    this.cancelGuard();
    if (!this.started) {
      this.started = true;
      this._changed();
    }
    this.touch();
  }

  /** Progress: restart the clock (only once started). */
  touch(): void {
    if (this._done || !this.started) {
      return;
    }
    if (this._timer !== null) {
      clearTimeout(this._timer);
    }
    this._timer = setTimeout(() => {
      this.fail(
        new BridgeError(
          'timeout',
          this._trans.__(
            'The kernel did not answer within %1 s while %2. Nothing in the panel was changed; try again, or raise the timeout in the settings.',
            Math.round(this._timeoutMs / 1000),
            this.label
          )
        )
      );
    }, this._timeoutMs);
  }

  /**
   * The kernel is idle but this request has not started: if it still has not after the
   * timeout, the request was lost (a dropped connection, say).
   */
  armGuard(): void {
    if (this._done || this.started || this._guard !== null) {
      return;
    }
    this._guard = setTimeout(() => {
      this.fail(
        new BridgeError(
          'timeout',
          this._trans.__(
            'The kernel is idle but never started %1 (%2 s). The request was probably lost; nothing in the panel was changed; try again.',
            this.label,
            Math.round(this._timeoutMs / 1000)
          )
        )
      );
    }, this._timeoutMs);
  }

  cancelGuard(): void {
    if (this._guard !== null) {
      clearTimeout(this._guard);
      this._guard = null;
    }
  }

  fail(e: BridgeError): void {
    if (this._done) {
      return;
    }
    this.finish();
    this._reject(e);
  }

  finish(): void {
    if (this._done) {
      return;
    }
    this._done = true;
    if (this._timer !== null) {
      clearTimeout(this._timer);
    }
    this.cancelGuard();
  }
}
