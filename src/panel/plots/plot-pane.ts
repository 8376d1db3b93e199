/**
 * A plot inside a widget: the graph node, its PlotDriver, the export buttons, a note and a
 * status line. It follows the container's size (ResizeObserver), the JupyterLab theme (a
 * themeChanged signal when given, otherwise the body's data-jp-theme-name), and does no work
 * while its widget is hidden: a redraw asked for then is done when it is shown.
 */
import type { ISignal } from '@lumino/signaling';
import type { Widget } from '@lumino/widgets';
import type { Trans } from '../../model/workbench/rules';
import { cancelDraw, requestDraw } from './draw-queue';
import { CsvTooLarge } from './figure';
import { fileStem, type CsvColumn } from './csv';
import { PlotDriver } from './plot-driver';
import type { LoadPlotly } from './plotly';
import type { PlotRecord } from './plot-record';
import type { PlotSettings } from './settings';
import type { PlotSpec } from './spec';
import { readTheme } from './theme';

/** Saves text as a file through the browser's download. */
export function downloadText(text: string | Uint8Array, filename: string, type = 'text/csv'): void {
  const url = URL.createObjectURL(new Blob([text as BlobPart], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  a.style.display = 'none';
  document.body.append(a);
  a.click();
  a.remove();
  // Revoked after the click has been handled.
  setTimeout(() => URL.revokeObjectURL(url), 0);
}

/** The CSV maker of a compute seam that has one (the worker's), bound to it. */
export function csvMaker(
  compute: { csv?: PlotPane.MakeCsv } | undefined
): PlotPane.MakeCsv | undefined {
  const csv = compute?.csv;
  return csv ? columns => csv.call(compute, columns) : undefined;
}

export class PlotPane {
  constructor(options: PlotPane.IOptions) {
    this._owner = options.owner;
    this._trans = options.trans;
    this._writeData = options.writeData ?? null;
    this._makeCsv = options.makeCsv ?? null;
    this.node = document.createElement('div');
    this.node.className = 'pp-PlotPane';
    this.graph = document.createElement('div');
    this.graph.className = 'pp-PlotPane-graph';
    this.note = document.createElement('p');
    this.note.className = 'pp-PlotPane-note';
    this.status = document.createElement('p');
    this.status.className = 'pp-PlotPane-status';
    this.status.setAttribute('role', 'status');
    this.node.append(this.graph, this.note, this.status);
    this.driver = new PlotDriver({
      node: this.graph,
      loadPlotly: options.loadPlotly,
      settings: options.settings,
      onError: err => this._fail(err)
    });
    this._themeChanged = options.themeChanged ?? null;
    if (this._themeChanged) {
      this._themeChanged.connect(this._onTheme, this);
    } else if (typeof MutationObserver !== 'undefined') {
      this._themeObserver = new MutationObserver(() => this._onTheme());
      this._themeObserver.observe(document.body, {
        attributes: true,
        attributeFilter: ['data-jp-theme-name']
      });
    }
    if (typeof ResizeObserver !== 'undefined') {
      this._resizeObserver = new ResizeObserver(() => this.redraw());
      this._resizeObserver.observe(this.graph);
    }
  }

  readonly node: HTMLDivElement;
  readonly graph: HTMLDivElement;
  readonly note: HTMLParagraphElement;
  readonly status: HTMLParagraphElement;
  readonly driver: PlotDriver;

  /** Sets what is drawn (null: nothing) and redraws. */
  show(spec: PlotSpec | null): void {
    this.driver.spec = spec;
    this.note.textContent = spec?.note ?? '';
    this.status.textContent = '';
    this.redraw();
  }

  /** Shows a failure in the status line (the plot keeps what it had). */
  showError(message: string): void {
    this.status.textContent = message;
    this.status.dataset.kind = 'error';
  }

  /**
   * Draws at the graph's size, on a coming animation frame (bursts conflate; the page's plots
   * take turns, one per frame: draw-queue.ts), and only while the owner widget is visible;
   * otherwise when it is next shown (call `onShown`).
   */
  redraw(): void {
    if (this._disposed) {
      return;
    }
    if (!this._owner.isVisible) {
      this._stale = true;
      return;
    }
    requestDraw(this._drawQueued);
  }

  /** The owner was shown: draw what was asked for while hidden. */
  onShown(): void {
    if (this._stale) {
      this._stale = false;
      this.redraw();
    }
  }

  /**
   * The export buttons: PNG, SVG, CSV of the visible range, the same data to the kernel (when
   * the pane can write) and, when `openTab` is given, the view in a tab of its own.
   */
  exportButtons(stem: () => string, more: { openTab?: () => void } = {}): HTMLElement {
    const trans = this._trans;
    const box = document.createElement('span');
    box.className = 'pp-PlotPane-exports';
    const button = (label: string, title: string, act: () => Promise<void> | void): void => {
      const b = document.createElement('button');
      b.type = 'button';
      b.className = 'jp-mod-styled pp-PlotPane-export';
      b.textContent = label;
      b.title = title;
      b.addEventListener('click', () => {
        Promise.resolve()
          .then(act)
          .catch(err => this._fail(err));
      });
      box.append(b);
    };
    button('PNG', trans.__('Save the plot as a PNG image'), () =>
      this.driver.downloadImage('png', fileStem(stem()))
    );
    button('SVG', trans.__('Save the plot as an SVG image'), () =>
      this.driver.downloadImage('svg', fileStem(stem()))
    );
    button(
      'CSV',
      trans.__('Save the data of the visible range, every sample, as CSV'),
      async () => {
        const name = `${fileStem(stem())}.csv`;
        const make = this._makeCsv;
        if (!make) {
          downloadText(this.driver.csv(), name);
          return;
        }
        // The text is made in a worker (a million rows would hold the page for a second).
        this.status.textContent = trans.__('Making the CSV file…');
        delete this.status.dataset.kind;
        const bytes = await make(this.driver.csvColumns());
        this.status.textContent = '';
        downloadText(bytes, name);
      }
    );
    const write = this._writeData;
    if (write) {
      button(
        trans.__('To kernel'),
        trans.__(
          'Write the data of the visible range, every sample, to the kernel as a dict of arrays'
        ),
        () => write(this.driver.record(), stem())
      );
    }
    const openTab = more.openTab;
    if (openTab) {
      button(trans.__('Open in tab'), trans.__('Open this view in a tab of its own'), openTab);
    }
    return box;
  }

  dispose(): void {
    if (this._disposed) {
      return;
    }
    this._disposed = true;
    cancelDraw(this._drawQueued);
    if (this._themeTimer !== null) {
      clearTimeout(this._themeTimer);
      this._themeTimer = null;
    }
    this._themeChanged?.disconnect(this._onTheme, this);
    this._themeObserver?.disconnect();
    this._resizeObserver?.disconnect();
    this.driver.dispose();
  }

  private _drawNow(): void {
    if (this._disposed || !this._owner.isVisible) {
      this._stale = !this._disposed;
      return;
    }
    const width = this.graph.clientWidth;
    const height = this.graph.clientHeight;
    if (width <= 0 || height <= 0) {
      // Not laid out yet: the resize observer calls again once it is.
      return;
    }
    if (this.driver.spec && !this._loaded) {
      this.status.textContent = this._trans.__('Loading the plotting library…');
      delete this.status.dataset.kind;
    }
    this.driver
      .draw(readTheme(this.graph), { width, height })
      .then(() => {
        if (!this._loaded && this.driver.spec) {
          this._loaded = true;
          this.status.textContent = '';
        }
      })
      .catch(err => this._fail(err));
  }

  private _onTheme(): void {
    this.redraw();
    // The new theme's stylesheet may still be loading when the signal fires: draw once more
    // when it has surely applied.
    if (this._themeTimer !== null) {
      clearTimeout(this._themeTimer);
    }
    this._themeTimer = setTimeout(() => {
      this._themeTimer = null;
      this.redraw();
    }, 500);
  }

  private _fail(err: unknown): void {
    if (err instanceof CsvTooLarge) {
      this.showError(err.message);
      return;
    }
    const msg = err instanceof Error ? err.message : String(err);
    console.error('Perpend: plot failed', err);
    this.showError(this._trans.__('The plot failed: %1', msg));
  }

  private readonly _owner: Widget;
  private readonly _trans: Trans;
  private readonly _writeData: PlotPane.WriteData | null;
  private readonly _makeCsv: PlotPane.MakeCsv | null;
  private readonly _themeChanged: ISignal<unknown, unknown> | null;
  private _themeObserver: MutationObserver | null = null;
  private _resizeObserver: ResizeObserver | null = null;
  /** This pane's turn in the page's draw queue (one plot per animation frame). */
  private readonly _drawQueued = (): void => this._drawNow();
  private _themeTimer: ReturnType<typeof setTimeout> | null = null;
  private _stale = false;
  private _loaded = false;
  private _disposed = false;
}

export namespace PlotPane {
  export interface IOptions {
    /** The widget the pane sits in (its visibility gates the work). */
    owner: Widget;
    trans: Trans;
    loadPlotly: LoadPlotly;
    settings: PlotSettings;
    themeChanged?: ISignal<unknown, unknown>;
    /** Writes a plot's data to the kernel (asks the name); no button without it. */
    writeData?: WriteData;
    /** Makes the CSV text of the columns (in a worker); without it the page makes it. */
    makeCsv?: MakeCsv;
  }

  /** The CSV text of a plot's columns, UTF-8. */
  export type MakeCsv = (columns: ReadonlyArray<CsvColumn>) => Promise<Uint8Array>;

  /** Writes a plot's data (its record and a name stem to suggest) to the kernel. */
  export type WriteData = (record: PlotRecord, stem: string) => void;
}
