/**
 * Named inputs through the pool and the real worker entry in a Node worker thread
 * (protocol ArrayData.held, src/worker/held-arrays.ts): a worker that does not hold a job's
 * named inputs asks for them once, a later job naming them runs on what it kept without asking,
 * and for each of the adaptive filter's configurations the results are bit for bit those of the
 * same spec sent with its values (so no job writes into the inputs it was lent: a second run on
 * the kept values would differ). Also: no way to send the values fails the job with the reason,
 * a cancel while the page is sending them ends the job cancelled and the worker goes on, and a
 * budget of 0 keeps nothing. No timing is asserted.
 */
import * as fs from 'fs';
import * as path from 'path';
import { runFilter } from '../../src/core';
import { WorkerPool, type JobOutcome } from '../../src/worker/pool';
import type {
  AdaptiveFilterResult,
  AdaptiveFilterSpec,
  ArrayData,
  FilterConfiguration
} from '../../src/worker/protocol';
import { Rng } from '../core/filters/helpers';
import { buildNodeWorker, nodeTransport } from './node-worker';

let shim: string;
const pools: WorkerPool[] = [];

beforeAll(() => {
  shim = buildNodeWorker(`held-${process.pid}`);
});

afterAll(() => {
  fs.rmSync(path.dirname(shim), { recursive: true, force: true });
});

afterEach(() => {
  for (const p of pools.splice(0)) {
    p.dispose();
  }
});

function pool(holdBytesPerWorker = 1 << 24): WorkerPool {
  const p = new WorkerPool({
    size: 1,
    createTransport: () => nodeTransport(shim),
    holdBytesPerWorker
  });
  pools.push(p);
  return p;
}

function done(o: JobOutcome): AdaptiveFilterResult {
  if (o.status !== 'done') {
    throw new Error(`expected a result, got ${JSON.stringify(o)}`);
  }
  return o.result as AdaptiveFilterResult;
}

/** Values by name: what a page would copy for the worker. */
type Values = Record<string, { data: Float64Array; shape: number[] }>;

/** The same configuration with its arrays sent as values, or as names alone. */
type Build = (arr: (name: string) => ArrayData) => FilterConfiguration;

function withValues(values: Values): (name: string) => ArrayData {
  return name => ({
    data: values[name].data.slice(),
    shape: values[name].shape,
    complex: false
  });
}

function byName(values: Values): (name: string) => ArrayData {
  return name => ({
    data: new Float64Array(0),
    shape: values[name].shape,
    complex: false,
    held: `test-${name}`
  });
}

function supplier(values: Values, asked: string[][]) {
  return async (names: string[]): Promise<Record<string, Float64Array>> => {
    asked.push([...names].sort());
    const out: Record<string, Float64Array> = {};
    for (const n of names) {
      out[n] = values[n.replace(/^test-/, '')].data.slice();
    }
    return out;
  };
}

const filterSpec = (configuration: FilterConfiguration): AdaptiveFilterSpec => ({
  kind: 'adaptive-filter',
  configuration,
  algorithm: 'qr-rls',
  taps: 6,
  lambda: 0.995,
  chunkSize: 700
});

function scenario(N: number, seed: number): Values {
  const rng = new Rng(seed);
  const x = rng.gaussArray(N);
  const d = new Float64Array(N);
  const s = new Float64Array(N);
  const r = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    d[n] = 0.7 * x[n] - (n > 0 ? 0.2 * x[n - 1] : 0) + 0.05 * rng.gauss();
    s[n] = rng.gauss() < 0 ? -1 : 1;
    r[n] = s[n] + (n > 0 ? 0.35 * s[n - 1] : 0) + 0.05 * rng.gauss();
  }
  const x2 = rng.gaussArray(3 * N);
  const d2 = x2.map((v, i) => 0.5 * v + (0.01 * i) / N);
  return {
    x: { data: x, shape: [N] },
    d: { data: d, shape: [N] },
    s: { data: s, shape: [N] },
    r: { data: r, shape: [N] },
    x2: { data: x2, shape: [3, N] },
    d2: { data: d2, shape: [3, N] }
  };
}

