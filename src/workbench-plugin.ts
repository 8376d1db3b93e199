import {
  ILayoutRestorer,
  type JupyterFrontEnd,
  type JupyterFrontEndPlugin
} from '@jupyterlab/application';
import {
  ICommandPalette,
  MainAreaWidget,
  Dialog,
  Notification,
  showDialog,
  WidgetTracker
} from '@jupyterlab/apputils';
import { INotebookTracker, NotebookActions, type NotebookPanel } from '@jupyterlab/notebook';
import { ISettingRegistry } from '@jupyterlab/settingregistry';
import { ITranslator, nullTranslator } from '@jupyterlab/translation';
import {
  BUILTIN_DEFAULTS,
  type KernelHints,
  type WorkbenchDefaults
} from './model/workbench/drafts';
import { PoolRunner } from './model/workbench/pool-runner';
import { notebookTarget } from './panel/notebook-target';
import { perpendIcon } from './panel/icons';
import { WorkbenchManager } from './panel/workbench/workbench-manager';
import { WorkbenchPanel } from './panel/workbench/workbench-panel';
import {
  chooseArray,
  writePlotData,
  writeRunArray,
  writeWholeRun
} from './panel/workbench/write-back';
import type { PlotSettings } from './panel/plots/settings';
import { createPlotTab, plotTargetOf, type PlotTarget } from './panel/plots/plot-tab';
import { addWorkbenchCommands, paletteItems, WORKBENCH_COMMANDS } from './workbench-commands';
import { createBrowserWorkerPool } from './worker/client';
import type { WorkerPool } from './worker/pool';
import { workerSpectralCompute } from './worker/spectral-client';
import { DEFAULT_SETTINGS, IPerpend, type IPerpendSettings } from './tokens';
import type { KernelBridge } from './bridge';

const PLUGIN_ID = 'perpend:workbench';

/**
 * The workbench plugin: a main-area tab per notebook where set-ups are made, run off the page
 * in a pool of workers, and kept in the notebook's metadata. Registers the commands, restores
 * open workbenches on reload, and connects executions to the set-ups that follow their
 * sources. Menus and shortcuts are declared in schema/workbench.json.
 */
