/**
 * The workbench of one notebook, as a main-area widget: a row of tools to start a set-up, the
 * set-ups with their runs on the left, and the editor or the chosen run on the right. It wires
 * the views to the model and to the actions the plugin provides (write-back, confirmations);
 * it computes nothing.
 */
import { CommandRegistry } from '@lumino/commands';
import { UUID } from '@lumino/coreutils';
import type { Message } from '@lumino/messaging';
import { PanelLayout, SplitPanel, Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import { draftFor, type KernelHints, type WorkbenchDefaults } from '../../model/workbench/drafts';
import { TOOL_LABELS } from '../../model/workbench/fields';
import type { FieldIssue } from '../../model/workbench/rules';
import { TOOLS, type SetupParams, type Tool } from '../../model/workbench/setup';
import type { WorkbenchModel } from '../../model/workbench/workbench';
import type { ISourceCatalog } from '../../model/workbench/catalog';
import { WorkbenchSelection } from '../../model/workbench/selection';
import { WorkbenchCommandIDs } from './command-ids';
import { ComparePlots, RunPlots } from '../plots';
import type { PlotCompute } from '../plots/compute';
import type { PlotPane } from '../plots/plot-pane';
import type { PlotSettings } from '../plots/settings';
import type { PlotTarget } from '../plots/plot-tab';
import { RunDetail } from './run-detail';
import { SetupEditor } from './setup-editor';
import { SetupsView } from './setups-view';

export class WorkbenchPanel extends Widget {
  constructor(options: WorkbenchPanel.IOptions) {
    super();
    this.addClass('pp-Workbench');
    // The commands' buttons name this workbench by its id; the keyboard's shortcuts need the
    // focus inside it.
    this.id = `pp-workbench-${UUID.uuid4()}`;
    this.node.tabIndex = -1;
    this._trans = options.trans;
    this._model = options.model;
    this._host = options.host;
    this._commands = options.commands;
    this.selection = new WorkbenchSelection(this._model);
    const trans = this._trans;
    const exec = (command: string, args: Record<string, string | boolean>): void => {
      void Promise.resolve(this._commands.execute(command, { ...args, workbench: this.id })).catch(
        reason => console.error(`Perpend: ${command} failed.`, reason)
      );
    };

    this._header = new Widget();
    this._header.addClass('pp-Workbench-header');
    this._problems = new Widget();
    this._problems.addClass('pp-Workbench-problems');

    this._list = new SetupsView({
      trans,
      model: this._model,
      selection: this.selection,
      execute: exec,
      describe: command => this._describe(command)
    });
    this._editor = new SetupEditor({
      trans,
      catalog: options.catalog,
      hints: () => this._hints,
      validate: p => this._model.validate(p),
      save: (p, title, id, run) => this._save(p, title, id, run),
      close: () => this._closeEditor()
    });
    const actions: RunDetail.IActions = {
      writeArray: (run, key) => exec(WorkbenchCommandIDs.writeArray, { run, key }),
      writeRun: options.host.writeRun
        ? run => exec(WorkbenchCommandIDs.writeRun, { run })
        : undefined
    };
    this._detail = new RunDetail({ trans, model: this._model, actions });
    // The run's arrays and parameters come after its plots: numbers, then pictures, then data.
    this._arrays = new RunDetail({ trans, model: this._model, actions, part: 'arrays' });
    this._editor.hide();
    const host = options.host;
    const openPlot = host.openPlot?.bind(host);
    this._plots = new RunPlots({
      trans,
      model: this._model,
      compute: options.compute,
      writeData: host.writePlot?.bind(host),
      openTab: openPlot ? (runId, view) => openPlot({ runId, view }) : undefined
    });
    this._plots.addClass('pp-Workbench-plots');
    this._compare = new ComparePlots({
      trans,
      model: this._model,
      compute: options.compute,
      writeData: host.writePlot?.bind(host),
      openTab: openPlot ? (runIds, compare) => openPlot({ runIds, compare }) : undefined
    });
    this._compare.addClass('pp-Workbench-compare');
    this._compare.hide();

    const right = new Widget();
    right.addClass('pp-Workbench-side');
    const rightLayout = new PanelLayout();
    rightLayout.addWidget(this._editor);
    rightLayout.addWidget(this._detail);
    rightLayout.addWidget(this._plots);
    rightLayout.addWidget(this._arrays);
    rightLayout.addWidget(this._compare);
    right.layout = rightLayout;

    const split = new SplitPanel({ orientation: 'horizontal', spacing: 1 });
    split.addClass('pp-Workbench-split');
    split.addWidget(this._list);
    split.addWidget(right);
    split.setRelativeSizes([1, 1]);

    // Header and problems in normal flow, the split taking the rest (CSS flex, style/workbench.css).
    const layout = new PanelLayout();
    layout.addWidget(this._header);
    layout.addWidget(this._problems);
    layout.addWidget(split);
    this.layout = layout;

    this._defaults = options.defaults;
    this._renderHeader(exec);
    this._renderProblems();
    this._model.setupsChanged.connect(this._renderProblems, this);
    this.selection.changed.connect(this._onSelection, this);
  }

  /** The current set-up, the run shown and the runs compared (what the commands act on). */
  readonly selection: WorkbenchSelection;

  get model(): WorkbenchModel {
    return this._model;
  }

  dispose(): void {
    if (this.isDisposed) {
      return;
    }
    this.selection.dispose();
    super.dispose();
  }

  /** A button's tooltip: its command's caption and, when it has one, its key (Ctrl+Enter). */
  private _describe(command: string): string {
    const caption = this._commands.caption(command, {});
    const binding = this._commands.keyBindings.find(
      b => b.command === command && b.selector === '.pp-Workbench'
    );
    return binding
      ? this._trans.__('%1 (%2)', caption, CommandRegistry.formatKeystroke(binding.keys))
      : caption;
  }

  /** True while the keyboard is in the set-up editor. */
  editorHasFocus(): boolean {
    return this._editor.isVisible && this._editor.node.contains(document.activeElement);
  }

  /** Saves and runs what the editor holds (its checks first). */
  saveAndRunEditor(): void {
    this._editor.submit(true);
  }

  /** Asks once, then removes a set-up and its runs; true when removed. */
  async removeSetup(id: string): Promise<boolean> {
    const s = this._model.setup(id);
    if (!s || !(await this._host.confirmRemove(s.title || s.id))) {
      return false;
    }
    this._model.remove(id);
    if (this._editor.setupId === id) {
      this._closeEditor();
    }
    return true;
  }

  writeRun(runId: string): Promise<void> {
    return this._host.writeRun?.(runId) ?? Promise.resolve();
  }

  writeArray(runId: string, key: string | null): Promise<void> {
    return this._host.writeArray(runId, key);
  }

  protected onActivateRequest(msg: Message): void {
    super.onActivateRequest(msg);
    if (!this.node.contains(document.activeElement)) {
      this.node.focus();
    }
  }

  /** Opens a new set-up of `tool` in the editor, with the defaults filled in. */
  async newSetup(tool: Tool): Promise<void> {
    // The pickers offer what the kernel holds now.
    this._host.refresh();
    // The form shown so far goes at once (nothing typed now could land in it), and the new one
    // comes with the kernel's hints (fs, f0); the latest click wins.
    const token = ++this._newSetups;
    this._editor.prepare(this._trans.__('Preparing a new %1 set-up…', TOOL_LABELS[tool]));
    this._showEditor();
    try {
      this._hints = await this._host.hints();
    } catch {
      // No kernel or nothing defined: the draft starts from the defaults alone.
    }
    if (token !== this._newSetups || this.isDisposed) {
      return;
    }
    const params = draftFor(tool, this._defaults(), this._hints);
    this._editor.edit(params, '', null);
    this._showEditor();
  }

  /** Opens an existing set-up in the editor. */
  editSetup(id: string): void {
    ++this._newSetups; // a new set-up's form still being prepared does not replace this one
    const s = this._model.setup(id);
    if (s) {
      this.selection.selectSetup(id);
      this._editor.edit(s.params, s.title, id);
      this._showEditor();
    }
  }

  /** Shows a run in the detail view and its plots. */
  showRun(runId: string): void {
    this.selection.selectRun(runId);
  }

  /** The views follow the selection: the run shown, the runs compared. */
  private _onSelection(): void {
    const runId = this.selection.runId;
    if (runId !== this._detail.runId) {
      this._showRun(runId);
    }
    const ids = [...this.selection.compared];
    if (ids.join() !== this._compare.runIds.join()) {
      this._compare.runIds = ids;
      this._compare.setHidden(ids.length === 0);
    }
  }

  private _showRun(runId: string | null): void {
    this._detail.runId = runId;
    if (runId !== null && this._plots.view === null) {
      // The first view answers the tool's question: how the filter converged, or what the
      // projection did to the spectrum. Later the user's choice of view is kept.
      const tool = this._model.runs.find(r => r.id === runId)?.params.tool;
      this._plots.view = tool === 'adaptive' ? 'learning' : tool === 'removal' ? 'spectrum' : null;
    }
    this._plots.runId = runId;
    this._arrays.runId = runId;
  }

  /** Settings of the run's plots and the comparison (from the workbench's settings). */
  set plotSettings(s: Partial<PlotSettings>) {
    this._plots.settings = s;
    this._compare.settings = s;
  }

  /** The view of the run shown (null: no run shown, or it has nothing to plot). */
  get shownPlot(): PlotTarget | null {
    const runId = this._plots.runId;
    const views = this._plots.views;
    if (runId === null || views.length === 0) {
      return null;
    }
    const view = this._plots.view;
    return { runId, view: view !== null && views.includes(view) ? view : views[0] };
  }

  private _save(
    params: SetupParams,
    title: string,
    id: string | null,
    run: boolean
  ): FieldIssue[] | null {
    const name = title || this._trans.__(TOOL_LABELS[params.tool]);
    let setupId = id;
    if (id === null) {
      const r = this._model.add(params, name);
      if ('issues' in r) {
        return r.issues;
      }
      setupId = r.id;
      this.selection.selectSetup(setupId);
    } else {
      const issues = this._model.update(id, params, name);
      if (issues.length > 0) {
        return issues;
      }
    }
    this._closeEditor();
    if (run && setupId) {
      void this._commands.execute(WorkbenchCommandIDs.runSetup, {
        workbench: this.id,
        setup: setupId
      });
    }
    return null;
  }

  private _showEditor(): void {
    this._editor.show();
    this._detail.hide();
    this._plots.hide();
    this._arrays.hide();
    this._editor.node.querySelector<HTMLElement>('input, select')?.focus();
  }

  private _closeEditor(): void {
    this._editor.hide();
    this._detail.show();
    this._plots.show();
    this._arrays.show();
  }

  private _renderHeader(exec: (command: string, args: Record<string, string>) => void): void {
    const trans = this._trans;
    const row = document.createElement('div');
    row.className = 'pp-Workbench-tools';
    row.setAttribute('role', 'toolbar');
    row.setAttribute('aria-label', trans.__('Start a set-up'));
    const lead = document.createElement('span');
    lead.className = 'pp-Workbench-lead';
    lead.textContent = trans.__('New set-up:');
    row.append(lead);
    for (const tool of TOOLS) {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'jp-Button jp-mod-styled jp-mod-reject pp-Workbench-tool';
      b.dataset.tool = tool;
      b.textContent = trans.__(TOOL_LABELS[tool]);
      b.title = this._commands.caption(WorkbenchCommandIDs.newSetup, { tool });
      b.addEventListener('click', () => exec(WorkbenchCommandIDs.newSetup, { tool }));
      row.append(b);
    }
    this._header.node.replaceChildren(row);
  }

  private _renderProblems(): void {
    const problems = this._model.problems;
    const node = this._problems.node;
    if (problems.length === 0 && !this._model.readOnly) {
      node.replaceChildren();
      this._problems.hide();
      return;
    }
    const trans = this._trans;
    const head = document.createElement('strong');
    head.textContent = this._model.readOnly
      ? trans.__(
          'The set-ups stored in this notebook could not be read; they are kept as they are and nothing new is saved into the notebook.'
        )
      : trans.__(
          'Some stored set-ups could not be read and were left out (they stay in the notebook):'
        );
    const ul = document.createElement('ul');
    for (const p of problems) {
      const li = document.createElement('li');
      li.textContent = p;
      ul.append(li);
    }
    node.setAttribute('role', 'alert');
    node.replaceChildren(head, ul);
    this._problems.show();
  }

  private readonly _trans: TranslationBundle;
  private readonly _model: WorkbenchModel;
  private readonly _host: WorkbenchPanel.IHost;
  private readonly _commands: CommandRegistry;
  private readonly _header: Widget;
  private readonly _problems: Widget;
  private readonly _list: SetupsView;
  private readonly _editor: SetupEditor;
  private readonly _detail: RunDetail;
  private readonly _plots: RunPlots;
  private readonly _arrays: RunDetail;
  private readonly _compare: ComparePlots;
  private readonly _defaults: () => WorkbenchDefaults;
  private _hints: KernelHints = {};
  private _newSetups = 0;
}

export namespace WorkbenchPanel {
  /** What the panel needs from the application (dialogs, the kernel, the settings). */
  export interface IHost {
    /** Asks once before a set-up and its runs are removed. */
    confirmRemove(title: string): Promise<boolean>;
    /** Writes one result array (asks which when `key` is null, then for the name). */
    writeArray(runId: string, key: string | null): Promise<void>;
    /** Writes a run's arrays and parameters as one dict (when the bridge can). */
    writeRun?(runId: string): Promise<void>;
    /** Lists the notebook's arrays again (for the pickers). */
    refresh(): void;
    /** What the kernel defines that new set-ups start from (fs, f0). */
    hints(): Promise<KernelHints>;
    /** Writes a plot's data to the kernel (a button on every plot when given). */
    writePlot?: PlotPane.WriteData;
    /** Opens a view or the comparison in a tab of its own (a button on every plot when given). */
    openPlot?(target: PlotTarget): void;
  }
  export interface IOptions {
    trans: TranslationBundle;
    model: WorkbenchModel;
    catalog: ISourceCatalog;
    host: IHost;
    defaults: () => WorkbenchDefaults;
    /** Where the plots' long estimates run (a worker; default the main thread). */
    compute?: PlotCompute;
    /** The application's commands: every button executes one (src/workbench-commands.ts). */
    commands: CommandRegistry;
  }
}
