/**
 * A plot spec as plotly's data and layout for a visible x-range and a number of pixel columns,
 * and the CSV of what a range shows. Long series go through the core's envelope here; SVG
 * `scatter` only (never `scattergl`, which takes seconds per frame without a GPU).
 */
import { csvText, withUnit, type CsvColumn } from './csv';
import { fullPoints, indexRange, linePoints, type LineSource, type XRange } from './lines';
import type { PlotObject } from './plotly';
import type { HeatmapSpec, PlotSpec, StaticTrace } from './spec';
import { seriesColor, themeLayout, type PlotTheme } from './theme';

export interface Figure {
  data: PlotObject[];
  layout: PlotObject;
}

/** Space around the plot area (px). */
export const MARGIN = { l: 64, r: 16, t: 36, b: 48 };

/** Width of the plot area inside a graph of `width` px. */
export function plotAreaWidth(width: number): number {
  return Math.max(1, width - MARGIN.l - MARGIN.r);
}

function lineTrace(src: LineSource, theme: PlotTheme, range: XRange, columns: number): PlotObject {
  const [i0, i1] = indexRange(src, range);
  const p = linePoints(src, i0, i1, columns);
  const color = seriesColor(theme, src.color);
  const t: PlotObject = {
    type: 'scatter',
    mode: 'lines',
    name: src.name,
    x: p.x,
    y: p.y,
    line: { color, width: src.faint ? 0.5 : 1.25, dash: src.dash ?? 'solid' },
    showlegend: !src.noLegend,
    hoverinfo: 'x+y+name'
  };
  if (src.fill) {
    t.fill = 'tonexty';
    t.fillcolor = withAlpha(color, 0.18);
  }
  if (src.faint) {
    t.opacity = 0.6;
  }
  if (src.lower) {
    t.yaxis = 'y2';
  }
  return t;
}

function staticTrace(s: StaticTrace, theme: PlotTheme): PlotObject {
  const color = seriesColor(theme, s.color);
  const base: PlotObject = { name: s.name, x: s.x, y: s.y };
  if (s.lower) {
    base.yaxis = 'y2';
  }
  if (s.noLegend) {
    base.showlegend = false;
  }
  if (s.group !== undefined) {
    base.legendgroup = s.group;
  }
  switch (s.kind) {
    case 'bar':
      return { ...base, type: 'bar', marker: { color } };
    case 'markers':
      return {
        ...base,
        type: 'scatter',
        mode: 'markers',
        marker: { color, size: 4, opacity: 0.7 }
      };
    case 'line':
      return {
        ...base,
        type: 'scatter',
        mode: 'lines',
        line: { color, width: 1.25, dash: s.dash ?? 'solid' }
      };
  }
}

/**
 * A heatmap trace: z as rows (plotly's z[row][col]), a perceptually uniform colour scale
 * (viridis, readable on light and dark backgrounds) and a colour bar titled with the unit.
 */
function heatmapTrace(spec: PlotSpec, h: HeatmapSpec, theme: PlotTheme): PlotObject {
  const z: Float64Array[] = [];
  for (let i = 0; i < h.rows; i++) {
    z.push(h.z.subarray(i * h.cols, (i + 1) * h.cols));
  }
  return {
    type: 'heatmap',
    name: h.name,
    x: h.x,
    y: h.y,
    z,
    zmin: h.zRange[0],
    zmax: h.zRange[1],
    zauto: false,
    colorscale: 'Viridis',
    showlegend: false,
    // Each number with what it is and its unit (the axis titles and the colour bar's).
    hovertemplate: `${hoverText(spec.xTitle)} %{x}<br>${hoverText(spec.yTitle)} %{y}<br>${hoverText(h.zTitle)} %{z:.1f}<extra></extra>`,
    colorbar: {
      title: { text: h.zTitle, side: 'right', font: { color: theme.foreground } },
      tickfont: { color: theme.foreground },
      outlinewidth: 0,
      thickness: 12
    }
  };
}

