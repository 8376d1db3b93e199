/**
 * The views whose numbers come from long computations, each through a `PlotCompute` (./compute.ts;
 * the core on the main thread by default, a worker when the workbench passes one): the spectrum,
 * the cancellation bound from the coherence, and the spectrogram.
 */
import type { PsdResult, SignalView, SpectrogramResult } from '../../core';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import type { PlotCompute } from './compute';
import type { LineSignal } from './lines';
import type { PlotSettings } from './settings';
import { emptySpec, type PlotSpec } from './spec';
import {
  beforeOf,
  coherencePair,
  frequencyAxis,
  need,
  rowIn,
  spectrumRequests,
  spectrumSpec,
  timeAxis,
  type ComputedView,
  type ViewOptions
} from './views';

/** The cancellation bound is drawn up to this (γ² = 1 would bound nothing). */
export const BOUND_CAP_DB = 100;

/** Colours of a spectrogram span this many dB below its strongest cell. */
export const SPECTROGRAM_RANGE_DB = 80;

function view(s: LineSignal): SignalView {
  return { data: s.data, complex: s.complex, n: s.n, stride: s.stride, offset: s.offset };
}

function rate(run: Run): number | null {
  return run.fs !== null && run.fs > 0 ? run.fs : null;
}

/** The plot of a computed view; the numbers come from `compute`. */
export async function computeView(
  trans: Trans,
  run: Run,
  kind: ComputedView,
  options: ViewOptions,
  settings: PlotSettings,
  compute: PlotCompute
): Promise<PlotSpec> {
  switch (kind) {
    case 'spectrum': {
      const requests = spectrumRequests(trans, run, settings, options.row);
      const results: PsdResult[] = await Promise.all(
        requests.map(r => compute.welch(r.signal, r.options))
      );
      return spectrumSpec(trans, run, requests, results);
    }
    case 'cancellation':
      return cancellationView(trans, run, options, settings, compute);
    case 'spectrogram':
      return spectrogramView(trans, run, options, settings, compute);
  }
}

/**
 * The magnitude-squared coherence γ²(f) of x and d bounds what any linear filter of x can take
 * off d: the residual's spectrum is at least (1 − γ²)·S_dd, so the cancellation at f is at
 * most −10·log₁₀(1 − γ²) dB (Bendat and Piersol, Random Data, 4th ed., §9.2 and ch. 7 on
 * coherent output power, from memory). Drawn against the cancellation the run achieved,
 * 10·log₁₀(S_dd/S_ee), all three from Welch estimates with the spectrum view's segments.
 */
async function cancellationView(
  trans: Trans,
  run: Run,
  o: ViewOptions,
  s: PlotSettings,
  compute: PlotCompute
): Promise<PlotSpec> {
  const pair = coherencePair(run);
  if (!pair) {
    throw new Error(
      trans.__('run "%1" has no reference, signal and residual to compare', run.label)
    );
  }
  const x = rowIn(pair.x, o.row);
  const d = rowIn(pair.d, o.row);
  const e = rowIn(pair.e, o.row);
  if (x.n !== d.n || e.n !== d.n) {
    throw new Error(
      trans.__(
        'x has %1 samples, d %2 and e %3: the coherence needs them sample for sample',
        x.n,
        d.n,
        e.n
      )
    );
  }
  const fs = rate(run);
  const options = {
    fs: fs ?? 1,
    nperseg: Math.min(s.welchSegment, d.n),
    order: 'ascending' as const
  };
  const [coh, pd, pe] = await Promise.all([
    compute.coherence(view(x), view(d), options),
    compute.welch(view(d), { ...options, scaling: 'density' }),
    compute.welch(view(e), { ...options, scaling: 'density' })
  ]);
  const K = coh.frequency.length;
  const bound = new Float64Array(K);
  const achieved = new Float64Array(K);
  const floor = 10 ** (-BOUND_CAP_DB / 10);
  for (let k = 0; k < K; k++) {
    const g = coh.coherence[k];
    bound[k] = Number.isNaN(g) ? NaN : -10 * Math.log10(Math.max(floor, 1 - g));
    achieved[k] = 10 * Math.log10(pd.psd[k] / pe.psd[k]);
  }
  const f = frequencyAxis(trans, fs);
  const use = pair.use;
  const spec = emptySpec(
    use === 'identification'
      ? trans.__('Error reduction: bound from the coherence, and achieved')
      : trans.__('Cancellation: bound from the coherence, and achieved'),
    f.title,
    f.unit,
    trans.__('cancellation (dB)')
  );
  spec.y2Title = trans.__('coherence γ²');
  spec.traces.push({
    name: trans.__('bound −10·log₁₀(1 − γ²)'),
    kind: 'line',
    x: coh.frequency,
    y: bound,
    color: 1,
    dash: 'dash'
  });
  spec.traces.push({
    name: trans.__('achieved 10·log₁₀(PSD_d / PSD_e)'),
    kind: 'line',
    x: coh.frequency,
    y: achieved,
    color: 0
  });
  spec.traces.push({
    name: trans.__('γ²(f) of x and d'),
    kind: 'line',
    x: coh.frequency,
    y: coh.coherence,
    color: 2,
    lower: true
  });
  spec.note = trans.__(
    'γ²(f): magnitude-squared coherence of %1 and %2. A linear filter of x can take at most −10·log₁₀(1 − γ²) dB off d at each frequency (drawn up to %3 dB); the run took 10·log₁₀(PSD_d/PSD_e). Welch estimates: Hann window, %4-sample segments, 50 % overlap, mean removed per segment.',
    use === 'cancellation'
      ? trans.__('the reference x')
      : use === 'removal'
        ? trans.__('the reference channel x')
        : trans.__('the input x'),
    use === 'cancellation'
      ? trans.__('the primary d')
      : use === 'removal'
        ? trans.__('the signal d')
        : trans.__('the desired d'),
    BOUND_CAP_DB,
    coh.nperseg
  );
  if (coh.segments < 8) {
    spec.note +=
      ' ' +
      trans.__(
        'Only %1 segments were averaged: with few segments γ² is biased towards 1.',
        coh.segments
      );
  }
  return spec;
}

