import {
  ILayoutRestorer,
  type JupyterFrontEnd,
  type JupyterFrontEndPlugin
} from '@jupyterlab/application';
import { ICommandPalette } from '@jupyterlab/apputils';
import { INotebookTracker, NotebookActions, type NotebookPanel } from '@jupyterlab/notebook';
import { ISettingRegistry } from '@jupyterlab/settingregistry';
import { ITranslator, nullTranslator } from '@jupyterlab/translation';
import { Signal } from '@lumino/signaling';
import type { IDisposable } from '@lumino/disposable';
import { CACHE_NOTES, SessionLedger, watchKernelExecutions } from './bridge';
import { LoadedArraysModel } from './model/loaded';
import { SourcesModel, type INotebookTarget } from './model/sources';
import { OUTPUT_SELECTOR, outputUnderContextMenu } from './panel/output-target';
import { PerpendSidebar } from './panel/sidebar';
import { perpendIcon } from './panel/icons';
import { DEFAULT_SETTINGS, IPerpend, type IPerpendSettings } from './tokens';

namespace CommandIDs {
  export const open = 'perpend:open';
  export const refresh = 'perpend:refresh-arrays';
  export const sendOutput = 'perpend:send-output';
}

const PLUGIN_ID = 'perpend:plugin';

/** Perpend's main plugin: wires the sources model to the notebook tracker and the side panel. */
const plugin: JupyterFrontEndPlugin<IPerpend> = {
  id: PLUGIN_ID,
  description: 'QR-based subspace tools and adaptive filters on notebook arrays.',
  autoStart: true,
  requires: [INotebookTracker],
  optional: [ICommandPalette, ISettingRegistry, ILayoutRestorer, ITranslator],
  provides: IPerpend,
  activate: (
    app: JupyterFrontEnd,
    tracker: INotebookTracker,
    palette: ICommandPalette | null,
    settingRegistry: ISettingRegistry | null,
    restorer: ILayoutRestorer | null,
    translator: ITranslator | null
  ): IPerpend => {
    const trans = (translator ?? nullTranslator).load('perpend');
    const sources = new SourcesModel();
    const loaded = new LoadedArraysModel({ bridge: () => sources.bridge });
    const sidebar = new PerpendSidebar({ sources, loaded, trans });

    let settings: IPerpendSettings = { ...DEFAULT_SETTINGS };
    const perpend = new Private.Perpend(sources, loaded);

    app.shell.add(sidebar, 'right', { rank: 650 });
    restorer?.add(sidebar, sidebar.id);

    app.commands.addCommand(CommandIDs.open, {
      label: trans.__('Open Perpend Panel'),
      caption: trans.__('Show the Perpend panel in the right sidebar'),
      icon: perpendIcon,
      execute: () => {
        app.shell.activateById(sidebar.id);
      }
    });
    app.commands.addCommand(CommandIDs.refresh, {
      label: trans.__('Perpend: List Notebook Arrays Again'),
      execute: () => sources.refresh()
    });
    app.commands.addCommand(CommandIDs.sendOutput, {
      label: trans.__('Send Output to Perpend'),
      caption: trans.__(
        'Load this output into the Perpend panel (from the kernel at full precision when it can)'
      ),
      icon: perpendIcon,
      isEnabled: () => tracker.currentWidget !== null,
      execute: async () => {
        const output = outputUnderContextMenu(app, tracker);
        if (!output) {
          return;
        }
        app.shell.activateById(sidebar.id);
        const ledger = targetOf(tracker.currentWidget)?.ledger;
        const count = output.executionCount;
        if (
          output.type === 'execute_result' &&
          count !== null &&
          ledger?.trusts(output.cellId, count) &&
          sources.bridge
        ) {
          const item = await loaded.loadFromKernel({
            source: { kind: 'cell', cellId: output.cellId, executionCount: count },
            label: `Out[${count}]`
          });
          if (item) {
            return;
          }
        }
        // Not in this kernel session's output cache (or no kernel): parse what the output shows.
        const label = count !== null ? `Out[${count}] (text)` : `cell ${output.cellIndex} output`;
        const notes = output.type === 'execute_result' ? [] : [CACHE_NOTES.notCached];
        const json = output.data['application/json'];
        if (json !== undefined) {
          loaded.loadFromText(label, json, 'application/json', notes);
        } else {
          loaded.loadFromText(label, output.data['text/plain'] ?? '', undefined, notes);
        }
      }
    });
    app.contextMenu.addItem({
      command: CommandIDs.sendOutput,
      selector: OUTPUT_SELECTOR,
      rank: 20
    });
    palette?.addItem({ command: CommandIDs.open, category: 'Perpend' });
    palette?.addItem({ command: CommandIDs.refresh, category: 'Perpend' });

    const targets = new WeakMap<NotebookPanel, INotebookTarget>();
    const targetOf = (panel: NotebookPanel | null): INotebookTarget | null => {
      if (!panel) {
        return null;
      }
      let target = targets.get(panel);
      if (!target) {
        target = Private.notebookTarget(panel);
        targets.set(panel, target);
        panel.sessionContext.kernelChanged.connect(() => {
          if (tracker.currentWidget === panel) {
            void sources.refresh();
          }
        });
      }
      return target;
    };
    const follow = (): void => {
      const panel = tracker.currentWidget;
      if (!panel) {
        sources.setTarget(null);
        return;
      }
      void panel.sessionContext.ready.then(() => {
        if (tracker.currentWidget === panel) {
          sources.setTarget(targetOf(panel));
          void sources.refresh();
        }
      });
      sources.setTarget(targetOf(panel));
    };
    tracker.currentChanged.connect(follow);
    // Every notebook gets its ledger as soon as it opens, so executions in notebooks that are not
    // current are recorded too.
    tracker.widgetAdded.connect((_, panel) => void targetOf(panel));
    tracker.forEach(panel => void targetOf(panel));
    follow();

    NotebookActions.executed.connect((_, args) => {
      if (settings.refreshAfterExecution && tracker.currentWidget?.content === args.notebook) {
        void sources.refresh();
      }
    });

    if (settingRegistry) {
      const apply = (loaded: ISettingRegistry.ISettings): void => {
        settings = { ...DEFAULT_SETTINGS, ...(loaded.composite as Partial<IPerpendSettings>) };
        sources.setBridgeOptions({
          timeoutMs: settings.requestTimeoutSeconds * 1000,
          maxBytes: settings.maxArrayMiB * 1024 * 1024
        });
        perpend.settingsChanged.emit(settings);
      };
      settingRegistry
        .load(PLUGIN_ID)
        .then(loaded => {
          apply(loaded);
          loaded.changed.connect(apply);
        })
        .catch(reason => console.error('Perpend: could not load the settings', reason));
    }
    return perpend;
  }
};

namespace Private {
  /** The IPerpend handle: its signal's sender is the handle itself, as listeners expect. */
  export class Perpend implements IPerpend {
    constructor(
      readonly sources: SourcesModel,
      readonly loaded: LoadedArraysModel
    ) {}
    readonly settingsChanged: Signal<IPerpend, IPerpendSettings> = new Signal(this);
  }

  /**
   * Adapts a NotebookPanel to what the sources model needs, with a ledger of the executions its
   * current kernel session produced (reset when the kernel changes or restarts).
   */
  export function notebookTarget(panel: NotebookPanel): INotebookTarget {
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
            const count = (cell.model as unknown as { executionCount: number | null })
              .executionCount;
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
}

export default plugin;
