/**
 * Runs side by side: their learning curves, spectra or weights' responses overlaid (the legend
 * names each run) and beside it a table of convergence time, steady-state MSE, misadjustment
 * and run time, sorted by a click on a column's header and saved as CSV.
 */
import type { Message } from '@lumino/messaging';
import { RenderWidget } from '../render-widget';
import type { ISignal } from '@lumino/signaling';
import { type Widget } from '@lumino/widgets';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import {
  cellText,
  comparable,
  compareColumns,
  compareCsv,
  compareRows,
  compareSpec,
  sortRows,
  type CompareKey
} from './compare';
import {
  COMPARE_KINDS,
  compareKindLabel,
  compareResponseSpec,
  compareSpectrumRequests,
  compareSpectrumSpec,
  leftOutNote,
  responseRuns,
  spectrumRuns,
  type CompareKind
} from './compare-overlays';
import { welch, type PsdResult, type SignalView, type WelchOptions } from '../../core';
import { csvMaker, downloadText, PlotPane } from './plot-pane';
import { loadPlotlyDist, type LoadPlotly } from './plotly';
import type { IRunSource } from './run-source';
import { DEFAULT_PLOT_SETTINGS, type PlotSettings } from './settings';
import type { PlotSpec } from './spec';

/**
 * How long the comparison waits, while some of its runs still run, for others to end before it
 * redraws (runs of a sweep on a pool of workers end in pairs, tens of ms apart).
 */
const SETTLE_MS = 400;

function unfinished(r: Run): boolean {
  return r.status === 'reading' || r.status === 'running';
}

export class ComparePlots extends RenderWidget {
  constructor(options: ComparePlots.IOptions) {
    super();
    this.addClass('pp-ComparePlots');
    this._trans = options.trans;
    this._model = options.model;
    this._settings = { ...DEFAULT_PLOT_SETTINGS, ...options.settings };
    this._compute = options.compute ?? { welch: (signal, o) => welch(signal, o) };
    this._openTab = options.openTab ?? null;
    this._bar = document.createElement('div');
    this._bar.className = 'pp-Plots-bar';
    this._hint = document.createElement('p');
    this._hint.className = 'pp-Plots-hint';
    this._pane = new PlotPane({
      owner: this,
      trans: this._trans,
      loadPlotly: options.loadPlotly ?? loadPlotlyDist,
      settings: this._settings,
      themeChanged: options.themeChanged,
      writeData: options.writeData,
      makeCsv: csvMaker(options.compute)
    });
    this._table = document.createElement('div');
    this._table.className = 'pp-ComparePlots-table';
    const body = document.createElement('div');
    body.className = 'pp-ComparePlots-body';
    body.append(this._pane.node, this._table);
    this.node.append(this._bar, this._hint, body);
    this._model.runChanged.connect(this._onRun, this);
    this.update();
  }

  /** The runs compared (their ids; runs that are gone or have no learning curve are left out). */
  get runIds(): ReadonlyArray<string> {
    return this._runIds;
  }
  set runIds(ids: ReadonlyArray<string>) {
    this._runIds = [...ids];
    this._plotKey = null;
    this.update();
  }

  /** What is overlaid: learning curves, spectra or the final weights' responses. */
  get kind(): CompareKind {
    return this._kind;
  }
  set kind(k: CompareKind) {
    if (k !== this._kind) {
      this._kind = k;
      this._plotKey = null;
      this.update();
    }
  }

  /** The sort of the table. */
  get sort(): { key: CompareKey; direction: 'ascending' | 'descending' } {
    return this._sort;
  }
  set sort(s: { key: CompareKey; direction: 'ascending' | 'descending' }) {
    this._sort = s;
    this.update();
  }

  set settings(s: Partial<PlotSettings>) {
    this._settings = { ...this._settings, ...s };
    this._pane.driver.settings = this._settings;
    this._plotKey = null;
    this.update();
  }

