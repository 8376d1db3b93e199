// The views of a run: which exist, their series, axes with units and marker lines. Numbers come
// from the core; the checks here name the fact each relies on.
import { welch } from '../../../src/core';
import { DEFAULT_PLOT_SETTINGS } from '../../../src/panel/plots/settings';
import {
  buildView,
  DEFAULT_VIEW_OPTIONS,
  defaultSmoothing,
  frequencyAxis,
  parseTaps,
  rowsOf,
  spectrumRequests,
  spectrumSpec,
  timeAxis,
  viewsOf
} from '../../../src/panel/plots/views';
import { cancellationRun, makeRun, removal, trans, vec } from './fixtures';
import { cancellation } from '../../model/workbench/fixtures';

const S = DEFAULT_PLOT_SETTINGS;
const O = DEFAULT_VIEW_OPTIONS;

describe('axes', () => {
  test('seconds and hertz when the sample rate is known, samples and cycles/sample otherwise', () => {
    expect(timeAxis(trans, 8000)).toEqual({ dx: 1 / 8000, title: 'time (s)', unit: 's' });
    expect(timeAxis(trans, null)).toEqual({ dx: 1, title: 'sample n', unit: 'samples' });
    expect(frequencyAxis(trans, 8000)).toEqual({
      scale: 8000,
      title: 'frequency (Hz)',
      unit: 'Hz'
    });
    expect(frequencyAxis(trans, null).unit).toBe('cycles/sample');
  });
});

describe('which views a run has', () => {
  test('an adaptive filter run: signals, learning curve, response, trajectories, spectrum', () => {
    expect(viewsOf(cancellationRun(2000, 1000))).toEqual([
      'signals',
      'learning',
      'response',
      'trajectories',
      'spectrum',
      'cancellation',
      'spectrogram'
    ]);
  });
  test('a run without results has none; a removal has signals, spectrum and energy', () => {
    expect(viewsOf(makeRun(cancellation(), { status: 'running' }))).toEqual([]);
    const r = makeRun(removal(), {
      arrays: { output: vec(new Float64Array(8)) },
      inputs: { signal: vec(new Float64Array(8)) },
      figures: [{ key: 'dir:50 Hz', label: 'energy along 50 Hz', value: -3, unit: 'dB' }]
    });
    expect(viewsOf(r)).toEqual(['signals', 'spectrum', 'spectrogram', 'energy']);
  });
  test('a complex equalizer adds its constellation', () => {
    const y = new Float64Array(20);
    const r = makeRun(cancellation({ use: 'equalization', trainingLength: 4 }), {
      arrays: {
        output: vec(y, true),
        error: vec(y, true),
        learningCurve: vec(new Float64Array(10))
      },
      inputs: { x: vec(y, true) }
    });
    expect(viewsOf(r)).toContain('constellation');
    const spec = buildView(trans, r, 'constellation', O, S);
    expect(spec.traces.map(t => [t.name, t.y.length])).toEqual([
      ['training (n < 4)', 4],
      ['decision-directed', 6]
    ]);
    expect(spec.equalAxes).toBe(true);
  });
});

describe('signals', () => {
  test('primary, output and error over time in seconds', () => {
    const spec = buildView(trans, cancellationRun(2000, 1000), 'signals', O, S);
    expect(spec.lines.map(l => l.name)).toEqual(['primary d(n)', 'output y(n)', 'error e(n)']);
    expect(spec.lines.every(l => l.dx === 1e-3)).toBe(true);
    expect(spec.xTitle).toBe('time (s)');
    expect(spec.y2Title).toBeUndefined();
  });
  test('complex signals on two axes, as magnitude/phase or real/imaginary', () => {
    const z = new Float64Array(40);
    const r = makeRun(cancellation(), {
      arrays: { output: vec(z, true), error: vec(z, true) },
      inputs: { d: vec(z, true), x: vec(z, true) }
    });
    const polar = buildView(trans, r, 'signals', O, S);
    expect(polar.lines.map(l => l.part)).toEqual(['abs', 'phase', 'abs', 'phase', 'abs', 'phase']);
    expect([polar.yTitle, polar.y2Title]).toEqual(['magnitude', 'phase (rad)']);
    const cart = buildView(trans, r, 'signals', { ...O, complexAs: 'cartesian' }, S);
    expect(cart.lines.map(l => l.part).slice(0, 2)).toEqual(['real', 'imag']);
    expect(cart.lines[1].lower).toBe(true);
  });
  test('a removal draws the input against what the projection left', () => {
    const r = makeRun(removal(), {
      arrays: { output: vec(new Float64Array(8)) },
      inputs: { signal: vec(new Float64Array(8)) }
    });
    expect(buildView(trans, r, 'signals', O, S).lines.map(l => l.name)).toEqual([
      'input x',
      'with the subspace removed'
    ]);
  });
});

