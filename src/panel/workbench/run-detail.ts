/**
 * One run in full: its status and messages, its key numbers with units, the parameters it ran
 * with, its timing, and its result arrays with a button each to write them to the kernel.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { WorkbenchModel } from '../../model/workbench/workbench';
import type { Run } from '../../model/workbench/runs';
import { RenderWidget } from '../render-widget';
import { formatShape, formatValue } from '../format';
import { ProgressPainter } from './progress-paint';
import { formatDuration, statusText } from './run-text';
import { fieldsOf, getPath, type FieldSpec } from '../../model/workbench/fields';
import type { RateRef, SourcePick } from '../../model/workbench/setup';
import { refShortName } from '../../model/workbench/sources-check';

export class RunDetail extends RenderWidget {
  constructor(options: RunDetail.IOptions) {
    super();
    this.addClass('pp-RunDetail');
    this._trans = options.trans;
    this._model = options.model;
    this._actions = options.actions;
    this._part = options.part ?? 'summary';
    this.addClass(`pp-mod-${this._part}`);
    this._model.runChanged.connect(this._onRun, this);
    this.update();
  }

  dispose(): void {
    this._model.runChanged.disconnect(this._onRun, this);
    this._progress.dispose();
    super.dispose();
  }

  get runId(): string | null {
    return this._runId;
  }
  set runId(id: string | null) {
    if (this._runId !== id) {
      this._runId = id;
      this.update();
    }
  }

  protected render(): void {
    const trans = this._trans;
    const r = this._model.runs.find(x => x.id === this._runId);
    this._shown = r ? { id: r.id, status: r.status, messages: r.messages.length } : null;
    if (!r) {
      if (this._part === 'arrays') {
        this.node.replaceChildren();
        return;
      }
      const p = document.createElement('p');
      p.className = 'pp-Workbench-hint';
      p.textContent = trans.__('Choose a run to see its numbers and arrays.');
      this.node.replaceChildren(p);
      return;
    }
    if (this._part === 'arrays') {
      const keys = Object.keys(r.arrays);
      this.node.replaceChildren(
        ...(keys.length > 0 ? [this._arrays(r, keys)] : []),
        this._params(r)
      );
      return;
    }
    const head = document.createElement('h3');
    head.className = 'pp-RunDetail-head';
    head.textContent = r.label;
    const status = document.createElement('div');
    status.className = 'pp-RunDetail-status';
    status.dataset.status = r.status;
    status.setAttribute('role', 'status');
    status.textContent =
      r.computeMs !== null && r.status !== 'reading' && r.status !== 'running'
        ? trans.__('%1 · %2', statusText(trans, r), formatDuration((r.readMs ?? 0) + r.computeMs))
        : statusText(trans, r);
    const parts: HTMLElement[] = [head, status];
    if (r.messages.length > 0) {
      const ul = document.createElement('ul');
      ul.className = 'pp-RunDetail-messages';
      for (const m of r.messages) {
        const li = document.createElement('li');
        li.textContent = m;
        ul.append(li);
      }
      parts.push(ul);
    }
    if (r.figures.length > 0) {
      parts.push(this._figures(r));
    }
    parts.push(this._timing(r));
    this.node.replaceChildren(...parts);
  }

  private _figures(r: Run): HTMLElement {
    const trans = this._trans;
    const table = document.createElement('table');
    table.className = 'pp-RunDetail-figures';
    const cap = document.createElement('caption');
    cap.textContent = trans.__('Key numbers');
    const note = document.createElement('div');
    note.className = 'pp-RunDetail-caption';
    // MSE figures are powers of the data: dB relative to 1 (unit of the data)².
    note.textContent = trans.__('dB of a power are relative to 1 (unit of the data)²');
    cap.append(note);
    table.append(cap);
    for (const f of r.figures) {
      const tr = table.insertRow();
      tr.dataset.key = f.key;
      const th = document.createElement('th');
      th.scope = 'row';
      th.textContent = trans.__(f.label);
      const td = tr.insertCell();
      td.textContent = formatValue(f.value).replace('-', '−');
      const unit = tr.insertCell();
      unit.className = 'pp-RunDetail-unit';
      unit.textContent = f.unit;
      tr.prepend(th);
    }
    return table;
  }

  private _timing(r: Run): HTMLElement {
    const p = document.createElement('p');
    p.className = 'pp-RunDetail-timing';
    // the worker's own time, unrounded, for tools that read it (the benchmark's job rate)
    p.dataset.computeMs = r.computeMs === null ? '' : String(r.computeMs);
    p.dataset.run = r.id;
    p.textContent = this._trans.__(
      'Read from the kernel in %1, computed in %2 (in a worker, off the page).',
      formatDuration(r.readMs),
      formatDuration(r.computeMs)
    );
    return p;
  }

  private _arrays(r: Run, keys: string[]): HTMLElement {
    const trans = this._trans;
    const box = document.createElement('div');
    box.className = 'pp-RunDetail-arrays';
    const h = document.createElement('h4');
    h.textContent = trans.__('Result arrays');
    const all = document.createElement('button');
    all.type = 'button';
    all.className = 'jp-Button jp-mod-styled jp-mod-accept';
    all.textContent = trans.__('Write the whole run to the kernel…');
    all.title = trans.__('One dict: every array below plus the parameters.');
    all.addEventListener('click', () => this._actions.writeRun?.(r.id));
    box.append(h);
    if (this._actions.writeRun) {
      box.append(all);
    }
    for (const k of keys) {
      const a = r.arrays[k];
      const row = document.createElement('div');
      row.className = 'pp-RunDetail-array';
      row.dataset.key = k;
      const name = document.createElement('code');
      name.textContent = k;
      const what = document.createElement('span');
      what.textContent = `${trans.__(a.description)} · ${formatShape(a.shape)} ${a.complex ? 'complex128' : 'float64'}`;
      const write = document.createElement('button');
      write.type = 'button';
      write.className = 'jp-Button jp-mod-styled jp-mod-reject';
      write.textContent = trans.__('Write to kernel…');
      write.setAttribute('aria-label', trans.__('Write %1 to the kernel', k));
      write.addEventListener('click', () => this._actions.writeArray(r.id, k));
      row.append(name, what, write);
      box.append(row);
    }
    return box;
  }

  private _params(r: Run): HTMLElement {
    const trans = this._trans;
    const d = document.createElement('details');
    d.className = 'pp-RunDetail-params';
    const s = document.createElement('summary');
    s.textContent = trans.__('Parameters of this run');
    const dl = document.createElement('dl');
    for (const f of fieldsOf(r.params.tool)) {
      if (f.when && !f.when(r.params)) {
        continue;
      }
      const dt = document.createElement('dt');
      dt.textContent = trans.__(f.label);
      const dd = document.createElement('dd');
      dd.textContent = paramText(trans, f, getPath(r.params, f.path));
      dl.append(dt, dd);
    }
    d.append(s, dl);
    return d;
  }

  private _onRun(_: WorkbenchModel, r: Run): void {
    if (r.id !== this._runId) {
      return;
    }
    // A running run's progress changes its status line alone: written in place (a repaint per
    // per cent, beside the workers, takes the page's thread from them on two cores).
    const shown = this._shown;
    if (
      r.status === 'running' &&
      shown?.id === r.id &&
      shown.status === 'running' &&
      shown.messages === r.messages.length
    ) {
      this._progress.paint(r.id, () => {
        const now = this._model.runs.find(x => x.id === r.id);
        const line = this.node.querySelector('.pp-RunDetail-status');
        if (now && now.status === 'running' && line && this._part === 'summary') {
          line.textContent = statusText(this._trans, now);
        }
      });
      return;
    }
    this._progress.forget(r.id);
    this.update();
  }

  private readonly _progress = new ProgressPainter();

  private _shown: { id: string; status: Run['status']; messages: number } | null = null;

  private readonly _trans: TranslationBundle;
  private readonly _model: WorkbenchModel;
  private readonly _actions: RunDetail.IActions;
  private _runId: string | null = null;
  private readonly _part: 'summary' | 'arrays';
}

export namespace RunDetail {
  export interface IActions {
    writeArray(runId: string, key: string): void;
    /** Writes every array and the parameters as one dict (when the bridge can). */
    writeRun?(runId: string): void;
  }
  export interface IOptions {
    trans: TranslationBundle;
    model: WorkbenchModel;
    actions: RunDetail.IActions;
    /** 'summary': status, messages, key numbers, timing; 'arrays': result arrays, parameters. */
    part?: 'summary' | 'arrays';
  }
}

