/**
 * What a plot shows, before it meets plotly: long series (decimated per visible range), short
 * traces drawn as they are (spectra, responses, bars, constellation points), marker lines with
 * their labels, and the axes' titles with units.
 */
import type { LineSource } from './lines';

/** A short trace, drawn as it is. */
export interface StaticTrace {
  name: string;
  kind: 'line' | 'bar' | 'markers';
  x: ArrayLike<number> | ReadonlyArray<string>;
  y: ArrayLike<number>;
  color: number;
  dash?: 'dot' | 'dash';
  /** Second y-axis (lower subplot). */
  lower?: boolean;
  /** Left out of the legend (a second part of a trace that has an entry). */
  noLegend?: boolean;
  /** Traces of one group show and hide together from the legend. */
  group?: string;
}

/** A horizontal (y = value) or vertical (x = value) marker line with a label. */
export interface MarkerLine {
  orientation: 'h' | 'v';
  value: number;
  label: string;
  color: number;
  lower?: boolean;
}

/** A grid of values drawn as colours (a spectrogram): z[row·cols + col] at (x[col], y[row]). */
export interface HeatmapSpec {
  name: string;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  rows: number;
  cols: number;
  /** What the colour measures, with its unit (the colour bar's title). */
  zTitle: string;
  /** The colour range (values outside are drawn at its ends). */
  zRange: [number, number];
}

export interface PlotSpec {
  /** Plot title (what it shows). */
  title: string;
  /** x-axis title with its unit. */
  xTitle: string;
  /** Unit of the x-axis alone ('s', 'samples', 'Hz', …) for the CSV header. */
  xUnit: string;
  yTitle: string;
  /** Lower subplot's y title, when there is one. */
  y2Title?: string;
  lines: LineSource[];
  traces: StaticTrace[];
  markers: MarkerLine[];
  /** A heatmap under the traces (one per plot). */
  heatmap?: HeatmapSpec;
  /** Equal scales on x and y (a constellation). */
  equalAxes?: boolean;
  /** A sentence under the plot (what was computed and how). */
  note?: string;
}

export function emptySpec(title: string, xTitle: string, xUnit: string, yTitle: string): PlotSpec {
  return { title, xTitle, xUnit, yTitle, lines: [], traces: [], markers: [] };
}
