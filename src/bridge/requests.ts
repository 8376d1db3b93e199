/**
 * Requests to the kernel and their timeouts: silent executes of the helper, the kernel's
 * status (main shell busy/idle, restarts, deaths, lost connections) and what the bridge is
 * doing meanwhile. Every request is an {@link Op} with its own clock; a kernel event that ends
 * the session fails every pending one with a sentence saying what happened.
 */
import type { Kernel, KernelMessage } from '@jupyterlab/services';
import type { TranslationBundle } from '@jupyterlab/translation';
import { Signal, type ISignal } from '@lumino/signaling';
import { BridgeError, type BridgeErrorCode } from './errors';
import { installCode } from './helper';
import { Op } from './op';
import { aborted, isRecord, kernelException, malformed, parseJsonExpression } from './replies';

/**
 * Runs `task` on each item, three at a time in item order: a few requests in flight keep the
 * kernel busy while the previous reply is handled. Rejects with the first failure.
 */
export async function inFlight<T>(
  items: ReadonlyArray<T>,
  task: (item: T) => Promise<void>
): Promise<void> {
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < items.length) {
      await task(items[next++]);
    }
  };
  await Promise.all([worker(), worker(), worker()]);
}

/**
 * What ended the kernel session's state: `restart`, a new kernel process (a new history,
 * maybe another comm support); `lost`, a death, a closed connection or a dropped one.
 */
export type KernelReset = 'restart' | 'lost';

export namespace KernelRequests {
  /** What the bridge is doing, for the panel's status line. */
  export interface IActivity {
    /** 'waiting': queued behind a running cell; 'running': the kernel works on it. */
    state: 'idle' | 'waiting' | 'running';
    /** Requests not finished. */
    pending: number;
    /** What the oldest pending request is, e.g. "reading x". */
    label: string | null;
  }
}

/**
 * The request machinery of one kernel connection: it evaluates the helper's expressions in
 * silent executes (`silent: true, store_history: false`), defers and coalesces listings while
 * the kernel is busy, and watches the kernel so that no request outlives its session.
 */
export class KernelRequests {
  /**
   * @param kernel - the notebook's kernel connection.
   * @param timeoutMs - the longest silence once the kernel started a request (the bridge
   *   validates it and may change it later through {@link timeoutMs}).
   * @param trans - the bundle every sentence of the bridge goes through.
   * @param onActivity - called on every change of {@link activity}.
   */
  constructor(
    readonly kernel: Kernel.IKernelConnection,
    public timeoutMs: number,
    readonly trans: TranslationBundle,
    private readonly _onActivity: (a: KernelRequests.IActivity) => void
  ) {
    this._shellBusy = kernel.status === 'busy';
    kernel.statusChanged.connect(this._onStatus, this);
    kernel.iopubMessage.connect(this._onIOPub, this);
    kernel.connectionStatusChanged.connect(this._onConnection, this);
    kernel.disposed.connect(this._onKernelDisposed, this);
  }

  get isDisposed(): boolean {
    return this._disposed;
  }

  /** What the requests are doing now. */
  get activity(): KernelRequests.IActivity {
    const ops = Array.from(this._ops);
    if (ops.length === 0) {
      return { state: 'idle', pending: 0, label: null };
    }
    const running = ops.find(o => o.started);
    return {
      state: running ? 'running' : 'waiting',
      pending: ops.length,
      label: (running ?? ops[0]).label
    };
  }

  /**
   * Emits when the kernel session's state must be dropped, before the pending requests fail:
   * the comm channel and the cell checks' memory listen.
   */
  get reset(): ISignal<this, KernelReset> {
    return this._reset;
  }

  /** Fails every pending request and lets go of the kernel's signals. */
  dispose(): void {
    if (this._disposed) {
      return;
    }
    this._disposed = true;
    this._failAll(
      'disposed',
      this.trans.__('Perpend stopped talking to this kernel (the bridge was closed).')
    );
    this.kernel.statusChanged.disconnect(this._onStatus, this);
    this.kernel.iopubMessage.disconnect(this._onIOPub, this);
    this.kernel.connectionStatusChanged.disconnect(this._onConnection, this);
    this.kernel.disposed.disconnect(this._onKernelDisposed, this);
    Signal.clearData(this);
  }

  /** A fresh number for a comm request or a staged transfer in the kernel. */
  nextId(): number {
    return ++this._id;
  }

  /** A new request: tracked as activity until {@link endOp}. */
  newOp(label: string): Op {
    const op = new Op(label, this.timeoutMs, this.trans, () => this._emitActivity());
    this._ops.add(op);
    if (!this._shellBusy && this.kernel.status === 'idle') {
      op.armGuard();
    }
    this._emitActivity();
    return op;
  }