/** A parameter's value in words, with its unit. */
function paramText(trans: TranslationBundle, f: FieldSpec, v: unknown): string {
  switch (f.kind) {
    case 'source': {
      const p = v as SourcePick | null | undefined;
      if (!p) {
        // An optional source left empty (the true response).
        return trans.__('none');
      }
      const name = refShortName(trans, p.ref);
      const layout = p.layout
        ? trans.__(
            ' (samples along axis %1, the other axis holds %2)',
            p.layout.samplesAxis,
            p.layout.rows
          )
        : '';
      return `${name}${p.shape ? ` · ${formatShape(p.shape)}` : ''}${layout}`;
    }
    case 'rate': {
      const rate = v as RateRef | null;
      return rate === null
        ? trans.__('none (results in samples)')
        : rate.kind === 'hz'
          ? `${rate.value} Hz`
          : trans.__('%1 (read from the kernel)', rate.name);
    }
    case 'choice':
      return trans.__(f.options?.find(o => o[0] === v)?.[1] ?? String(v));
    case 'toggle':
      return v ? trans.__('yes') : trans.__('no');
    case 'numbers':
      return `${(v as number[]).join(', ')}${f.unit ? ` ${f.unit}` : ''}`;
    default:
      return v === null ? trans.__('default') : `${String(v)}${f.unit ? ` ${f.unit}` : ''}`;
  }
}
