import { Signal, type ISignal } from '@lumino/signaling';
import type { IDisposable } from '@lumino/disposable';
import type { Kernel } from '@jupyterlab/services';
import type { TranslationBundle } from '@jupyterlab/translation';
import { englishBundle } from './english';
import { KernelBridge, type ArrayInfo, type SessionLedger } from '../bridge';

/**
 * What the sources model needs to know of a notebook: its code cells and its kernel. The plugin
 * adapts a NotebookPanel to this; tests can give a plain object.
 */
export interface INotebookTarget {
  /** A name to show (the notebook's path). */
  readonly name: string;
  /** The code cells in order, with the execution count each shows now. */
  cells(): ReadonlyArray<SourcesModel.ICellRef>;
  /** The kernel connection, or null when there is none. */
  readonly kernel: Kernel.IKernelConnection | null;
  /**
   * The (cell id, execution count) pairs this kernel session produced; when given, only those
   * cell results are trusted (after a restart the notebook's counts point at other objects).
   */
  readonly ledger?: SessionLedger;
}

/**
 * The arrays a notebook offers: results of executed cells and kernel variables.
 *
 * Emits `changed` only on a real change. Refreshes are coalesced (a burst of requests while one
 * runs becomes one more run) and deferred while the kernel is busy running the user's code; what
 * the model already listed stays listed when a refresh fails.
 */
export class SourcesModel implements IDisposable {
  constructor(options: SourcesModel.IOptions = {}) {
    this._bridgeOptions = options.bridgeOptions ?? {};
    this._createBridge = options.createBridge ?? (o => new KernelBridge(o));
    this._trans = options.trans ?? englishBundle();
    this._message = this._trans.__('No notebook is active.');
  }

  /** Emitted when anything shown changes. */
  get changed(): ISignal<this, void> {
    return this._changed;
  }
  get status(): SourcesModel.Status {
    return this._status;
  }
  /** A sentence for the user about the status (the error, what is awaited). */
  get message(): string {
    return this._message;
  }
  get target(): INotebookTarget | null {
    return this._target;
  }
  get cellResults(): ReadonlyArray<ArrayInfo> {
    return this._cellResults;
  }
  get variables(): ReadonlyArray<ArrayInfo> {
    return this._variables;
  }
  /** The bridge to the target's current kernel (created on demand), or null. */
  get bridge(): SourcesModel.IBridge | null {
    const kernel = this._target?.kernel ?? null;
    if (!kernel) {
      return null;
    }
    if (!this._bridge || this._bridgeKernel !== kernel) {
      this._bridge?.dispose();
      this._bridge = this._createBridge({
        ...this._bridgeOptions,
        kernel,
        ledger: this._target?.ledger
      });
      this._bridgeKernel = kernel;
    }
    return this._bridge;
  }
  get isDisposed(): boolean {
    return this._isDisposed;
  }

  /** Changes the bridge options (from the settings); applies to the next request. */
  setBridgeOptions(options: Partial<KernelBridge.IOptions>): void {
    this._bridgeOptions = { ...this._bridgeOptions, ...options };
    this._bridge?.dispose();
    this._bridge = null;
    this._bridgeKernel = null;
  }

  /** Points the model at another notebook (or none); the lists are cleared and refreshed. */
  setTarget(target: INotebookTarget | null): void {
    if (target === this._target) {
      return;
    }
    this._target = target;
    this._cellResults = [];
    this._variables = [];
    this._bridge?.dispose();
    this._bridge = null;
    this._bridgeKernel = null;
    this._setStatus(
      target ? 'idle' : 'none',
      target ? '' : this._trans.__('No notebook is active.')
    );
    this._changed.emit();
    if (target) {
      void this.refresh();
    }
  }

  /**
   * Lists the arrays again. While the kernel is busy with the user's code the refresh waits until
   * it is idle (the status says so); concurrent calls are merged.
   */
  async refresh(): Promise<void> {
    if (this._running) {
      this._again = true;
      return this._running;
    }
    this._running = this._refreshLoop();
    try {
      await this._running;
    } finally {
      this._running = null;
    }
  }

  dispose(): void {
    if (this._isDisposed) {
      return;
    }
    this._isDisposed = true;
    this._bridge?.dispose();
    Signal.clearData(this);
  }

  private async _refreshLoop(): Promise<void> {
    do {
      this._again = false;
      await this._refreshOnce();
    } while (this._again && !this._isDisposed);
  }