  endOp(op: Op): void {
    op.finish();
    if (this._ops.delete(op)) {
      this._emitActivity();
    }
  }

  /** Throws when the bridge was closed or the kernel is gone. */
  checkUsable(): void {
    if (this._disposed) {
      throw new BridgeError(
        'disposed',
        this.trans.__('Perpend stopped talking to this kernel (the bridge was closed).')
      );
    }
    if (this.kernel.isDisposed || this.kernel.status === 'dead') {
      throw new BridgeError(
        'dead',
        this.trans.__(
          'The kernel is not running. Start or restart it, then try again; the panel keeps what it has.'
        )
      );
    }
  }

  /**
   * A listing request: deferred while the kernel is busy, coalesced by `key` (calls made
   * meanwhile share one request). Resolves to the helper's JSON object.
   */
  listing(key: string, label: string, expr: string): Promise<unknown> {
    const existing = this._listings.get(key);
    if (existing) {
      return existing;
    }
    const p = (async () => {
      try {
        await this._whenIdle(label);
        const r = await this.evaluate(label, { r: expr });
        const v = parseJsonExpression(this.trans, r.r, label);
        if (!isRecord(v)) {
          throw malformed(this.trans, label);
        }
        return v;
      } finally {
        this._listings.delete(key);
      }
    })();
    this._listings.set(key, p);
    return p;
  }

  /**
   * One silent execute that installs the helper if needed and evaluates `expressions`.
   * Retries once when the kernel aborted it because of a failure queued before it.
   */
  async evaluate(
    label: string,
    expressions: Record<string, string>,
    retry = true
  ): Promise<Record<string, unknown>> {
    this.checkUsable();
    await this._checkPython();
    const op = this.newOp(label);
    let future: Kernel.IShellFuture<
      KernelMessage.IExecuteRequestMsg,
      KernelMessage.IExecuteReplyMsg
    > | null = null;
    try {
      future = this.kernel.requestExecute(
        {
          code: installCode(),
          silent: true,
          store_history: false,
          user_expressions: expressions,
          allow_stdin: false,
          stop_on_error: false
        },
        true
      );
      future.onIOPub = msg => {
        if (msg.header.msg_type === 'status') {
          const s = (msg.content as { execution_state?: string }).execution_state;
          if (s === 'busy') {
            op.start();
          }
        }
      };
      const reply = (await Promise.race([
        future.done,
        op.promise
      ])) as KernelMessage.IExecuteReplyMsg;
      const content = reply.content as unknown as Record<string, unknown>;
      if (content.status === 'aborted') {
        if (retry) {
          this.endOp(op);
          return this.evaluate(label, expressions, false);
        }
        throw aborted(this.trans, label);
      }
      if (content.status === 'error') {
        throw kernelException(this.trans, content, label);
      }
      const exprs = content.user_expressions;
      if (!isRecord(exprs)) {
        throw malformed(this.trans, label);
      }
      return exprs;
    } catch (e) {
      throw this.toBridgeError(e, label);
    } finally {
      this.endOp(op);
    }
  }

  /**
   * Frees a staged transfer in the kernel: fire and forget, not tracked as activity (the
   * helper also drops stale stages on its own).
   */
  release(expr: string): void {
    if (this._disposed || this.kernel.isDisposed || this.kernel.status === 'dead') {
      return;
    }
    try {
      const f = this.kernel.requestExecute(
        {
          code: '',
          silent: true,
          store_history: false,
          user_expressions: { r: expr },
          allow_stdin: false,
          stop_on_error: false
        },
        true
      );
      f.done.catch(() => undefined);
    } catch {
      // The connection is going away; the kernel side is dropped with it.
    }
  }

  /** Any failure while `label` as a BridgeError that says what happened. */
  toBridgeError(e: unknown, label: string): BridgeError {
    if (e instanceof BridgeError) {
      return e;
    }
    if (this.kernel.isDisposed || this.kernel.status === 'dead') {
      return new BridgeError(
        'dead',
        this.trans.__('The kernel died while %1. Nothing in the panel was changed.', label)
      );
    }
    const text = e instanceof Error ? e.message : String(e);
    if (/cancel/i.test(text)) {
      return new BridgeError(
        'restarted',
        this.trans.__(
          'The kernel restarted or disconnected while %1. Nothing in the panel was changed; try again.',
          label
        )
      );
    }
    return new BridgeError(
      'disconnected',
      this.trans.__(
        'The request failed while %1: %2. Nothing in the panel was changed.',
        label,
        text.slice(0, 200)
      )
    );
  }

