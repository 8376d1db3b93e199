/**
 * One workbench per notebook: its model (set-ups in the notebook's metadata, runs in memory),
 * its own listing of the notebook's kernel (so the workbench keeps working when another
 * notebook is active), and the following of its sources after each execution. Made on first
 * use, disposed with the notebook (runs in flight are cancelled).
 */
import type { NotebookPanel } from '@jupyterlab/notebook';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { Cell } from '@jupyterlab/cells';
import type { KernelBridge } from '../../bridge';
import { KernelSources } from '../../model/workbench/kernel-sources';
import { CombinedSources, ShelfSources, type IShelf } from '../../model/workbench/shelf-sources';
import type { IRunner } from '../../model/workbench/runs';
import { METADATA_KEY, setupSources, type SourceRef } from '../../model/workbench/setup';
import { WorkbenchModel } from '../../model/workbench/workbench';
import { SourcesModel, type INotebookTarget } from '../../model/sources';

/** What the manager keeps for one notebook. */
export interface IWorkbenchEntry {
  readonly panel: NotebookPanel;
  readonly model: WorkbenchModel;
  readonly kernel: KernelSources;
  /** The notebook's listing and the panel's shelf together: what the pickers offer. */
  readonly sources: CombinedSources;
  readonly listing: SourcesModel;
  readonly shelf: ShelfSources | null;
}

export class WorkbenchManager {
  constructor(options: WorkbenchManager.IOptions) {
    this._trans = options.trans;
    this._runner = options.runner;
    this._target = options.target;
    this._bridgeOptions = options.bridgeOptions;
    this._shelf = options.shelf ?? null;
  }

  /** The notebook's workbench, made on first use. */
  entryFor(panel: NotebookPanel): IWorkbenchEntry {
    let entry = this._entries.get(panel);
    if (entry) {
      return entry;
    }
    const trans = this._trans;
    const listing = new SourcesModel({ trans, bridgeOptions: this._bridgeOptions() });
    const kernel = new KernelSources({
      sources: listing,
      notListed: id =>
        trans.__(
          'The result of cell %1 is not listed now: run the cell in this kernel session first.',
          id
        ),
      noKernel: trans.__('The notebook has no running kernel.')
    });
    const gone = (label: string): string =>
      trans.__(
        '“%1” is no longer on the Perpend panel: the panel keeps its arrays in this page only, so a reload empties it. Make it again there, or pick another source.',
        label
      );
    const shelf = this._shelf ? new ShelfSources({ shelf: this._shelf, gone }) : null;
    const sources = new CombinedSources(kernel, shelf, gone);
    const model = new WorkbenchModel({
      trans,
      runner: this._runner,
      reader: sources,
      host: {
        read: () => panel.model?.getMetadata(METADATA_KEY),
        write: value => panel.model?.setMetadata(METADATA_KEY, value as never)
      }
    });
    kernel.sourcesChanged.connect((_, refs) => model.sourcesChanged(refs));
    const target: INotebookTarget = this._target(panel, () => {
      model.kernelRestarted();
      void listing.refresh();
    });
    listing.setTarget(target);
    // A restart keeps the kernel connection (no kernel change): its status says it.
    panel.sessionContext.statusChanged.connect((_, status) => {
      if (status === 'restarting' || status === 'autorestarting') {
        model.kernelRestarted();
      }
    });
    entry = { panel, model, kernel, sources, listing, shelf };
    this._entries.set(panel, entry);
    panel.disposed.connect(() => this._drop(panel));
    return entry;
  }

  /** The workbench of `panel` if it has one. */
  existing(panel: NotebookPanel): IWorkbenchEntry | undefined {
    return this._entries.get(panel);
  }

  /** A cell of `panel` finished running: list again, and tell following set-ups what changed. */
  cellExecuted(panel: NotebookPanel, cell: Cell): void {
    const entry = this._entries.get(panel);
    if (!entry) {
      return;
    }
    const text = cell.model.sharedModel.getSource();
    // A variable re-bound to the same shape leaves the listing as it was; the executed cell's
    // text naming it is the sign it may have changed.
    const named: SourceRef[] = [];
    for (const s of entry.model.setups) {
      for (const { pick } of setupSources(s.params)) {
        if (pick.ref.kind === 'variable' && mentions(text, pick.ref.name.split('.')[0])) {
          named.push(pick.ref);
        }
      }
    }
    const cellRef: SourceRef = { kind: 'cell', cellId: cell.model.id };
    void entry.listing.refresh().then(() => entry.model.sourcesChanged([cellRef, ...named]));
  }

  /** New bridge options (from the settings) for every notebook's listing. */
  setBridgeOptions(options: Partial<KernelBridge.IOptions>): void {
    for (const e of this._entries.values()) {
      e.listing.setBridgeOptions(options);
    }
  }

  private _drop(panel: NotebookPanel): void {
    const e = this._entries.get(panel);
    if (e) {
      this._entries.delete(panel);
      e.model.dispose();
      e.sources.dispose();
      e.shelf?.dispose();
      e.kernel.dispose();
      e.listing.dispose();
    }
  }

  private readonly _trans: TranslationBundle;
  private readonly _runner: IRunner;
  private readonly _target: WorkbenchManager.IOptions['target'];
  private readonly _bridgeOptions: () => Partial<KernelBridge.IOptions>;
  private readonly _shelf: IShelf | null;
  private readonly _entries = new Map<NotebookPanel, IWorkbenchEntry>();
}

export namespace WorkbenchManager {
  export interface IOptions {
    trans: TranslationBundle;
    runner: IRunner;
    /** Adapts a notebook to the listing's target (`kernelChanged` after each change of kernel). */
    target: (panel: NotebookPanel, kernelChanged: () => void) => INotebookTarget;
    bridgeOptions: () => Partial<KernelBridge.IOptions>;
    /** The Perpend panel's arrays (its shelf), offered as sources beside the kernel's. */
    shelf?: IShelf | null;
  }
}

/** True when `code` uses `name` as a whole identifier (not inside another name). */
export function mentions(code: string, name: string): boolean {
  const esc = name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  return new RegExp(`(^|[^A-Za-z0-9_.])${esc}(?![A-Za-z0-9_])`).test(code);
}
