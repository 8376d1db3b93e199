// The views computed through the PlotCompute seam (cancellation bound, spectrogram, spectrum)
// and the beam pattern: their series, axes with units and notes, and numbers checked against
// closed forms named beside each check.
import { coherence, welch } from '../../../src/core';
import { mainThreadCompute, type PlotCompute } from '../../../src/panel/plots/compute';
import {
  BOUND_CAP_DB,
  computeView,
  spectrogramSegment
} from '../../../src/panel/plots/computed-views';
import { buildView, DEFAULT_VIEW_OPTIONS, viewsOf } from '../../../src/panel/plots/views';
import { DEFAULT_PLOT_SETTINGS } from '../../../src/panel/plots/settings';
import { cancellation, variable } from '../../model/workbench/fixtures';
import { makeRun, removal, rng, trans, vec } from './fixtures';

const S = DEFAULT_PLOT_SETTINGS;
const O = DEFAULT_VIEW_OPTIONS;

/** Standard normal samples by Box–Muller (common practice) from the seeded generator. */
function gauss(n: number, seed: number): Float64Array {
  const u = rng(seed);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    out[i] = Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  }
  return out;
}

/** A PlotCompute that runs the core and counts what it was asked (the seam is really used). */
function counting(): { compute: PlotCompute; calls: string[] } {
  const calls: string[] = [];
  return {
    calls,
    compute: {
      welch: (s, o) => {
        calls.push('welch');
        return mainThreadCompute.welch(s, o);
      },
      coherence: (x, y, o) => {
        calls.push('coherence');
        return mainThreadCompute.coherence(x, y, o);
      },
      spectrogram: (s, o, m) => {
        calls.push(`spectrogram:${m}`);
        return mainThreadCompute.spectrogram(s, o, m);
      }
    }
  };
}

/**
 * x white (unit variance), d = x + n with n white of variance σ² independent of x, e = n (a
 * perfect canceller): γ² = 1/(1 + σ²) at every frequency (coherence of a linear system with
 * output noise; Bendat and Piersol, Random Data, 4th ed., §9.2, from memory), so the bound is
 * −10·log₁₀(σ²/(1 + σ²)) dB and the achieved cancellation 10·log₁₀((1 + σ²)/σ²) — the same.
 */
function whiteRun(N: number, sigma2: number, fs: number | null) {
  const x = gauss(N, 3);
  const n = gauss(N, 4);
  const d = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    n[i] *= Math.sqrt(sigma2);
    d[i] = x[i] + n[i];
  }
  return makeRun(cancellation(), {
    fs,
    arrays: { error: vec(n), output: vec(x), learningCurve: vec(new Float64Array(N)) },
    inputs: { x: vec(x), d: vec(d) }
  });
}

describe('which runs have the new views', () => {
  test('cancellation and identification get the bound; prediction does not', () => {
    const run = whiteRun(1024, 0.25, 1000);
    expect(viewsOf(run)).toEqual(expect.arrayContaining(['cancellation', 'spectrogram']));
    const pred = makeRun(cancellation({ use: 'prediction', d: null }), {
      arrays: run.arrays,
      inputs: { x: run.inputs.x }
    });
    expect(viewsOf(pred)).not.toContain('cancellation');
    const ident = makeRun(cancellation({ use: 'identification' }), {
      arrays: run.arrays,
      inputs: run.inputs
    });
    expect(viewsOf(ident)).toContain('cancellation');
  });
  test('only an array removal has a beam pattern', () => {
    const r = makeRun(removal(), {
      arrays: { output: vec(new Float64Array(8)) },
      inputs: { signal: vec(new Float64Array(8)) }
    });
    expect(viewsOf(r)).not.toContain('beam');
  });
});

