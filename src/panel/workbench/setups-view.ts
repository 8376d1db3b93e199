/**
 * The set-ups of a notebook, each with its runs beneath it: status in words and per cent, the
 * key numbers with their units, and the actions (run, cancel, edit, duplicate, follow,
 * remove). Renders the model and marks the current set-up and the run shown; every button
 * executes a workbench command (src/workbench-commands.ts) for its own card.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { WorkbenchSelection } from '../../model/workbench/selection';
import type { WorkbenchModel } from '../../model/workbench/workbench';
import type { Run } from '../../model/workbench/runs';
import type { Setup } from '../../model/workbench/setup';
import { TOOL_LABELS } from '../../model/workbench/fields';
import { RenderWidget } from '../render-widget';
import { WorkbenchCommandIDs as IDs } from './command-ids';
import { ProgressPainter } from './progress-paint';
import { formatFigure, statusText } from './run-text';

export class SetupsView extends RenderWidget {
  constructor(options: SetupsView.IOptions) {
    super();
    this.addClass('pp-SetupsView');
    this._trans = options.trans;
    this._model = options.model;
    this._selection = options.selection;
    this._execute = options.execute;
    this._describe = options.describe ?? (() => '');
    this._model.setupsChanged.connect(this.update, this);
    this._model.runChanged.connect(this._onRun, this);
    this._selection.changed.connect(this._mark, this);
    this.update();
  }

  dispose(): void {
    this._model.setupsChanged.disconnect(this.update, this);
    this._model.runChanged.disconnect(this._onRun, this);
    this._selection.changed.disconnect(this._mark, this);
    this._progress.dispose();
    super.dispose();
  }

  /**
   * Marks the current set-up, the run shown and the compared runs in place: a repaint on a
   * click would replace the button being clicked.
   */
  private _mark(): void {
    const current = this._selection.setupId;
    for (const card of this.node.querySelectorAll<HTMLElement>('.pp-SetupCard')) {
      const on = card.dataset.setup === current;
      card.classList.toggle('pp-mod-current', on);
      if (on) {
        card.setAttribute('aria-current', 'true');
      } else {
        card.removeAttribute('aria-current');
      }
    }
    for (const row of this.node.querySelectorAll<HTMLElement>('.pp-RunRow')) {
      const id = row.dataset.run ?? '';
      row.classList.toggle('pp-mod-selected', id === this._selection.runId);
      const tick = row.querySelector<HTMLInputElement>('.pp-RunRow-compare');
      if (tick) {
        tick.checked = this._selection.isCompared(id);
      }
    }
  }

  /**
   * Progress of a running run is written into its row in place: repainting the list on every
   * per cent would replace the Cancel button under the user's pointer.
   */
  private _onRun(_: WorkbenchModel, r: Run): void {
    const row = this.node.querySelector<HTMLElement>(`.pp-RunRow[data-run="${r.id}"]`);
    if (
      row &&
      r.status === 'running' &&
      row.dataset.status === 'running' &&
      row.querySelector('progress') &&
      row.querySelector('.pp-RunRow-status')
    ) {
      this._progress.paint(r.id, () => this._paintProgress(r.id));
      return;
    }
    this._progress.forget(r.id);
    this.update();
  }

  /** The run's bar and status line as the model has them now (in place). */
  private _paintProgress(id: string): void {
    const r = this._model.runs.find(x => x.id === id);
    const row = this.node.querySelector<HTMLElement>(`.pp-RunRow[data-run="${id}"]`);
    const bar = row?.querySelector('progress');
    const status = row?.querySelector('.pp-RunRow-status');
    if (r && r.status === 'running' && bar && status) {
      bar.value = r.progress;
      status.textContent = statusText(this._trans, r);
    }
  }

  private readonly _progress = new ProgressPainter();

  protected render(): void {
    const trans = this._trans;
    const list = document.createElement('div');
    list.className = 'pp-SetupsView-list';
    if (this._model.setups.length === 0) {
      const p = document.createElement('p');
      p.className = 'pp-Workbench-hint';
      p.textContent = trans.__(
        'No set-ups yet. Start one with the tool buttons above: pick the arrays, check the values, then run.'
      );
      list.append(p);
    }
    for (const s of this._model.setups) {
      list.append(this._card(s));
    }
    // Keep the focused control across a repaint (a run's progress must not steal the keyboard).
    const focused = document.activeElement as HTMLElement | null;
    const key = focused && this.node.contains(focused) ? focused.dataset.key : undefined;
    this.node.replaceChildren(list);
    this._mark();
    if (key) {
      this.node.querySelector<HTMLElement>(`[data-key="${key}"]`)?.focus();
    }
  }

  private _card(s: Setup): HTMLElement {
    const trans = this._trans;
    const runs = this._model.runsOf(s.id);
    const busy = runs.some(r => r.status === 'reading' || r.status === 'running');
    const card = document.createElement('section');
    card.className = 'pp-SetupCard';
    card.dataset.setup = s.id;
    // A click (any button, so before a context menu opens) or the keyboard inside makes the
    // card current; focusable so that the workbench's shortcuts reach it.
    card.tabIndex = -1;
    card.dataset.key = `card:${s.id}`;
    card.addEventListener('pointerdown', () => this._selection.selectSetup(s.id));
    card.addEventListener('focusin', () => this._selection.selectSetup(s.id));
    card.setAttribute('aria-label', trans.__('set-up %1', s.title || s.id));
    const head = document.createElement('div');
    head.className = 'pp-SetupCard-head';
    const title = document.createElement('span');
    title.className = 'pp-SetupCard-title';
    title.textContent = s.title || s.id;
    const tool = document.createElement('span');
    tool.className = 'pp-SetupCard-tool';
    tool.textContent = trans.__(TOOL_LABELS[s.params.tool]);
    head.append(title, tool);
    const bar = document.createElement('div');
    bar.className = 'pp-SetupCard-actions';
    const on = { setup: s.id };
    bar.append(
      this._button(trans.__('Run'), `run:${s.id}`, IDs.runSetup, on),
      this._button(trans.__('Cancel'), `cancel:${s.id}`, IDs.cancelSetup, on, !busy),
      this._button(trans.__('Edit'), `edit:${s.id}`, IDs.editSetup, on),
      this._button(trans.__('Duplicate'), `duplicate:${s.id}`, IDs.duplicateSetup, on),
      this._button(trans.__('Remove'), `remove:${s.id}`, IDs.removeSetup, on)
    );
    const follow = document.createElement('label');
    follow.className = 'pp-SetupCard-follow';
    const box = document.createElement('input');
    box.type = 'checkbox';
    box.checked = s.follow;
    box.dataset.key = `follow:${s.id}`;
    box.addEventListener('change', () =>
      this._execute(IDs.toggleFollow, { setup: s.id, on: box.checked })
    );
    follow.append(box, document.createTextNode(trans.__('re-run when its sources change')));
    follow.title = trans.__(
      'When a cell that makes a source is run again, or a source variable changes, this set-up re-reads it and runs again. It never runs a cell.'
    );
    bar.append(follow);
    card.append(head, bar);
    if (runs.length > 0) {
      const table = document.createElement('div');
      table.className = 'pp-RunList';
      table.setAttribute('role', 'list');
      for (const r of [...runs].reverse()) {
        table.append(this._runRow(r));
      }
      card.append(table);
    }
    return card;
  }

  private _runRow(r: Run): HTMLElement {
    const trans = this._trans;
    const row = document.createElement('div');
    row.className = 'pp-RunRow';
    row.dataset.run = r.id;
    row.dataset.status = r.status;
    row.dataset.key = `row:${r.id}`;
    row.tabIndex = 0;
    row.setAttribute('role', 'listitem');
    const status = document.createElement('span');
    status.className = 'pp-RunRow-status';
    status.textContent = statusText(trans, r);
    const label = document.createElement('span');
    label.className = 'pp-RunRow-label';
    label.textContent = r.label;
    const figs = document.createElement('span');
    figs.className = 'pp-RunRow-figures';
    figs.textContent = r.figures
      .slice(0, 3)
      .map(f => formatFigure(trans, f))
      .join(' · ');
    const tick = document.createElement('input');
    tick.type = 'checkbox';
    tick.className = 'pp-RunRow-compare';
    tick.checked = this._selection.isCompared(r.id);
    tick.dataset.key = `compare:${r.id}`;
    tick.title = trans.__('Compare: overlay this run’s learning curve with the other ticked runs');
    tick.setAttribute('aria-label', trans.__('compare %1', r.label));
    tick.addEventListener('click', ev => ev.stopPropagation());
    tick.addEventListener('keydown', ev => ev.stopPropagation());
    tick.addEventListener('change', () =>
      this._execute(IDs.toggleCompare, { run: r.id, on: tick.checked })
    );
    const head = document.createElement('span');
    head.className = 'pp-RunRow-head';
    head.append(tick, status);
    row.append(head, label, figs);
    if (r.status === 'reading' || r.status === 'running') {
      const bar = document.createElement('progress');
      bar.className = 'pp-RunRow-progress';
      bar.max = 1;
      bar.value = r.progress;
      bar.setAttribute('aria-label', trans.__('progress of %1', r.label));
      row.append(bar);
    }
    row.setAttribute(
      'aria-label',
      `${r.label}: ${status.textContent}${figs.textContent ? `; ${figs.textContent}` : ''}`
    );
    const open = () => this._selection.selectRun(r.id);
    // Before a context menu opens too: its commands act on the run shown.
    row.addEventListener('pointerdown', open);
    row.addEventListener('click', open);
    row.addEventListener('keydown', ev => {
      if (ev.key === 'Enter' || ev.key === ' ') {
        ev.preventDefault();
        open();
      }
    });
    return row;
  }

  private _button(
    label: string,
    key: string,
    command: string,
    args: Record<string, string>,
    disabled = false
  ): HTMLButtonElement {
    const b = document.createElement('button');
    b.type = 'button';
    b.className = 'jp-Button jp-mod-styled jp-mod-reject pp-SetupCard-button';
    b.textContent = label;
    b.dataset.key = key;
    b.disabled = disabled;
    b.title = this._describe(command);
    b.addEventListener('click', () => this._execute(command, args));
    return b;
  }

  private readonly _trans: TranslationBundle;
  private readonly _model: WorkbenchModel;
  private readonly _selection: WorkbenchSelection;
  private readonly _execute: SetupsView.Execute;
  private readonly _describe: (command: string) => string;
}

export namespace SetupsView {
  /** Executes a workbench command for this workbench with the given arguments. */
  export type Execute = (command: string, args: Record<string, string | boolean>) => void;
  export interface IOptions {
    trans: TranslationBundle;
    model: WorkbenchModel;
    /** The current set-up, the run shown and the compared runs. */
    selection: WorkbenchSelection;
    execute: Execute;
    /** A command's tooltip (its caption and key) for the buttons. */
    describe?: (command: string) => string;
  }
}