const plugin: JupyterFrontEndPlugin<void> = {
  id: PLUGIN_ID,
  description: 'The Perpend workbench: adaptive filters, interference removal and subspace tools.',
  autoStart: true,
  requires: [INotebookTracker],
  optional: [ICommandPalette, ISettingRegistry, ILayoutRestorer, ITranslator, IPerpend],
  activate: (
    app: JupyterFrontEnd,
    notebooks: INotebookTracker,
    palette: ICommandPalette | null,
    settingRegistry: ISettingRegistry | null,
    restorer: ILayoutRestorer | null,
    translator: ITranslator | null,
    perpend: IPerpend | null
  ): void => {
    const trans = (translator ?? nullTranslator).load('perpend');
    const withTranslator = (v: IPerpendSettings): Partial<KernelBridge.IOptions> => ({
      ...Private.bridgeOptions(v),
      translator: translator ?? undefined
    });
    // The main plugin's settings may be loaded before this plugin activates: start from them.
    let bridgeOptions = withTranslator(perpend?.settings ?? DEFAULT_SETTINGS);
    let defaults: WorkbenchDefaults = { ...BUILTIN_DEFAULTS };
    let poolSize = 0;
    let memoryMiB = 1024;
    let plotSettings: Partial<PlotSettings> = { csvMaxRows: 1_000_000 };
    let pool: WorkerPool | null = null;
    // The workers together keep as many bytes of the runs' inputs as the page keeps of the
    // arrays it read (the setting "Arrays kept after reading"), shared out between them.
    const holdInputs = (p: WorkerPool): void => {
      p.holdBytesPerWorker = Math.floor((bridgeOptions.keepReadBytes ?? 256 * 2 ** 20) / p.size);
    };
    const getPool = (): WorkerPool => {
      if (!pool) {
        pool = createBrowserWorkerPool({
          size: poolSize > 0 ? poolSize : undefined,
          memoryLimitBytes: memoryMiB * 2 ** 20
        });
        holdInputs(pool);
      }
      return pool;
    };
    // The plots' spectral estimates run in a worker of their own: never queued behind runs.
    let plotPool: WorkerPool | null = null;
    const plotCompute = workerSpectralCompute(
      () => (plotPool ??= createBrowserWorkerPool({ size: 1, memoryLimitBytes: 2 ** 30 }))
    );
    const manager = new WorkbenchManager({
      trans,
      runner: new PoolRunner(getPool, trans),
      target: notebookTarget,
      bridgeOptions: () => bridgeOptions,
      shelf: perpend?.loaded ?? null
    });
    const tracker = new WidgetTracker<MainAreaWidget<WorkbenchPanel>>({
      namespace: 'perpend-workbench'
    });
    const widgets = new Map<NotebookPanel, MainAreaWidget<WorkbenchPanel>>();

    const open = (panel: NotebookPanel, activate = true): MainAreaWidget<WorkbenchPanel> => {
      let widget = widgets.get(panel);
      if (!widget || widget.isDisposed) {
        const entry = manager.entryFor(panel);
        const content = new WorkbenchPanel({
          trans,
          model: entry.model,
          catalog: entry.sources,
          defaults: () => defaults,
          compute: plotCompute,
          commands: app.commands,
          host: {
            confirmRemove: async title =>
              (
                await showDialog({
                  title: trans.__('Remove the set-up %1?', title),
                  body: trans.__(
                    'The set-up and its runs leave this workbench; arrays already written to the kernel stay.'
                  ),
                  buttons: [Dialog.cancelButton(), Dialog.warnButton({ label: trans.__('Remove') })]
                })
              ).button.accept,
            writeArray: async (runId, key) => {
              const run = entry.model.runs.find(r => r.id === runId);
              const chosen = run ? (key ?? (await chooseArray(trans, run))) : null;
              if (run && chosen !== null) {
                await writeRunArray(
                  trans,
                  entry.listing.bridge,
                  run,
                  chosen,
                  () => void entry.listing.refresh()
                );
              }
            },
            writeRun: async runId => {
              const run = entry.model.runs.find(r => r.id === runId);
              if (run) {
                await writeWholeRun(
                  trans,
                  entry.listing.bridge,
                  run,
                  () => void entry.listing.refresh()
                );
              }
            },
            hints: () => Private.kernelHints(entry.listing.bridge),
            refresh: () => void entry.listing.refresh(),
            writePlot: (record, stem) =>
              void writePlotData(
                trans,
                entry.listing.bridge,
                record,
                stem,
                () => void entry.listing.refresh()
              ),
            openPlot: target =>
              void app.commands.execute(CommandIDs.openPlot, {
                ...target,
                path: panel.context.path
              })
          }
        });
        content.plotSettings = plotSettings;
        widget = new MainAreaWidget({ content });
        widget.id = `perpend-workbench-${panel.id}`;
        widget.title.label = trans.__(
          'Workbench · %1',
          panel.context.localPath.split('/').pop() ?? ''
        );
        widget.title.caption = trans.__('Perpend workbench of %1', panel.context.path);
        widget.title.icon = perpendIcon;
        widget.title.closable = true;
        widgets.set(panel, widget);
        panel.disposed.connect(() => widget?.dispose());
        void tracker.add(widget);
        app.shell.add(widget, 'main', { mode: 'split-right', ref: panel.id });
      }
      if (activate) {
        app.shell.activateById(widget.id);
      }
      return widget;
    };

    const currentWorkbench = (): MainAreaWidget<WorkbenchPanel> | null => tracker.currentWidget;

    let plotTabs = 0;
    /** A view of a run, or the comparison, in a tab of its own beside the workbench. */
    const openPlotTab = (wb: MainAreaWidget<WorkbenchPanel>, target: PlotTarget): void => {
      const panel = [...widgets].find(([, w]) => w === wb)?.[0];
      const entry = panel ? manager.existing(panel) : undefined;
      const tab = createPlotTab({
        trans,
        model: wb.content.model,
        target,
        owner: wb,
        settings: plotSettings,
        compute: plotCompute,
        writeData: (record, stem) =>
          void writePlotData(
            trans,
            entry?.listing.bridge ?? null,
            record,
            stem,
            () => void entry?.listing.refresh()
          )
      });
      tab.id = `perpend-plot-${++plotTabs}`;
      app.shell.add(tab, 'main', { mode: 'tab-after', ref: wb.id });
      app.shell.activateById(tab.id);
    };

    app.commands.addCommand(CommandIDs.open, {
      label: trans.__('Open Perpend Workbench'),
      caption: trans.__(
        "Open the active notebook's workbench beside it: adaptive filters, interference removal, subspace tools"
      ),
      icon: perpendIcon,
      isEnabled: () => notebooks.currentWidget !== null,
      execute: args => {
        const path = typeof args.path === 'string' ? args.path : null;
        const panel = path ? notebooks.find(p => p.context.path === path) : notebooks.currentWidget;
        if (panel) {
          open(panel, args.activate !== false);
        }
      }
    });
    app.commands.addCommand(CommandIDs.runAll, {
      label: trans.__('Run All Set-ups Again'),
      caption: trans.__('Read every set-up’s sources again from the kernel and recompute'),
      isEnabled: () => currentWorkbench() !== null,
      execute: () => currentWorkbench()?.content.model.runAll()
    });
    app.commands.addCommand(CommandIDs.cancelAll, {
      label: trans.__('Cancel Running Set-ups'),
      caption: trans.__('Stop every run of this workbench at its next chunk'),
      isEnabled: () =>
        currentWorkbench()?.content.model.runs.some(
          r => r.status === 'reading' || r.status === 'running'
        ) ?? false,
      execute: () => currentWorkbench()?.content.model.cancelAll()
    });
    app.commands.addCommand(CommandIDs.openPlot, {
      label: trans.__('Open Plot in a Tab'),
      caption: trans.__(
        'Open the plot of the run shown in the workbench (or the given view or comparison) in a tab of its own'
      ),
      isEnabled: args => typeof args.path === 'string' || currentWorkbench() !== null,
      execute: args => {
        const path = typeof args.path === 'string' ? args.path : null;
        const wb = path
          ? [...widgets].find(([p, w]) => p.context.path === path && !w.isDisposed)?.[1]
          : currentWorkbench();
        if (!wb) {
          return;
        }
        const target = plotTargetOf(args) ?? wb.content.shownPlot;
        if (!target) {
          Notification.warning(
            trans.__('Show a run with plots in the workbench first, then open its plot in a tab.'),
            { autoClose: 5000 }
          );
          return;
        }
        openPlotTab(wb, target);
      }
    });
    // Every action of the workbench tab (src/workbench-commands.ts): on the workbench its
    // arguments name, else on the current one.
    const workbenchOf = (args: { workbench?: unknown }): WorkbenchPanel | null =>
      typeof args.workbench === 'string'
        ? (tracker.find(w => w.content.id === args.workbench)?.content ?? null)
        : (currentWorkbench()?.content ?? null);
    addWorkbenchCommands(app.commands, trans, workbenchOf);
    if (palette) {
      const category = trans.__('Perpend');
      for (const command of [
        CommandIDs.open,
        CommandIDs.runAll,
        CommandIDs.cancelAll,
        CommandIDs.openPlot
      ]) {
        palette.addItem({ command, category });
      }
      for (const item of paletteItems()) {
        palette.addItem({ ...item, category });
      }
    }
    if (restorer) {
      void restorer.restore(tracker, {
        command: CommandIDs.open,
        args: widget => ({ path: notebookPathOf(widget, widgets), activate: false }),
        name: widget => notebookPathOf(widget, widgets)
      });
    }

    // Buttons bound to these commands (the side panel's toolbar) follow the active notebook.
    notebooks.currentChanged.connect(() => app.commands.notifyCommandChanged(CommandIDs.open));
    const notifyWorkbench = (): void => {
      for (const id of [CommandIDs.runAll, CommandIDs.cancelAll, ...WORKBENCH_COMMANDS]) {
        app.commands.notifyCommandChanged(id);
      }
    };
    tracker.currentChanged.connect(notifyWorkbench);
    // The current set-up, run or comparison changed in a workbench: menus and palette follow.
    tracker.widgetAdded.connect((_, w) => w.content.selection.changed.connect(notifyWorkbench));
    NotebookActions.executed.connect((_, { notebook, cell }) => {
      const panel = notebooks.find(p => p.content === notebook);
      if (panel) {
        manager.cellExecuted(panel, cell);
      }
    });
    perpend?.settingsChanged.connect((_, values) => {
      bridgeOptions = withTranslator(values);
      manager.setBridgeOptions(bridgeOptions);
      if (pool) {
        holdInputs(pool);
      }
    });

    if (settingRegistry) {
      void settingRegistry
        .load(PLUGIN_ID)
        .then(settings => {
          const apply = (): void => {
            const c = settings.composite as Record<string, unknown>;
            defaults = {
              taps: Number(c.taps ?? BUILTIN_DEFAULTS.taps),
              lambda: Number(c.lambda ?? BUILTIN_DEFAULTS.lambda),
              delta: Number(c.delta ?? BUILTIN_DEFAULTS.delta),
              mu: Number(c.mu ?? BUILTIN_DEFAULTS.mu),
              epsilon: Number(c.epsilon ?? BUILTIN_DEFAULTS.epsilon),
              precision: c.precision === 'float32' ? 'float32' : 'float64'
            };
            const next = {
              csvMaxRows: Number(c.plotExportMaxRows ?? 1_000_000),
              pointsPerPixel: Number(c.plotPointsPerPixel ?? 4),
              welchSegment: Number(c.plotWelchSegment ?? 1024),
              spectrogramColumns: Number(c.plotSpectrogramColumns ?? 400)
            };
            if (JSON.stringify(next) !== JSON.stringify(plotSettings)) {
              plotSettings = next;
              widgets.forEach(w => {
                if (!w.isDisposed) {
                  w.content.plotSettings = plotSettings;
                }
              });
            }
            const size = Number(c.workers ?? 0);
            const mem = Number(c.runMemoryMiB ?? 1024);
            if (size !== poolSize || mem !== memoryMiB) {
              poolSize = size;
              memoryMiB = mem;
              // The next run makes a pool of the new size; runs in flight finish on the old one.
              const old = pool;
              pool = null;
              if (old) {
                setTimeout(() => old.dispose(), 60_000);
              }
            }
          };
          apply();
          settings.changed.connect(apply);
        })
        .catch(reason => console.error('Perpend: could not load the workbench settings.', reason));
    }
  }
};

