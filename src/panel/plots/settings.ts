/** Settings of the plots (the lead wires them to the extension's settings). */
export interface PlotSettings {
  /** Points drawn per pixel column of a plot (the M4 envelope gives 4; fewer thins it). */
  pointsPerPixel: number;
  /** Most rows a CSV export of a visible range holds. */
  csvMaxRows: number;
  /** Welch segment length (samples; shorter signals use their length). */
  welchSegment: number;
  /** Most points of each part of a constellation. */
  constellationPoints: number;
  /** Frequencies at which a weight vector's response is evaluated. */
  responsePoints: number;
  /** Most time columns a spectrogram draws (neighbouring segments are averaged into one). */
  spectrogramColumns: number;
}

export const DEFAULT_PLOT_SETTINGS: PlotSettings = {
  pointsPerPixel: 4,
  csvMaxRows: 1_000_000,
  welchSegment: 1024,
  constellationPoints: 2000,
  responsePoints: 512,
  spectrogramColumns: 400
};

/** Pixel columns of a plot area `width` px wide for a budget of `pointsPerPixel` per column. */
export function columnsFor(width: number, pointsPerPixel: number): number {
  const w = Number.isFinite(width) && width > 0 ? width : 600;
  const p = Number.isFinite(pointsPerPixel) && pointsPerPixel > 0 ? pointsPerPixel : 4;
  // M4 writes up to four points per envelope column.
  return Math.max(16, Math.floor((w * p) / 4));
}
