/**
 * Colours and fonts of the plots from JupyterLab's theme variables (`--jp-*`), so a plot reads
 * the same as the panel around it in light and dark themes.
 */
import type { PlotObject } from './plotly';

export interface PlotTheme {
  foreground: string;
  muted: string;
  background: string;
  grid: string;
  fontFamily: string;
  fontSize: number;
  /** Line colours, in the order the series take them. */
  colors: string[];
}

/** Theme variables of the line colours, in order. */
export const COLOR_VARIABLES = [
  '--jp-brand-color1',
  '--jp-warn-color1',
  '--jp-success-color1',
  '--jp-error-color1',
  '--jp-accent-color1',
  '--jp-info-color1',
  '--jp-brand-color3',
  '--jp-warn-color3'
];

/** Used where a variable is missing (outside JupyterLab, in tests). */
const FALLBACK: PlotTheme = {
  foreground: '#333333',
  muted: '#757575',
  background: '#ffffff',
  grid: '#e0e0e0',
  fontFamily: 'sans-serif',
  fontSize: 12,
  colors: ['#1976d2', '#f57c00', '#388e3c', '#d32f2f', '#7b1fa2', '#0097a7', '#64b5f6', '#ffb74d']
};

/** The plot theme from a lookup of CSS variables (getComputedStyle(node).getPropertyValue). */
export function themeFrom(lookup: (name: string) => string): PlotTheme {
  const v = (name: string, fallback: string): string => {
    const s = lookup(name).trim();
    return s.length > 0 ? s : fallback;
  };
  const size = parseFloat(v('--jp-ui-font-size1', ''));
  return {
    foreground: v('--jp-ui-font-color1', FALLBACK.foreground),
    muted: v('--jp-ui-font-color2', FALLBACK.muted),
    background: v('--jp-layout-color1', FALLBACK.background),
    grid: v('--jp-border-color2', FALLBACK.grid),
    fontFamily: v('--jp-ui-font-family', FALLBACK.fontFamily),
    fontSize: Number.isFinite(size) && size > 0 ? size : FALLBACK.fontSize,
    colors: COLOR_VARIABLES.map((name, i) => v(name, FALLBACK.colors[i]))
  };
}

/** The theme of the page around `node`. */
export function readTheme(node: Element): PlotTheme {
  const style = getComputedStyle(node);
  return themeFrom(name => style.getPropertyValue(name));
}

/** Colour of series `i`. */
export function seriesColor(theme: PlotTheme, i: number): string {
  return theme.colors[i % theme.colors.length];
}

/** The theme's part of a layout: fonts, background, axis and grid colours. */
export function themeLayout(theme: PlotTheme): PlotObject {
  const axis = {
    color: theme.foreground,
    gridcolor: theme.grid,
    zerolinecolor: theme.grid,
    linecolor: theme.grid
  };
  return {
    font: { family: theme.fontFamily, size: theme.fontSize, color: theme.foreground },
    paper_bgcolor: theme.background,
    plot_bgcolor: theme.background,
    legend: { font: { color: theme.foreground }, bgcolor: 'rgba(0,0,0,0)' },
    xaxis: axis,
    yaxis: axis,
    yaxis2: axis
  };
}
