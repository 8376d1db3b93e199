export { RunPlots } from './run-plots';
export { ComparePlots } from './compare-plots';
export type { LoadPlotly, PlotlyLike } from './plotly';
export { loadPlotlyDist } from './plotly';
export { DEFAULT_PLOT_SETTINGS, type PlotSettings } from './settings';
export { parseTaps, viewLabel, viewsOf, type ViewKind } from './views';
export { mainThreadCompute, type PlotCompute } from './compute';
export type { CompareKey } from './compare';
export type { IRunSource } from './run-source';
