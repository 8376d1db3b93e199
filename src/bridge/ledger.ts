import type { Kernel, KernelMessage } from '@jupyterlab/services';
import type { IDisposable } from '@lumino/disposable';

/**
 * Which (cell id, execution count) pairs the current kernel session produced.
 *
 * IPython's output cache is keyed by execution count, and after a restart the counts saved in
 * a notebook point at nothing or at other objects. The ledger remembers only counts that this
 * session produced, and {@link KernelBridge.listCellResults} asks the kernel only about those.
 * Pure: it is fed by {@link SessionLedger.record} and {@link SessionLedger.reset}, by
 * {@link watchKernelExecutions}, and by {@link KernelBridge.verifyCells} for cells that ran
 * before this page watched the kernel (a reload), checked against the kernel's input history.
 */
export class SessionLedger {
  private _byCell = new Map<string, number>();
  private _generation = 0;

  /** Increments on each reset, so a caller can tell a stale answer from a fresh one. */
  get generation(): number {
    return this._generation;
  }

  /** Number of cells recorded since the last reset. */
  get size(): number {
    return this._byCell.size;
  }

  /**
   * Records that `cellId` ran as execution `executionCount` in this session. A later run of
   * the same cell replaces the earlier one (the cell shows only its latest result).
   * Bad arguments (empty id, non-positive or non-integer count) are ignored and return false:
   * they come from notebook content, which is not trusted.
   */
  record(cellId: unknown, executionCount: unknown): boolean {
    if (typeof cellId !== 'string' || cellId.length === 0 || cellId.length > 256) {
      return false;
    }
    if (
      typeof executionCount !== 'number' ||
      !Number.isSafeInteger(executionCount) ||
      executionCount < 1
    ) {
      return false;
    }
    this._byCell.set(cellId, executionCount);
    return true;
  }

  /** Forgets everything: call on kernel restart or when the notebook changes kernel. */
  reset(): void {
    this._byCell.clear();
    this._generation++;
  }

  /** True when `cellId` last ran as `executionCount` in this session. */
  trusts(cellId: string, executionCount: number | null | undefined): boolean {
    return executionCount !== null && this._byCell.get(cellId) === executionCount;
  }

  /** The execution count recorded for `cellId`, if any. */
  countFor(cellId: string): number | undefined {
    return this._byCell.get(cellId);
  }

  /** The cell recorded as having run as `executionCount`, if any. */
  cellFor(executionCount: number): string | undefined {
    for (const [cellId, n] of this._byCell) {
      if (n === executionCount) {
        return cellId;
      }
    }
    return undefined;
  }

  /** A snapshot of the recorded pairs. */
  entries(): Array<{ cellId: string; executionCount: number }> {
    return Array.from(this._byCell, ([cellId, executionCount]) => ({ cellId, executionCount }));
  }
}

/**
 * Feeds `ledger` from a kernel connection's own traffic: an outgoing `execute_request` whose
 * metadata carries `cellId` (JupyterLab's notebook sends it) is matched with the
 * `execute_input` / `execute_reply` that carries its execution count; a restart (status
 * `restarting` / `autorestarting`) resets the ledger. Only requests sent through this
 * connection object are seen, which is the case for a notebook's own kernel connection.
 * Dispose the returned object to stop.
 */
export function watchKernelExecutions(
  kernel: Kernel.IKernelConnection,
  ledger: SessionLedger
): IDisposable {
  const cellByMsg = new Map<string, string>();
  let disposed = false;
  const onAny = (_: unknown, args: Kernel.IAnyMessageArgs): void => {
    const msg = args.msg as KernelMessage.IMessage;
    if (args.direction === 'send') {
      if (msg.header.msg_type === 'execute_request') {
        const content = msg.content as KernelMessage.IExecuteRequestMsg['content'];
        const cellId = (msg.metadata as Record<string, unknown>)?.cellId;
        if (typeof cellId === 'string' && content.store_history !== false && !content.silent) {
          cellByMsg.set(msg.header.msg_id, cellId);
          if (cellByMsg.size > 10000) {
            // Bound the map if replies never come (dropped connection): forget the oldest.
            const first = cellByMsg.keys().next().value as string;
            cellByMsg.delete(first);
          }
        }
      }
      return;
    }
    const parentId = (msg.parent_header as Partial<KernelMessage.IHeader>)?.msg_id;
    if (typeof parentId !== 'string') {
      return;
    }
    const cellId = cellByMsg.get(parentId);
    if (cellId === undefined) {
      return;
    }
    const type = msg.header.msg_type;
    if (type === 'execute_input' || type === 'execute_reply') {
      const count = (msg.content as { execution_count?: unknown }).execution_count;
      ledger.record(cellId, count);
      if (type === 'execute_reply') {
        cellByMsg.delete(parentId);
      }
    }
  };
  const onStatus = (_: unknown, status: Kernel.Status): void => {
    if (status === 'restarting' || status === 'autorestarting') {
      ledger.reset();
      cellByMsg.clear();
    }
  };
  kernel.anyMessage.connect(onAny);
  kernel.statusChanged.connect(onStatus);
  return {
    get isDisposed() {
      return disposed;
    },
    dispose() {
      if (disposed) {
        return;
      }
      disposed = true;
      kernel.anyMessage.disconnect(onAny);
      kernel.statusChanged.disconnect(onStatus);
      cellByMsg.clear();
    }
  };
}
