/**
 * Live cross-check against SciPy 1.17 in the project's venv (.venv/bin/python, resolved from the
 * repository root; scripts/fixtures/gen_spectra.py `live`): seeded random signals, given to
 * Perpend as strided views (non-unit and negative strides, offsets inside a larger buffer) and
 * to SciPy as contiguous copies, with random window, nperseg, noverlap, nfft, detrend, scaling,
 * sidedness and averaging. Tolerance: error ≤ 1e-10 relative to the spectrum's maximum (the
 * issue's). If the venv is missing the test fails with a message saying how to create it.
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as path from 'path';
import {
  coherence,
  csd,
  spectrogram,
  welch,
  type SignalView,
  type WindowName
} from '../../../src/core/dsp';
import { Rng } from '../filters/helpers';
import { decode, encode, relToMax, type CaseParams, type Enc } from './spectra-helpers';

const root = path.resolve(__dirname, '../../..');
const python = path.join(root, '.venv', 'bin', 'python');

/** A random signal (tones + noise + offset + trend) as a strided view and as a contiguous copy. */
function randomSignal(
  rng: Rng,
  n: number,
  complex: boolean
): { view: SignalView; copy: Float64Array } {
  const W = complex ? 2 : 1;
  const copy = rng.gaussArray(n, complex);
  const f0 = rng.uniform() * 0.5;
  for (let i = 0; i < n; i++) {
    copy[W * i] += 2 * Math.cos(2 * Math.PI * f0 * i) + 0.5 + 1e-3 * i;
    if (complex) {
      copy[W * i + 1] += 2 * Math.sin(2 * Math.PI * f0 * i) - 0.25;
    }
  }
  const stride = [1, 2, 3, -1, -2][rng.u32() % 5];
  const pad = rng.u32() % 4;
  const span = (n - 1) * Math.abs(stride) + 1;
  const data = new Float64Array((span + pad) * W).fill(NaN);
  const offset = stride > 0 ? pad : (n - 1) * -stride + pad;
  for (let k = 0; k < n; k++) {
    for (let q = 0; q < W; q++) {
      data[W * (offset + k * stride) + q] = copy[W * k + q];
    }
  }
  return { view: { data, complex, n, stride, offset }, copy };
}

