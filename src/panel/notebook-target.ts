import type { IDisposable } from '@lumino/disposable';
import type { NotebookPanel } from '@jupyterlab/notebook';
import { SessionLedger, watchKernelExecutions } from '../bridge';
import type { INotebookTarget, SourcesModel } from '../model/sources';

/**
 * Adapts a NotebookPanel to what the sources model needs, with a ledger of the executions its
 * current kernel session produced (reset when the kernel changes or restarts).
 * `kernelChanged` is called after each change of kernel.
 */
export function notebookTarget(panel: NotebookPanel, kernelChanged: () => void): INotebookTarget {
  const ledger = new SessionLedger();
  let watcher: IDisposable | null = null;
  const watch = (): void => {
    watcher?.dispose();
    watcher = null;
    ledger.reset();
    const kernel = panel.sessionContext.session?.kernel;
    if (kernel) {
      watcher = watchKernelExecutions(kernel, ledger);
    }
  };
  panel.sessionContext.kernelChanged.connect(watch);
  panel.sessionContext.kernelChanged.connect(kernelChanged);
  panel.disposed.connect(() => watcher?.dispose());
  watch();
  return {
    ledger,
    get name() {
      return panel.context.path;
    },
    cells() {
      const refs: SourcesModel.ICellRef[] = [];
      for (const cell of panel.content.widgets) {
        if (cell.model.type === 'code') {
          const count = (cell.model as unknown as { executionCount: number | null }).executionCount;
          refs.push({
            cellId: cell.model.id,
            executionCount: count ?? null,
            source: cell.model.sharedModel.getSource()
          });
        }
      }
      return refs;
    },
    get kernel() {
      return panel.sessionContext.session?.kernel ?? null;
    }
  };
}
