import { RenderWidget } from './render-widget';
import { closeIcon } from '@jupyterlab/ui-components';
import type { TranslationBundle } from '@jupyterlab/translation';
import {
  humUnavailable,
  workingDtype,
  type ILoadedArray,
  type LoadedArraysModel
} from '../model/loaded';
import { formatShape, formatValue } from './format';

/**
 * The arrays brought into Perpend, each with its summary, notes and actions. Renders the model;
 * actions are handed to the callbacks (the sidebar asks the user, the model does the work).
 */
export class LoadedView extends RenderWidget {
  constructor(options: LoadedView.IOptions) {
    super();
    this._trans = options.trans;
    this._actions = options.actions;
    this.addClass('pp-LoadedView');
    this._model = options.model;
    this._model.changed.connect(this.update, this);
    this.update();
  }

  dispose(): void {
    this._model.changed.disconnect(this.update, this);
    super.dispose();
  }

  protected render(): void {
    const trans = this._trans;
    const model = this._model;
    const h = document.createElement('h3');
    h.textContent = trans.__('In Perpend (%1)', model.items.length);
    const status = document.createElement('div');
    status.className = 'pp-LoadedView-status';
    status.dataset.status = model.status;
    status.setAttribute('role', 'status');
    status.textContent = model.message;
    const list = document.createElement('div');
    list.className = 'pp-LoadedView-list';
    if (model.items.length === 0) {
      const p = document.createElement('p');
      p.className = 'pp-SourcesView-hint';
      p.textContent = trans.__(
        'Click an array above, or right-click a cell output and choose "Send Output to Perpend".'
      );
      list.append(p);
    }
    for (const item of model.items) {
      list.append(this._card(item));
    }
    this.node.replaceChildren(h, status, list);
  }

  private _card(item: ILoadedArray): HTMLElement {
    const trans = this._trans;
    const card = document.createElement('div');
    card.className = 'pp-LoadedItem';
    card.dataset.id = item.id;
    card.dataset.label = item.label;
    card.dataset.origin = item.origin;
    const head = document.createElement('div');
    head.className = 'pp-LoadedItem-head';
    const label = document.createElement('span');
    label.className = 'pp-LoadedItem-label';
    label.textContent = item.label;
    label.title = item.label;
    const meta = document.createElement('span');
    meta.className = 'pp-LoadedItem-meta';
    // The dtype Perpend computes in, and beside it the one the array had where it came from.
    const working = workingDtype(item.array);
    const source = item.array.dtype;
    meta.textContent = `${formatShape(item.array.shape)} ${working}`;
    if (source && source !== working) {
      const from = document.createElement('span');
      from.className = 'pp-LoadedItem-source';
      from.textContent = trans.__('from %1', source);
      from.title = trans.__(
        'The array was %1 where it came from; Perpend computes in %2.',
        source,
        working
      );
      card.dataset.sourceDtype = source;
      meta.append(' ', from);
    }
    const remove = Private.button(trans.__('Remove from Perpend'), 'pp-LoadedItem-remove', () =>
      this._model.remove(item.id)
    );
    closeIcon.element({ container: remove, tag: 'span' });
    head.append(label, meta, remove);
    const stats = document.createElement('div');
    stats.className = 'pp-LoadedItem-stats';
    const s = item.summary;
    stats.textContent = trans.__(
      'N %1 · RMS %2 · peak %3',
      s.count,
      formatValue(s.rms),
      formatValue(s.peak)
    );
    stats.title = trans.__(
      'N: number of elements; RMS and peak |x| in the unit of the data. Mean %1, min %2, max %3 (real parts).',
      `${formatValue(s.mean)}${item.array.complex ? ` + ${formatValue(s.meanImag)}j` : ''}`,
      formatValue(s.min),
      formatValue(s.max)
    );
    card.append(head, stats);
    if (item.notes.length) {
      const notes = document.createElement('ul');
      notes.className = 'pp-LoadedItem-notes';
      for (const n of item.notes) {
        const li = document.createElement('li');
        li.textContent = n;
        notes.append(li);
      }
      card.append(notes);
    }
    const actions = document.createElement('div');
    actions.className = 'pp-LoadedItem-actions';
    const hum = Private.button(
      trans.__('Project off the mains-hum harmonics'),
      'pp-LoadedItem-hum',
      () => this._actions.removeHum(item)
    );
    hum.textContent = trans.__('Remove hum…');
    actions.append(hum);
    const why = humUnavailable(item, trans);
    if (why) {
      // Shown, not hidden: the button says it exists and the line below says why not here.
      hum.disabled = true;
      const reason = document.createElement('div');
      reason.className = 'pp-LoadedItem-unavailable';
      reason.id = `pp-why-hum-${item.id}`;
      reason.textContent = why;
      hum.setAttribute('aria-describedby', reason.id);
      card.append(actions, reason);
    }
    const save = Private.button(
      trans.__('Save as a numpy array in the kernel'),
      'pp-LoadedItem-save',
      () => this._actions.save(item)
    );
    save.textContent = trans.__('Save to kernel…');
    actions.append(save);
    if (!why) {
      card.append(actions);
    }
    return card;
  }

  private readonly _model: LoadedArraysModel;
  private readonly _trans: TranslationBundle;
  private readonly _actions: LoadedView.IActions;
}

export namespace LoadedView {
  export interface IActions {
    save(item: ILoadedArray): void;
    removeHum(item: ILoadedArray): void;
  }
  export interface IOptions {
    model: LoadedArraysModel;
    trans: TranslationBundle;
    actions: IActions;
  }
}

namespace Private {
  export function button(title: string, className: string, onClick: () => void): HTMLButtonElement {
    const b = document.createElement('button');
    b.className = `pp-Button jp-Button ${className}`;
    b.title = title;
    b.setAttribute('aria-label', title);
    b.addEventListener('click', onClick);
    return b;
  }
}