  private async _refreshOnce(): Promise<void> {
    const target = this._target;
    if (!target) {
      return;
    }
    const kernel = target.kernel;
    if (!kernel) {
      this._setStatus('no-kernel', this._trans.__('The notebook has no running kernel.'));
      return;
    }
    if (kernel.status === 'busy') {
      this._setStatus(
        'waiting',
        this._trans.__('Waiting for the kernel to finish the running cell…')
      );
      await Private.untilNotBusy(kernel);
      if (this._target !== target || this._isDisposed) {
        return;
      }
    }
    const bridge = this.bridge;
    if (!bridge) {
      return;
    }
    this._setStatus('refreshing', this._trans.__('Reading the list of arrays from the kernel…'));
    try {
      const cells = target
        .cells()
        .filter(c => c.executionCount !== null)
        .map(c =>
          c.source === undefined
            ? { cellId: c.cellId, executionCount: c.executionCount }
            : { cellId: c.cellId, executionCount: c.executionCount, source: c.source }
        );
      const cellResults = await bridge.listCellResults(cells);
      const variables = await bridge.listVariables();
      if (this._target !== target || this._isDisposed) {
        return;
      }
      const changed =
        !Private.sameInfos(cellResults, this._cellResults) ||
        !Private.sameInfos(variables, this._variables);
      this._cellResults = cellResults;
      this._variables = variables;
      this._setStatus('idle', '', changed);
    } catch (reason) {
      if (this._target !== target || this._isDisposed) {
        return;
      }
      const text = reason instanceof Error ? reason.message : String(reason);
      console.error('Perpend: listing the arrays failed', reason);
      this._setStatus('error', this._trans.__('Could not list the arrays: %1', text));
    }
  }

  private _setStatus(status: SourcesModel.Status, message: string, force = false): void {
    if (!force && status === this._status && message === this._message) {
      return;
    }
    this._status = status;
    this._message = message;
    this._changed.emit();
  }

  private _bridgeOptions: Partial<KernelBridge.IOptions>;
  private _target: INotebookTarget | null = null;
  private readonly _createBridge: (options: KernelBridge.IOptions) => SourcesModel.IBridge;
  private _bridge: SourcesModel.IBridge | null = null;
  private _bridgeKernel: Kernel.IKernelConnection | null = null;
  private _cellResults: ArrayInfo[] = [];
  private _variables: ArrayInfo[] = [];
  private _status: SourcesModel.Status = 'none';
  private _message: string;
  private readonly _trans: TranslationBundle;
  private _running: Promise<void> | null = null;
  private _again = false;
  private _isDisposed = false;
  private _changed = new Signal<this, void>(this);
}

export namespace SourcesModel {
  export type Status = 'none' | 'no-kernel' | 'idle' | 'waiting' | 'refreshing' | 'error';
  export interface ICellRef {
    cellId: string;
    executionCount: number | null;
    /**
     * The cell's current text: lets the bridge check a count its ledger did not record (after
     * a page reload) against the kernel's input history. Only its digest leaves the page.
     */
    source?: string;
  }
  /** What the model uses of a bridge (KernelBridge; tests may pass a stand-in). */
  export type IBridge = Pick<
    KernelBridge,
    | 'listCellResults'
    | 'listVariables'
    | 'readArray'
    | 'readScalar'
    | 'writeArray'
    | 'writeRecord'
    | 'dispose'
    | 'activity'
    | 'activityChanged'
  >;
  export interface IOptions {
    bridgeOptions?: Partial<KernelBridge.IOptions>;
    /** Makes the bridge for a kernel; defaults to `new KernelBridge(options)`. */
    createBridge?: (options: KernelBridge.IOptions) => IBridge;
    /** Translates what the model says to the user; English when absent. */
    trans?: TranslationBundle;
  }
}

namespace Private {
  export function sameInfos(a: ReadonlyArray<ArrayInfo>, b: ReadonlyArray<ArrayInfo>): boolean {
    return a.length === b.length && a.every((x, i) => JSON.stringify(x) === JSON.stringify(b[i]));
  }

  export function untilNotBusy(kernel: Kernel.IKernelConnection): Promise<void> {
    return new Promise(resolve => {
      const check = (): void => {
        if (kernel.status !== 'busy' || kernel.isDisposed) {
          kernel.statusChanged.disconnect(check);
          resolve();
        }
      };
      kernel.statusChanged.connect(check);
      check();
    });
  }
}