  dispose(): void {
    if (this.isDisposed) {
      return;
    }
    this._model.runChanged.disconnect(this._onRun, this);
    if (this._settleTimer !== null) {
      clearTimeout(this._settleTimer);
    }
    this._pane.dispose();
    super.dispose();
  }

  protected onAfterShow(msg: Message): void {
    super.onAfterShow(msg);
    this._pane.onShown();
  }

  protected onResize(_msg: Widget.ResizeMessage): void {
    this._pane.redraw();
  }

  private _runs(): Run[] {
    const byId = new Map(this._model.runs.map(r => [r.id, r]));
    return this._runIds.map(id => byId.get(id)).filter((r): r is Run => r !== undefined);
  }

  private _onRun(_: unknown, run: Run): void {
    if (!this._runIds.includes(run.id)) {
      return;
    }
    // A run still reading or running changes nothing compared (its curve and figures come at
    // its end): during a sweep, repainting the table for its progress 10 times a second per run
    // took the page's thread from the workers. (A run removed while it ran is repainted away.)
    if (unfinished(run) && this._model.runs.some(r => r.id === run.id)) {
      return;
    }
    // While other compared runs still run (a sweep), runs that end close together are drawn
    // in one redraw: each redraw is a plotly draw on the page's thread, taken from the workers.
    if (this._settleTimer !== null) {
      clearTimeout(this._settleTimer);
      this._settleTimer = null;
    }
    if (this._runs().some(unfinished)) {
      this._settleTimer = setTimeout(() => {
        this._settleTimer = null;
        this.update();
      }, SETTLE_MS);
      return;
    }
    this.update();
  }

  private _settleTimer: ReturnType<typeof setTimeout> | null = null;

  /** The runs the chosen overlay can draw. */
  private _overlaid(runs: Run[]): Run[] {
    switch (this._kind) {
      case 'learning':
        return comparable(runs);
      case 'spectrum':
        return spectrumRuns(runs);
      case 'response':
        return responseRuns(runs);
    }
  }

  /** Paints the plot (RenderWidget calls it only while visible). */
  protected render(): void {
    const trans = this._trans;
    const runs = this._runs();
    const rows = sortRows(compareRows(runs), this._sort.key, this._sort.direction);
    const shown = this._overlaid(runs);
    if (runs.length === 0) {
      this._hint.textContent = trans.__(
        'Tick runs to compare their learning curves, spectra, weights responses and figures.'
      );
      this._hint.hidden = false;
      this._bar.replaceChildren();
      this._table.replaceChildren();
      this._plotKey = null;
      this._pane.show(null);
      return;
    }
    this._renderBar(shown.length);
    this._renderTable(rows);
    if (shown.length === 0) {
      this._hint.textContent =
        this._kind === 'learning'
          ? trans.__('None of the runs ticked has a learning curve (adaptive-filter runs do).')
          : this._kind === 'spectrum'
            ? trans.__('None of the runs ticked has an error or output to take a spectrum of.')
            : trans.__('None of the runs ticked has final weights (adaptive-filter runs do).');
      this._hint.hidden = false;
      this._plotKey = null;
      this._pane.show(null);
      return;
    }
    this._hint.hidden = true;
    const key: unknown[] = [this._kind, this._smoothing, ...shown.map(r => r.arrays)];
    if (
      this._plotKey &&
      this._plotKey.length === key.length &&
      this._plotKey.every((k, i) => k === key[i])
    ) {
      return;
    }
    this._plotKey = key;
    const fail = (err: unknown): void => {
      this._pane.show(null);
      this._pane.showError(
        trans.__(
          'This comparison cannot be drawn: %1',
          err instanceof Error ? err.message : String(err)
        )
      );
    };
    try {
      if (this._kind === 'spectrum') {
        this._spectraAsync(runs, shown, key).catch(fail);
        return;
      }
      const spec: PlotSpec =
        this._kind === 'learning'
          ? compareSpec(trans, shown, this._smoothing)
          : compareResponseSpec(trans, shown, this._settings);
      this._pane.show(this._noted(spec, runs, shown));
    } catch (err) {
      fail(err);
    }
  }

