/**
 * The views of one run, built from its result arrays, its inputs and its figures. Every number
 * drawn comes from the core: Welch spectra (`welch`), FIR responses (`firResponse`), smoothing
 * (`movingAverage`), dB (`toDb`) and, per visible range, the M4 envelope (see ./lines.ts).
 */
import {
  firResponse,
  movingAverage,
  toDb,
  welch,
  type PsdResult,
  type SignalView,
  type WelchOptions
} from '../../core';
import { beamView } from './beam-view';
import type { Trans } from '../../model/workbench/rules';
import { AFTER_FLOOR_DB } from '../../model/workbench/outcome';
import type { ResultArray, Run } from '../../model/workbench/runs';
import { optimumWeights } from '../../model/workbench/truth';
import { rowCount, rowOf, type LinePart, type LineSignal, type LineSource } from './lines';
import type { PlotSettings } from './settings';
import { emptySpec, type MarkerLine, type PlotSpec } from './spec';

/** The views a run can have. */
export type ViewKind =
  | 'signals'
  | 'learning'
  | 'response'
  | 'trajectories'
  | 'spectrum'
  | 'energy'
  | 'constellation'
  | 'angles'
  | 'cancellation'
  | 'spectrogram'
  | 'beam';

/** Views whose numbers come from long computations (through a `PlotCompute`, see ./compute.ts). */
export type ComputedView = 'spectrum' | 'cancellation' | 'spectrogram';

export function isComputedView(v: ViewKind): v is ComputedView {
  return v === 'spectrum' || v === 'cancellation' || v === 'spectrogram';
}

/** How complex values are drawn: magnitude and phase, or real and imaginary parts. */
export type ComplexAs = 'polar' | 'cartesian';

export interface ViewOptions {
  complexAs: ComplexAs;
  /** Learning-curve smoothing window in samples (null: the default for the length). */
  smoothing: number | null;
  /** Taps whose trajectories are drawn (null: the first four). */
  taps: number[] | null;
  /** Row (trial or channel, from 0) of K×N results drawn; arrays with fewer rows use their last. */
  row: number;
  /** Which signal the spectrogram shows: the one the run started from, or its result. */
  spectrogramOf: 'before' | 'after';
}

export const DEFAULT_VIEW_OPTIONS: ViewOptions = {
  complexAs: 'polar',
  smoothing: null,
  taps: null,
  row: 0,
  spectrogramOf: 'before'
};

/** Row `row` of an array, or its last row when it has fewer (a 1-D input beside K×N results). */
export function rowIn(a: ResultArray, row: number): LineSignal {
  return rowOf(a, Math.max(0, Math.min(row, rowCount(a) - 1)));
}

/** Most rows (trials or channels) among a run's result arrays and inputs. */
export function rowsOf(run: Run): number {
  let k = 1;
  for (const a of [...Object.values(run.arrays), ...Object.values(run.inputs)]) {
    if (a.shape.length > 1 && a !== run.arrays.trajectory) {
      k = Math.max(k, rowCount(a));
    }
  }
  if (run.arrays.trajectory && run.arrays.trajectory.shape.length > 2) {
    k = Math.max(k, run.arrays.trajectory.shape[0]);
  }
  return k;
}

/** The tab label of a view. */
export function viewLabel(trans: Trans, v: ViewKind): string {
  switch (v) {
    case 'signals':
      return trans.__('Signals');
    case 'learning':
      return trans.__('Learning curve');
    case 'response':
      return trans.__('Weights response');
    case 'trajectories':
      return trans.__('Tap trajectories');
    case 'spectrum':
      return trans.__('Spectrum');
    case 'energy':
      return trans.__('Energy per direction');
    case 'constellation':
      return trans.__('Constellation');
    case 'angles':
      return trans.__('Angles');
    case 'cancellation':
      return trans.__('Cancellation bound');
    case 'spectrogram':
      return trans.__('Spectrogram');
    case 'beam':
      return trans.__('Beam pattern');
  }
}

