import { RenderWidget } from './render-widget';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { ArrayInfo } from '../bridge';
import type { SourcesModel } from '../model/sources';
import { formatBytes, formatShape } from './format';

/**
 * The list of arrays the active notebook offers: executed cells' array results and kernel
 * variables. Renders its model only; repaints in onUpdateRequest (bursts conflate) and does no
 * work while hidden.
 */
export class SourcesView extends RenderWidget {
  constructor(options: SourcesView.IOptions) {
    super();
    this._trans = options.trans;
    this._onActivate = options.onActivate ?? null;
    this.addClass('pp-SourcesView');
    const header = document.createElement('div');
    header.className = 'pp-SourcesView-header';
    this._title = document.createElement('span');
    this._title.className = 'pp-SourcesView-notebook';
    header.append(this._title);
    this._status = document.createElement('div');
    this._status.className = 'pp-SourcesView-status';
    this._status.setAttribute('role', 'status');
    this._body = document.createElement('div');
    this._body.className = 'pp-SourcesView-body';
    this.node.append(header, this._status, this._body);
    this.model = options.model;
  }

  get model(): SourcesModel | null {
    return this._model;
  }
  set model(model: SourcesModel | null) {
    if (model === this._model) {
      return;
    }
    this._model?.changed.disconnect(this._onModelChanged, this);
    this._model = model;
    model?.changed.connect(this._onModelChanged, this);
    this.update();
  }

  protected render(): void {
    const model = this._model;
    const trans = this._trans;
    this._title.textContent = model?.target?.name ?? trans.__('No notebook');
    this._title.title = this._title.textContent;
    this._status.textContent = model?.message ?? '';
    this._status.dataset.status = model?.status ?? 'none';
    this._body.replaceChildren();
    if (!model?.target) {
      this._body.append(Private.hint(trans.__('Open a notebook to list its arrays.')));
      return;
    }
    this._body.append(
      Private.section(
        trans.__('Cell results'),
        'cells',
        model.cellResults,
        trans.__('No executed cell has returned an array yet.'),
        trans,
        this._onActivate
      ),
      Private.section(
        trans.__('Kernel variables'),
        'variables',
        model.variables,
        trans.__('No array variables in the kernel.'),
        trans,
        this._onActivate
      )
    );
  }

  dispose(): void {
    this.model = null;
    super.dispose();
  }

  private _onModelChanged(): void {
    this.update();
  }

  private _model: SourcesModel | null = null;
  private readonly _onActivate: ((info: ArrayInfo) => void) | null;
  private readonly _trans: TranslationBundle;
  private readonly _title: HTMLSpanElement;
  private readonly _status: HTMLDivElement;
  private readonly _body: HTMLDivElement;
}

export namespace SourcesView {
  export interface IOptions {
    model: SourcesModel | null;
    trans: TranslationBundle;
    /** Called when the user clicks (or presses Enter on) a listed array. */
    onActivate?: (info: ArrayInfo) => void;
  }
}

namespace Private {
  export function hint(text: string): HTMLElement {
    const p = document.createElement('p');
    p.className = 'pp-SourcesView-hint';
    p.textContent = text;
    return p;
  }

  export function section(
    title: string,
    kind: string,
    infos: ReadonlyArray<ArrayInfo>,
    empty: string,
    trans: TranslationBundle,
    onActivate: ((info: ArrayInfo) => void) | null
  ): HTMLElement {
    const section = document.createElement('section');
    section.className = 'pp-SourcesView-section';
    section.dataset.kind = kind;
    const h = document.createElement('h3');
    h.textContent = `${title} (${infos.length})`;
    section.append(h);
    if (infos.length === 0) {
      section.append(hint(empty));
      return section;
    }
    // A note every row carries (the output-cache caveat) is said once, under the heading.
    const shared = infos[0].notes.filter(n => infos.every(i => i.notes.includes(n)));
    if (infos.length > 1) {
      for (const n of shared) {
        const p = hint(n);
        p.classList.add('pp-SourcesView-note');
        section.append(p);
      }
    }
    const table = document.createElement('table');
    table.className = 'pp-ArrayTable';
    const head = table.createTHead().insertRow();
    for (const label of [
      trans.__('Source'),
      trans.__('Shape'),
      trans.__('dtype'),
      trans.__('Size')
    ]) {
      const th = document.createElement('th');
      th.textContent = label;
      head.append(th);
    }
    const body = table.createTBody();
    for (const info of infos) {
      const row = body.insertRow();
      row.className = 'pp-ArrayTable-row';
      row.dataset.label = info.label;
      const shape = formatShape(info.shape);
      const size = formatBytes(info.bytes);
      const notes = infos.length > 1 ? info.notes.filter(n => !shared.includes(n)) : info.notes;
      const readable = info.readable !== false;
      if (onActivate && readable) {
        row.tabIndex = 0;
        row.setAttribute('role', 'button');
        row.classList.add('pp-mod-activatable');
        row.setAttribute(
          'aria-label',
          trans.__('Load %1 into Perpend: shape %2, %3, %4', info.label, shape, info.dtype, size)
        );
        row.addEventListener('click', () => onActivate(info));
        row.addEventListener('keydown', event => {
          if (event.key === 'Enter' || event.key === ' ') {
            // Space would scroll the panel; Enter must not reach the notebook.
            event.preventDefault();
            event.stopPropagation();
            onActivate(info);
          }
        });
      } else if (!readable) {
        row.classList.add('pp-mod-unreadable');
        row.setAttribute(
          'aria-label',
          trans.__('%1: shape %2, %3, %4 (cannot be read)', info.label, shape, info.dtype, size)
        );
      }
      const cells = [info.label, shape, info.dtype, size];
      const classes = [
        'pp-ArrayTable-label',
        'pp-ArrayTable-shape',
        'pp-ArrayTable-dtype',
        'pp-ArrayTable-size'
      ];
      cells.forEach((text, i) => {
        const td = row.insertCell();
        td.className = classes[i];
        td.textContent = text;
        td.title = text;
      });
      if (notes.length) {
        // The row's own notes (same object as a variable, why it cannot be read) stay visible.
        const noteRow = body.insertRow();
        noteRow.className = 'pp-ArrayTable-notes';
        const td = noteRow.insertCell();
        td.colSpan = 4;
        td.textContent = notes.join(' ');
        const id = `pp-notes-${nextId++}`;
        td.id = id;
        row.setAttribute('aria-describedby', id);
      }
    }
    section.append(table);
    return section;
  }

  export let nextId = 0;
}