describe('learning curve', () => {
  test('smoothed |e|² in dB with steady state, convergence and minimum MSE marked', () => {
    const run = cancellationRun(2000, 1000);
    const spec = buildView(trans, run, 'learning', { ...O, smoothing: 10 }, S);
    const line = spec.lines[spec.lines.length - 1];
    expect(line.db).toBe(true);
    // trailing moving average of 10 (the core's movingAverage): sample 20 is the mean of 11…20
    const lc = run.arrays.learningCurve.data;
    let s = 0;
    for (let k = 11; k <= 20; k++) {
      s += lc[k];
    }
    expect(line.signal.data[20]).toBeCloseTo(s / 10, 14);
    expect(spec.markers).toEqual([
      { orientation: 'h', value: -21.5, label: 'steady state -21.5 dB', color: 2 },
      { orientation: 'v', value: 0.5, label: 'converged at 0.5 s', color: 1 },
      { orientation: 'h', value: -20, label: 'minimum MSE -20 dB', color: 3 }
    ]);
    expect(spec.yTitle).toBe('squared error (dB)');
  });
  test('by default the curve the figures were read off, as the worker smoothed it', () => {
    const run = cancellationRun(2000, 1000);
    const pre = vec(new Float64Array(2000).fill(0.25));
    const r2 = {
      ...run,
      arrays: { ...run.arrays, learningCurveSmoothed: pre },
      figures: [...run.figures, { key: 'smoothingWindow', label: '', value: 40, unit: 'samples' }]
    };
    const spec = buildView(trans, r2, 'learning', O, S);
    const line = spec.lines[spec.lines.length - 1];
    expect(line.signal.data).toBe(pre.data);
    expect(line.name).toBe('|e(n)|², smoothed over 40 samples');
    // another window asked for: smoothed here from the raw curve
    const other = buildView(trans, r2, 'learning', { ...O, smoothing: 10 }, S);
    expect(other.lines[other.lines.length - 1].signal.data).not.toBe(pre.data);
  });
  test('the 95 % band is drawn as a filled pair when the run has one', () => {
    const run = cancellationRun(100, null);
    const band = vec(new Float64Array(100).fill(1));
    const r2 = {
      ...run,
      arrays: { ...run.arrays, learningCurveLower: band, learningCurveUpper: band }
    };
    const spec = buildView(trans, r2, 'learning', O, S);
    expect(spec.lines.map(l => [l.fill === true, l.noLegend === true])).toEqual([
      [false, true],
      [true, false],
      [false, false]
    ]);
    expect(spec.markers[1].label).toBe('converged at n = 500');
  });
  test('default smoothing is about 1 % of the length, 1 … 1000', () => {
    expect(defaultSmoothing(50)).toBe(1);
    expect(defaultSmoothing(20000)).toBe(200);
    expect(defaultSmoothing(1e7)).toBe(1000);
  });
});

