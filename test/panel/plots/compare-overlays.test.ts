/**
 * Comparing runs by their spectra and their final weights' responses: the numbers drawn against
 * references from outside the project (SciPy's Welch estimate of the spectral fixtures; the
 * closed-form response of a two-tap averager), the legend naming each run, and the CSV and the
 * kernel record holding the plotted arrays.
 */
import * as fs from 'fs';
import * as path from 'path';
import { welch } from '../../../src/core';
import {
  compareResponseSpec,
  compareSpectrumRequests,
  compareSpectrumSpec,
  leftOutNote,
  responseRuns,
  spectrumRuns
} from '../../../src/panel/plots/compare-overlays';
import { figureCsv, plotColumns } from '../../../src/panel/plots/figure';
import { columnKey, plotRecord } from '../../../src/panel/plots/plot-record';
import { DEFAULT_PLOT_SETTINGS as S } from '../../../src/panel/plots/settings';
import type { Run } from '../../../src/model/workbench/runs';
import { cancellationRun, makeRun, removal, trans, vec } from './fixtures';

const root = path.resolve(__dirname, '../../..');
// SciPy 1.17 fixtures of scripts/fixtures/gen_spectra.py (seed in the file); its first Welch
// case is signal x with SciPy's defaults: Hann, nperseg 256, 50 % overlap, constant detrend,
// one-sided density at fs = 1.
const fx = JSON.parse(
  fs.readFileSync(path.join(root, 'test/fixtures/dsp/scipy_spectra.json'), 'utf8')
) as {
  signals: Record<string, { re: number[] }>;
  cases: { fn: string; x: string; params: Record<string, unknown>; result: { psd: number[] } }[];
};
const x = Float64Array.from(fx.signals.x.re);
const scipyPsd = fx.cases.find(
  c => c.fn === 'welch' && c.x === 'x' && Object.keys(c.params).length === 0
)!.result.psd;

/** A run whose error is `e` (the rest of a cancellation run around it). */
function withError(e: Float64Array, over: Partial<Run>): Run {
  const base = cancellationRun(e.length, 1, over);
  return { ...base, arrays: { ...base.arrays, error: vec(e) } };
}

describe('spectra overlaid', () => {
  const settings = { ...S, welchSegment: 256 };
  const a = withError(x, { id: 'a', label: 'RLS · M 4 · λ 0.99' });
  const half = x.map(v => v / 2);
  const b = withError(half, { id: 'b', label: 'NLMS · M 4 · μ 0.5' });

  test("each run's error as its own spectrum view estimates it, equal to SciPy's Welch", () => {
    const requests = compareSpectrumRequests(trans, [a, b], settings);
    expect(requests.map(r => r.name)).toEqual(['RLS · M 4 · λ 0.99', 'NLMS · M 4 · μ 0.5']);
    expect(requests[0].options).toMatchObject({ fs: 1, nperseg: 256, scaling: 'density' });
    const spec = compareSpectrumSpec(
      trans,
      [a, b],
      requests,
      requests.map(r => welch(r.signal, r.options))
    );
    expect(spec.yTitle).toBe('PSD (dB/Hz)');
    expect(spec.xTitle).toBe('frequency (Hz)');
    expect(spec.traces.map(t => t.name)).toEqual(['RLS · M 4 · λ 0.99', 'NLMS · M 4 · μ 0.5']);
    expect(spec.traces.map(t => t.color)).toEqual([0, 1]);
    // dB back to power, against SciPy to 1e-10 of the maximum (the spectra issue's tolerance).
    const max = Math.max(...scipyPsd);
    const y = spec.traces[0].y;
    expect(y.length).toBe(scipyPsd.length);
    for (let k = 0; k < y.length; k++) {
      expect(Math.abs(10 ** (y[k] / 10) - scipyPsd[k]) / max).toBeLessThan(1e-10);
    }
    // Half the amplitude is a quarter of the power: 10·log10(1/4) ≈ −6.02 dB at every bin.
    const y2 = spec.traces[1].y;
    for (let k = 1; k < y.length; k++) {
      expect(y2[k] - y[k]).toBeCloseTo(10 * Math.log10(0.25), 9);
    }
    expect(spec.note).toMatch(/256-sample segments/);
  });

  test('a removal run overlays its output; runs of other sample rates go per sample', () => {
    const r = makeRun(removal(), {
      id: 'c',
      label: 'remove 3 harmonics of 50 Hz',
      arrays: { output: vec(x) },
      inputs: { signal: vec(x) },
      fs: 1000
    });
    expect(spectrumRuns([a, r]).map(q => q.id)).toEqual(['a', 'c']);
    const requests = compareSpectrumRequests(trans, [a, r], settings);
    expect(requests.map(q => q.options)).toEqual([
      expect.objectContaining({ fs: 1, scaling: 'spectrum' }),
      expect.objectContaining({ fs: 1, scaling: 'spectrum' })
    ]);
    // The same samples give the same estimate whichever run they come from.
    expect(Array.from(requests[1].signal.data)).toEqual(Array.from(x));
    const spec = compareSpectrumSpec(
      trans,
      [a, r],
      requests,
      requests.map(q => welch(q.signal, q.options))
    );
    expect(spec.xTitle).toBe('frequency (cycles/sample)');
    expect(spec.yTitle).toBe('power per bin (dB)');
    expect(spec.note).toMatch(/different sample rates/);
  });
});