  /** The spectra through the PSD function (a worker job, or the core on this thread). */
  private async _spectraAsync(ticked: Run[], runs: Run[], key: unknown[]): Promise<void> {
    const requests = compareSpectrumRequests(this._trans, runs, this._settings);
    this._pane.show(null);
    this._pane.status.textContent = this._trans.__('Computing the spectra…');
    const results = await Promise.all(
      requests.map(r => Promise.resolve().then(() => this._compute.welch(r.signal, r.options)))
    );
    // The latest request wins: a newer choice or result made while these ran replaces them.
    if (this.isDisposed || this._plotKey !== key) {
      return;
    }
    this._pane.show(
      this._noted(compareSpectrumSpec(this._trans, runs, requests, results), ticked, runs)
    );
  }

  /** The spec with a sentence on the ticked runs it leaves out, if any. */
  private _noted(spec: PlotSpec, ticked: Run[], shown: Run[]): PlotSpec {
    const left = leftOutNote(this._trans, this._kind, ticked, shown);
    return left ? { ...spec, note: spec.note ? `${spec.note} ${left}` : left } : spec;
  }

  private _renderBar(count: number): void {
    const trans = this._trans;
    const tabs = document.createElement('div');
    tabs.className = 'pp-Plots-tabs';
    tabs.setAttribute('role', 'tablist');
    tabs.setAttribute('aria-label', trans.__('What the comparison overlays'));
    for (const k of COMPARE_KINDS) {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'pp-Plots-tab';
      b.setAttribute('role', 'tab');
      b.setAttribute('aria-selected', String(k === this._kind));
      b.dataset.compare = k;
      b.textContent = compareKindLabel(trans, k);
      b.addEventListener('click', () => {
        this.kind = k;
      });
      tabs.append(b);
    }
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Smoothing (samples)') + ' ');
    const input = document.createElement('input');
    input.type = 'number';
    input.min = '1';
    input.step = '1';
    input.className = 'jp-mod-styled pp-Plots-number';
    input.placeholder = trans.__('auto');
    input.value = this._smoothing === null ? '' : String(this._smoothing);
    input.addEventListener('change', () => {
      if (input.value.trim() === '') {
        this._smoothing = null;
        this.update();
        return;
      }
      const v = Number(input.value);
      if (!Number.isSafeInteger(v) || v < 1) {
        this._pane.showError(trans.__('Smoothing must be a whole number of samples, 1 or more.'));
        return;
      }
      this._smoothing = v;
      this.update();
    });
    label.append(input);
    const title = document.createElement('span');
    title.className = 'pp-Plots-title';
    title.textContent = trans.__('Runs compared: %1', count);
    const csv = document.createElement('button');
    csv.type = 'button';
    csv.className = 'jp-mod-styled pp-PlotPane-export';
    csv.textContent = trans.__('Table as CSV');
    csv.title = trans.__('Save the table, in its current order, as CSV');
    csv.addEventListener('click', () => {
      const rows = sortRows(compareRows(this._runs()), this._sort.key, this._sort.direction);
      downloadText(compareCsv(trans, rows), 'run-comparison.csv');
    });
    const controls = document.createElement('div');
    controls.className = 'pp-Plots-controls';
    if (this._kind === 'learning') {
      controls.append(label);
    }
    const openTab = this._openTab;
    controls.append(
      this._pane.exportButtons(() => `comparison ${compareKindLabel(trans, this._kind)}`, {
        openTab: openTab ? () => openTab([...this._runIds], this._kind) : undefined
      }),
      csv
    );
    const head = document.createElement('div');
    head.className = 'pp-Plots-head';
    head.append(tabs, title);
    this._bar.replaceChildren(head, controls);
  }

