/**
 * The inner loops allocate nothing: in a child Node process started with --trace-gc, the M4
 * envelope of 2e6 samples (real, strided complex magnitude) into caller buffers, and Welch's PSD,
 * the cross-spectrum and the spectrogram of 1e6 samples (whose per-call allocations are a few
 * result and work arrays, not per-sample) show no scavenge (young-generation collection) between
 * the start and the end of the timed call. V8 prints one line per collection with --trace-gc,
 * "Scavenge" for the young generation (Node.js documentation, command-line options); a boxed
 * double per sample would fill the young generation many times over. Warm-up first, and V8 run
 * with synchronous optimisation (as test/core/filters/no-allocation.test.ts explains); a minor
 * collection right before the timed call starts it with an empty young generation.
 */
import { runCoreInChild } from './child';

const CHILD = `
const { m4Envelope, m4EnvelopeAbs, welch, csd, spectrogram } = require('./core/dsp');
const { Rng } = require('./helpers');
const rng = new Rng(7200);
const N = 2000000;
const x = rng.gaussArray(N);
const z = rng.gaussArray(N / 2, true);
const xo = new Float64Array(4000), yo = new Float64Array(4000);
const y = x.subarray(0, 1000000);
const cases = {
  envelope: () => m4Envelope(x, 1, 0, 0, N, 1000, xo, yo),
  'envelope strided': () => m4Envelope(x, 2, 1, 0, N / 2, 1000, xo, yo),
  'envelope |z|': () => m4EnvelopeAbs(z, 1, 0, 0, N / 2, 1000, xo, yo),
  welch: () => welch(y, { nperseg: 4096 }).psd[3],
  'welch complex': () => welch(z.subarray(0, 1000000), { complex: true, nperseg: 1024 }).psd[3],
  csd: () => csd(y, x.subarray(1000000), { nperseg: 1024 }).csd[3],
  spectrogram: () => spectrogram(y, { nperseg: 256 }).sxx[3]
};
for (const [name, fn] of Object.entries(cases)) {
  for (let k = 0; k < 5; k++) fn();
  // a full collection throws away optimised code that referred to objects that died; warm up
  // again, then empty the young generation (a minor collection) so the trace starts clean
  global.gc();
  for (let k = 0; k < 2; k++) fn();
  global.gc({ type: 'minor' });
  console.log('BEGIN ' + name);
  fn();
  console.log('END ' + name);
}
`;

test('envelope, welch, csd and spectrogram trigger no scavenge (child Node with --trace-gc)', () => {
  const stdout = runCoreInChild(CHILD, [
    '--trace-gc',
    '--expose-gc',
    '--no-concurrent-recompilation',
    '--no-lazy-feedback-allocation'
  ]);
  const lines = stdout.split('\n');
  let inside = '';
  let runs = 0;
  const offending: string[] = [];
  for (const line of lines) {
    if (line.startsWith('BEGIN ')) {
      inside = line.slice(6);
    } else if (line.startsWith('END ')) {
      inside = '';
      runs++;
    } else if (inside && /Scavenge/.test(line)) {
      offending.push(`${inside}: ${line.trim()}`);
    }
  }
  expect(runs).toBe(7);
  // the trace is on: the forced gc() before each run shows up
  expect(lines.some(l => /Mark-Compact|Mark-sweep|Mark-Sweep/.test(l))).toBe(true);
  expect(offending).toEqual([]);
});