describe("final weights' responses overlaid", () => {
  // w = [1, 1]: H(e^jω) = 1 + e^(−jω) = 2 cos(ω/2) e^(−jω/2), so |H| = 2|cos(πf)| and
  // arg H = −πf for 0 ≤ f < 1/2 (the two-point moving sum; Oppenheim & Schafer, Discrete-Time
  // Signal Processing, 3rd ed., §2.6, the moving-average example — section from memory).
  const twoTap = cancellationRun(100, 1000, {
    id: 'a',
    label: 'LMS · M 2 · μ 0.01',
    arrays: { weights: vec(Float64Array.from([1, 1])) }
  });
  const other = cancellationRun(100, 1000, { id: 'b', label: 'RLS · M 4 · λ 0.99' });

  test('magnitude 20·log10(2|cos πf|) and phase −πf, in Hz at fs = 1000', () => {
    const spec = compareResponseSpec(trans, [twoTap, other], { ...S, responsePoints: 100 });
    expect(spec.xTitle).toBe('frequency (Hz)');
    expect(spec.yTitle).toBe('magnitude (dB)');
    expect(spec.y2Title).toBe('phase (rad)');
    const [mag, phase] = spec.traces;
    expect(mag.name).toBe('LMS · M 2 · μ 0.01');
    expect(phase.lower).toBe(true);
    expect(phase.noLegend).toBe(true);
    expect(mag.group).toBe(phase.group);
    expect(mag.x.length).toBe(101);
    expect(mag.x[100]).toBe(500);
    for (let k = 0; k < 100; k++) {
      const f = k / 200;
      expect(mag.x[k]).toBeCloseTo(f * 1000, 9);
      expect(mag.y[k]).toBeCloseTo(20 * Math.log10(2 * Math.abs(Math.cos(Math.PI * f))), 9);
      expect(phase.y[k]).toBeCloseTo(-Math.PI * f, 9);
    }
    // The second run in the next colour, its legend entry named by its label.
    expect(spec.traces.filter(t => !t.noLegend).map(t => [t.name, t.color])).toEqual([
      ['LMS · M 2 · μ 0.01', 0],
      ['RLS · M 4 · λ 0.99', 1]
    ]);
  });

  test('complex weights among them: every response over −fs/2 … fs/2', () => {
    // w = [1, j]: y(n) = wᴴu(n) makes h = conj(w) = [1, −j], so H = 1 − j e^(−jω) and
    // |H|² = 2 − 2 sin ω (direct expansion), zero at f = 1/4 (Haykin, Adaptive Filter Theory,
    // 4th ed., §5.1: the filter output is wᴴu; from memory).
    const cx = cancellationRun(100, 1000, {
      id: 'c',
      label: 'complex',
      arrays: { weights: vec(Float64Array.from([1, 0, 0, 1]), true) }
    });
    const spec = compareResponseSpec(trans, [twoTap, cx], { ...S, responsePoints: 200 });
    const mag = spec.traces.filter(t => !t.lower);
    expect(mag[0].x[0]).toBe(-500);
    expect(mag[1].x[200]).toBe(500);
    for (let k = 0; k <= 200; k++) {
      const f = -0.5 + k / 200;
      if (Math.abs(f - 0.25) > 1e-9) {
        expect(mag[1].y[k]).toBeCloseTo(10 * Math.log10(2 - 2 * Math.sin(2 * Math.PI * f)), 8);
      }
    }
    expect(responseRuns([twoTap, makeRun(removal())]).map(r => r.id)).toEqual(['a']);
  });
});