/** A run's figure by key, when it holds a finite number. */
export function figure(run: Run, key: string): number | null {
  const f = run.figures.find(g => g.key === key);
  return f && Number.isFinite(f.value) ? f.value : null;
}

/** The views that have something to show for a run (none until it has results). */
export function viewsOf(run: Run): ViewKind[] {
  const a = run.arrays;
  const out: ViewKind[] = [];
  if (run.params.tool === 'adaptive') {
    if (a.output || a.error) {
      out.push('signals');
    }
    if (a.learningCurve) {
      out.push('learning');
    }
    if (a.weights) {
      out.push('response');
    }
    if (a.trajectory && a.trajectoryIndex) {
      out.push('trajectories');
    }
    if (a.error && beforeOf(run)) {
      out.push('spectrum');
    }
    const use = run.params.use;
    if (coherencePair(run)) {
      out.push('cancellation');
    }
    if (a.error && beforeOf(run)) {
      out.push('spectrogram');
    }
    if (use === 'equalization' && a.output && a.output.complex) {
      out.push('constellation');
    }
  } else if (run.params.tool === 'removal') {
    if (a.output) {
      out.push('signals', 'spectrum', 'spectrogram');
    }
    if (run.figures.some(f => f.key.startsWith('dir:'))) {
      out.push('energy');
    }
    if (coherencePair(run)) {
      out.push('cancellation');
    }
    if (a.output && run.params.basis.kind === 'array') {
      out.push('beam');
    }
  } else if (run.params.tool === 'angles') {
    if (run.figures.some(f => /^angle\d+$/.test(f.key))) {
      out.push('angles');
    }
  }
  return out;
}

/**
 * The signals a cancellation bound compares: the reference x, the signal d it is taken off and
 * what is left e — an adaptive canceller's (or identifier's) x, d and error, or a removal's
 * reference channel, signal and output when the removal takes delayed copies of a reference off
 * the signal (a least-squares FIR of the reference). Null when the run has no such three.
 */
export function coherencePair(run: Run): {
  x: ResultArray;
  d: ResultArray;
  e: ResultArray;
  use: 'cancellation' | 'identification' | 'removal';
} | null {
  const p = run.params;
  if (p.tool === 'adaptive' && (p.use === 'cancellation' || p.use === 'identification')) {
    const { x, d } = run.inputs;
    const e = run.arrays.error;
    return x && d && e ? { x, d, e, use: p.use } : null;
  }
  if (p.tool === 'removal' && p.basis.kind === 'reference' && p.mode === 'off') {
    const x = run.inputs['basis.reference'];
    const d = run.inputs.signal;
    const e = run.arrays.output;
    return x && d && e ? { x, d, e, use: 'removal' } : null;
  }
  return null;
}

/** The time axis: seconds when the run's sample rate is known, samples otherwise. */
export function timeAxis(
  trans: Trans,
  fs: number | null
): { dx: number; title: string; unit: string } {
  return fs !== null && fs > 0
    ? { dx: 1 / fs, title: trans.__('time (s)'), unit: 's' }
    : { dx: 1, title: trans.__('sample n'), unit: 'samples' };
}

/** The frequency axis: Hz when fs is known, cycles per sample otherwise. */
export function frequencyAxis(
  trans: Trans,
  fs: number | null
): { scale: number; title: string; unit: string } {
  return fs !== null && fs > 0
    ? { scale: fs, title: trans.__('frequency (Hz)'), unit: 'Hz' }
    : { scale: 1, title: trans.__('frequency (cycles/sample)'), unit: 'cycles/sample' };
}

/** The signal a run started from (desired, primary, the predicted signal, the input) and its name. */
export function beforeOf(run: Run): { array: ResultArray; name: string } | null {
  const p = run.params;
  if (p.tool === 'adaptive') {
    if (p.use === 'prediction') {
      return run.inputs.x ? { array: run.inputs.x, name: 'x(n)' } : null;
    }
    if (p.use === 'equalization') {
      return run.inputs.x ? { array: run.inputs.x, name: 'received x(n)' } : null;
    }
    const d = run.inputs.d;
    if (!d) {
      return null;
    }
    return { array: d, name: p.use === 'cancellation' ? 'primary d(n)' : 'desired d(n)' };
  }
  if (p.tool === 'removal' && run.inputs.signal) {
    return { array: run.inputs.signal, name: 'input x' };
  }
  return null;
}

