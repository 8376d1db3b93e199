// Comparing runs: rows, sorting (missing values last), the CSV and the overlaid curves.
import {
  cellText,
  compareCsv,
  compareRows,
  compareSpec,
  sortRows
} from '../../../src/panel/plots/compare';
import type { IRunSource } from '../../../src/panel/plots/run-source';
import type { WorkbenchModel } from '../../../src/model/workbench/workbench';
import { movingAverage } from '../../../src/core';
import { cancellationRun, makeRun, removal, trans } from './fixtures';

// The widgets take any run source; the workbench model is one (checked by the type checker).
export const workbenchIsARunSource = (m: WorkbenchModel): IRunSource => m;

const a = cancellationRun(1000, 1000, { id: 'a', label: 'RLS · M 4 · λ 0.99', computeMs: 30 });
const b = cancellationRun(1000, 1000, {
  id: 'b',
  label: 'NLMS · M 4 · μ 0.5',
  computeMs: 10,
  figures: [{ key: 'steadyStateMseDb', label: '', value: -18, unit: 'dB' }]
});
const c = makeRun(removal(), { id: 'c' });

test('rows of the adaptive runs with their figures (others left out)', () => {
  const rows = compareRows([a, b, c]);
  expect(rows.map(r => r.id)).toEqual(['a', 'b']);
  expect(rows[0]).toEqual({
    id: 'a',
    label: 'RLS · M 4 · λ 0.99',
    convergenceSamples: 500,
    convergenceSeconds: null,
    steadyStateMseDb: -21.5,
    misadjustment: 3.2,
    computeMs: 30
  });
});

test('sorting by a column in either direction keeps missing values last', () => {
  const rows = compareRows([a, b]);
  expect(sortRows(rows, 'computeMs', 'ascending').map(r => r.id)).toEqual(['b', 'a']);
  expect(sortRows(rows, 'computeMs', 'descending').map(r => r.id)).toEqual(['a', 'b']);
  expect(sortRows(rows, 'misadjustment', 'ascending').map(r => r.id)).toEqual(['a', 'b']);
  expect(sortRows(rows, 'misadjustment', 'descending').map(r => r.id)).toEqual(['a', 'b']);
  expect(sortRows(rows, 'label', 'ascending').map(r => r.id)).toEqual(['b', 'a']);
  expect(sortRows(rows, 'steadyStateMseDb', 'descending').map(r => r.id)).toEqual(['b', 'a']);
});

test('the table as CSV, in the order shown, each header with its unit', () => {
  const rows = sortRows(compareRows([a, b]), 'computeMs', 'ascending');
  expect(compareCsv(trans, rows)).toBe(
    'run,convergence time (samples),convergence time (s),steady-state MSE (dB),misadjustment (%),run time (ms)\r\n' +
      'NLMS · M 4 · μ 0.5,,,-18,,10\r\n' +
      'RLS · M 4 · λ 0.99,500,,-21.5,3.2,30\r\n'
  );
});

test('cells: whole numbers as they are, others to four significant digits, a dash when missing', () => {
  expect(cellText(null)).toBe('—');
  expect(cellText(500)).toBe('500');
  expect(cellText(-21.4567)).toBe('-21.46');
  expect(cellText(12345.6)).toBe('12346');
});

test('learning curves overlaid, each named by its run, in seconds for a common rate', () => {
  const spec = compareSpec(trans, [a, b, c], 10);
  expect(spec.lines.map(l => l.name)).toEqual(['RLS · M 4 · λ 0.99', 'NLMS · M 4 · μ 0.5']);
  expect(spec.lines.map(l => l.color)).toEqual([0, 1]);
  expect(spec.xTitle).toBe('time (s)');
  expect(spec.title).toBe('Learning curves, smoothed over 10 samples');
  const mixed = compareSpec(trans, [a, { ...b, fs: 2000 }], null);
  expect(mixed.xTitle).toBe('sample n');
  expect(mixed.note).toMatch(/different sample rates/);
});

test('runs sharing a label are numbered in the legend and the table', () => {
  const again = { ...a, id: 'a2' };
  expect(compareSpec(trans, [a, b, again], 1).lines.map(l => l.name)).toEqual([
    'RLS · M 4 · λ 0.99 (1)',
    'NLMS · M 4 · μ 0.5',
    'RLS · M 4 · λ 0.99 (2)'
  ]);
  expect(compareRows([a, again]).map(r => r.label)).toEqual([
    'RLS · M 4 · λ 0.99 (1)',
    'RLS · M 4 · λ 0.99 (2)'
  ]);
});

test('the overlay takes the curves the worker smoothed when the runs share its window, else smooths once', () => {
  // the worker's curve: the trailing moving average over the window the figures were read off
  const withSmoothed = (r: typeof a, id: string): typeof a => {
    const lc = r.arrays.learningCurve!.data;
    return {
      ...r,
      id,
      arrays: {
        ...r.arrays,
        learningCurveSmoothed: { ...r.arrays.learningCurve!, data: movingAverage(lc, 20) }
      },
      figures: [...r.figures, { key: 'smoothingWindow', label: '', value: 20, unit: 'samples' }]
    };
  };
  const s1 = withSmoothed(a, 's1');
  const s2 = withSmoothed(b, 's2');
  const spec = compareSpec(trans, [s1, s2], null);
  expect(spec.title).toBe('Learning curves, smoothed over 20 samples');
  expect(spec.lines[0].signal.data).toBe(s1.arrays.learningCurveSmoothed!.data);
  expect(spec.lines[1].signal.data).toBe(s2.arrays.learningCurveSmoothed!.data);
  // another window: smoothed on the page (the same trailing average), once per curve and window
  const other = compareSpec(trans, [s1, s2], 7);
  const want = movingAverage(s1.arrays.learningCurve!.data, 7);
  expect(Array.from(other.lines[0].signal.data)).toEqual(Array.from(want));
  expect(compareSpec(trans, [s1, s2], 7).lines[0].signal.data).toBe(other.lines[0].signal.data);
  // runs whose windows differ: the default for the longest (N / 100 = 10 here)
  expect(compareSpec(trans, [s1, a], null).title).toBe('Learning curves, smoothed over 10 samples');
});