describe('the data of a plot, as CSV and as a record for the kernel', () => {
  const twoTap = cancellationRun(100, 1000, {
    id: 'a',
    label: 'LMS · M 2',
    arrays: { weights: vec(Float64Array.from([1, 1])) }
  });
  const spec = compareResponseSpec(trans, [twoTap], { ...S, responsePoints: 100 });

  test('CSV: headers with their units, the points of the visible range, values in full', () => {
    const text = figureCsv(spec, [100, 200], 1000);
    const lines = text.trimEnd().split('\r\n');
    expect(lines[0]).toBe(
      'frequency (Hz) · LMS · M 2,LMS · M 2 · magnitude (dB),frequency (Hz) · LMS · M 2,LMS · M 2 · phase (rad)'
    );
    // 100 … 200 Hz on a 5 Hz grid: 21 frequencies.
    expect(lines).toHaveLength(1 + 21);
    const mag = spec.traces[0];
    lines.slice(1).forEach((line, i) => {
      const [f, m, f2, p] = line.split(',').map(Number);
      expect(line.split(',')).toHaveLength(4);
      const k = 20 + i;
      expect(f).toBe(mag.x[k]);
      expect(f2).toBe(mag.x[k]);
      expect(m).toBe(mag.y[k]);
      expect(p).toBe(spec.traces[1].y[k]);
    });
    expect(() => figureCsv(spec, null, 100)).toThrow(/101 points .* at most 100 rows/);
  });

  test('the record holds the same columns as float64 arrays under identifiers', () => {
    const cols = plotColumns(spec, [100, 200], 1000);
    const rec = plotRecord(cols, {
      title: spec.title,
      xTitle: spec.xTitle,
      yTitle: spec.yTitle,
      y2Title: spec.y2Title,
      range: [100, 200]
    });
    expect(Object.keys(rec.arrays)).toEqual([
      'frequency_Hz_LMS_M_2',
      'LMS_M_2_magnitude_dB',
      'frequency_Hz_LMS_M_2_2',
      'LMS_M_2_phase_rad'
    ]);
    expect(rec.params.columns.LMS_M_2_magnitude_dB).toBe('LMS · M 2 · magnitude (dB)');
    expect(rec.params.x_range).toEqual([100, 200]);
    expect(Array.from(rec.arrays.LMS_M_2_magnitude_dB.data)).toEqual(
      Array.from(spec.traces[0].y).slice(20, 41)
    );
    expect(rec.arrays.frequency_Hz_LMS_M_2.shape).toEqual([21]);
  });

  test('keys: identifiers, never a keyword, a leading digit or "params"', () => {
    const none = new Set<string>();
    expect(columnKey('time (s)', none)).toBe('time_s');
    expect(columnKey('θ (°)', none)).toBe('c');
    expect(columnKey('3 dB', none)).toBe('c_3_dB');
    expect(columnKey('in', none)).toBe('in_');
    expect(columnKey('params', none)).toBe('params_');
    expect(columnKey('time (s)', new Set(['time_s', 'time_s_2']))).toBe('time_s_3');
  });

  test('text columns (bar categories) go into the parameters', () => {
    const rec = plotRecord(
      [
        { header: 'direction', values: ['50 Hz', '100 Hz'] },
        { header: 'energy share (dB)', values: Float64Array.from([-3, -9]) }
      ],
      { title: 't', xTitle: 'direction', yTitle: 'dB', range: null }
    );
    expect(Object.keys(rec.arrays)).toEqual(['energy_share_dB']);
    expect(rec.params.labels).toEqual({ direction: ['50 Hz', '100 Hz'] });
    expect(rec.params.x_range).toBeNull();
  });
});

test('the runs an overlay leaves out are named with the reason', () => {
  const a = cancellationRun(100, 1000, { id: 'a', label: 'RLS · M 4 · λ 0.99' });
  const r = makeRun(removal(), { id: 'c', label: 'remove 3 harmonics of 50 Hz' });
  expect(leftOutNote(trans, 'response', [a, r], responseRuns([a, r]))).toBe(
    'Left out, without final weights: remove 3 harmonics of 50 Hz.'
  );
  expect(leftOutNote(trans, 'response', [a], [a])).toBeNull();
});