describe('cancellation bound', () => {
  test('white x, d = x + noise: bound and achieved both near 10·log₁₀((1 + σ²)/σ²)', async () => {
    const sigma2 = 0.25;
    const run = whiteRun(1 << 16, sigma2, 4000);
    const { compute, calls } = counting();
    const spec = await computeView(trans, run, 'cancellation', O, S, compute);
    expect(calls.sort()).toEqual(['coherence', 'welch', 'welch']);
    expect(spec.xTitle).toBe('frequency (Hz)');
    expect(spec.yTitle).toBe('cancellation (dB)');
    expect(spec.y2Title).toBe('coherence γ²');
    const [bound, achieved, coh] = spec.traces;
    expect(bound.name).toBe('bound −10·log₁₀(1 − γ²)');
    expect(coh.lower).toBe(true);
    const expected = 10 * Math.log10((1 + sigma2) / sigma2); // 6.99 dB
    const mean = (a: ArrayLike<number>): number => {
      let s = 0;
      for (let i = 1; i < a.length - 1; i++) {
        s += a[i];
      }
      return s / (a.length - 2);
    };
    // 127 segments of 1024 samples: the estimates scatter by a few tenths of a dB per bin; their
    // mean over the bins (DC and Nyquist left out) lies well within 0.3 dB.
    expect(Math.abs(mean(bound.y) - expected)).toBeLessThan(0.3);
    expect(Math.abs(mean(achieved.y) - expected)).toBeLessThan(0.3);
    // The numbers are the core's: γ² of x and d with the spectrum view's segments.
    const c = coherence(run.inputs.x.data, run.inputs.d.data, { fs: 4000, nperseg: 1024 });
    expect(coh.y[100]).toBeCloseTo(c.coherence[100], 14);
    expect(bound.y[100]).toBeCloseTo(-10 * Math.log10(1 - c.coherence[100]), 10);
    const pd = welch(run.inputs.d.data, { fs: 4000, nperseg: 1024 });
    const pe = welch(run.arrays.error.data, { fs: 4000, nperseg: 1024 });
    expect(achieved.y[100]).toBeCloseTo(10 * Math.log10(pd.psd[100] / pe.psd[100]), 10);
    expect(spec.note).toMatch(/magnitude-squared coherence of the reference x and the primary d/);
    expect(spec.note).toMatch(/1024-sample segments/);
  });
  test('γ² = 1 (d a copy of x) is drawn at the cap, not at infinity', async () => {
    const run = whiteRun(4096, 0, null);
    const spec = await computeView(trans, run, 'cancellation', O, S, mainThreadCompute);
    expect(Math.max(...Array.from(spec.traces[0].y))).toBeCloseTo(BOUND_CAP_DB, 6);
    expect(spec.xTitle).toBe('frequency (cycles/sample)');
  });
});

describe('spectrogram', () => {
  test('a 1e6-sample run draws at most the settings’ columns; a tone switch shows in time', async () => {
    const N = 1_000_000;
    const fs = 1000;
    const x = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      x[i] = Math.sin((2 * Math.PI * (i < N / 2 ? 100 : 300) * i) / fs);
    }
    const run = makeRun(cancellation(), {
      fs,
      arrays: { error: vec(new Float64Array(N)), output: vec(x) },
      inputs: { x: vec(x), d: vec(x) }
    });
    const { compute, calls } = counting();
    const spec = await computeView(trans, run, 'spectrogram', O, S, compute);
    expect(calls).toEqual([`spectrogram:${S.spectrogramColumns}`]);
    const h = spec.heatmap!;
    expect(h.cols).toBeLessThanOrEqual(S.spectrogramColumns);
    expect(h.rows).toBe(129); // nperseg 256, one-sided: 256/2 + 1 rows
    expect(h.z.length).toBe(h.rows * h.cols);
    expect(spec.xTitle).toBe('time (s)');
    expect(spec.yTitle).toBe('frequency (Hz)');
    expect(h.zTitle).toBe('power (dB/Hz)');
    expect(h.x[h.cols - 1]).toBeLessThan(N / fs);
    // The strongest row of an early and a late column: 100 Hz, then 300 Hz (fs/256 = 3.9 Hz bins).
    const peak = (c: number): number => {
      let best = 0;
      for (let i = 1; i < h.rows; i++) {
        if (h.z[i * h.cols + c] > h.z[best * h.cols + c]) {
          best = i;
        }
      }
      return h.y[best];
    };
    expect(Math.abs(peak(10) - 100)).toBeLessThan(4);
    expect(Math.abs(peak(h.cols - 10) - 300)).toBeLessThan(4);
    expect(h.zRange[1] - h.zRange[0]).toBe(80);
    expect(spec.title).toBe('Spectrogram of primary d(n)');
    expect(spec.note).toMatch(/256-sample segments overlapping by 32/);
    // ⌊(1e6 − 32)/224⌋ = 4464 segments (SciPy's count), 12 per column → 372 columns
    expect(spec.note).toMatch(
      /4464 segments in all, averaged 12 neighbours per column into 372 columns/
    );
  });
  test('the selector picks the signal after; the segment follows short signals', async () => {
    const run = whiteRun(2048, 0.25, null);
    const spec = await computeView(
      trans,
      run,
      'spectrogram',
      { ...O, spectrogramOf: 'after' },
      S,
      mainThreadCompute
    );
    expect(spec.title).toBe('Spectrogram of error e(n)');
    expect(spec.xTitle).toBe('sample n');
    expect(spec.heatmap!.zTitle).toBe('power per bin (dB)');
    expect(spectrogramSegment(2048)).toBe(256);
    expect(spectrogramSegment(1000)).toBe(64);
    expect(spectrogramSegment(40)).toBe(16);
  });
});

