/**
 * The plots of one run: a row of view tabs (the views the run has), the view's controls, the
 * graph with its exports, and a note on what was computed. It renders the model's run; every
 * number drawn comes from the core (see ./views.ts).
 */
import type { Message } from '@lumino/messaging';
import { RenderWidget } from '../render-widget';
import type { ISignal } from '@lumino/signaling';
import { type Widget } from '@lumino/widgets';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { csvMaker, PlotPane } from './plot-pane';
import { loadPlotlyDist, type LoadPlotly } from './plotly';
import type { IRunSource } from './run-source';
import { DEFAULT_PLOT_SETTINGS, type PlotSettings } from './settings';
import { mainThreadCompute, type PlotCompute } from './compute';
import { computeView } from './computed-views';
import {
  beforeOf,
  buildView,
  DEFAULT_VIEW_OPTIONS,
  smoothingOf,
  isComputedView,
  parseTaps,
  rowsOf,
  type ComputedView,
  viewLabel,
  viewsOf,
  type ComplexAs,
  type ViewKind,
  type ViewOptions
} from './views';

export class RunPlots extends RenderWidget {
  constructor(options: RunPlots.IOptions) {
    super();
    this.addClass('pp-RunPlots');
    this._trans = options.trans;
    this._model = options.model;
    this._settings = { ...DEFAULT_PLOT_SETTINGS, ...options.settings };
    this._compute = options.compute ?? mainThreadCompute;
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
    this.node.append(this._bar, this._hint, this._pane.node);
    this._model.runChanged.connect(this._onRun, this);
    this.update();
  }

  /** The run shown (null: nothing). */
  get runId(): string | null {
    return this._runId;
  }
  set runId(id: string | null) {
    if (id !== this._runId) {
      this._runId = id;
      this._shown = null;
      this.update();
    }
  }

  /** The view shown (one of the run's views; the first when the run lacks it). */
  get view(): ViewKind | null {
    return this._view;
  }
  set view(v: ViewKind | null) {
    if (v !== this._view) {
      this._view = v;
      this._shown = null;
      this.update();
    }
  }

  /** The views the current run has, in tab order. */
  get views(): ViewKind[] {
    const r = this._run();
    return r ? viewsOf(r) : [];
  }

  /** Settings (point budget, CSV limit, Welch segment, …); the plot is redrawn. */
  set settings(s: Partial<PlotSettings>) {
    this._settings = { ...this._settings, ...s };
    this._pane.driver.settings = this._settings;
    this._shown = null;
    this.update();
  }