/** Text for a hover template, its HTML made literal (plotly renders a few tags in hover labels). */
function hoverText(t: string): string {
  return t.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

/** A CSS colour with an alpha, for band fills (hex and rgb() forms; others as they are). */
export function withAlpha(color: string, alpha: number): string {
  const c = color.trim();
  const hex = /^#([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(c);
  if (hex) {
    const h = hex[1].length === 3 ? hex[1].replace(/./g, ch => ch + ch) : hex[1];
    const v = parseInt(h, 16);
    return `rgba(${(v >> 16) & 255},${(v >> 8) & 255},${v & 255},${alpha})`;
  }
  const rgb = /^rgba?\(\s*([\d.]+)[ ,]+([\d.]+)[ ,]+([\d.]+)/i.exec(c);
  if (rgb) {
    return `rgba(${rgb[1]},${rgb[2]},${rgb[3]},${alpha})`;
  }
  return c;
}

/** A legend only when it names more than one trace. */
function showLegend(data: PlotObject[]): boolean {
  return data.filter(t => t.showlegend !== false).length > 1;
}

/**
 * Rows a horizontal legend above the plot takes (an estimate from the names' lengths: about
 * 0.6 em per character plus 40 px for the symbol), so the top margin makes room for it.
 */
export function legendRows(data: PlotObject[], fontSize: number, width: number): number {
  if (!showLegend(data)) {
    return 0;
  }
  const room = Math.max(100, width - 16);
  let rows = 1;
  let used = 0;
  for (const t of data) {
    if (t.showlegend === false) {
      continue;
    }
    const w = 40 + 0.6 * fontSize * String(t.name ?? '').length;
    if (used > 0 && used + w > room) {
      rows++;
      used = 0;
    }
    used += w;
  }
  return rows;
}

/**
 * A plot title broken at spaces into lines that fit `width` px (plotly draws titles as SVG text,
 * which does not wrap: a long title in a narrow pane was cut at the edge). Widths estimated at
 * 0.6·fontSize per character, as the legend's rows are; `<br>` joins the lines.
 */
export function wrapTitle(
  title: string,
  fontSize: number,
  width: number
): { text: string; lines: number } {
  const perLine = Math.max(12, Math.floor((width - 16) / (0.6 * fontSize)));
  const lines: string[] = [];
  let line = '';
  for (const word of title.split(' ')) {
    if (line && line.length + 1 + word.length > perLine) {
      lines.push(line);
      line = word;
    } else {
      line = line ? `${line} ${word}` : word;
    }
  }
  lines.push(line);
  return { text: lines.join('<br>'), lines: lines.length };
}

/** y-ranges the user zoomed to, by axis; an axis left out autoranges. */
export interface YRanges {
  yaxis?: XRange;
  yaxis2?: XRange;
}

/** plotly data and layout of a spec. `range` is the visible x-range (null: all). */
export function buildFigure(
  spec: PlotSpec,
  theme: PlotTheme,
  range: XRange,
  columns: number,
  size: { width: number; height: number },
  yRanges: YRanges = {}
): Figure {
  const data: PlotObject[] = [
    ...(spec.heatmap ? [heatmapTrace(spec, spec.heatmap, theme)] : []),
    ...spec.lines.map(l => lineTrace(l, theme, range, columns)),
    ...spec.traces.map(t => staticTrace(t, theme))
  ];
  const base = themeLayout(theme);
  const two = spec.y2Title !== undefined;
  // Axis types are stated, not guessed: plotly otherwise scans the data of every trace for dates
  // and categories on each draw (the learning curve's draw, 646 points, repeated in the page:
  // medians 12.2 → 10.3 ms and 9.8 → 9.6 ms in two rounds; 9 ms of it in one profiled slow draw).
  const xaxis: PlotObject = {
    ...(base.xaxis as PlotObject),
    type: spec.traces.some(t => typeof t.x[0] === 'string') ? 'category' : 'linear',
    title: { text: spec.xTitle },
    anchor: two ? 'y2' : 'y'
  };
  if (range) {
    xaxis.range = [range[0], range[1]];
    xaxis.autorange = false;
  } else {
    xaxis.autorange = true;
  }
  const yaxis: PlotObject = {
    ...(base.yaxis as PlotObject),
    type: 'linear',
    title: { text: spec.yTitle },
    autorange: true,
    domain: two ? [0.45, 1] : [0, 1]
  };
  const fixY = (axis: PlotObject, r: XRange | undefined): void => {
    if (r) {
      axis.range = [r[0], r[1]];
      axis.autorange = false;
    }
  };
  fixY(yaxis, yRanges.yaxis);
  if (spec.equalAxes) {
    yaxis.scaleanchor = 'x';
    yaxis.scaleratio = 1;
  }
  const title = wrapTitle(spec.title, theme.fontSize + 1, size.width);
  const layout: PlotObject = {
    ...base,
    width: size.width,
    height: size.height,
    margin: {
      ...MARGIN,
      // room for the colour bar and its title beside a heatmap
      r: spec.heatmap ? MARGIN.r + 72 : MARGIN.r,
      t: 28 + 18 * (title.lines - 1) + 22 * legendRows(data, theme.fontSize, size.width)
    },
    title: {
      text: title.text,
      x: 0,
      xanchor: 'left',
      xref: 'container',
      y: 1,
      yanchor: 'top',
      yref: 'container',
      pad: { t: 6, l: 8 },
      font: { size: theme.fontSize + 1 }
    },
    showlegend: showLegend(data),
    legend: { ...(base.legend as PlotObject), orientation: 'h', x: 0, y: 1.0, yanchor: 'bottom' },
    hovermode: 'closest',
    xaxis,
    yaxis
  };
  if (two) {
    layout.yaxis2 = {
      ...(base.yaxis2 as PlotObject),
      type: 'linear',
      title: { text: spec.y2Title },
      autorange: true,
      domain: [0, 0.38],
      anchor: 'x'
    };
    fixY(layout.yaxis2 as PlotObject, yRanges.yaxis2);
  }
  const shapes: PlotObject[] = [];
  const annotations: PlotObject[] = [];
  let hCount = 0;
  for (const m of spec.markers) {
    const color = seriesColor(theme, m.color);
    const yref = m.lower ? 'y2' : 'y';
    if (m.orientation === 'h') {
      // Labels of horizontal lines alternate right (above the line) and left (below it), so two
      // close levels (steady state and minimum MSE) stay readable.
      const right = hCount++ % 2 === 0;
      shapes.push({
        type: 'line',
        xref: 'paper',
        x0: 0,
        x1: 1,
        yref,
        y0: m.value,
        y1: m.value,
        line: { color, width: 1, dash: 'dash' }
      });
      annotations.push({
        xref: 'paper',
        x: right ? 1 : 0,
        xanchor: right ? 'right' : 'left',
        yref,
        y: m.value,
        yanchor: right ? 'bottom' : 'top',
        text: m.label,
        showarrow: false,
        font: { color, size: theme.fontSize - 1 }
      });
    } else {
      shapes.push({
        type: 'line',
        xref: 'x',
        x0: m.value,
        x1: m.value,
        yref: 'paper',
        y0: 0,
        y1: 1,
        line: { color, width: 1, dash: 'dot' }
      });
      annotations.push({
        xref: 'x',
        x: m.value,
        xanchor: 'left',
        yref: 'paper',
        y: 1,
        yanchor: 'top',
        text: m.label,
        showarrow: false,
        font: { color, size: theme.fontSize - 1 }
      });
    }
  }
  layout.shapes = shapes;
  layout.annotations = annotations;
  return { data, layout };
}

/** Thrown when a CSV export would exceed the row limit; the message says what to do. */
export class CsvTooLarge extends Error {}

/**
 * The columns of what the visible x-range shows, at full resolution: every sample of each long
 * series (not the envelope) and each short trace's points inside the range, each column with
 * its header (name and unit). Series on one grid share the x column; otherwise each gets its
 * own x column. Throws CsvTooLarge when a series holds more than `maxRows` samples in range.
 * The CSV export and the write to the kernel both hold these columns.
 */
export function plotColumns(spec: PlotSpec, range: XRange, maxRows: number): CsvColumn[] {
  const columns: CsvColumn[] = [];
  const xHeader = withUnit(spec.xTitle.replace(/\s*\([^)]*\)\s*$/, ''), spec.xUnit);
  const partName = (l: LineSource): string =>
    l.signal.complex
      ? `${l.name} ${l.part === 'abs' ? '|·|' : l.part === 'phase' ? 'arg' : l.part === 'imag' ? 'Im' : 'Re'}`
      : l.name;
  if (spec.lines.length > 0) {
    const first = spec.lines[0];
    const shared = spec.lines.every(
      l => l.signal.n === first.signal.n && l.dx === first.dx && l.xTable === first.xTable
    );
    for (const l of spec.lines) {
      const [i0, i1] = indexRange(l, range);
      if (i1 - i0 > maxRows) {
        throw new CsvTooLarge(
          `The visible range holds ${i1 - i0} samples of "${l.name}"; an export takes at most ${maxRows} rows. Zoom in first.`
        );
      }
    }
    spec.lines.forEach((l, i) => {
      const [i0, i1] = indexRange(l, range);
      const p = fullPoints(l, i0, i1);
      if (!shared || i === 0) {
        columns.push({ header: shared ? xHeader : `${xHeader} · ${partName(l)}`, values: p.x });
      }
      columns.push({ header: partName(l) + (l.db ? ' (dB)' : ''), values: p.y });
    });
  }
  const lo = range ? Math.min(range[0], range[1]) : -Infinity;
  const hi = range ? Math.max(range[0], range[1]) : Infinity;
  if (spec.heatmap) {
    // One row per cell inside the range: x, y and the value (long form).
    const h = spec.heatmap;
    const cols: number[] = [];
    for (let c = 0; c < h.cols; c++) {
      if (h.x[c] >= lo && h.x[c] <= hi) {
        cols.push(c);
      }
    }
    if (cols.length * h.rows > maxRows) {
      throw new CsvTooLarge(
        `The visible range holds ${cols.length * h.rows} cells of "${h.name}"; a CSV export takes at most ${maxRows} rows. Zoom in first.`
      );
    }
    const xs: number[] = [];
    const ys: number[] = [];
    const zs: number[] = [];
    for (const c of cols) {
      for (let i = 0; i < h.rows; i++) {
        xs.push(h.x[c]);
        ys.push(h.y[i]);
        zs.push(h.z[i * h.cols + c]);
      }
    }
    columns.push({ header: xHeader, values: xs });
    columns.push({ header: spec.yTitle, values: ys });
    columns.push({ header: h.zTitle, values: zs });
  }
  for (const t of spec.traces) {
    const numeric = t.x.length === 0 || typeof t.x[0] === 'number';
    const xs: Array<number | string> = [];
    const ys: number[] = [];
    for (let k = 0; k < t.y.length; k++) {
      const x = t.x[k];
      if (typeof x === 'number' && (x < lo || x > hi)) {
        continue;
      }
      xs.push(x);
      ys.push(t.y[k]);
    }
    if (ys.length > maxRows) {
      throw new CsvTooLarge(
        `The visible range holds ${ys.length} points of "${t.name}"; an export takes at most ${maxRows} rows. Zoom in first.`
      );
    }
    const yTitle = t.lower && spec.y2Title !== undefined ? spec.y2Title : spec.yTitle;
    columns.push({
      header: `${xHeader} · ${t.name}`,
      values: numeric ? Float64Array.from(xs as number[]) : xs
    });
    columns.push({ header: `${t.name} · ${yTitle}`, values: Float64Array.from(ys) });
  }
  return columns;
}

/** CSV of what the visible x-range shows, at full resolution (the columns of `plotColumns`). */
export function figureCsv(spec: PlotSpec, range: XRange, maxRows: number): string {
  return csvText(plotColumns(spec, range, maxRows));
}