function parts(complex: boolean, as: ComplexAs): [LinePart, LinePart | null] {
  if (!complex) {
    return ['real', null];
  }
  return as === 'polar' ? ['abs', 'phase'] : ['real', 'imag'];
}

function partTitles(trans: Trans, as: ComplexAs): [string, string] {
  return as === 'polar'
    ? [trans.__('magnitude'), trans.__('phase (rad)')]
    : [trans.__('real part'), trans.__('imaginary part')];
}

export function need(run: Run, key: string): ResultArray {
  const a = run.arrays[key];
  if (!a) {
    throw new Error(`run "${run.label}" has no array '${key}' to plot`);
  }
  return a;
}

/**
 * The smoothing window of a run's learning curve: the user's, else the one its figures were read
 * off (steady state, convergence), else the default for its length.
 */
export function smoothingOf(run: Run, o: ViewOptions): number {
  const lc = run.arrays.learningCurve;
  return o.smoothing ?? figure(run, 'smoothingWindow') ?? defaultSmoothing(lc ? lc.data.length : 1);
}

// Curves smoothed on the page, per array and window: specs are built again on every change of
// the views or of the compared runs (a sweep's runs end one after another), a curve once.
const smoothedOnPage = new WeakMap<Float64Array, Map<number, Float64Array>>();

/** `data` smoothed by the core's trailing moving average over `w` samples, computed once. */
export function smoothedOnce(data: Float64Array, w: number): Float64Array {
  if (w <= 1) {
    return data;
  }
  let byWindow = smoothedOnPage.get(data);
  if (!byWindow) {
    byWindow = new Map();
    smoothedOnPage.set(data, byWindow);
  }
  let out = byWindow.get(w);
  if (!out) {
    out = movingAverage(data, w);
    byWindow.set(w, out);
  }
  return out;
}

/**
 * A run's learning curve smoothed over `w` samples: the curve the figures were read off,
 * smoothed in the worker, when `w` is its window; else smoothed here once.
 */
export function smoothedLearningCurve(run: Run, w: number): Float64Array {
  const lc = need(run, 'learningCurve').data;
  const pre = run.arrays.learningCurveSmoothed?.data;
  return pre && w > 1 && w === figure(run, 'smoothingWindow') ? pre : smoothedOnce(lc, w);
}

/** The default smoothing of a learning curve of N samples: about 1 % of it, at most 1000. */
export function defaultSmoothing(n: number): number {
  return Math.max(1, Math.min(1000, Math.round(n / 100)));
}

function signalsView(trans: Trans, run: Run, o: ViewOptions): PlotSpec {
  const t = timeAxis(trans, run.fs);
  const series: Array<{ a: ResultArray; name: string }> = [];
  const before = beforeOf(run);
  if (before) {
    series.push({ a: before.array, name: trans.__(before.name) });
  }
  if (run.params.tool === 'adaptive') {
    if (run.arrays.output) {
      series.push({ a: run.arrays.output, name: trans.__('output y(n)') });
    }
    if (run.arrays.error) {
      series.push({ a: run.arrays.error, name: trans.__('error e(n)') });
    }
  } else {
    series.push({
      a: need(run, 'output'),
      name:
        run.params.tool === 'removal' && run.params.mode === 'onto'
          ? trans.__('projected onto the subspace')
          : trans.__('with the subspace removed')
    });
  }
  const complex = series.some(s => s.a.complex);
  const [upper, lower] = partTitles(trans, o.complexAs);
  const spec = emptySpec(trans.__('Signals'), t.title, t.unit, complex ? upper : trans.__('value'));
  if (complex) {
    spec.y2Title = lower;
  }
  series.forEach((s, i) => {
    const [p1, p2] = parts(s.a.complex, o.complexAs);
    const signal = rowIn(s.a, o.row);
    spec.lines.push({ name: s.name, signal, part: p1, dx: t.dx, color: i });
    if (p2) {
      spec.lines.push({
        name: s.name,
        signal,
        part: p2,
        dx: t.dx,
        color: i,
        lower: true,
        noLegend: true
      });
    } else if (complex) {
      // A real series beside complex ones: its value is drawn once, on the upper axis.
    }
  });
  if (series.some(s => rowCount(s.a) > 1)) {
    spec.note = trans.__('Row %1 of the results (trial or channel).', o.row + 1);
  }
  return spec;
}

