/**
 * Comparing runs beyond their learning curves: the Welch spectra of what each run leaves (an
 * adaptive filter's error, a removal's output) overlaid, and the responses of each run's final
 * weights (magnitude in dB above, unwrapped phase below). Every number comes from the core
 * (`welch` through the given PSD function, `firResponse`, `toDb`); the legend names each run by
 * its label (algorithm and parameters), numbered where two share one.
 */
import { firResponse, type PsdResult } from '../../core';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { distinctLabels } from './compare';
import { rowCount } from './lines';
import type { PlotSettings } from './settings';
import { emptySpec, type PlotSpec } from './spec';
import { frequencyAxis, psdSpec, spectrumRequests, type PsdRequest } from './views';

/** What the comparison overlays. */
export type CompareKind = 'learning' | 'spectrum' | 'response';

export const COMPARE_KINDS: ReadonlyArray<CompareKind> = ['learning', 'spectrum', 'response'];

/** The label of a comparison in its chooser. */
export function compareKindLabel(trans: Trans, kind: CompareKind): string {
  switch (kind) {
    case 'learning':
      return trans.__('Learning curves');
    case 'spectrum':
      return trans.__('Spectra');
    case 'response':
      return trans.__('Weights responses');
  }
}

/**
 * A sentence naming the ticked runs the overlay leaves out and why (null when none is), so a
 * comparison never drops a run silently.
 */
export function leftOutNote(
  trans: Trans,
  kind: CompareKind,
  runs: ReadonlyArray<Run>,
  shown: ReadonlyArray<Run>
): string | null {
  const out = runs.filter(r => !shown.includes(r));
  if (out.length === 0) {
    return null;
  }
  const names = out.map(r => r.label).join('; ');
  switch (kind) {
    case 'learning':
      return trans.__('Left out, without a learning curve: %1.', names);
    case 'spectrum':
      return trans.__('Left out, without an error or output: %1.', names);
    case 'response':
      return trans.__('Left out, without final weights: %1.', names);
  }
}

/** The runs that have a spectrum to overlay: adaptive runs with an error, removals with an output. */
export function spectrumRuns(runs: ReadonlyArray<Run>): Run[] {
  return runs.filter(r =>
    r.params.tool === 'adaptive'
      ? r.arrays.error !== undefined
      : r.params.tool === 'removal' && r.arrays.output !== undefined
  );
}

/** The runs that have final weights: adaptive-filter runs. */
export function responseRuns(runs: ReadonlyArray<Run>): Run[] {
  return runs.filter(r => r.params.tool === 'adaptive' && r.arrays.weights !== undefined);
}

/** The one sample rate all runs share, or null (unknown for one, or different). */
function commonRate(runs: ReadonlyArray<Run>): { fs: number | null; mixed: boolean } {
  const rates = new Set(runs.map(r => (r.fs !== null && r.fs > 0 ? r.fs : null)));
  if (rates.size === 1) {
    return { fs: [...rates][0], mixed: false };
  }
  return { fs: null, mixed: runs.length > 1 };
}

/**
 * The Welch estimates of the spectra: for each run, the estimate its own spectrum view makes
 * of what it leaves (`spectrumRequests`' last item: the error or the output, row 1), named by
 * the run. Where the runs' sample rates differ, every estimate is made per sample (fs = 1,
 * power per bin) so the curves share their axes.
 */
export function compareSpectrumRequests(
  trans: Trans,
  runs: ReadonlyArray<Run>,
  settings: PlotSettings
): PsdRequest[] {
  const list = spectrumRuns(runs);
  const labels = distinctLabels(list);
  const { mixed } = commonRate(list);
  return list.map((run, i) => {
    const all = spectrumRequests(trans, run, settings, 0);
    const own = all[all.length - 1];
    const options = mixed ? { ...own.options, fs: 1, scaling: 'spectrum' as const } : own.options;
    return { name: labels[i], signal: own.signal, options };
  });
}

/** The spectra overlaid, from the estimates of `compareSpectrumRequests` (in the same order). */
export function compareSpectrumSpec(
  trans: Trans,
  runs: ReadonlyArray<Run>,
  requests: ReadonlyArray<PsdRequest>,
  results: ReadonlyArray<PsdResult>
): PlotSpec {
  const list = spectrumRuns(runs);
  const { fs, mixed } = commonRate(list);
  const spec = psdSpec(trans, trans.__('Residual spectra (Welch)'), fs, requests, results);
  const segments = [...new Set(results.map(r => r.nperseg))].join(', ');
  const notes = [
    trans.__(
      "Welch's method on each adaptive run's error e(n) and each removal's output: Hann window, %1-sample segments, 50 % overlap, mean removed per segment.",
      segments
    )
  ];
  if (mixed) {
    notes.push(trans.__('The runs have different sample rates: the axis is in cycles per sample.'));
  }
  if (
    list.some(r => rowCount(r.params.tool === 'adaptive' ? r.arrays.error : r.arrays.output) > 1)
  ) {
    notes.push(trans.__('Runs with several trials or channels show their first row.'));
  }
  spec.note = notes.join(' ');
  return spec;
}

/**
 * The responses of the runs' final weights: 20·log10|H| above and the unwrapped phase below,
 * one colour per run (its phase drawn in the same colour, without a second legend entry), over
 * [0, fs/2] for real weights, [−fs/2, fs/2] when any run's weights are complex.
 */
export function compareResponseSpec(
  trans: Trans,
  runs: ReadonlyArray<Run>,
  settings: PlotSettings
): PlotSpec {
  const list = responseRuns(runs);
  const labels = distinctLabels(list);
  const { fs, mixed } = commonRate(list);
  const f = frequencyAxis(trans, fs);
  const anyComplex = list.some(r => r.arrays.weights.complex);
  const band: [number, number] = anyComplex ? [-0.5, 0.5] : [0, 0.5];
  const points = settings.responsePoints + 1;
  const spec = emptySpec(
    trans.__('Responses of the final weights'),
    f.title,
    f.unit,
    trans.__('magnitude (dB)')
  );
  // Short enough to stay inside its subplot when the legend takes room from a small plot.
  spec.y2Title = trans.__('phase (rad)');
  list.forEach((run, i) => {
    const wArr = run.arrays.weights;
    const M = wArr.shape[wArr.shape.length - 1];
    const W = wArr.complex ? 2 : 1;
    const w = wArr.data.subarray(0, W * M);
    const r = firResponse(w, { complex: wArr.complex, points, band });
    const x = new Float64Array(r.frequency.length);
    for (let k = 0; k < x.length; k++) {
      x[k] = r.frequency[k] * f.scale;
    }
    // One legend entry per run: a click on it hides or shows both of its curves.
    const group = `run${i}`;
    spec.traces.push({ name: labels[i], kind: 'line', x, y: r.magnitudeDb, color: i, group });
    spec.traces.push({
      name: labels[i],
      kind: 'line',
      x,
      y: r.phase,
      color: i,
      lower: true,
      noLegend: true,
      group
    });
  });
  const notes = [
    trans.__(
      'H = Σ w_k e^(−jωk) of each run’s final weights, at %1 frequencies; phase unwrapped.',
      points
    )
  ];
  if (mixed) {
    notes.push(trans.__('The runs have different sample rates: the axis is in cycles per sample.'));
  }
  if (list.some(r => rowCount(r.arrays.weights) > 1)) {
    notes.push(
      trans.__('Runs with several trials or channels show the weights of their first row.')
    );
  }
  spec.note = notes.join(' ');
  return spec;
}
