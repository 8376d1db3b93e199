/**
 * No allocation per sample: a 1e6-sample run in a child Node process started with --trace-gc
 * shows no scavenge (young-generation collection) between the start and the end of the run.
 * V8 prints one line per collection with --trace-gc, "Scavenge" for the young generation
 * (Node.js documentation, command-line options). The filter is first warmed up on 40 chunks
 * of 5,000 samples (so the kernel runs optimised, as it does in steady streaming), then the
 * 1e6-sample chunk runs with caller-supplied output buffers. Data: white input through a fixed
 * FIR plus noise (seeded). One fresh process per case, and V8 run with synchronous optimisation
 * and feedback from the first call (--no-concurrent-recompilation, --no-lazy-feedback-allocation):
 * on this shared 2-core machine, concurrent compilation otherwise lands late and the first part
 * of a chunk runs in the unoptimised tiers, which box every double — that measures the JIT's
 * scheduling, not the kernels.
 */
import { runInChild } from './helpers';

const CHILD = `
const { createFilter } = require('./core/filters');
const { Rng } = require('./helpers');
const N = 1000000, M = 8;
const cases = JSON.parse(process.argv[2]);
if (cases.length > 1) {
  // one fresh process per case, as a worker runs one filter: the kernels stay monomorphic
  const { spawnSync } = require('child_process');
  for (const c of cases) {
    const r = spawnSync(process.execPath, [...process.execArgv, __filename, JSON.stringify([c])], { encoding: 'utf8' });
    process.stdout.write(r.stdout);
  }
  process.exit(0);
}
for (const c of cases) {
  const W = c.complex ? 2 : 1;
  const A = c.precision === 'float32' ? Float32Array : Float64Array;
  const rng = new Rng(7100);
  const x = new A(rng.gaussArray(N * W));
  const d = new A(N * W);
  for (let i = 0; i < N * W; i++) { d[i] = 0.5 * x[i] + (i >= W ? 0.25 * x[i - W] : 0) + 1e-3 * rng.gauss(); }
  const out = { y: new A(N * W), e: new A(N * W), ePost: new A(N * W), gamma: new A(N),
    trajectory: new Float64Array(0), trajectoryIndex: new Float64Array(0) };
  const f = createFilter({ ...c, taps: M, lambda: 0.999, delta: 0.01, mu: c.algorithm === 'lms' ? 0.01 : 0.5 });
  const C = 5000 * W;
  for (let k = 0; k < 40; k++) { f.process(x.subarray(k * C, (k + 1) * C), d.subarray(k * C, (k + 1) * C), out); }
  global.gc();
  console.log('BEGIN ' + JSON.stringify(c));
  f.process(x, d, out);
  console.log('END ' + JSON.stringify(c) + ' ' + f.health().status);
}
`;

test('a 1e6-sample run triggers no scavenge (child Node with --trace-gc)', () => {
  const cases = [
    ...['qr-rls', 'inverse-qr-rls', 'rls', 'nlms', 'lms'].map(algorithm => ({ algorithm })),
    { algorithm: 'qr-rls', complex: true },
    { algorithm: 'inverse-qr-rls', complex: true },
    { algorithm: 'rls', complex: true },
    { algorithm: 'lms', complex: true },
    { algorithm: 'qr-rls', precision: 'float32' },
    { algorithm: 'nlms', precision: 'float32', complex: true }
  ];
  const stdout = runInChild(
    CHILD,
    [JSON.stringify(cases)],
    ['--trace-gc', '--expose-gc', '--no-concurrent-recompilation', '--no-lazy-feedback-allocation']
  );
  const lines = stdout.split('\n');
  let inside = '';
  let runs = 0;
  const offending: string[] = [];
  for (const line of lines) {
    if (line.startsWith('BEGIN ')) {
      inside = line.slice(6);
    } else if (line.startsWith('END ')) {
      expect(line).toMatch(/ ok$/);
      inside = '';
      runs++;
    } else if (inside && /Scavenge/.test(line)) {
      offending.push(`${inside}: ${line.trim()}`);
    }
  }
  expect(runs).toBe(cases.length);
  // the trace is on: the forced gc() before each run shows up
  expect(lines.some(l => /Mark-Compact|Mark-sweep|Mark-Sweep/.test(l))).toBe(true);
  expect(offending).toEqual([]);
});