describe('weights', () => {
  test('response of w = [1, 1]: |H(e^jω)| = 2|cos(ω/2)|, in Hz (Oppenheim and Schafer, 3rd ed., §5.1)', () => {
    const run = cancellationRun(100, 1000);
    const spec = buildView(trans, run, 'response', O, { ...S, responsePoints: 8 });
    const [mag, phase] = spec.traces;
    expect(phase.lower).toBe(true);
    for (let k = 0; k < 8; k++) {
      const f = (k / 16) * 1000; // ω = πk/8 → f = ω/2π·fs
      expect(mag.x[k]).toBeCloseTo(f, 10);
      const w = (Math.PI * k) / 8;
      expect(mag.y[k]).toBeCloseTo(20 * Math.log10(2 * Math.abs(Math.cos(w / 2))), 10);
    }
    expect(spec.xTitle).toBe('frequency (Hz)');
  });
  test('trajectories of chosen taps at the kept sample indices', () => {
    const run = cancellationRun(100, 10);
    const spec = buildView(trans, run, 'trajectories', { ...O, taps: [1, 3, 9] }, S);
    expect(spec.lines.map(l => l.name)).toEqual(['w1', 'w3']);
    expect(spec.lines[0].signal).toMatchObject({ n: 5, stride: 4, offset: 1 });
    expect(Array.from(spec.lines[0].xTable ?? [])).toEqual([0, 1, 2, 3, 4]);
  });
  test('tap lists are parsed with a reason when wrong', () => {
    expect(parseTaps('0, 3 3,7', 8)).toEqual({ taps: [0, 3, 7] });
    expect(parseTaps('8', 8)).toEqual({
      error: '"8" is not a tap: give whole numbers from 0 to 7, separated by commas'
    });
    expect(parseTaps('1.5', 8)).toHaveProperty('error');
    expect(parseTaps(' ', 8)).toEqual({ error: 'give at least one tap' });
  });
});

describe('spectrum', () => {
  test('Welch PSD before and after, peak at the tone, harmonics marked', () => {
    // A 100 Hz tone at fs = 1000 Hz peaks in the bin at 100 Hz (common practice).
    const N = 4096;
    const x = new Float64Array(N);
    for (let n = 0; n < N; n++) {
      x[n] = Math.sin((2 * Math.PI * 100 * n) / 1000);
    }
    const r = makeRun(removal(), {
      fs: 1000,
      arrays: { output: vec(new Float64Array(N).fill(0.001)) },
      inputs: { signal: vec(x) }
    });
    const spec = buildView(trans, r, 'spectrum', O, { ...S, welchSegment: 1000 });
    expect(spec.yTitle).toBe('PSD (dB/Hz)');
    const [before] = spec.traces;
    let best = 0;
    for (let k = 1; k < before.y.length; k++) {
      if (before.y[k] > before.y[best]) {
        best = k;
      }
    }
    expect(before.x[best]).toBeCloseTo(100, 0);
    expect(spec.markers.map(m => m.value)).toEqual([50, 100, 150]);
    expect(spec.note).toMatch(/1000-sample segments/);
  });
  test('the estimates can be computed elsewhere (a worker) and give the same view', () => {
    const run = cancellationRun(3000, 1000);
    const req = spectrumRequests(trans, run, { ...S, welchSegment: 256 });
    expect(req.map(r => [r.name, r.options.nperseg, r.options.scaling, r.signal.n])).toEqual([
      ['primary d(n)', 256, 'density', 3000],
      ['error e(n)', 256, 'density', 3000]
    ]);
    const fromRequests = spectrumSpec(
      trans,
      run,
      req,
      req.map(r => welch(r.signal, r.options))
    );
    expect(fromRequests).toEqual(buildView(trans, run, 'spectrum', O, { ...S, welchSegment: 256 }));
  });
  test('without a sample rate: power per bin in dB against cycles/sample', () => {
    const r = makeRun(removal(), {
      arrays: { output: vec(new Float64Array(64).fill(1)) },
      inputs: { signal: vec(new Float64Array(64).fill(1)) }
    });
    const spec = buildView(trans, r, 'spectrum', O, S);
    expect(spec.yTitle).toBe('power per bin (dB)');
    expect(spec.xUnit).toBe('cycles/sample');
  });
});

