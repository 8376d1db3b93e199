/**
 * The binary comm channel to the helper: opened once per kernel process, on the main shell,
 * with numbered requests whose messages are routed to their handler. When the kernel has no
 * comm support, transport 'auto' falls back to base64 inside silent executes.
 */
import type { CommsOverSubshells, Kernel, KernelMessage } from '@jupyterlab/services';
import { BridgeError } from './errors';
import { COMM_TARGET, HELPER_REF } from './helper';
import type { Op } from './op';
import { aborted, isRecord } from './replies';
import type { KernelRequests, KernelReset } from './requests';

/** Receives the messages of one numbered request (`{ op: 'closed' }` when the comm closes). */
export type CommHandler = (data: Record<string, unknown>, buffers: ReadonlyArray<DataView>) => void;

/** How arrays move: 'auto' (comm, else base64), 'comm' or 'base64'. */
export type Transport = 'auto' | 'comm' | 'base64';

/** Perpend's comm to the helper, and the choice between it and base64. */
export class CommChannel {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _transport: Transport
  ) {
    _requests.reset.connect(this._onReset, this);
  }

  /** True when a transfer should use the comm (opening it if needed), false for base64. */
  async use(): Promise<boolean> {
    if (this._transport === 'base64') {
      return false;
    }
    if (this._failed && this._transport === 'auto') {
      return false;
    }
    try {
      await this.open();
      return true;
    } catch (e) {
      if (this._transport === 'auto' && e instanceof BridgeError && e.code === 'comm-closed') {
        this._failed = true;
        return false;
      }
      throw e;
    }
  }

  /** The open comm, opened now when there is none. */
  open(): Promise<Kernel.IComm> {
    if (this._comm && !this._comm.isDisposed && this._ready) {
      return this._ready;
    }
    const requests = this._requests;
    const trans = requests.trans;
    const label = trans.__('opening the data channel');
    const ready = (async () => {
      const r = await requests.evaluate(label, { r: `${HELPER_REF}.HAS_COMM` });
      const has = r.r;
      if (!isRecord(has) || !isRecord(has.data) || has.data['text/plain'] !== 'True') {
        throw new BridgeError('comm-closed', trans.__('The kernel has no comm support.'));
      }
      const comm = requests.kernel.createComm(COMM_TARGET);
      // @jupyterlab/services 7.6 sends comm messages over a kernel subshell (JEP 91) by
      // default, where they run in a thread beside the user's running cell. Perpend's reads
      // and writes stay on the main shell instead: they queue behind the running cell and see
      // the namespace between cells, never half-way through one. Set synchronously, before
      // the comm's asynchronous subshell start-up checks it.
      comm.commsOverSubshells = 'disabled' as CommsOverSubshells;
      this._comm = comm;
      const op = requests.newOp(label);
      try {
        const opened = new Promise<void>((resolve, reject) => {
          comm.onMsg = msg => {
            const data = msg.content.data as Record<string, unknown>;
            if (isRecord(data) && data.op === 'ready' && data.req === undefined) {
              resolve();
              return;
            }
            this._onMsg(msg);
          };
          comm.onClose = () => {
            reject(
              new BridgeError('comm-closed', trans.__("The kernel refused Perpend's data channel."))
            );
            this._onClosed(comm);
          };
        });
        const future = comm.open({});
        future.onIOPub = msg => {
          if (
            msg.header.msg_type === 'status' &&
            (msg.content as { execution_state?: string }).execution_state === 'busy'
          ) {
            op.start();
          }
        };
        await Promise.race([opened, op.promise]);
        return comm;
      } catch (e) {
        if (this._comm === comm) {
          this._comm = null;
          this._ready = null;
        }
        throw requests.toBridgeError(e, label);
      } finally {
        requests.endOp(op);
      }
    })();
    this._ready = ready;
    ready.catch(() => {
      if (this._ready === ready) {
        this._ready = null;
      }
    });
    return ready;
  }

  /** True while `comm` is the channel in use (not closed, not replaced). */
  isCurrent(comm: Kernel.IComm): boolean {
    return this._comm === comm && !comm.isDisposed;
  }

  /** Routes the messages of request `req` to `handler` until {@link unhandle}. */
  handle(req: number, handler: CommHandler): void {
    this._handlers.set(req, handler);
  }

  unhandle(req: number): void {
    this._handlers.delete(req);
  }

  /** Sends one comm message for `op`, starting/extending its clock on the kernel's busy. */
  send(
    comm: Kernel.IComm,
    op: Op,
    data: Record<string, unknown>,
    buffers?: ArrayBuffer[]
  ): Kernel.IShellFuture {
    const future = comm.send(data as never, undefined, buffers, true);
    future.onIOPub = msg => {
      if (
        msg.header.msg_type === 'status' &&
        (msg.content as { execution_state?: string }).execution_state === 'busy'
      ) {
        op.start();
      }
    };
    future.onReply = msg => {
      if ((msg.content as { status?: string }).status === 'aborted') {
        op.fail(aborted(this._requests.trans, op.label));
      }
    };
    return future;
  }

  /** Closes the comm (the bridge is being disposed). */
  dispose(): void {
    this._requests.reset.disconnect(this._onReset, this);
    const comm = this._comm;
    this._comm = null;
    this._ready = null;
    if (comm && !comm.isDisposed && !this._requests.kernel.isDisposed) {
      try {
        comm.close();
      } catch {
        // The kernel may be gone already; nothing to release then.
      }
    }
  }

  private _onMsg(msg: KernelMessage.ICommMsgMsg): void {
    const data = msg.content.data as Record<string, unknown>;
    if (!isRecord(data) || typeof data.req !== 'number') {
      return;
    }
    const handler = this._handlers.get(data.req);
    if (handler) {
      handler(data, (msg.buffers ?? []) as DataView[]);
    }
  }

  private _onClosed(comm: Kernel.IComm): void {
    if (this._comm !== comm) {
      return;
    }
    this._comm = null;
    this._ready = null;
    const handlers = Array.from(this._handlers.values());
    this._handlers.clear();
    for (const h of handlers) {
      h({ op: 'closed' }, []);
    }
  }

  private _onReset(_: KernelRequests, _kind: KernelReset): void {
    // A new kernel process may support the comm even if the last one did not.
    this._failed = false;
    this._comm = null;
    this._ready = null;
    this._handlers.clear();
  }

  private _comm: Kernel.IComm | null = null;
  private _ready: Promise<Kernel.IComm> | null = null;
  private _failed = false;
  private _handlers = new Map<number, CommHandler>();
}