const CONFIGURATIONS: Array<[string, Build]> = [
  [
    'system identification',
    a => ({ kind: 'system-identification', input: a('x'), output: a('d') })
  ],
  ['noise cancellation', a => ({ kind: 'noise-cancellation', reference: a('x'), primary: a('d') })],
  [
    'noise cancellation, 3 trials (K×N)',
    a => ({ kind: 'noise-cancellation', reference: a('x2'), primary: a('d2') })
  ],
  ['linear prediction, delay 2', a => ({ kind: 'linear-prediction', signal: a('x'), delay: 2 })],
  [
    // training and symbols are the same values under one name, as the page sends them
    'equalization, decision-directed after 400 symbols',
    a => ({
      kind: 'equalization',
      received: a('r'),
      training: a('s'),
      delay: 1,
      trainingLength: 400,
      decisionDirected: true,
      constellation: 'bpsk',
      symbols: a('s')
    })
  ]
];

test.each(CONFIGURATIONS)(
  '%s: asked once, then run on the kept inputs, bit for bit as with the values sent',
  async (_label, build) => {
    const values = scenario(3000, 21);
    const p = pool();
    const plain = done(await p.run(filterSpec(build(withValues(values)))).outcome);
    const asked: string[][] = [];
    const supply = supplier(values, asked);
    const first = done(await p.run(filterSpec(build(byName(values))), { supply }).outcome);
    const second = done(await p.run(filterSpec(build(byName(values))), { supply }).outcome);
    expect(asked).toHaveLength(1);
    for (const r of [first, second]) {
      expect(r.output.data).toEqual(plain.output.data);
      expect(r.error.data).toEqual(plain.error.data);
      expect(r.weights.data).toEqual(plain.weights.data);
      expect(r.figures).toEqual(plain.figures);
    }
  }
);

test('the kept run equals a direct call of the core (noise cancellation)', async () => {
  const values = scenario(4000, 22);
  const p = pool();
  const build = CONFIGURATIONS[1][1];
  const asked: string[][] = [];
  await p.run(filterSpec(build(byName(values))), { supply: supplier(values, asked) }).outcome;
  const r = done(
    await p.run(
      { ...filterSpec(build(byName(values))), lambda: 0.999 },
      { supply: supplier(values, asked) }
    ).outcome
  );
  expect(asked).toEqual([['test-d', 'test-x']]);
  const ref = runFilter(values.x.data, values.d.data, {
    algorithm: 'qr-rls',
    taps: 6,
    lambda: 0.999
  });
  expect(r.output.data).toEqual(ref.y);
  expect(r.error.data).toEqual(ref.e);
  expect(r.weights.data).toEqual(ref.weights);
});

test('a budget of 0 keeps nothing: every job asks again', async () => {
  const values = scenario(1000, 23);
  const p = pool(0);
  const asked: string[][] = [];
  const build = CONFIGURATIONS[0][1];
  for (let i = 0; i < 2; i++) {
    done(
      await p.run(filterSpec(build(byName(values))), { supply: supplier(values, asked) }).outcome
    );
  }
  expect(asked).toEqual([
    ['test-d', 'test-x'],
    ['test-d', 'test-x']
  ]);
});

test('named inputs with nothing to send them fail the job with the reason; the worker goes on', async () => {
  const values = scenario(1000, 24);
  const p = pool();
  const build = CONFIGURATIONS[0][1];
  const o = await p.run(filterSpec(build(byName(values)))).outcome;
  expect(o).toMatchObject({ status: 'failed' });
  expect((o as { reason: string }).reason).toMatch(
    /the worker does not hold test-x, test-d and nothing can send them/
  );
  done(await p.run(filterSpec(build(withValues(values)))).outcome);
});

test('a cancel while the page sends the inputs ends the job cancelled; the worker goes on', async () => {
  const values = scenario(1000, 25);
  const p = pool();
  const build = CONFIGURATIONS[1][1];
  let fail!: (e: Error) => void;
  let asked = 0;
  const h = p.run(filterSpec(build(byName(values))), {
    supply: () => {
      asked++;
      // the page's copy stops at the cancel (pool-runner.ts: CopyCancelled)
      return new Promise((_, reject) => (fail = reject));
    }
  });
  while (asked === 0) {
    await new Promise(r => setTimeout(r, 5));
  }
  h.cancel();
  fail(new Error('cancelled'));
  expect(await h.outcome).toEqual({ status: 'cancelled', done: 0 });
  const again: string[][] = [];
  done(await p.run(filterSpec(build(byName(values))), { supply: supplier(values, again) }).outcome);
  expect(again).toHaveLength(1);
});
