/**
 * The part of plotly.js the plots use, passed in so that tests can substitute it (DESIGN §6),
 * and the lazy loader of the real bundle, plotly's own cartesian partial bundle
 * (plotly.js-cartesian-dist-min: scatter, bar, heatmap and the other cartesian traces, all the
 * plots draw). It is imported on the first plot, never at JupyterLab's start-up (DESIGN §5); its
 * start-up is one task on the page, 0.3–0.5 s in headless chromium here against 0.8–1.2 s for
 * the full plotly.js-dist-min (4.8 MB, with 3-D, map and WebGL traces the plots never use).
 */

/** A trace or a layout as plotly takes it (plain objects). */
export type PlotObject = Record<string, unknown>;

/** The graph div after plotly has drawn into it: an event emitter. */
export interface PlotlyGraph {
  on?(event: string, handler: (ev: unknown) => void): void;
  removeAllListeners?(event?: string): void;
}

/** The functions of plotly.js the plots call. */
export interface PlotlyLike {
  react(node: HTMLElement, data: PlotObject[], layout: PlotObject, config?: PlotObject): unknown;
  purge(node: HTMLElement): void;
  downloadImage(
    node: HTMLElement,
    options: { format: 'png' | 'svg'; filename: string; width?: number; height?: number }
  ): unknown;
}

/** Gives the plotly module (loaded once, when first needed). */
export type LoadPlotly = () => Promise<PlotlyLike>;

let loading: Promise<PlotlyLike> | null = null;

/** Imports plotly.js-cartesian-dist-min on first use (a separate chunk of the extension). */
export const loadPlotlyDist: LoadPlotly = () => {
  if (!loading) {
    loading = import('plotly.js-cartesian-dist-min').then(m => {
      const mod = m as unknown as { default?: PlotlyLike } & PlotlyLike;
      return mod.default && typeof mod.default.react === 'function' ? mod.default : mod;
    });
    // A failed load is not cached: the next plot tries again.
    loading.catch(() => {
      loading = null;
    });
  }
  return loading;
};
