/**
 * LoadedArraysModel: the hum-removal result against NumPy's least-squares projection
 * (y = x − B·lstsq(B, x), numpy.linalg.lstsq documentation), text parsing with truncation, and
 * failures that keep what was loaded.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { humUnavailable, LoadedArraysModel } from '../../src/model/loaded';
import type { SourcesModel } from '../../src/model/sources';

// The model reports background failures with console.error; keep the test output readable.
beforeEach(() => {
  jest.spyOn(console, 'error').mockImplementation(() => undefined);
});
afterEach(() => {
  jest.restoreAllMocks();
});

const PY = path.resolve(__dirname, '../..', '.venv', 'bin', 'python');

function numpyDehum(): { x: number[]; y: number[]; suppressionDb: number } {
  const code = `
import json, numpy as np

rng = np.random.default_rng(3)
fs, f0, K, N = 1000.0, 50.0, 3, 2000
t = np.arange(N) / fs
x = 0.1 * rng.standard_normal((2, N)) + np.sin(2*np.pi*f0*t + 0.4) + 0.3*np.cos(2*np.pi*3*f0*t)
B = np.column_stack([f(2*np.pi*k*f0*t) for k in range(1, K+1) for f in (np.cos, np.sin)])
coef, *_ = np.linalg.lstsq(B, x.T, rcond=None)
y = x - (B @ coef).T
print(json.dumps({"x": x.ravel().tolist(), "y": y.ravel().tolist(),
                  "suppressionDb": float(10*np.log10(np.sum(x**2)/np.sum(y**2)))}))
`;
  const r = spawnSync(PY, ['-c', code], { encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) {
    throw new Error(`NumPy reference failed (run scripts/setup.sh for .venv): ${r.stderr}`);
  }
  return JSON.parse(r.stdout);
}

test('hum removal matches the least-squares projection NumPy computes', () => {
  const ref = numpyDehum();
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = model.loadFromText(
    'x',
    JSON.stringify([ref.x.slice(0, 2000), ref.x.slice(2000)]),
    'application/json'
  );
  expect(item).not.toBeNull();
  const out = model.removeHum(item!.id, { f0: 50, fs: 1000, harmonics: 3 });
  expect(out).not.toBeNull();
  expect(out!.array.shape).toEqual([2, 2000]);
  let maxErr = 0;
  out!.array.data.forEach((v, i) => (maxErr = Math.max(maxErr, Math.abs(v - ref.y[i]))));
  // Both are backward stable projections of O(1) data: agreement to ~1e-13 (κ(B) ≈ 1 here).
  expect(maxErr).toBeLessThan(1e-12);
  expect(out!.notes.join(' ')).toContain(`Suppression ${ref.suppressionDb.toFixed(1)} dB`);
  expect(model.items).toHaveLength(2);
});

test('a truncated numpy repr is loaded with a note that values are missing', () => {
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = model.loadFromText(
    'Out[3]',
    'array([ 0.1,  0.2,  0.3, ...,  0.7,  0.8,  0.9], shape=(1000,))'
  );
  expect(item?.truncated).toBe(true);
  expect(item?.notes.join(' ')).toMatch(/truncated.*shape \(1000\)/);
});

test('failures keep what was loaded and say what went wrong', async () => {
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = model.loadFromText('v', '[1, 2, 3]')!;
  expect(model.loadFromText('bad', 'hello world')).toBeNull();
  expect(model.status).toBe('error');
  expect(model.message).toMatch(/Could not read an array from bad/);
  expect(model.removeHum(item.id, { f0: 300, fs: 1000, harmonics: 2 })).toBeNull();
  expect(model.message).toMatch(/Nyquist/);
  expect(await model.writeBack(item.id, 'y')).toBeNull();
  expect(model.message).toMatch(/no kernel/);
  expect(model.items.map(i => i.label)).toEqual(['v']);
});

test('notes given with parsed text are kept (e.g. that the output is not in the cache)', () => {
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = model.loadFromText('cell 3 output', '[1.5, 2.5]', undefined, ['pick the variable']);
  expect(item?.notes).toContain('pick the variable');
  expect(Array.from(item!.array.data)).toEqual([1.5, 2.5]);
});

/** A bridge stand-in that serves one cell result, or fails to (the real bridge: integration). */
function fakeBridge(read: () => Promise<Float64Array>) {
  return {
    activity: { state: 'idle' },
    activityChanged: { connect: () => true, disconnect: () => true },
    readArray: async () => ({ data: await read(), shape: [3], complex: false, dtype: 'float32' })
  } as unknown as SourcesModel.IBridge;
}