describe('energy per direction', () => {
  test('bars from the figures dir:<label>, in dB', () => {
    const r = makeRun(removal(), {
      figures: [
        { key: 'dir:50 Hz', label: '', value: -3, unit: 'dB' },
        { key: 'keptShare', label: '', value: 42.5, unit: '%' },
        { key: 'dir:100 Hz', label: '', value: -12, unit: 'dB' }
      ]
    });
    const spec = buildView(trans, r, 'energy', O, S);
    expect(spec.traces[0].x).toEqual(['50 Hz', '100 Hz']);
    expect(Array.from(spec.traces[0].y)).toEqual([-3, -12]);
    expect(spec.yTitle).toBe('share of the input energy (dB)');
    expect(spec.note).toBe('Share of the signal kept: 42.5 %.');
    expect(spec.traces).toHaveLength(1); // no after-figures: the input's bars alone
  });

  test('beside each bar what is left in the output, a numerical zero at the floor said so', () => {
    const r = makeRun(removal(), {
      figures: [
        { key: 'dir:50 Hz', label: '', value: -3, unit: 'dB' },
        { key: 'after:50 Hz', label: '', value: -150, unit: 'dB' },
        { key: 'dir:100 Hz', label: '', value: -12, unit: 'dB' },
        { key: 'after:100 Hz', label: '', value: -150, unit: 'dB' }
      ]
    });
    const spec = buildView(trans, r, 'energy', O, S);
    expect(spec.traces.map(t => t.name)).toEqual(['in the input', 'left in the output']);
    expect(Array.from(spec.traces[1].y)).toEqual([-150, -150]);
    expect(spec.note).toContain('Bars at -150 dB: nothing left along that direction');
  });
});

describe('rows of K×N results (trials or channels)', () => {
  // Two trials of 3 samples, M = 2 taps, trajectories of 2 kept rows per trial.
  const e = vec(Float64Array.from([1, 2, 3, 10, 20, 30]), false, [2, 3]);
  const run = makeRun(cancellation({ taps: 2 }), {
    arrays: {
      error: e,
      output: e,
      weights: vec(Float64Array.from([1, 0, 0, 1]), false, [2, 2]),
      trajectory: vec(Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8]), false, [2, 2, 2]),
      trajectoryIndex: vec(Float64Array.from([0, 1]))
    },
    inputs: { d: vec(Float64Array.from([5, 5, 5])) }
  });

  test('the run has as many rows as its largest K×N array', () => {
    expect(rowsOf(run)).toBe(2);
    expect(rowsOf(cancellationRun(10, null))).toBe(1);
  });
  test('signals: the chosen row of the results beside the 1-D input', () => {
    const spec = buildView(trans, run, 'signals', { ...O, row: 1 }, S);
    expect(spec.lines.map(l => l.signal.offset)).toEqual([0, 3, 3]);
    expect(spec.note).toBe('Row 2 of the results (trial or channel).');
  });
  test('weights and trajectories of the chosen row', () => {
    // w = [0, 1]: H(e^{jω}) = e^{−jω}, |H| = 1 (0 dB) everywhere (Oppenheim and Schafer, §5.1)
    const r = buildView(trans, run, 'response', { ...O, row: 1 }, { ...S, responsePoints: 4 });
    expect(Array.from(r.traces[0].y).every(v => Math.abs(v) < 1e-12)).toBe(true);
    const t = buildView(trans, run, 'trajectories', { ...O, row: 1, taps: [1] }, S);
    expect(t.lines[0].signal).toMatchObject({ n: 2, stride: 2, offset: 5 });
  });
});

describe('weights response against a known true response', () => {
  test('the true response h = (1, 0.5) dashed over the weights: |H| = 1.5 at 0, 0.5 at Nyquist', () => {
    // H(e^{jω}) = 1 + 0.5·e^{−jω} (Oppenheim and Schafer, 3rd ed., §5.1): |H(0)| = 1.5, |H(π)| = 0.5
    const run = cancellationRun(2000, 1000, {
      inputs: {
        x: vec(new Float64Array(2000)),
        d: vec(new Float64Array(2000)),
        truth: { ...vec(Float64Array.from([1, 0.5])), description: 'path' }
      },
      figures: [{ key: 'misalignmentDb', label: 'misalignment', value: -31.25, unit: 'dB' }]
    });
    const spec = buildView(trans, run, 'response', O, S);
    expect(spec.traces.map(t => [t.name, t.dash ?? 'solid', t.lower ?? false])).toEqual([
      ['|H|', 'solid', false],
      ['arg H', 'solid', true],
      ['|H| true', 'dash', false],
      ['arg H true', 'dash', true]
    ]);
    const true_ = spec.traces[2].y;
    expect(true_[0]).toBeCloseTo(20 * Math.log10(1.5), 10);
    expect(true_[true_.length - 1]).toBeCloseTo(20 * Math.log10(0.5), 10);
    expect(spec.note).toBe(
      'Dashed: the true response path (2 taps); misalignment of the weights -31.3 dB.'
    );
  });
});
