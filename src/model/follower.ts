import type { SessionLedger } from '../bridge';
import type { INotebookTarget, SourcesModel } from './sources';

/**
 * Keeps the sources model on the active notebook: one target (with its ledger of executions)
 * per notebook, made the first time the notebook is seen and kept for its lifetime, so that
 * executions in notebooks that are not active are recorded too. Generic over the notebook
 * type: the plugin passes NotebookPanels, tests pass plain objects.
 */
export class NotebookFollower<P extends object> {
  constructor(options: NotebookFollower.IOptions<P>) {
    this._sources = options.sources;
    this._adapt = options.adapt;
    this._ready = options.ready;
  }

  /** The notebook followed now, or null. */
  get current(): P | null {
    return this._current;
  }

  /** Whether to list the arrays again after every execution in the active notebook. */
  refreshAfterExecution = true;

  /** The notebook's target, made on first use (null for no notebook). */
  targetOf(notebook: P | null): INotebookTarget | null {
    if (!notebook) {
      return null;
    }
    let target = this._targets.get(notebook);
    if (!target) {
      target = this._adapt(notebook, () => this._kernelChanged(notebook));
      this._targets.set(notebook, target);
    }
    return target;
  }

  /** The ledger of the executions the notebook's current kernel session produced. */
  ledgerOf(notebook: P | null): SessionLedger | null {
    return this.targetOf(notebook)?.ledger ?? null;
  }

  /**
   * Whether the notebook's ledger trusts a cell's execution count (false without a ledger, so
   * an output whose origin is unknown is read from its text).
   */
  trusts(notebook: P | null, cellId: string, count: number): boolean {
    return this.ledgerOf(notebook)?.trusts(cellId, count) ?? false;
  }

  /**
   * Follows another active notebook (or none): points the sources model at it now, and lists
   * its arrays again once its session is ready (if it is still the active one then).
   */
  follow(notebook: P | null): void {
    this._current = notebook;
    if (!notebook) {
      this._sources.setTarget(null);
      return;
    }
    void this._ready(notebook).then(() => {
      if (this._current === notebook) {
        this._sources.setTarget(this.targetOf(notebook));
        void this._sources.refresh();
      }
    });
    this._sources.setTarget(this.targetOf(notebook));
  }

  /** A cell of `notebook` finished running: list again when that is the active notebook. */
  executed(notebook: P | null): void {
    if (this.refreshAfterExecution && notebook !== null && notebook === this._current) {
      void this._sources.refresh();
    }
  }

  private _kernelChanged(notebook: P): void {
    if (this._current === notebook) {
      void this._sources.refresh();
    }
  }

  private readonly _sources: Pick<SourcesModel, 'setTarget' | 'refresh'>;
  private readonly _adapt: NotebookFollower.IOptions<P>['adapt'];
  private readonly _ready: (notebook: P) => Promise<unknown>;
  private readonly _targets = new WeakMap<P, INotebookTarget>();
  private _current: P | null = null;
}

export namespace NotebookFollower {
  export interface IOptions<P> {
    sources: Pick<SourcesModel, 'setTarget' | 'refresh'>;
    /**
     * Adapts a notebook to a target; calls `kernelChanged` whenever the notebook's kernel
     * changes (the follower lists again when it is the active notebook).
     */
    adapt: (notebook: P, kernelChanged: () => void) => INotebookTarget;
    /** Resolves when the notebook's session is ready (sessionContext.ready). */
    ready: (notebook: P) => Promise<unknown>;
  }
}