function learningView(trans: Trans, run: Run, o: ViewOptions): PlotSpec {
  const t = timeAxis(trans, run.fs);
  const w = smoothingOf(run, o);
  const spec = emptySpec(
    trans.__('Learning curve'),
    t.title,
    t.unit,
    trans.__('squared error (dB)')
  );
  const line = (data: Float64Array): LineSource['signal'] => ({
    data,
    complex: false,
    n: data.length,
    stride: 1,
    offset: 0
  });
  const lo = run.arrays.learningCurveLower;
  const hi = run.arrays.learningCurveUpper;
  if (lo && hi) {
    spec.lines.push({
      name: trans.__('95 % band'),
      signal: line(smoothedOnce(lo.data, w)),
      part: 'real',
      db: true,
      dx: t.dx,
      color: 0,
      faint: true,
      noLegend: true
    });
    spec.lines.push({
      name: trans.__('95 % band of the mean'),
      signal: line(smoothedOnce(hi.data, w)),
      part: 'real',
      db: true,
      dx: t.dx,
      color: 0,
      faint: true,
      fill: true
    });
  }
  spec.lines.push({
    name: trans.__('|e(n)|², smoothed over %1 samples', w),
    signal: line(smoothedLearningCurve(run, w)),
    part: 'real',
    db: true,
    dx: t.dx,
    color: 0
  });
  const ss = figure(run, 'steadyStateMseDb');
  if (ss !== null) {
    spec.markers.push({
      orientation: 'h',
      value: ss,
      label: trans.__('steady state %1 dB', ss.toFixed(1)),
      color: 2
    });
  }
  const conv = figure(run, 'convergenceSamples');
  if (conv !== null) {
    spec.markers.push({
      orientation: 'v',
      value: conv * t.dx,
      label:
        t.unit === 's'
          ? trans.__('converged at %1 s', Number((conv * t.dx).toPrecision(4)))
          : trans.__('converged at n = %1', conv),
      color: 1
    });
  }
  if (run.params.tool === 'adaptive' && run.params.minMseDb !== null) {
    spec.markers.push({
      orientation: 'h',
      value: run.params.minMseDb,
      label: trans.__('minimum MSE %1 dB', run.params.minMseDb),
      color: 3
    });
  }
  return spec;
}