test('SciPy live cross-check: welch, csd, coherence, spectrogram on strided views, random parameters', () => {
  if (!fs.existsSync(python)) {
    throw new Error(
      `SciPy cross-check needs the project's Python at ${path.relative(root, python)}: ` +
        'create it with `python3 -m venv .venv && .venv/bin/pip install --retries 0 numpy scipy`'
    );
  }
  const rng = new Rng(20261212);
  const windows: WindowName[] = ['boxcar', 'hann', 'hamming', 'blackman', 'flattop', 'tukey'];
  const fns = ['welch', 'csd', 'coherence', 'spectrogram'] as const;
  const cases: { fn: string; x: Enc; y?: Enc; params: CaseParams }[] = [];
  const ours: { fn: string; views: SignalView[]; params: CaseParams }[] = [];
  for (let t = 0; t < 48; t++) {
    const fn = fns[t % 4];
    const complex = rng.uniform() < 0.4;
    const n = 200 + (rng.u32() % 1400);
    const nperseg = 8 + (rng.u32() % Math.min(300, n - 8));
    const pow = Math.max(2, 2 ** Math.ceil(Math.log2(nperseg)));
    const params: CaseParams = {
      window: {
        name: windows[rng.u32() % windows.length],
        alpha: 0.1 + 0.8 * rng.uniform(),
        symmetric: rng.uniform() < 0.3
      },
      nperseg,
      noverlap: rng.u32() % nperseg,
      nfft: pow * (rng.uniform() < 0.3 ? 2 : 1),
      detrend: (['constant', 'linear', 'none'] as const)[rng.u32() % 3],
      onesided: complex ? false : rng.uniform() < 0.8,
      scaling: rng.uniform() < 0.5 ? 'density' : 'spectrum',
      fs: [1, 1000, 44100, 0.5][rng.u32() % 4]
    };
    if (fn === 'welch' || fn === 'csd') {
      params.average = rng.uniform() < 0.3 ? 'median' : 'mean';
    }
    const a = randomSignal(rng, n, complex);
    const views = [a.view];
    const c: { fn: string; x: Enc; y?: Enc; params: CaseParams } = {
      fn,
      x: encode(a.copy, complex),
      params
    };
    if (fn === 'csd' || fn === 'coherence') {
      const b = randomSignal(rng, n, complex);
      // y correlated with x: x plus its own noise
      for (let k = 0; k < b.copy.length; k++) {
        b.copy[k] = 0.5 * b.copy[k] + a.copy[k];
      }
      const W = complex ? 2 : 1;
      for (let k = 0; k < n; k++) {
        for (let q = 0; q < W; q++) {
          b.view.data[W * (b.view.offset! + k * b.view.stride!) + q] = b.copy[W * k + q];
        }
      }
      views.push(b.view);
      c.y = encode(b.copy, complex);
    }
    cases.push(c);
    ours.push({ fn, views, params });
  }
  const run = spawnSync(python, [path.join(root, 'scripts/fixtures/gen_spectra.py'), 'live'], {
    input: JSON.stringify(cases),
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024
  });
  if (run.status !== 0) {
    throw new Error(`SciPy cross-check failed to run: ${run.stderr}`);
  }
  const ref = JSON.parse(run.stdout) as {
    frequency: number[];
    psd?: number[];
    csd?: Enc;
    coherence?: number[];
    sxx?: number[];
    time?: number[];
  }[];
  const worst: Record<string, number> = {};
  ours.forEach(({ fn, views, params }, i) => {
    const r = ref[i];
    const o = { ...params, window: params.window as never };
    let e: number;
    if (fn === 'welch') {
      const p = welch(views[0], o);
      e = relToMax(p.psd, r.psd!);
      expect(relToMax(p.frequency, r.frequency)).toBeLessThan(1e-14);
    } else if (fn === 'csd') {
      const p = csd(views[0], views[1], o);
      const d = decode(r.csd!);
      const refc = d.complex
        ? d.data
        : Float64Array.from(p.csd, (_, k) => (k % 2 ? 0 : d.data[k >> 1]));
      e = relToMax(p.csd, refc, true);
    } else if (fn === 'coherence') {
      // scipy.signal.coherence has no sidedness, scaling or averaging argument
      const { scaling: _s, average: _a, onesided: _o, ...rest } = o;
      const p = coherence(views[0], views[1], rest);
      // where P_xx or P_yy is at rounding level the ratio is 0/0 in both programs (the DC bin
      // of a boxcar window after the mean is removed): such bins are left out
      const pxx = welch(views[0], { ...rest, scaling: 'density' }).psd;
      const pyy = welch(views[1], { ...rest, scaling: 'density' }).psd;
      const mx = Math.max(...pxx, ...pyy);
      const keep = (_: number, k: number) => pxx[k] > 1e-20 * mx && pyy[k] > 1e-20 * mx;
      e = relToMax(p.coherence.filter(keep), r.coherence!.filter(keep));
    } else {
      const p = spectrogram(views[0], o);
      e = relToMax(p.sxx, r.sxx!);
      expect(relToMax(p.time, r.time!)).toBeLessThan(1e-14);
    }
    const tag = `${fn}${views[0].complex ? ' (complex)' : ''}`;
    worst[tag] = Math.max(worst[tag] ?? 0, e);
    if (!(e < 1e-10)) {
      console.log(JSON.stringify({ fn, params, n: views[0].n, stride: views[0].stride, e }));
    }
    expect(e).toBeLessThan(1e-10);
  });
  console.log(
    `SciPy live spectral cross-check: ${ours.length} seeded cases, max error relative to the maximum ${JSON.stringify(worst)}`
  );
});