namespace CommandIDs {
  /** Open (or show) the active notebook's workbench. */
  export const open = 'perpend:open-workbench';
  /** Re-read every set-up's sources and recompute. */
  export const runAll = 'perpend:workbench-run-all';
  /** Cancel every run in flight in the current workbench. */
  export const cancelAll = 'perpend:workbench-cancel-all';
  /** A view of a run, or the comparison, in a main-area tab of its own. */
  export const openPlot = 'perpend:open-plot-tab';
}

namespace Private {
  /** The bridge options the main plugin's settings give. */
  export function bridgeOptions(v: IPerpendSettings): Partial<KernelBridge.IOptions> {
    return {
      timeoutMs: v.requestTimeoutSeconds * 1000,
      maxBytes: v.maxArrayMiB * 1024 * 1024,
      keepReadBytes: v.keepReadMiB * 1024 * 1024
    };
  }

  /** What new set-ups start from: a kernel variable `fs` to name, a mains fundamental `f0`. */
  export async function kernelHints(
    bridge: Pick<KernelBridge, 'readScalar'> | null
  ): Promise<KernelHints> {
    if (!bridge) {
      return {};
    }
    const [fs, f0] = await Promise.all([
      bridge.readScalar('fs').catch(() => null),
      bridge.readScalar('f0').catch(() => null)
    ]);
    return {
      fsName: fs !== null && fs > 0 ? 'fs' : null,
      f0: f0 !== null && f0 > 0 ? f0 : null
    };
  }
}

/** The path of the notebook a workbench belongs to (for restoring it after a reload). */
function notebookPathOf(
  widget: MainAreaWidget<WorkbenchPanel>,
  widgets: Map<NotebookPanel, MainAreaWidget<WorkbenchPanel>>
): string {
  for (const [panel, w] of widgets) {
    if (w === widget) {
      return panel.context.path;
    }
  }
  return '';
}

export default plugin;
