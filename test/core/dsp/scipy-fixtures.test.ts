/**
 * Spectral estimates against SciPy 1.17 (fixtures from scripts/fixtures/gen_spectra.py, seed in
 * the file): scipy.signal.get_window, welch, csd, coherence, spectrogram on seeded real and complex
 * signals with the same window, nperseg, noverlap, nfft, detrend, scaling and sidedness. The
 * tolerance is the issue's: error ≤ 1e-10 relative to the spectrum's maximum. The worst residual
 * of each function is printed.
 */
import * as fs from 'fs';
import * as path from 'path';
import {
  coherence,
  csd,
  getWindow,
  spectrogram,
  welch,
  type WindowSpec
} from '../../../src/core/dsp';
import { decode, relToMax, type CaseParams, type Enc } from './spectra-helpers';

const root = path.resolve(__dirname, '../../..');
const fx = JSON.parse(
  fs.readFileSync(path.join(root, 'test/fixtures/dsp/scipy_spectra.json'), 'utf8')
) as {
  seed: number;
  scipy: string;
  signals: Record<string, Enc>;
  windows: { spec: WindowSpec; m: number; w: number[] }[];
  cases: {
    fn: 'welch' | 'csd' | 'coherence' | 'spectrogram';
    x: string;
    y: string | null;
    params: CaseParams;
    result: {
      frequency: number[];
      psd?: number[];
      csd?: Enc;
      coherence?: number[];
      sxx?: number[];
      time?: number[];
      rows?: number;
      cols?: number;
      nfft: number;
    };
  }[];
};

const worst: Record<string, number> = {};
const note = (k: string, v: number) => (worst[k] = Math.max(worst[k] ?? 0, v));
afterAll(() =>
  console.log(
    `SciPy spectral fixtures (max error relative to the maximum): ${JSON.stringify(worst)}`
  )
);

function signal(name: string): { data: Float64Array; complex: boolean } {
  if (name === 'x1500') {
    const x = decode(fx.signals.x);
    return { data: x.data.slice(0, 1500), complex: false };
  }
  return decode(fx.signals[name]);
}

test('fixture provenance', () => {
  expect(fx.seed).toBe(20261211);
  expect(fx.scipy).toMatch(/^1\.17/);
  expect(fx.cases.length).toBe(28);
});

test('windows match scipy.signal.get_window (periodic and symmetric)', () => {
  for (const c of fx.windows) {
    const w = getWindow(c.spec, c.m);
    expect(w.length).toBe(c.m);
    // direct formula against direct formula: rounding only (windows peak at 1: absolute error)
    for (let i = 0; i < c.m; i++) {
      expect(Math.abs(w[i] - c.w[i])).toBeLessThan(1e-15);
      note('get_window (absolute)', Math.abs(w[i] - c.w[i]));
    }
  }
});

test('welch, csd, coherence and spectrogram match SciPy within 1e-10 of the maximum', () => {
  for (const c of fx.cases) {
    const x = signal(c.x);
    const p = c.params;
    const opts = { ...p, window: p.window as WindowSpec | undefined, nfft: c.result.nfft };
    const tag = `${c.fn}${x.complex ? ' (complex)' : ''}`;
    if (c.fn === 'welch') {
      const r = welch({ data: x.data, complex: x.complex }, opts);
      expect(r.nfft).toBe(c.result.nfft);
      const e = relToMax(r.psd, c.result.psd!);
      expect(e).toBeLessThan(1e-10);
      note(tag, e);
      expect(relToMax(r.frequency, c.result.frequency)).toBeLessThan(1e-14);
    } else if (c.fn === 'csd') {
      const y = signal(c.y!);
      const r = csd(
        { data: x.data, complex: x.complex },
        { data: y.data, complex: y.complex },
        opts
      );
      const ref = decode(c.result.csd!);
      // SciPy returns a real array's imaginary part too: compare as complex
      const e = relToMax(r.csd, ref.complex ? ref.data : interleaveReal(ref.data), true);
      expect(e).toBeLessThan(1e-10);
      note(`${tag}${y.complex && !x.complex ? ' real×complex' : ''}`, e);
      expect(relToMax(r.frequency, c.result.frequency)).toBeLessThan(1e-14);
    } else if (c.fn === 'coherence') {
      const y = signal(c.y!);
      const r = coherence(
        { data: x.data, complex: x.complex },
        { data: y.data, complex: y.complex },
        opts
      );
      const e = relToMax(r.coherence, c.result.coherence!);
      expect(e).toBeLessThan(1e-10);
      note(tag, e);
      expect(relToMax(r.frequency, c.result.frequency)).toBeLessThan(1e-14);
    } else {
      const r = spectrogram({ data: x.data, complex: x.complex }, opts);
      expect([r.rows, r.cols]).toEqual([c.result.rows, c.result.cols]);
      const e = relToMax(r.sxx, c.result.sxx!);
      expect(e).toBeLessThan(1e-10);
      note(tag, e);
      expect(relToMax(r.time, c.result.time!)).toBeLessThan(1e-14);
      expect(relToMax(r.frequency, c.result.frequency)).toBeLessThan(1e-14);
    }
  }
});

function interleaveReal(re: Float64Array): Float64Array {
  const d = new Float64Array(2 * re.length);
  for (let i = 0; i < re.length; i++) {
    d[2 * i] = re[i];
  }
  return d;
}
