import {
  ILayoutRestorer,
  type JupyterFrontEnd,
  type JupyterFrontEndPlugin
} from '@jupyterlab/application';
import { ICommandPalette } from '@jupyterlab/apputils';
import { INotebookTracker, NotebookActions, type NotebookPanel } from '@jupyterlab/notebook';
import { ISettingRegistry } from '@jupyterlab/settingregistry';
import { ITranslator, nullTranslator } from '@jupyterlab/translation';
import { refreshIcon } from '@jupyterlab/ui-components';
import { Signal } from '@lumino/signaling';
import { canHoldArray } from './model/output-source';
import { NotebookFollower } from './model/follower';
import { LoadedArraysModel } from './model/loaded';
import { SourcesModel } from './model/sources';
import { notebookTarget } from './panel/notebook-target';
import { activeCellOutput, outputUnderContextMenu } from './panel/output-target';
import { PerpendSidebar } from './panel/sidebar';
import { perpendIcon } from './panel/icons';
import workbenchPlugin from './workbench-plugin';
import { CommandIDs, DEFAULT_SETTINGS, IPerpend, type IPerpendSettings } from './tokens';

const PLUGIN_ID = 'perpend:plugin';

/**
 * Perpend's main plugin: registers the commands, the side panel and the settings, and connects
 * the models to the notebook tracker. Menus, the context-menu item and the shortcuts are
 * declared in schema/plugin.json.
 */
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
    translator ??= nullTranslator;
    const trans = translator.load('perpend');
    // The bridge says its own sentences (errors, notes, the replace question) in the same language.
    const sources = new SourcesModel({ trans, bridgeOptions: { translator } });
    const loaded = new LoadedArraysModel({ bridge: () => sources.bridge, trans });
    const follower = new NotebookFollower<NotebookPanel>({
      sources,
      adapt: notebookTarget,
      ready: panel => panel.sessionContext.ready
    });
    const sidebar = new PerpendSidebar({
      sources,
      loaded,
      trans,
      translator,
      commands: app.commands,
      toolbarCommands: [CommandIDs.refresh, 'perpend:open-workbench']
    });
    const perpend = new Private.Perpend(sources, loaded);
    const trusts = (cellId: string, count: number): boolean =>
      follower.trusts(tracker.currentWidget, cellId, count);

    app.commands.addCommand(CommandIDs.open, {
      label: trans.__('Open Perpend Panel'),
      caption: trans.__('Show the Perpend panel in the right sidebar'),
      icon: perpendIcon,
      execute: () => app.shell.activateById(sidebar.id)
    });
    app.commands.addCommand(CommandIDs.refresh, {
      label: trans.__('List Notebook Arrays Again'),
      caption: trans.__(
        "List the active notebook's array results and variables again (one silent request; no data is moved)"
      ),
      icon: refreshIcon,
      isEnabled: () => tracker.currentWidget !== null,
      execute: () => sources.refresh()
    });
    app.commands.addCommand(CommandIDs.sendOutput, {
      label: trans.__('Send Output to Perpend'),
      caption: trans.__(
        'Load this output into the Perpend panel (from the kernel at full precision when it can)'
      ),
      icon: perpendIcon,
      isEnabled: () => {
        const output = outputUnderContextMenu(app, tracker.currentWidget);
        return output !== null && canHoldArray(output);
      },
      execute: () => {
        const output = outputUnderContextMenu(app, tracker.currentWidget);
        if (output) {
          app.shell.activateById(sidebar.id);
          return sidebar.actions.loadOutput(output, trusts);
        }
        return null;
      }
    });
    app.commands.addCommand(CommandIDs.sendCellOutput, {
      label: trans.__('Send Cell Output to Perpend'),
      caption: trans.__(
        "Load the active cell's array result (or its first array display) into the Perpend panel"
      ),
      icon: perpendIcon,
      isEnabled: () => activeCellOutput(tracker.currentWidget) !== null,
      execute: () => {
        const output = activeCellOutput(tracker.currentWidget);
        if (output) {
          app.shell.activateById(sidebar.id);
          return sidebar.actions.loadOutput(output, trusts);
        }
        return null;
      }
    });
    const category = trans.__('Perpend');
    for (const command of [CommandIDs.open, CommandIDs.refresh, CommandIDs.sendCellOutput]) {
      palette?.addItem({ command, category });
    }

    app.shell.add(sidebar, 'right', { rank: 650 });
    restorer?.add(sidebar, sidebar.id);

    tracker.currentChanged.connect(() => {
      follower.follow(tracker.currentWidget);
      // The toolbar button shows whether the refresh applies: tell it when that changes.
      app.commands.notifyCommandChanged(CommandIDs.refresh);
    });
    // Every notebook gets its ledger as soon as it opens, so executions in notebooks that are not
    // current are recorded too.
    tracker.widgetAdded.connect((_, panel) => void follower.targetOf(panel));
    tracker.forEach(panel => void follower.targetOf(panel));
    follower.follow(tracker.currentWidget);
    NotebookActions.executed.connect((_, args) =>
      follower.executed(tracker.find(panel => panel.content === args.notebook) ?? null)
    );

    settingRegistry
      ?.load(PLUGIN_ID)
      .then(settings => {
        const apply = (): void => {
          const values = {
            ...DEFAULT_SETTINGS,
            ...(settings.composite as Partial<IPerpendSettings>)
          };
          sources.setBridgeOptions({
            timeoutMs: values.requestTimeoutSeconds * 1000,
            maxBytes: values.maxArrayMiB * 1024 * 1024,
            keepReadBytes: values.keepReadMiB * 1024 * 1024
          });
          follower.refreshAfterExecution = values.refreshAfterExecution;
          perpend.settings = values;
          perpend.settingsChanged.emit(values);
        };
        apply();
        settings.changed.connect(apply);
      })
      .catch(reason => console.error('Perpend: could not load the settings', reason));
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
    /** The values applied last (the defaults until the settings are loaded). */
    settings: IPerpendSettings = { ...DEFAULT_SETTINGS };
  }
}

export default [plugin, workbenchPlugin] as JupyterFrontEndPlugin<unknown>[];
