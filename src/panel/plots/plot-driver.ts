/**
 * One plotly graph: loads plotly on the first draw, draws with `Plotly.react` only, rebuilds the
 * envelope of the long series for the visible range after every zoom or pan
 * (`plotly_relayout`), exports PNG/SVG through plotly and CSV of the visible range, and purges
 * the graph on dispose. It holds no DOM of its own beyond the node it is given.
 */
import type { IDisposable } from '@lumino/disposable';
import { buildFigure, figureCsv, plotAreaWidth, plotColumns, type YRanges } from './figure';
import type { XRange } from './lines';
import type { CsvColumn } from './csv';
import { afterWaitingTasks } from './draw-queue';
import type { LoadPlotly, PlotlyGraph, PlotlyLike } from './plotly';
import { plotRecord, type PlotRecord } from './plot-record';
import { columnsFor, type PlotSettings } from './settings';
import type { PlotSpec } from './spec';
import type { PlotTheme } from './theme';

/**
 * The range a `plotly_relayout` event sets on an axis ('xaxis', 'yaxis', 'yaxis2'): a range,
 * null (autorange), or undefined (the event leaves the axis alone).
 */
export function relayoutRange(ev: unknown, axis = 'xaxis'): XRange | undefined {
  if (!ev || typeof ev !== 'object') {
    return undefined;
  }
  const e = ev as Record<string, unknown>;
  if (e[`${axis}.autorange`] === true) {
    return null;
  }
  const a = e[`${axis}.range[0]`];
  const b = e[`${axis}.range[1]`];
  if (typeof a === 'number' && typeof b === 'number') {
    return [a, b];
  }
  const r = e[`${axis}.range`];
  if (Array.isArray(r) && typeof r[0] === 'number' && typeof r[1] === 'number') {
    return [r[0], r[1]];
  }
  return undefined;
}

export class PlotDriver implements IDisposable {
  constructor(options: PlotDriver.IOptions) {
    this._node = options.node;
    this._load = options.loadPlotly;
    this._settings = options.settings;
    this._onError = options.onError;
    this._yield = options.yieldToPage ?? afterWaitingTasks;
  }

  get isDisposed(): boolean {
    return this._disposed;
  }

  /** The spec drawn (null: nothing). A new spec resets the zoom. */
  get spec(): PlotSpec | null {
    return this._spec;
  }
  set spec(s: PlotSpec | null) {
    if (s !== this._spec) {
      this._spec = s;
      this._range = null;
      this._yRanges = {};
    }
  }

  /** The visible x-range (null: everything). */
  get range(): XRange {
    return this._range;
  }

  /** y-ranges the user zoomed to (an axis left out autoranges). */
  get yRanges(): YRanges {
    return this._yRanges;
  }

  set settings(s: PlotSettings) {
    this._settings = s;
  }

  /** Number of pixel columns the last draw enveloped into. */
  get columns(): number {
    return this._columns;
  }

  /**
   * Draws the spec at the node's size in `theme`. Concurrent calls conflate: only the latest
   * reaches plotly. Resolves when plotly has drawn (or nothing was to draw).
   */
  async draw(theme: PlotTheme, size: { width: number; height: number }): Promise<void> {
    this._theme = theme;
    this._size = size;
    const ticket = ++this._ticket;
    if (!this._plotly) {
      if (!this._spec) {
        return;
      }
      const plotly = await this._load();
      if (this._disposed || ticket !== this._ticket) {
        return;
      }
      this._plotly = plotly;
    }
    await this._react(ticket);
  }

  /** Sets the visible x-range and redraws (as a zoom does). */
  async zoom(range: XRange): Promise<void> {
    this._range = range;
    if (this._theme && this._size && this._plotly) {
      await this._react(++this._ticket);
    }
  }

  /** CSV of the visible range at full resolution. Throws CsvTooLarge past the row limit. */
  csv(): string {
    if (!this._spec) {
      throw new Error('nothing is plotted');
    }
    return figureCsv(this._spec, this._range, this._settings.csvMaxRows);
  }

  /** The columns the CSV export holds (every sample of the visible range, capped). */
  csvColumns(): CsvColumn[] {
    if (!this._spec) {
      throw new Error('nothing is plotted');
    }
    return plotColumns(this._spec, this._range, this._settings.csvMaxRows);
  }