/** The segment length of a spectrogram of n samples: 256, or n/8 rounded down to a power of 2. */
export function spectrogramSegment(n: number): number {
  let p = 16;
  while (p * 2 <= Math.min(256, n / 8)) {
    p *= 2;
  }
  return Math.min(p, n);
}

async function spectrogramView(
  trans: Trans,
  run: Run,
  o: ViewOptions,
  s: PlotSettings,
  compute: PlotCompute
): Promise<PlotSpec> {
  const before = beforeOf(run);
  const after =
    run.params.tool === 'adaptive'
      ? { array: need(run, 'error'), name: 'error e(n)' }
      : { array: need(run, 'output'), name: 'output' };
  const pick = o.spectrogramOf === 'before' && before ? before : after;
  const sig = rowIn(pick.array, o.row);
  const fs = rate(run);
  const nperseg = spectrogramSegment(sig.n);
  const r: SpectrogramResult = await compute.spectrogram(
    view(sig),
    {
      fs: fs ?? 1,
      nperseg,
      order: 'ascending',
      scaling: fs !== null ? 'density' : 'spectrum'
    },
    s.spectrogramColumns
  );
  const z = new Float64Array(r.sxx.length);
  let top = -Infinity;
  for (let i = 0; i < z.length; i++) {
    z[i] = 10 * Math.log10(r.sxx[i]);
    if (z[i] > top && Number.isFinite(z[i])) {
      top = z[i];
    }
  }
  if (!Number.isFinite(top)) {
    top = 0;
  }
  const lo = top - SPECTROGRAM_RANGE_DB;
  for (let i = 0; i < z.length; i++) {
    // −∞ (a silent segment) and NaN are drawn at the bottom of the range.
    if (!(z[i] >= lo)) {
      z[i] = lo;
    }
  }
  const t = timeAxis(trans, fs);
  const f = frequencyAxis(trans, fs);
  const spec = emptySpec(
    trans.__('Spectrogram of %1', trans.__(pick.name)),
    t.title,
    t.unit,
    f.title
  );
  spec.heatmap = {
    name: trans.__(pick.name),
    x: r.time,
    y: r.frequency,
    z,
    rows: r.rows,
    cols: r.cols,
    zTitle: fs !== null ? trans.__('power (dB/Hz)') : trans.__('power per bin (dB)'),
    zRange: [lo, top]
  };
  const group = Math.ceil(r.segments / r.cols);
  spec.note = trans.__(
    'Short-time power of %1: Tukey window (α = 0.25), %2-sample segments overlapping by %3, mean removed per segment; %4. Colours span the top %5 dB.',
    trans.__(pick.name),
    r.nperseg,
    r.noverlap,
    group > 1
      ? trans.__(
          '%1 segments in all, averaged %2 neighbours per column into %3 columns',
          r.segments,
          group,
          r.cols
        )
      : trans.__('one column per segment (%1)', r.segments),
    SPECTROGRAM_RANGE_DB
  );
  return spec;
}
