/**
 * Comparing runs: their learning curves on one plot (the legend names each run) and a table of
 * the figures read off them, sortable and exportable as CSV.
 */
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { csvText, withUnit } from './csv';
import { emptySpec, type PlotSpec } from './spec';
import { defaultSmoothing, figure, smoothedLearningCurve, timeAxis } from './views';

/** One row of the comparison table. */
export interface CompareRow {
  id: string;
  label: string;
  /** Convergence time in samples and seconds (null when not reached or unknown). */
  convergenceSamples: number | null;
  convergenceSeconds: number | null;
  /** Steady-state MSE, dB. */
  steadyStateMseDb: number | null;
  /** Misadjustment, per cent (needs a known minimum MSE). */
  misadjustment: number | null;
  /** Computation time, ms. */
  computeMs: number | null;
}

export type CompareKey = Exclude<keyof CompareRow, 'id'>;

/** The table's columns in order, each with its header (name and unit). */
export function compareColumns(
  trans: Trans
): Array<{ key: CompareKey; name: string; unit: string }> {
  return [
    { key: 'label', name: trans.__('run'), unit: '' },
    { key: 'convergenceSamples', name: trans.__('convergence time'), unit: trans.__('samples') },
    { key: 'convergenceSeconds', name: trans.__('convergence time'), unit: 's' },
    { key: 'steadyStateMseDb', name: trans.__('steady-state MSE'), unit: 'dB' },
    { key: 'misadjustment', name: trans.__('misadjustment'), unit: '%' },
    { key: 'computeMs', name: trans.__('run time'), unit: 'ms' }
  ];
}

function fig(run: Run, key: string): number | null {
  const f = run.figures.find(g => g.key === key);
  return f && Number.isFinite(f.value) ? f.value : null;
}

/** The runs that can be compared: adaptive-filter runs with a learning curve. */
export function comparable(runs: ReadonlyArray<Run>): Run[] {
  return runs.filter(r => r.params.tool === 'adaptive' && r.arrays.learningCurve !== undefined);
}

/**
 * Each run's label, numbered "(1)", "(2)", … where several runs share one (two runs of one
 * set-up), so the legend and the table tell them apart.
 */
export function distinctLabels(runs: ReadonlyArray<Run>): string[] {
  const total = new Map<string, number>();
  for (const r of runs) {
    total.set(r.label, (total.get(r.label) ?? 0) + 1);
  }
  const seen = new Map<string, number>();
  return runs.map(r => {
    if ((total.get(r.label) ?? 0) < 2) {
      return r.label;
    }
    const k = (seen.get(r.label) ?? 0) + 1;
    seen.set(r.label, k);
    return `${r.label} (${k})`;
  });
}

export function compareRows(runs: ReadonlyArray<Run>): CompareRow[] {
  const list = comparable(runs);
  const labels = distinctLabels(list);
  return list.map((r, i) => ({
    id: r.id,
    label: labels[i],
    convergenceSamples: fig(r, 'convergenceSamples'),
    convergenceSeconds: fig(r, 'convergenceSeconds'),
    steadyStateMseDb: fig(r, 'steadyStateMseDb'),
    misadjustment: fig(r, 'misadjustment'),
    computeMs: r.computeMs
  }));
}

/**
 * Rows sorted by a column (a stable sort; labels by locale, numbers by value); a missing value
 * sorts last in either direction.
 */
export function sortRows(
  rows: ReadonlyArray<CompareRow>,
  key: CompareKey,
  direction: 'ascending' | 'descending'
): CompareRow[] {
  const sign = direction === 'ascending' ? 1 : -1;
  return rows
    .map((r, i) => ({ r, i }))
    .sort((a, b) => {
      const va = a.r[key];
      const vb = b.r[key];
      if (va === null || vb === null) {
        return va === vb ? a.i - b.i : va === null ? 1 : -1;
      }
      const c =
        typeof va === 'string' ? va.localeCompare(vb as string) : (va as number) - (vb as number);
      return c !== 0 ? sign * c : a.i - b.i;
    })
    .map(x => x.r);
}

/** The table as CSV, in the order given. */
export function compareCsv(trans: Trans, rows: ReadonlyArray<CompareRow>): string {
  return csvText(
    compareColumns(trans).map(c => ({
      header: withUnit(c.name, c.unit),
      values: rows.map(r => r[c.key])
    }))
  );
}

/**
 * The learning curves of the runs on one plot, each smoothed over `smoothing` samples (null:
 * the default for the longest), in seconds when every run has the same sample rate.
 */
export function compareSpec(
  trans: Trans,
  runs: ReadonlyArray<Run>,
  smoothing: number | null
): PlotSpec {
  const list = comparable(runs);
  const rates = new Set(list.map(r => r.fs));
  const fs = rates.size === 1 ? (list[0]?.fs ?? null) : null;
  const t = timeAxis(trans, fs);
  const longest = list.reduce((m, r) => Math.max(m, r.arrays.learningCurve.data.length), 0);
  // By default the window the runs' figures were read off, when they share one (their curves
  // come smoothed from the worker), else the default for the longest.
  const windows = new Set(list.map(r => figure(r, 'smoothingWindow')));
  const shared = windows.size === 1 ? [...windows][0] : null;
  const w = smoothing ?? shared ?? defaultSmoothing(longest);
  const spec = emptySpec(
    trans.__('Learning curves, smoothed over %1 samples', w),
    t.title,
    t.unit,
    trans.__('squared error (dB)')
  );
  const labels = distinctLabels(list);
  list.forEach((r, i) => {
    const data = smoothedLearningCurve(r, w);
    spec.lines.push({
      name: labels[i],
      signal: { data, complex: false, n: data.length, stride: 1, offset: 0 },
      part: 'real',
      db: true,
      dx: t.dx,
      color: i
    });
  });
  if (rates.size > 1) {
    spec.note = trans.__('The runs have different sample rates: the axis is in samples.');
  }
  return spec;
}

/** A table cell: the number with a sensible precision, a dash when missing. */
export function cellText(v: string | number | null): string {
  if (v === null) {
    return '—';
  }
  if (typeof v === 'string') {
    return v;
  }
  return Math.abs(v) >= 1000 || Number.isInteger(v) ? String(Math.round(v)) : v.toPrecision(4);
}