  /**
   * The data of the visible range as a record for the kernel (the CSV's columns as arrays).
   * Throws CsvTooLarge past the row limit.
   */
  record(): PlotRecord {
    const spec = this._spec;
    if (!spec) {
      throw new Error('nothing is plotted');
    }
    return plotRecord(plotColumns(spec, this._range, this._settings.csvMaxRows), {
      title: spec.title,
      xTitle: spec.xTitle,
      yTitle: spec.yTitle,
      y2Title: spec.y2Title,
      range: this._range
    });
  }

  /** PNG or SVG of the graph through plotly. */
  async downloadImage(format: 'png' | 'svg', filename: string): Promise<void> {
    if (!this._plotly || !this._spec) {
      throw new Error('nothing is plotted yet');
    }
    await this._plotly.downloadImage(this._node, {
      format,
      filename,
      width: this._size?.width,
      height: this._size?.height
    });
  }

  dispose(): void {
    if (this._disposed) {
      return;
    }
    this._disposed = true;
    const g = this._node as unknown as PlotlyGraph;
    if (this._listening && g.removeAllListeners) {
      g.removeAllListeners('plotly_relayout');
    }
    if (this._plotly) {
      this._plotly.purge(this._node);
    }
    this._spec = null;
  }

  private async _react(ticket: number): Promise<void> {
    const plotly = this._plotly;
    if (!plotly || this._disposed || !this._theme || !this._size) {
      return;
    }
    if (!this._spec) {
      plotly.purge(this._node);
      this._listening = false;
      return;
    }
    this._columns = columnsFor(plotAreaWidth(this._size.width), this._settings.pointsPerPixel);
    const fig = buildFigure(
      this._spec,
      this._theme,
      this._range,
      this._columns,
      this._size,
      this._yRanges
    );
    // The figure (the envelope of a 1e6-sample series: ≈ 9 ms here) is built in this task and
    // plotly draws it in the next (≈ 25 ms): what waits on the page runs in between.
    await this._yield();
    if (this._disposed || ticket !== this._ticket) {
      return;
    }
    await plotly.react(this._node, fig.data, fig.layout, {
      displaylogo: false,
      responsive: false,
      modeBarButtonsToRemove: ['toImage', 'sendDataToCloud']
    });
    if (this._disposed || ticket !== this._ticket) {
      return;
    }
    const g = this._node as unknown as PlotlyGraph;
    if (!this._listening && g.on) {
      g.on('plotly_relayout', ev => this._onRelayout(ev));
      this._listening = true;
    }
  }

  private _onRelayout(ev: unknown): void {
    if (this._disposed) {
      return;
    }
    // y zooms are kept so that later redraws (resize, theme, new data) do not undo them.
    for (const axis of ['yaxis', 'yaxis2'] as const) {
      const y = relayoutRange(ev, axis);
      if (y !== undefined) {
        this._yRanges = { ...this._yRanges, [axis]: y };
      }
    }
    const r = relayoutRange(ev, 'xaxis');
    if (r === undefined) {
      return;
    }
    this._range = r;
    // Only long series depend on the range; short traces are already all there.
    if (this._spec && this._spec.lines.length > 0) {
      this._react(++this._ticket).catch(err => this._onError(err));
    }
  }

  private readonly _node: HTMLElement;
  private readonly _load: LoadPlotly;
  private readonly _onError: (err: unknown) => void;
  private readonly _yield: () => Promise<void>;
  private _settings: PlotSettings;
  private _plotly: PlotlyLike | null = null;
  private _spec: PlotSpec | null = null;
  private _range: XRange = null;
  private _yRanges: YRanges = {};
  private _theme: PlotTheme | null = null;
  private _size: { width: number; height: number } | null = null;
  private _columns = 0;
  private _ticket = 0;
  private _listening = false;
  private _disposed = false;
}

export namespace PlotDriver {
  export interface IOptions {
    /** The graph's node (plotly draws into it). */
    node: HTMLElement;
    loadPlotly: LoadPlotly;
    settings: PlotSettings;
    /** Failures of redraws started by plotly's own events. */
    onError: (err: unknown) => void;
    /**
     * Resolves when the page's waiting tasks have run, between building a figure and drawing
     * it (default: a task at background priority; draw-queue.ts).
     */
    yieldToPage?: () => Promise<void>;
  }
}
