/**
 * The set-ups of a notebook, each with its runs beneath it: status in words and per cent, the
 * key numbers with their units, and the actions (run, cancel, edit, follow, remove). Renders
 * the model; actions go to the callbacks.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { WorkbenchModel } from '../../model/workbench/workbench';
import type { Run } from '../../model/workbench/runs';
import type { Setup } from '../../model/workbench/setup';
import { TOOL_LABELS } from '../../model/workbench/fields';
import { RenderWidget } from '../render-widget';
import { formatFigure, statusText } from './run-text';

export class SetupsView extends RenderWidget {
  constructor(options: SetupsView.IOptions) {
    super();
    this.addClass('pp-SetupsView');
    this._trans = options.trans;
    this._model = options.model;
    this._actions = options.actions;
    this._model.setupsChanged.connect(this.update, this);
    this._model.runChanged.connect(this._onRun, this);
    this.update();
  }

  dispose(): void {
    this._model.setupsChanged.disconnect(this.update, this);
    this._model.runChanged.disconnect(this._onRun, this);
    super.dispose();
  }

  /**
   * Progress of a running run is written into its row in place: repainting the list on every
   * per cent would replace the Cancel button under the user's pointer.
   */
  private _onRun(_: WorkbenchModel, r: Run): void {
    const row = this.node.querySelector<HTMLElement>(`.pp-RunRow[data-run="${r.id}"]`);
    if (row && r.status === 'running' && row.dataset.status === 'running') {
      const bar = row.querySelector('progress');
      const status = row.querySelector('.pp-RunRow-status');
      if (bar && status) {
        bar.value = r.progress;
        status.textContent = statusText(this._trans, r);
        return;
      }
    }
    this.update();
  }

  /** The runs ticked for comparison. */
  get compared(): string[] {
    return [...this._compared];
  }
  set compared(ids: string[]) {
    this._compared = new Set(ids);
    this.update();
  }

  /** The run shown in detail (its row is marked). */
  set selectedRun(id: string | null) {
    if (this._selected !== id) {
      this._selected = id;
      this.update();
    }
  }

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
    bar.append(
      this._button(trans.__('Run'), `run:${s.id}`, () => this._actions.run(s.id)),
      this._button(
        trans.__('Cancel'),
        `cancel:${s.id}`,
        () => this._actions.cancelSetup(s.id),
        !busy
      ),
      this._button(trans.__('Edit'), `edit:${s.id}`, () => this._actions.edit(s.id)),
      this._button(trans.__('Remove'), `remove:${s.id}`, () => this._actions.remove(s.id))
    );
    const follow = document.createElement('label');
    follow.className = 'pp-SetupCard-follow';
    const box = document.createElement('input');
    box.type = 'checkbox';
    box.checked = s.follow;
    box.dataset.key = `follow:${s.id}`;
    box.addEventListener('change', () => this._model.setFollow(s.id, box.checked));
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
    if (r.id === this._selected) {
      row.classList.add('pp-mod-selected');
    }
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
    tick.checked = this._compared.has(r.id);
    tick.dataset.key = `compare:${r.id}`;
    tick.title = trans.__('Compare: overlay this run’s learning curve with the other ticked runs');
    tick.setAttribute('aria-label', trans.__('compare %1', r.label));
    tick.addEventListener('click', ev => ev.stopPropagation());
    tick.addEventListener('keydown', ev => ev.stopPropagation());
    tick.addEventListener('change', () => this._actions.compare(r.id, tick.checked));
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
    const open = () => this._actions.show(r.id);
    row.addEventListener('click', open);
    row.addEventListener('keydown', ev => {
      if (ev.key === 'Enter' || ev.key === ' ') {
        ev.preventDefault();
        open();
      }
    });
    return row;
  }

  private _button(label: string, key: string, fn: () => void, disabled = false): HTMLButtonElement {
    const b = document.createElement('button');
    b.type = 'button';
    b.className = 'jp-Button jp-mod-styled jp-mod-reject pp-SetupCard-button';
    b.textContent = label;
    b.dataset.key = key;
    b.disabled = disabled;
    b.addEventListener('click', fn);
    return b;
  }

  private readonly _trans: TranslationBundle;
  private readonly _model: WorkbenchModel;
  private readonly _actions: SetupsView.IActions;
  private _selected: string | null = null;
  private _compared = new Set<string>();
}

export namespace SetupsView {
  export interface IActions {
    run(setupId: string): void;
    cancelSetup(setupId: string): void;
    edit(setupId: string): void;
    remove(setupId: string): void;
    show(runId: string): void;
    compare(runId: string, on: boolean): void;
  }
  export interface IOptions {
    trans: TranslationBundle;
    model: WorkbenchModel;
    actions: IActions;
  }
}