  private _renderTable(rows: ReturnType<typeof compareRows>): void {
    const trans = this._trans;
    const table = document.createElement('table');
    table.className = 'pp-ComparePlots-grid';
    const head = document.createElement('tr');
    // In a narrow column the header row becomes a line of sort buttons after this lead, and
    // each run a block of "name (unit)  value" lines (style/plots.css, container query).
    head.dataset.lead = trans.__('Sort by:');
    for (const c of compareColumns(trans)) {
      const th = document.createElement('th');
      th.scope = 'col';
      const sorted = this._sort.key === c.key;
      th.setAttribute('aria-sort', sorted ? this._sort.direction : 'none');
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'pp-ComparePlots-sort';
      b.dataset.key = c.key;
      b.textContent = c.unit ? `${c.name} (${c.unit})` : c.name;
      b.title = trans.__('Sort by this column');
      b.addEventListener('click', () => {
        this.sort = {
          key: c.key,
          direction: sorted && this._sort.direction === 'ascending' ? 'descending' : 'ascending'
        };
      });
      th.append(b);
      head.append(th);
    }
    const thead = document.createElement('thead');
    thead.append(head);
    const tbody = document.createElement('tbody');
    for (const r of rows) {
      const tr = document.createElement('tr');
      tr.dataset.runId = r.id;
      for (const c of compareColumns(trans)) {
        const td = document.createElement('td');
        td.textContent = cellText(r[c.key]);
        if (c.key !== 'label') {
          td.className = 'pp-ComparePlots-num';
          td.dataset.label = c.unit ? `${c.name} (${c.unit})` : c.name;
        }
        tr.append(td);
      }
      tbody.append(tr);
    }
    table.append(thead, tbody);
    this._table.replaceChildren(table);
  }

  private readonly _trans: Trans;
  private readonly _model: IRunSource;
  private readonly _bar: HTMLDivElement;
  private readonly _hint: HTMLParagraphElement;
  private readonly _table: HTMLDivElement;
  private readonly _pane: PlotPane;
  private _settings: PlotSettings;
  private readonly _compute: ComparePlots.Compute;
  private readonly _openTab: ((runIds: string[], kind: CompareKind) => void) | null;
  private _kind: CompareKind = 'learning';
  private _runIds: string[] = [];
  private _sort: { key: CompareKey; direction: 'ascending' | 'descending' } = {
    key: 'steadyStateMseDb',
    direction: 'ascending'
  };
  private _smoothing: number | null = null;
  private _plotKey: unknown[] | null = null;
}

export namespace ComparePlots {
  /** The long computation the comparison needs: Welch estimates (the core's `welch`). */
  export interface Compute {
    welch(signal: SignalView, options: WelchOptions): PsdResult | Promise<PsdResult>;
    /** CSV text of a plot's columns (in a worker); the page makes it without. */
    csv?: PlotPane.MakeCsv;
  }
  export interface IOptions {
    trans: Trans;
    /** The runs (a WorkbenchModel). */
    model: IRunSource;
    /** Gives plotly (default: the lazily imported plotly.js-cartesian-dist-min); tests pass a fake. */
    loadPlotly?: LoadPlotly;
    settings?: Partial<PlotSettings>;
    /** IThemeManager.themeChanged, when available; otherwise the body's theme name is watched. */
    themeChanged?: ISignal<unknown, unknown>;
    /**
     * Computes the Welch estimates of the spectra (for example as a worker job; the plots'
     * PlotCompute seam fits). Default: the core's `welch` on the main thread.
     */
    compute?: Compute;
    /** Writes the plotted data to the kernel (asks the name); no button without it. */
    writeData?: PlotPane.WriteData;
    /** Opens the comparison of these runs in a tab of its own; no button without it. */
    openTab?: (runIds: string[], kind: CompareKind) => void;
  }
}