describe('beam pattern', () => {
  test('the demo array (8 elements, d/λ = 0.5, jammer at 35°): a null there, 1 − D²/M² elsewhere', () => {
    const M = 8;
    const run = makeRun(
      removal({
        signal: { ...variable('sensors', [M, 2000]), layout: { samplesAxis: 1, rows: 'channels' } },
        basis: { kind: 'array', directions: [35], units: 'degrees', spacing: 0.5, wavelength: 1 }
      }),
      {
        arrays: { output: vec(new Float64Array(4 * M), true, [M, 2]) },
        inputs: { signal: vec(new Float64Array(4 * M), true, [M, 2]) }
      }
    );
    expect(viewsOf(run)).toContain('beam');
    const spec = buildView(trans, run, 'beam', O, S);
    expect(spec.xTitle).toBe('direction θ from broadside (°)');
    expect(spec.yTitle).toBe('power passed (dB)');
    expect(spec.markers.map(m => [m.value, m.label])).toEqual([[35, 'removed 35°']]);
    const t = spec.traces[0];
    const x = t.x as Float64Array;
    const at = (deg: number): number => t.y[x.findIndex(v => Math.abs(v - deg) < 1e-9)];
    expect(at(35)).toBe(-100); // the null, at the floor
    // broadside: 1 − |a(35°)ᴴa(0)|²/M², the Dirichlet kernel sin²(Mψ/2)/sin²(ψ/2) with
    // ψ = π·sin 35° (common practice for a uniform line array)
    const psi = Math.PI * Math.sin((35 * Math.PI) / 180);
    const D2 = Math.sin((M * psi) / 2) ** 2 / Math.sin(psi / 2) ** 2;
    expect(at(0)).toBeCloseTo(10 * Math.log10(1 - D2 / (M * M)), 10);
    expect(spec.note).toMatch(/8-element line array with spacing d\/λ = 0.5/);
  });
  test('directions given as sines are marked at their angles', () => {
    const run = makeRun(
      removal({
        signal: { ...variable('s', [4, 100]), layout: { samplesAxis: 1, rows: 'channels' } },
        basis: { kind: 'array', directions: [0.5], units: 'sines', spacing: 0.5, wavelength: 1 },
        mode: 'onto'
      }),
      {
        arrays: { output: vec(new Float64Array(8), true, [4, 1]) },
        inputs: { signal: vec(new Float64Array(8), true, [4, 1]) }
      }
    );
    const spec = buildView(trans, run, 'beam', O, S);
    expect(spec.markers[0].value).toBeCloseTo(30, 10); // asin(0.5) = 30°
    expect(spec.markers[0].label).toBe('kept 30°');
  });
});

describe('cancellation bound of a removal by delayed copies of a reference', () => {
  test('reference, signal and output are x, d and e; other removals have no bound', async () => {
    const w = whiteRun(1 << 14, 0.25, 4000);
    const run = makeRun(
      removal({
        basis: { kind: 'reference', reference: variable('ref', [1 << 14]), copies: 4 }
      }),
      {
        fs: 4000,
        arrays: { output: w.arrays.error },
        inputs: { signal: w.inputs.d, 'basis.reference': w.inputs.x }
      }
    );
    expect(viewsOf(run)).toContain('cancellation');
    const spec = await computeView(trans, run, 'cancellation', O, S, mainThreadCompute);
    expect(spec.title).toBe('Cancellation: bound from the coherence, and achieved');
    expect(spec.note).toMatch(/coherence of the reference channel x and the signal d/);
    // the same white case as above: both near 10·log₁₀(1.25/0.25) = 6.99 dB at a middle bin
    const c = coherence(w.inputs.x.data, w.inputs.d.data, { fs: 4000, nperseg: 1024 });
    expect(spec.traces[0].y[200]).toBeCloseTo(-10 * Math.log10(1 - c.coherence[200]), 10);
    const onto = makeRun(
      removal({
        mode: 'onto',
        basis: { kind: 'reference', reference: variable('ref', [1 << 14]), copies: 4 }
      }),
      { arrays: run.arrays, inputs: run.inputs }
    );
    expect(viewsOf(onto)).not.toContain('cancellation');
  });
});