  dispose(): void {
    if (this.isDisposed) {
      return;
    }
    this._model.runChanged.disconnect(this._onRun, this);
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

  private _run(): Run | null {
    return this._model.runs.find(r => r.id === this._runId) ?? null;
  }

  private _onRun(_: unknown, run: Run): void {
    if (run.id !== this._runId) {
      return;
    }
    // Nothing to plot while it runs: its progress does not repaint the plots.
    if (run.status === 'running' && this._runningShown === run.id) {
      return;
    }
    this._runningShown = run.status === 'running' ? run.id : null;
    this.update();
  }

  private _runningShown: string | null = null;

  /** Paints the plot (RenderWidget calls it only while visible). */
  protected render(): void {
    const trans = this._trans;
    const run = this._run();
    const views = run ? viewsOf(run) : [];
    if (!run || views.length === 0) {
      this._bar.replaceChildren();
      this._hint.textContent = !run
        ? trans.__('Choose a run to plot its results.')
        : run.status === 'reading' || run.status === 'running'
          ? trans.__('The plots appear when the run has finished.')
          : trans.__('This run has nothing to plot.');
      this._hint.hidden = false;
      this._shown = null;
      this._pane.show(null);
      return;
    }
    this._hint.hidden = true;
    const view = this._view && views.includes(this._view) ? this._view : views[0];
    this._renderBar(run, views, view);
    // Rebuild the plot only when what it shows changed (a run's progress does not).
    const key = { arrays: run.arrays, figures: run.figures, view, options: this._options };
    const s = this._shown;
    if (
      s &&
      s.arrays === key.arrays &&
      s.figures === key.figures &&
      s.view === key.view &&
      s.options === key.options
    ) {
      return;
    }
    this._shown = key;
    const fail = (err: unknown): void => {
      this._pane.show(null);
      this._pane.showError(
        trans.__('This view cannot be drawn: %1', err instanceof Error ? err.message : String(err))
      );
    };
    try {
      if (isComputedView(view)) {
        this._computeAsync(run, key, view).catch(err => {
          if (!this.isDisposed && this._shown === key) {
            fail(err);
          }
        });
        return;
      }
      this._pane.show(buildView(trans, run, view, this._options, this._settings));
    } catch (err) {
      fail(err);
    }
  }

  /** A view whose numbers come through the PlotCompute (maybe a worker); the latest wins. */
  private async _computeAsync(
    run: Run,
    key: NonNullable<RunPlots['_shown']>,
    view: ComputedView
  ): Promise<void> {
    this._pane.show(null);
    this._pane.status.textContent = this._trans.__('Computing %1…', viewLabel(this._trans, view));
    const spec = await computeView(
      this._trans,
      run,
      view,
      this._options,
      this._settings,
      this._compute
    );
    if (this.isDisposed || this._shown !== key) {
      return;
    }
    this._pane.show(spec);
  }

  private _renderBar(run: Run, views: ViewKind[], view: ViewKind): void {
    const trans = this._trans;
    const tabs = document.createElement('div');
    tabs.className = 'pp-Plots-tabs';
    tabs.setAttribute('role', 'tablist');
    tabs.setAttribute('aria-label', trans.__('Views of the run'));
    for (const v of views) {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'pp-Plots-tab';
      b.setAttribute('role', 'tab');
      b.setAttribute('aria-selected', String(v === view));
      b.dataset.view = v;
      b.textContent = viewLabel(trans, v);
      b.addEventListener('click', () => {
        this.view = v;
      });
      tabs.append(b);
    }
    const controls = document.createElement('div');
    controls.className = 'pp-Plots-controls';
    const complex =
      (view === 'signals' && ['output', 'error'].some(k => run.arrays[k]?.complex)) ||
      (view === 'signals' && Object.values(run.inputs).some(a => a.complex)) ||
      (view === 'trajectories' && run.arrays.trajectory?.complex === true);
    if (complex) {
      controls.append(this._complexControl());
    }
    if (view === 'learning') {
      controls.append(this._smoothingControl(run));
    } else if (view !== 'energy' && view !== 'angles' && view !== 'beam' && rowsOf(run) > 1) {
      controls.append(this._rowControl(rowsOf(run)));
    }
    if (view === 'spectrogram' && beforeOf(run)) {
      controls.append(this._spectrogramControl(run));
    }
    if (view === 'trajectories' && run.arrays.trajectory) {
      const t = run.arrays.trajectory;
      controls.append(this._tapsControl(t.shape[t.shape.length - 1]));
    }
    const openTab = this._openTab;
    controls.append(
      this._pane.exportButtons(() => `${run.label} ${viewLabel(trans, view)}`, {
        openTab: openTab ? () => openTab(run.id, view) : undefined
      })
    );
    this._bar.replaceChildren(tabs, controls);
  }

  private _complexControl(): HTMLElement {
    const trans = this._trans;
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Complex values as') + ' ');
    const sel = document.createElement('select');
    sel.className = 'jp-mod-styled';
    const opts: Array<[ComplexAs, string]> = [
      ['polar', trans.__('magnitude and phase')],
      ['cartesian', trans.__('real and imaginary')]
    ];
    for (const [v, text] of opts) {
      const o = document.createElement('option');
      o.value = v;
      o.textContent = text;
      o.selected = v === this._options.complexAs;
      sel.append(o);
    }
    sel.addEventListener('change', () => {
      this._setOptions({ complexAs: sel.value as ComplexAs });
    });
    label.append(sel);
    return label;
  }

  /** Which signal of the run the spectrogram shows: before or after. */
  private _spectrogramControl(run: Run): HTMLElement {
    const trans = this._trans;
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Signal') + ' ');
    const sel = document.createElement('select');
    sel.className = 'jp-mod-styled pp-Plots-signal';
    const before = beforeOf(run);
    const opts: Array<['before' | 'after', string]> = [
      ['before', before ? trans.__(before.name) : trans.__('input')],
      ['after', run.params.tool === 'adaptive' ? trans.__('error e(n)') : trans.__('output')]
    ];
    for (const [v, text] of opts) {
      const o = document.createElement('option');
      o.value = v;
      o.textContent = text;
      o.selected = v === this._options.spectrogramOf;
      sel.append(o);
    }
    sel.addEventListener('change', () => {
      this._setOptions({ spectrogramOf: sel.value as 'before' | 'after' });
    });
    label.append(sel);
    return label;
  }

  private _smoothingControl(run: Run): HTMLElement {
    const trans = this._trans;
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Smoothing (samples)') + ' ');
    const input = document.createElement('input');
    input.type = 'number';
    input.min = '1';
    input.step = '1';
    input.className = 'jp-mod-styled pp-Plots-number';
    const n = run.arrays.learningCurve?.data.length ?? 1;
    input.value = String(smoothingOf(run, this._options));
    input.title = trans.__('Length of the moving average over |e(n)|², in samples');
    input.addEventListener('change', () => {
      const v = Number(input.value);
      if (!Number.isSafeInteger(v) || v < 1 || v > n) {
        this._pane.showError(
          trans.__('Smoothing must be a whole number of samples from 1 to %1.', n)
        );
        return;
      }
      this._setOptions({ smoothing: v });
    });
    label.append(input);
    return label;
  }

  private _rowControl(rows: number): HTMLElement {
    const trans = this._trans;
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Row') + ' ');
    const input = document.createElement('input');
    input.type = 'number';
    input.min = '1';
    input.max = String(rows);
    input.step = '1';
    input.className = 'jp-mod-styled pp-Plots-number';
    input.value = String(Math.min(this._options.row, rows - 1) + 1);
    input.title = trans.__('Which trial or channel of the K×N results to draw (1 to %1)', rows);
    input.addEventListener('change', () => {
      const v = Number(input.value);
      if (!Number.isSafeInteger(v) || v < 1 || v > rows) {
        this._pane.showError(trans.__('Row must be a whole number from 1 to %1.', rows));
        return;
      }
      this._setOptions({ row: v - 1 });
    });
    label.append(input);
    return label;
  }

  private _tapsControl(M: number): HTMLElement {
    const trans = this._trans;
    const label = document.createElement('label');
    label.className = 'pp-Plots-control';
    label.append(trans.__('Taps') + ' ');
    const input = document.createElement('input');
    input.type = 'text';
    input.className = 'jp-mod-styled pp-Plots-taps';
    input.value = (this._options.taps ?? [0, 1, 2, 3].filter(k => k < M)).join(', ');
    input.title = trans.__('Tap indices from 0 to %1, separated by commas', M - 1);
    input.addEventListener('change', () => {
      const r = parseTaps(input.value, M);
      if ('error' in r) {
        this._pane.showError(trans.__('Taps: %1.', r.error));
        return;
      }
      this._setOptions({ taps: r.taps });
    });
    label.append(input);
    return label;
  }

  private _setOptions(o: Partial<ViewOptions>): void {
    this._options = { ...this._options, ...o };
    this.update();
  }

  private readonly _trans: Trans;
  private readonly _model: IRunSource;
  private readonly _bar: HTMLDivElement;
  private readonly _hint: HTMLParagraphElement;
  private readonly _pane: PlotPane;
  private _settings: PlotSettings;
  private readonly _compute: PlotCompute;
  private readonly _openTab: ((runId: string, view: ViewKind) => void) | null;
  private _runId: string | null = null;
  private _view: ViewKind | null = null;
  private _options: ViewOptions = DEFAULT_VIEW_OPTIONS;
  private _shown: {
    arrays: Run['arrays'];
    figures: Run['figures'];
    view: ViewKind;
    options: ViewOptions;
  } | null = null;
}

export namespace RunPlots {
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
     * Runs the long computations of the spectrum, cancellation-bound and spectrogram views
     * (for example as worker jobs). Default: the core on the main thread (a Welch PSD takes
     * ~8 ms for 1e5 samples, ~0.1 s for 1e6 here).
     */
    compute?: PlotCompute;
    /** Writes the plotted data to the kernel (asks the name); no button without it. */
    writeData?: PlotPane.WriteData;
    /** Opens a view of a run in a tab of its own; no button without it. */
    openTab?: (runId: string, view: ViewKind) => void;
  }
}