test('an output of this session is read from the kernel at full precision', async () => {
  const bridge = fakeBridge(async () => new Float64Array([0.1, 0.2, 0.30000001192092896]));
  const model = new LoadedArraysModel({ bridge: () => bridge });
  const item = await model.loadOutput(
    {
      cellId: 'c',
      cellIndex: 2,
      type: 'execute_result',
      executionCount: 5,
      data: { 'text/plain': 'array([0.1, 0.2, 0.3], dtype=float32)' }
    },
    () => true
  );
  expect(item?.origin).toBe('kernel');
  expect(item?.label).toBe('Out[5]');
  expect(item?.array.dtype).toBe('float32'); // the source dtype is kept for display
  expect(item?.array.data[2]).toBe(0.30000001192092896);
});

test('when the kernel read fails the output is parsed from its text, and says so', async () => {
  const bridge = fakeBridge(async () => {
    throw new Error('stale count');
  });
  const model = new LoadedArraysModel({ bridge: () => bridge });
  const item = await model.loadOutput(
    {
      cellId: 'c',
      cellIndex: 2,
      type: 'execute_result',
      executionCount: 5,
      data: { 'text/plain': 'array([1.5, 2.5])' }
    },
    () => true
  );
  expect(item?.origin).toBe('output-text');
  expect(item?.label).toBe('Out[5] (text)');
  expect(item?.notes.join(' ')).toMatch(/Parsed from the output's text/);
});

test('a stream output is refused with a reason and nothing is added', async () => {
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = await model.loadOutput(
    {
      cellId: 'c',
      cellIndex: 1,
      type: 'stream',
      executionCount: null,
      data: { 'text/plain': '[1]' }
    },
    () => true
  );
  expect(item).toBeNull();
  expect(model.message).toMatch(/cannot hold an array/);
  expect(model.items).toHaveLength(0);
});

test('a complex array says why hum removal is unavailable for it', () => {
  const model = new LoadedArraysModel({ bridge: () => null });
  const real = model.loadFromText('r', '[1.0, 2.0]')!;
  const cplx = model.loadFromText('z', 'array([1.+2.j, 3.-1.j])')!;
  expect(cplx.array.complex).toBe(true);
  expect(humUnavailable(real)).toBeNull();
  expect(humUnavailable(cplx)).toMatch(
    /z is complex; hum removal with real harmonics needs a real signal/
  );
  expect(model.removeHum(cplx.id, { f0: 50, fs: 1000, harmonics: 2 })).toBeNull();
  expect(model.message).toMatch(/needs a real signal/);
});

test("each harmonic's figure is its own: the demo's hum amplitudes 0.8/k come out in order", () => {
  // The demo's hum (demo/build_demo_notebook.py): Σ 0.8/k·sin(2π·k·50·t + 0.3k), k = 1..5, at
  // fs = 4000 Hz over 32000 samples, plus a 737 Hz tone of amplitude 0.05. Every frequency sits on
  // a DFT bin, so the pairs are orthogonal and harmonic k carries (0.8/k)²·N/2 of the energy
  // (the energy of a sampled sinusoid over whole periods; common practice).
  const N = 32000;
  const fs = 4000;
  const x: number[] = [];
  for (let n = 0; n < N; n++) {
    let v = 0.05 * Math.sin((2 * Math.PI * 737 * n) / fs);
    for (let k = 1; k <= 5; k++) {
      v += (0.8 / k) * Math.sin((2 * Math.PI * k * 50 * n) / fs + 0.3 * k);
    }
    x.push(v);
  }
  const energy = x.reduce((a, v) => a + v * v, 0);
  const model = new LoadedArraysModel({ bridge: () => null });
  const item = model.loadFromText('primary', JSON.stringify(x), 'application/json')!;
  const out = model.removeHum(item.id, { f0: 50, fs, harmonics: 5 })!;
  const line = out.notes.find(n => n.startsWith('Share of the input energy per harmonic'))!;
  for (let k = 1; k <= 5; k++) {
    const expected = 10 * Math.log10(((0.8 / k) ** 2 * N) / 2 / energy);
    const label = (k * 50).toPrecision(4).replace('.', '\\.');
    const shown = Number(new RegExp(`[: ]${label} Hz: (-?[\\d.]+) dB`).exec(line)?.[1]);
    // Shown to 0.1 dB.
    expect(Math.abs(shown - expected)).toBeLessThan(0.051);
  }
});