function responseView(trans: Trans, run: Run, o: ViewOptions, s: PlotSettings): PlotSpec {
  const wArr = need(run, 'weights');
  const M = wArr.shape[wArr.shape.length - 1];
  const W = wArr.complex ? 2 : 1;
  const row = Math.max(0, Math.min(o.row, rowCount(wArr) - 1));
  const w = wArr.data.subarray(row * W * M, (row + 1) * W * M);
  const r = firResponse(w, { complex: wArr.complex, points: s.responsePoints + 1 });
  const f = frequencyAxis(trans, run.fs);
  const x = new Float64Array(r.frequency.length);
  for (let k = 0; k < x.length; k++) {
    x[k] = r.frequency[k] * f.scale;
  }
  const spec = emptySpec(
    trans.__('Response of the final weights'),
    f.title,
    f.unit,
    trans.__('magnitude (dB)')
  );
  spec.y2Title = trans.__('phase (rad, unwrapped)');
  spec.traces.push({ name: trans.__('|H|'), kind: 'line', x, y: r.magnitudeDb, color: 0 });
  spec.traces.push({ name: trans.__('arg H'), kind: 'line', x, y: r.phase, color: 1, lower: true });
  const notes: string[] = [];
  if (rowCount(wArr) > 1) {
    notes.push(trans.__('Final weights of row %1 (trial or channel).', row + 1));
  }
  const h = run.inputs.truth;
  if (h && !(h.complex && !wArr.complex)) {
    // The true impulse response h as weights w_o = conj(h) (y = wᴴu), on the same grid.
    const t = firResponse(optimumWeights(h, wArr.complex), {
      complex: wArr.complex,
      points: s.responsePoints + 1
    });
    spec.traces.push({
      name: trans.__('|H| true'),
      kind: 'line',
      x,
      y: t.magnitudeDb,
      color: 2,
      dash: 'dash'
    });
    spec.traces.push({
      name: trans.__('arg H true'),
      kind: 'line',
      x,
      y: t.phase,
      color: 3,
      dash: 'dash',
      lower: true
    });
    const mis = figure(run, 'misalignmentDb');
    notes.push(
      mis === null
        ? trans.__('Dashed: the true response %1 (%2 taps).', h.description, h.shape[0])
        : trans.__(
            'Dashed: the true response %1 (%2 taps); misalignment of the weights %3 dB.',
            h.description,
            h.shape[0],
            Number(mis.toFixed(1))
          )
    );
  }
  if (notes.length > 0) {
    spec.note = notes.join(' ');
  }
  return spec;
}

function trajectoriesView(trans: Trans, run: Run, o: ViewOptions): PlotSpec {
  const tr = need(run, 'trajectory');
  const idx = need(run, 'trajectoryIndex');
  const t = timeAxis(trans, run.fs);
  const M = tr.shape[tr.shape.length - 1];
  const rows = idx.data.length;
  const xTable = new Float64Array(rows);
  for (let k = 0; k < rows; k++) {
    xTable[k] = idx.data[k] * t.dx;
  }
  const taps = (o.taps ?? [0, 1, 2, 3]).filter(k => Number.isInteger(k) && k >= 0 && k < M);
  const [upper, lower] = partTitles(trans, o.complexAs);
  const spec = emptySpec(
    trans.__('Tap trajectories'),
    t.title,
    t.unit,
    tr.complex ? upper : trans.__('weight value')
  );
  if (tr.complex) {
    spec.y2Title = lower;
  }
  const [p1, p2] = parts(tr.complex, o.complexAs);
  taps.forEach((k, i) => {
    const K = tr.shape.length > 2 ? tr.shape[0] : 1;
    const base = Math.max(0, Math.min(o.row, K - 1)) * rows * M;
    const signal = { data: tr.data, complex: tr.complex, n: rows, stride: M, offset: base + k };
    const name = trans.__('w%1', k);
    spec.lines.push({ name, signal, part: p1, dx: t.dx, xTable, color: i });
    if (p2) {
      spec.lines.push({
        name,
        signal,
        part: p2,
        dx: t.dx,
        xTable,
        color: i,
        lower: true,
        noLegend: true
      });
    }
  });
  return spec;
}

/** One Welch estimate a spectrum view needs: the signal and the options it is computed with. */
export interface PsdRequest {
  name: string;
  signal: SignalView;
  options: WelchOptions;
}

/** The estimates the spectrum view of a run needs: before (when known) and after. */
export function spectrumRequests(trans: Trans, run: Run, s: PlotSettings, row = 0): PsdRequest[] {
  const before = beforeOf(run);
  const after =
    run.params.tool === 'adaptive'
      ? { array: need(run, 'error'), name: trans.__('error e(n)') }
      : { array: need(run, 'output'), name: trans.__('output') };
  const fs = run.fs !== null && run.fs > 0 ? run.fs : null;
  const list = before ? [{ array: before.array, name: trans.__(before.name) }, after] : [after];
  return list.map(item => {
    const sig = rowIn(item.array, row);
    return {
      name: item.name,
      signal: {
        data: sig.data,
        complex: sig.complex,
        n: sig.n,
        stride: sig.stride,
        offset: sig.offset
      },
      options: {
        fs: fs ?? 1,
        nperseg: Math.min(s.welchSegment, sig.n),
        scaling: fs !== null ? 'density' : 'spectrum',
        order: 'ascending'
      }
    };
  });
}

