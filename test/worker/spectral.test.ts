/**
 * The plots' spectral estimates computed in a worker (the real worker entry in a Node worker
 * thread): every Welch, coherence and spectrogram case of the SciPy 1.17 fixtures
 * (scripts/fixtures/gen_spectra.py: scipy.signal.welch, coherence, spectrogram on seeded real
 * and complex signals) within the issue's 1e-10 of the spectrum's maximum, strided rows of a
 * K×N result taken as they lie, the caller's arrays left untouched (copies are transferred),
 * a bad request failing with the core's sentence, and a plot's CSV made in the worker (RFC 4180).
 */
import * as fs from 'fs';
import * as path from 'path';
import type { WindowSpec } from '../../src/core/dsp';
import { csvText } from '../../src/worker/jobs/csv-text';
import { WorkerPool } from '../../src/worker/pool';
import { contiguousRow, workerSpectralCompute } from '../../src/worker/spectral-client';
import { decode, relToMax, type CaseParams, type Enc } from '../core/dsp/spectra-helpers';
import { buildNodeWorker, nodeTransport } from './node-worker';

const root = path.resolve(__dirname, '../..');
const fx = JSON.parse(
  fs.readFileSync(path.join(root, 'test/fixtures/dsp/scipy_spectra.json'), 'utf8')
) as {
  signals: Record<string, Enc>;
  cases: {
    fn: string;
    x: string;
    y: string | null;
    params: CaseParams;
    result: {
      frequency: number[];
      psd?: number[];
      coherence?: number[];
      sxx?: number[];
      rows?: number;
      cols?: number;
      nfft: number;
    };
  }[];
};

let shim: string;
let pool: WorkerPool;

beforeAll(() => {
  shim = buildNodeWorker(`spectral-${process.pid}`);
  pool = new WorkerPool({ size: 1, createTransport: () => nodeTransport(shim) });
});

afterAll(() => {
  pool.dispose();
  fs.rmSync(path.dirname(shim), { recursive: true, force: true });
});

function signal(name: string): { data: Float64Array; complex: boolean } {
  if (name === 'x1500') {
    return { data: decode(fx.signals.x).data.slice(0, 1500), complex: false };
  }
  return decode(fx.signals[name]);
}

test('Welch, coherence and spectrogram in the worker match SciPy within 1e-10 of the maximum', async () => {
  const compute = workerSpectralCompute(() => pool);
  let checked = 0;
  for (const c of fx.cases) {
    const x = signal(c.x);
    const before = x.data.slice();
    const opts = {
      ...c.params,
      window: c.params.window as WindowSpec | undefined,
      nfft: c.result.nfft
    };
    if (c.fn === 'welch') {
      const r = await compute.welch(x, opts);
      expect(relToMax(r.psd, c.result.psd!)).toBeLessThan(1e-10);
      expect(relToMax(r.frequency, c.result.frequency)).toBeLessThan(1e-14);
    } else if (c.fn === 'coherence') {
      const r = await compute.coherence(x, signal(c.y!), opts);
      expect(relToMax(r.coherence, c.result.coherence!)).toBeLessThan(1e-10);
    } else if (c.fn === 'spectrogram') {
      // more columns allowed than the estimate has: nothing pooled, SciPy's values as they are
      const r = await compute.spectrogram(x, opts, 1000);
      expect([r.rows, r.cols]).toEqual([c.result.rows, c.result.cols]);
      expect(relToMax(r.sxx, c.result.sxx!)).toBeLessThan(1e-10);
    } else {
      continue;
    }
    // the caller's signal is not moved to the worker (a copy is)
    expect(x.data).toEqual(before);
    checked++;
  }
  expect(checked).toBe(21); // 14 welch, 3 coherence, 4 spectrogram cases
});

test('a strided row of a K×N result is estimated as the row itself', async () => {
  const compute = workerSpectralCompute(() => pool);
  const x = signal('x');
  const n = x.data.length;
  // 3 × n, C order, the fixture's signal as row 1: a view with stride 1, offset n
  const k = new Float64Array(3 * n);
  k.set(x.data, n);
  const row = await compute.welch({ data: k, n, stride: 1, offset: n }, { nperseg: 128 });
  const direct = await compute.welch(x, { nperseg: 128 });
  expect(Array.from(row.psd)).toEqual(Array.from(direct.psd));
  // the same signal as every 3rd sample of an interleaving (stride 3)
  const s = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    s[3 * i + 2] = x.data[i];
  }
  expect(Array.from(contiguousRow('x', { data: s, n, stride: 3, offset: 2 }).data)).toEqual(
    Array.from(x.data)
  );
});

test('a bad request fails with the core’s sentence, and the worker goes on', async () => {
  const compute = workerSpectralCompute(() => pool);
  const x = signal('x');
  await expect(compute.welch(x, { nperseg: 0 })).rejects.toThrow(/nperseg/);
  const r = await compute.welch(x, { nperseg: 64 });
  expect(r.psd.length).toBe(33);
});

test('a plot’s CSV made in the worker: RFC 4180 text, the same as the page makes', async () => {
  const compute = workerSpectralCompute(() => pool);
  const columns = [
    { header: 'time (s)', values: Float64Array.from([0, 0.25, 0.5]) },
    { header: 'error e(n), "smoothed"', values: [1.5, null, -2e-300] },
    { header: 'label', values: ['a,b', 'line\nbreak', 'plain'] }
  ];
  const text = new TextDecoder().decode(await compute.csv(columns));
  // RFC 4180 §2: CRLF line ends; a field with a comma, a double quote or a line break is
  // enclosed in double quotes, a double quote inside doubled; an empty field for a missing value.
  expect(text).toBe(
    'time (s),"error e(n), ""smoothed""",label\r\n' +
      '0,1.5,"a,b"\r\n' +
      '0.25,,"line\nbreak"\r\n' +
      '0.5,-2e-300,plain\r\n'
  );
  expect(text).toBe(csvText(columns));
  // every double survives the round trip through its shortest decimal form
  const many = new Float64Array(1000).map((_, i) => Math.sin(i) * 10 ** ((i % 40) - 20));
  const back = new TextDecoder()
    .decode(await compute.csv([{ header: 'v', values: many }]))
    .trim()
    .split('\r\n')
    .slice(1)
    .map(Number);
  expect(back).toEqual(Array.from(many));
});