  /** Resolves when the kernel is not busy (deferral of listings); fails on kernel loss. */
  private async _whenIdle(label: string): Promise<void> {
    this.checkUsable();
    if (!this._shellBusy) {
      return;
    }
    const op = this.newOp(label);
    try {
      await Promise.race([
        op.promise,
        new Promise<void>(resolve => {
          const onIdle = (): void => {
            this._shellIdle.disconnect(onIdle);
            resolve();
          };
          this._shellIdle.connect(onIdle);
          op.promise.catch(() => this._shellIdle.disconnect(onIdle));
        })
      ]);
    } finally {
      this.endOp(op);
    }
    this.checkUsable();
  }

  private async _checkPython(): Promise<void> {
    if (this._language === null) {
      let info: KernelMessage.IInfoReply | undefined;
      let timer: ReturnType<typeof setTimeout> | undefined;
      try {
        info = await Promise.race([
          this.kernel.info,
          new Promise<undefined>(resolve => {
            timer = setTimeout(() => resolve(undefined), this.timeoutMs);
          })
        ]);
      } catch {
        info = undefined;
      } finally {
        clearTimeout(timer);
      }
      const name = info?.language_info?.name;
      this._language = typeof name === 'string' ? name.toLowerCase() : '';
    }
    if (this._language !== 'python' && this._language !== '') {
      throw new BridgeError(
        'unsupported-kernel',
        this.trans.__(
          "This notebook's kernel runs %1, not Python: Perpend can only read arrays from the notebook's outputs.",
          this._language.slice(0, 40)
        )
      );
    }
  }

  private _emitActivity(): void {
    if (!this._disposed) {
      this._onActivity(this.activity);
    }
  }

  private _onStatus(_: Kernel.IKernelConnection, status: Kernel.Status): void {
    if (status === 'restarting' || status === 'autorestarting') {
      // A new kernel process: a new history, and a comm to open again.
      this._reset.emit('restart');
    }
    if (status === 'restarting') {
      // A restart the user asked for, or (when 'autorestarting' follows at once, as
      // @jupyterlab/services reports a server-side restart after a kernel died) a death.
      this._shellBusy = false;
      this._autoRestart = false;
      setTimeout(() => {
        if (this._autoRestart) {
          return;
        }
        this._failAll(
          'restarted',
          this.trans.__(
            "The kernel restarted before the request finished. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
          )
        );
      }, 0);
    } else if (status === 'autorestarting') {
      this._autoRestart = true;
      this._shellBusy = false;
      this._failAll(
        'dead',
        this.trans.__(
          "The kernel died before the request finished and the server restarted it. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
        )
      );
    } else if (status === 'dead') {
      this._reset.emit('lost');
      this._failAll(
        'dead',
        this.trans.__(
          'The kernel died before the request finished. Nothing in the panel was changed; restart the kernel and run the cells again.'
        )
      );
    }
  }

  /**
   * Tracks the main shell's busy/idle from iopub status messages, ignoring those of kernel
   * subshells (other comms may run there while the main shell is busy), which the
   * connection's own `status` mixes in.
   */
  private _onIOPub(_: Kernel.IKernelConnection, msg: KernelMessage.IIOPubMessage): void {
    if (msg.header.msg_type !== 'status') {
      return;
    }
    const parent = msg.parent_header as Partial<KernelMessage.IHeader> & { subshell_id?: unknown };
    if (parent && parent.subshell_id !== undefined && parent.subshell_id !== null) {
      return;
    }
    const s = (msg.content as { execution_state?: string }).execution_state;
    if (s === 'busy') {
      this._shellBusy = true;
      for (const op of this._ops) {
        op.cancelGuard();
      }
    } else if (s === 'idle') {
      this._shellBusy = false;
      for (const op of this._ops) {
        op.armGuard();
      }
      this._shellIdle.emit(undefined);
    }
  }

  private _onConnection(_: Kernel.IKernelConnection, status: Kernel.ConnectionStatus): void {
    if (status !== 'connected') {
      this._reset.emit('lost');
      // Status messages may have been missed; the next one tells the truth again.
      this._shellBusy = false;
      this._failAll(
        'disconnected',
        this.trans.__(
          'The connection to the Jupyter server dropped before the request finished. Nothing in the panel was changed; try again when the kernel is connected.'
        )
      );
    }
  }

  private _onKernelDisposed(): void {
    this._reset.emit('lost');
    this._failAll(
      'dead',
      this.trans.__('The kernel connection was closed. Nothing in the panel was changed.')
    );
  }

  private _failAll(code: BridgeErrorCode, message: string): void {
    for (const op of Array.from(this._ops)) {
      op.fail(new BridgeError(code, message));
    }
  }

  private _disposed = false;
  private _ops = new Set<Op>();
  private _listings = new Map<string, Promise<unknown>>();
  private _language: string | null = null;
  private _id = 0;
  private _reset = new Signal<this, KernelReset>(this);
  private _shellIdle = new Signal<this, void>(this);
  private _shellBusy = false;
  private _autoRestart = false;
}