/**
 * A plot of Welch estimates in dB, one line per request (named as it), against Hz when `fs` is
 * known (dB/Hz) or cycles per sample (dB per bin) otherwise.
 */
export function psdSpec(
  trans: Trans,
  title: string,
  fs: number | null,
  requests: ReadonlyArray<PsdRequest>,
  results: ReadonlyArray<PsdResult>
): PlotSpec {
  const f = frequencyAxis(trans, fs);
  const spec = emptySpec(
    title,
    f.title,
    f.unit,
    fs !== null ? trans.__('PSD (dB/Hz)') : trans.__('power per bin (dB)')
  );
  results.forEach((psd, i) => {
    spec.traces.push({
      name: requests[i].name,
      kind: 'line',
      x: psd.frequency,
      y: toDb(psd.psd),
      color: i
    });
  });
  return spec;
}

/** The spectrum view from the estimates of `spectrumRequests` (in the same order). */
export function spectrumSpec(
  trans: Trans,
  run: Run,
  requests: ReadonlyArray<PsdRequest>,
  results: ReadonlyArray<PsdResult>
): PlotSpec {
  const fs = run.fs !== null && run.fs > 0 ? run.fs : null;
  const f = frequencyAxis(trans, fs);
  const spec = psdSpec(trans, trans.__('Power spectral density (Welch)'), fs, requests, results);
  const p = run.params;
  if (p.tool === 'removal' && p.basis.kind === 'harmonics') {
    for (let k = 1; k <= p.basis.count; k++) {
      spec.markers.push(harmonicMarker(trans, k * p.basis.f0, f.unit));
    }
  }
  spec.note = trans.__(
    "Welch's method: Hann window, %1-sample segments, 50 % overlap, mean removed per segment.",
    results[0]?.nperseg ?? 0
  );
  return spec;
}

function spectrumView(trans: Trans, run: Run, o: ViewOptions, s: PlotSettings): PlotSpec {
  const requests = spectrumRequests(trans, run, s, o.row);
  return spectrumSpec(
    trans,
    run,
    requests,
    requests.map(r => welch(r.signal, r.options))
  );
}

function harmonicMarker(trans: Trans, freq: number, unit: string): MarkerLine {
  return {
    orientation: 'v',
    value: freq,
    label: trans.__('%1 %2', Number(freq.toPrecision(6)), unit),
    color: 3
  };
}

function energyView(trans: Trans, run: Run): PlotSpec {
  const dirs = run.figures.filter(f => f.key.startsWith('dir:'));
  const spec = emptySpec(
    trans.__('Energy along each direction'),
    trans.__('direction'),
    '',
    trans.__('share of the input energy (dB)')
  );
  const labels = dirs.map(d => d.key.slice(4));
  spec.traces.push({
    name: trans.__('in the input'),
    kind: 'bar',
    x: labels,
    y: Float64Array.from(dirs.map(d => d.value)),
    color: 0
  });
  const after = labels.map(l => figure(run, `after:${l}`));
  if (after.every(v => v !== null)) {
    spec.traces.push({
      name: trans.__('left in the output'),
      kind: 'bar',
      x: labels,
      y: Float64Array.from(after as number[]),
      color: 1
    });
  }
  const notes: string[] = [];
  const kept = figure(run, 'keptShare');
  if (kept !== null) {
    notes.push(trans.__('Share of the signal kept: %1 %.', Number(kept.toPrecision(4))));
  }
  if (after.some(v => v !== null && v <= AFTER_FLOOR_DB)) {
    notes.push(
      trans.__(
        'Bars at %1 dB: nothing left along that direction (numerically zero).',
        AFTER_FLOOR_DB
      )
    );
  }
  spec.note = notes.join(' ');
  return spec;
}

function anglesView(trans: Trans, run: Run): PlotSpec {
  const a = run.figures.filter(f => /^angle\d+$/.test(f.key));
  const spec = emptySpec(
    trans.__('Principal angles'),
    trans.__('angle'),
    '',
    trans.__('angle (°)')
  );
  spec.traces.push({
    name: trans.__('principal angle'),
    kind: 'bar',
    x: a.map((_, i) => `θ${i + 1}`),
    y: Float64Array.from(a.map(f => f.value)),
    color: 0
  });
  return spec;
}

function constellationView(trans: Trans, run: Run, o: ViewOptions, s: PlotSettings): PlotSpec {
  const y = need(run, 'output');
  const sig = rowIn(y, o.row);
  const train =
    run.params.tool === 'adaptive' ? Math.min(sig.n, Math.max(0, run.params.trainingLength)) : 0;
  const spec = emptySpec(
    trans.__('Equalizer output'),
    trans.__('in-phase'),
    '',
    trans.__('quadrature')
  );
  spec.equalAxes = true;
  const pick = (from: number, to: number, name: string, color: number): void => {
    const n = to - from;
    if (n <= 0) {
      return;
    }
    // Evenly spread samples of the part, the last one included.
    const m = Math.min(n, s.constellationPoints);
    const re = new Float64Array(m);
    const im = new Float64Array(m);
    for (let k = 0; k < m; k++) {
      const i = from + (m === 1 ? n - 1 : Math.round((k * (n - 1)) / (m - 1)));
      const q = 2 * (sig.offset + i * sig.stride);
      re[k] = sig.data[q];
      im[k] = sig.data[q + 1];
    }
    spec.traces.push({ name, kind: 'markers', x: re, y: im, color });
  };
  pick(0, train, trans.__('training (n < %1)', train), 1);
  pick(train, sig.n, trans.__('decision-directed'), 0);
  spec.note = trans.__(
    'At most %1 points of each part, evenly spread over it.',
    s.constellationPoints
  );
  return spec;
}

/**
 * The plot of one view of a run, computed here on the main thread. Throws with a sentence when
 * the run lacks what it needs. The cancellation bound and the spectrogram are built by
 * `computeView` (./computed-views.ts) through a `PlotCompute`; the spectrum either way.
 */
export function buildView(
  trans: Trans,
  run: Run,
  view: Exclude<ViewKind, 'cancellation' | 'spectrogram'>,
  options: ViewOptions,
  settings: PlotSettings
): PlotSpec {
  switch (view) {
    case 'signals':
      return signalsView(trans, run, options);
    case 'learning':
      return learningView(trans, run, options);
    case 'response':
      return responseView(trans, run, options, settings);
    case 'trajectories':
      return trajectoriesView(trans, run, options);
    case 'spectrum':
      return spectrumView(trans, run, options, settings);
    case 'energy':
      return energyView(trans, run);
    case 'constellation':
      return constellationView(trans, run, options, settings);
    case 'angles':
      return anglesView(trans, run);
    case 'beam':
      return beamView(trans, run);
  }
}

/** Parses a list of tap indices ("0, 3, 7"), or says in a sentence why it is not one. */
export function parseTaps(text: string, taps: number): { taps: number[] } | { error: string } {
  const parts = text
    .split(/[\s,]+/)
    .map(s => s.trim())
    .filter(s => s.length > 0);
  const out: number[] = [];
  for (const p of parts) {
    const k = Number(p);
    if (!/^\d+$/.test(p) || !Number.isSafeInteger(k) || k >= taps) {
      return {
        error: `"${p}" is not a tap: give whole numbers from 0 to ${taps - 1}, separated by commas`
      };
    }
    if (!out.includes(k)) {
      out.push(k);
    }
  }
  if (out.length === 0) {
    return { error: 'give at least one tap' };
  }
  return { taps: out };
}
