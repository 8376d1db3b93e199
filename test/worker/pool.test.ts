/**
 * The pool with the real worker entry in Node worker threads: ready handshake before any buffer
 * moves, progress from the core's chunks, cancel of a queued and of a running job, a worker that
 * dies mid-job (exit, uncaught error) failing its job and being replaced, the memory limit,
 * transfer of buffers, a sweep in parallel, and results equal to a direct core call bit for bit.
 * No timing is asserted (the machine is shared).
 */
import * as fs from 'fs';
import * as path from 'path';
import { movingAverage, runFilter, squaredError, type FilterRun } from '../../src/core';
import { WorkerPool, type JobOutcome, type JobProgress } from '../../src/worker/pool';
import type {
  AdaptiveFilterResult,
  AdaptiveFilterSpec,
  ArrayData,
  FromWorker,
  InterferenceResult
} from '../../src/worker/protocol';
import { PROTOCOL_VERSION } from '../../src/worker/protocol';
import type { WorkerTransport } from '../../src/worker/transport';
import { Rng } from '../core/filters/helpers';
import { buildNodeWorker, nodeTransport, type ShimOptions } from './node-worker';

let shim: string;
const pools: WorkerPool[] = [];

beforeAll(() => {
  shim = buildNodeWorker(`pool-${process.pid}`);
});

afterAll(() => {
  // the transpiled copy is this run's alone
  fs.rmSync(path.dirname(shim), { recursive: true, force: true });
});

afterEach(() => {
  for (const p of pools.splice(0)) {
    p.dispose();
  }
});

function pool(
  opts: Partial<ConstructorParameters<typeof WorkerPool>[0]> = {},
  shimOptions: ShimOptions = {}
) {
  const p = new WorkerPool({
    size: 1,
    createTransport: () => nodeTransport(shim, shimOptions),
    ...opts
  });
  pools.push(p);
  return p;
}

const arr = (data: Float64Array, shape: number[], complex = false): ArrayData => ({
  data,
  shape,
  complex
});

function data(N: number, seed = 1) {
  const rng = new Rng(seed);
  const x = rng.gaussArray(N);
  const d = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    d[n] = 0.8 * x[n] + (n > 0 ? -0.3 * x[n - 1] : 0) + 0.01 * rng.gauss();
  }
  return { x, d };
}

function spec(
  x: Float64Array,
  d: Float64Array,
  extra: Partial<AdaptiveFilterSpec> = {}
): AdaptiveFilterSpec {
  return {
    kind: 'adaptive-filter',
    configuration: {
      kind: 'noise-cancellation',
      reference: arr(x, [x.length]),
      primary: arr(d, [d.length])
    },
    algorithm: 'qr-rls',
    taps: 8,
    lambda: 0.999,
    ...extra
  };
}

function done(o: JobOutcome): AdaptiveFilterResult {
  if (o.status !== 'done') {
    throw new Error(`expected a result, got ${JSON.stringify(o)}`);
  }
  return o.result as AdaptiveFilterResult;
}

function expectSameRun(r: AdaptiveFilterResult, ref: FilterRun) {
  expect(r.output.data).toEqual(ref.y);
  expect(r.error.data).toEqual(ref.e);
  expect(r.weights.data).toEqual(ref.weights);
}

test('a job runs in a worker thread; its result equals a direct core call bit for bit', async () => {
  const { x, d } = data(20000);
  const p = pool();
  const progress: JobProgress[] = [];
  const h = p.run(spec(x, d, { chunkSize: 1000, keepEvery: 100 }), {
    onProgress: q => progress.push(q)
  });
  const r = done(await h.outcome);
  const ref = runFilter(x, d, {
    algorithm: 'qr-rls',
    taps: 8,
    lambda: 0.999,
    keepWeightsEvery: 100
  });
  expectSameRun(r, ref);
  expect(r.trajectory!.data).toEqual(ref.trajectory);
  // progress came from the chunks, in order, ending at the total
  expect(progress.length).toBeGreaterThan(0);
  expect(progress[progress.length - 1]).toMatchObject({
    done: 20000,
    total: 20000,
    unit: 'samples'
  });
  for (let k = 1; k < progress.length; k++) {
    expect(progress[k].done).toBeGreaterThan(progress[k - 1].done);
    expect(progress[k].done % 1000).toBe(0);
  }
  expect(h.state).toBe('settled');
  // the caller's arrays were copied, not taken
  expect(x.length).toBe(20000);
});

test('transfer: the spec buffers move to the worker (detached here), results come back whole', async () => {
  const { x, d } = data(5000, 2);
  const xc = Float64Array.from(x);
  const dc = Float64Array.from(d);
  const p = pool();
  const h = p.run(spec(x, d), { transfer: true });
  // still here while the job waits for the worker's ready message
  expect(x.byteLength).toBe(5000 * 8);
  const r = done(await h.outcome);
  expect(x.byteLength).toBe(0); // detached: the buffer went to the worker
  expect(d.byteLength).toBe(0);
  expectSameRun(r, runFilter(xc, dc, { algorithm: 'qr-rls', taps: 8, lambda: 0.999 }));
  expect(r.output.data.buffer.byteLength).toBe(5000 * 8);
});

test('buffers are handed over only after the worker said ready', async () => {
  // A real worker thread, with a wrapper that records what passes through the seam.
  const events: string[] = [];
  const p = pool({
    createTransport: () => {
      const t = nodeTransport(shim);
      const wrapped: WorkerTransport = {
        postMessage: (m, transfer) => {
          events.push(`post ${m.type} (${transfer.length} buffers)`);
          t.postMessage(m, transfer);
        },
        onMessage: h =>
          t.onMessage((m: FromWorker) => {
            if (m.type === 'ready' || m.type === 'result') {
              events.push(`got ${m.type}`);
            }
            h(m);
          }),
        onFailure: h => t.onFailure(h),
        terminate: () => t.terminate()
      };
      return wrapped;
    }
  });
  const { x, d } = data(1000, 3);
  done(await p.run(spec(x, d), { transfer: true }).outcome);
  expect(events).toEqual(['got ready', 'post run (2 buffers)', 'got result']);
});

test('cancel: a running job stops at a chunk border; a queued job is dropped; the worker stays', async () => {
  const { x, d } = data(400000, 4);
  const p = pool({ cancelGraceMs: 60000 }); // the chunk border, not the fallback, must stop it
  let cancelAt = -1;
  const running = p.run(spec(x, d, { taps: 32, chunkSize: 2000 }), {
    onProgress: q => {
      if (cancelAt < 0 && q.done >= 20000) {
        cancelAt = q.done;
        running.cancel();
      }
    }
  });
  const queued = p.run(spec(x, d));
  expect(queued.state).toBe('queued');
  queued.cancel();
  expect(await queued.outcome).toEqual({ status: 'cancelled', done: 0 });
  const o = await running.outcome;
  expect(o.status).toBe('cancelled');
  if (o.status === 'cancelled') {
    expect(o.done % 2000).toBe(0); // a chunk border
    expect(o.done).toBeGreaterThanOrEqual(cancelAt);
    expect(o.done).toBeLessThan(400000);
  }
  // the same worker (not replaced) runs the next job
  expect(p.workers).toBe(1);
  const small = data(3000, 5);
  expectSameRun(
    done(await p.run(spec(small.x, small.d)).outcome),
    runFilter(small.x, small.d, { algorithm: 'qr-rls', taps: 8, lambda: 0.999 })
  );
  expect(p.workers).toBe(1);
});

test.each([
  ['exits', { exitOnRun: true }, /the job worker stopped: the worker exited with code 3/],
  ['throws', { throwOnRun: true }, /the job worker stopped: the worker threw \(test shim\)/]
] as const)(
  'a worker that %s mid-job fails its job with the reason and is replaced',
  async (_, opts, reason) => {
    let made = 0;
    const p = pool({
      createTransport: () => nodeTransport(shim, made++ === 0 ? opts : {})
    });
    const { x, d } = data(2000, 6);
    const o = await p.run(spec(x, d)).outcome;
    expect(o.status).toBe('failed');
    if (o.status === 'failed') {
      expect(o.reason).toMatch(reason);
    }
    // the next job goes to a fresh worker and succeeds
    expectSameRun(
      done(await p.run(spec(x, d)).outcome),
      runFilter(x, d, { algorithm: 'qr-rls', taps: 8, lambda: 0.999 })
    );
    expect(made).toBe(2);
  }
);

test('workers that cannot start fail the queued jobs with the reason (no endless restarts)', async () => {
  let made = 0;
  const p = pool({
    maxStartFailures: 2,
    createTransport: () => {
      made++;
      return nodeTransport(shim, { throwOnLoad: true });
    }
  });
  const { x, d } = data(500, 7);
  const o = await p.run(spec(x, d)).outcome;
  expect(o.status).toBe('failed');
  if (o.status === 'failed') {
    expect(o.reason).toMatch(/job workers fail to start \(2 in a row\).*failed while loading/);
  }
  expect(made).toBe(2);
});

test('a run above the memory limit is refused before dispatch, with the figures', async () => {
  let made = 0;
  const p = pool({
    memoryLimitBytes: 2 ** 20,
    createTransport: () => {
      made++;
      return nodeTransport(shim);
    }
  });
  const { x, d } = data(100000, 8);
  const o = await p.run(spec(x, d, { keepEvery: 1 })).outcome;
  expect(o.status).toBe('failed');
  if (o.status === 'failed') {
    expect(o.reason).toMatch(
      /needs about [\d.]+ MB .*weight trajectory.*above the per-run memory limit of 1\.0 MB/
    );
  }
  expect(made).toBe(0);
});

test('a failing job reports the core’s message; the worker goes on', async () => {
  const { x, d } = data(100, 9);
  const p = pool();
  const o = await p.run(spec(x, d, { lambda: 1.5 })).outcome;
  expect(o).toMatchObject({ status: 'failed', errorName: 'RangeError' });
  if (o.status === 'failed') {
    expect(o.reason).toMatch(/options\.lambda must be in \(0, 1\]/);
  }
  done(await p.run(spec(x, d)).outcome);
  expect(p.workers).toBe(1);
});

test('a sweep runs one job per value on a pool of 2; each equals its direct core call', async () => {
  const { x, d } = data(6000, 10);
  const p = pool({ size: 2 });
  const lambdas = [0.99, 0.995, 0.999, 1];
  const sweep = p.runSweep({
    kind: 'sweep',
    base: spec(x, d),
    parameter: 'lambda',
    values: lambdas
  });
  expect(p.workers).toBe(2);
  const outcomes = await sweep.outcome;
  outcomes.forEach((o, k) => {
    const r = done(o);
    expectSameRun(r, runFilter(x, d, { algorithm: 'qr-rls', taps: 8, lambda: lambdas[k] }));
  });
});

test('a long run’s output, error and learning curves arrive in parts before its result, whole and exact', async () => {
  const N = 200000;
  const { x, d } = data(N, 12);
  const parts: Record<string, Array<[number, number]>> = {};
  let resultAt = -1;
  let count = 0;
  const p = pool({
    createTransport: () => {
      const t = nodeTransport(shim);
      return {
        postMessage: (m, transfer) => t.postMessage(m, transfer),
        onMessage: h =>
          t.onMessage((m: FromWorker) => {
            count++;
            if (m.type === 'part') {
              (parts[m.key] ??= []).push([m.offset, m.data.length]);
            } else if (m.type === 'result') {
              resultAt = count;
              const r = m.result as AdaptiveFilterResult;
              // the result itself carries them empty
              expect([
                r.output.data.length,
                r.error.data.length,
                r.learningCurve.length,
                r.learningCurveSmoothed?.length
              ]).toEqual([0, 0, 0, 0]);
            }
            h(m);
          }),
        onFailure: h => t.onFailure(h),
        terminate: () => t.terminate()
      };
    }
  });
  const r = done(await p.run(spec(x, d)).outcome);
  expect(resultAt).toBe(count);
  for (const key of ['output', 'error', 'learningCurve', 'learningCurveSmoothed']) {
    const spans = parts[key];
    // in order, each of at least 2^16 values but the last, covering the N samples
    expect(spans.length).toBeGreaterThanOrEqual(3);
    let next = 0;
    spans.forEach(([offset, n], i) => {
      expect(offset).toBe(next);
      if (i < spans.length - 1) {
        expect(n).toBeGreaterThanOrEqual(65536);
      }
      next += n;
    });
    expect(next).toBe(N);
  }
  expectSameRun(r, runFilter(x, d, { algorithm: 'qr-rls', taps: 8, lambda: 0.999 }));
  expect(r.learningCurve).toEqual(squaredError(r.error.data));
  expect(r.learningCurveSmoothed).toEqual(movingAverage(r.learningCurve, 1024));
});

test('jobs running side by side (a sweep) send no parts; the result brings its arrays whole', async () => {
  const N = 70000; // more than a part's 2^16 values
  const { x, d } = data(N, 14);
  const seen: string[] = [];
  const runs: boolean[] = [];
  const p = pool({
    size: 2,
    createTransport: () => {
      const t = nodeTransport(shim);
      return {
        postMessage: (m, transfer) => {
          if (m.type === 'run') {
            runs.push(m.partsAhead === true);
          }
          t.postMessage(m, transfer);
        },
        onMessage: h =>
          t.onMessage((m: FromWorker) => {
            seen.push(m.type);
            h(m);
          }),
        onFailure: h => t.onFailure(h),
        terminate: () => t.terminate()
      };
    }
  });
  const lambdas = [0.99, 0.999, 1];
  const outcomes = await p.runSweep({
    kind: 'sweep',
    base: spec(x, d),
    parameter: 'lambda',
    values: lambdas
  }).outcome;
  // the last job may start alone, when the others have ended: only that one may ask for parts
  expect(runs.slice(0, 2)).toEqual([false, false]);
  outcomes.forEach((o, k) => {
    const r = done(o);
    expectSameRun(r, runFilter(x, d, { algorithm: 'qr-rls', taps: 8, lambda: lambdas[k] }));
    // (arrays made in the worker thread's realm: copied into this one for the core's check)
    expect(r.learningCurve).toEqual(squaredError(Float64Array.from(r.error.data)));
  });
  const partsInSweep = seen.filter(t => t === 'part').length;
  expect(partsInSweep).toBe(runs[2] ? 4 * 2 : 0);
  // a job alone asks for them
  done(await p.run(spec(x, d)).outcome);
  expect(runs[3]).toBe(true);
  expect(seen.filter(t => t === 'part').length - partsInSweep).toBe(4 * 2);
});

test('a part the page cannot take fails the run with the reason', async () => {
  const posted: string[] = [];
  const p = pool({
    createTransport: () => {
      let handler: (m: FromWorker) => void = () => undefined;
      setTimeout(() => handler({ type: 'ready', protocol: PROTOCOL_VERSION }), 0);
      return {
        postMessage: m => {
          posted.push(m.type);
          if (m.type === 'run') {
            const id = m.id;
            setTimeout(() => {
              handler({
                type: 'part',
                id,
                key: 'output',
                offset: 0,
                length: 4,
                data: new Float64Array(2)
              });
              handler({
                type: 'part',
                id,
                key: 'output',
                offset: 3,
                length: 4,
                data: new Float64Array(1)
              });
              handler({
                type: 'result',
                id,
                result: {
                  kind: 'csv',
                  status: 'ok',
                  warnings: [],
                  bytes: new Uint8Array(0),
                  rows: 0
                },
                timing: { ms: 1, perSecond: null }
              });
            }, 0);
          }
        },
        onMessage: h => (handler = h),
        onFailure: () => undefined,
        terminate: () => undefined
      };
    }
  });
  const { x, d } = data(4, 13);
  await expect(p.run(spec(x, d, { taps: 2 })).outcome).resolves.toEqual({
    status: 'failed',
    reason: 'the worker sent values 3… of the output (of 4) after 2 of 4: out of order',
    errorName: 'ProtocolError'
  });
  expect(posted).toEqual(['run']);
});

test('a job with no chunk border in sight is stopped by terminating its worker', async () => {
  // the shim spins for ever on the first run: the cancel message is never read there
  let made = 0;
  const p = pool({
    cancelGraceMs: 20,
    createTransport: () => nodeTransport(shim, made++ === 0 ? { spinOnRun: true } : {})
  });
  const { x, d } = data(500, 14);
  const h = p.run(spec(x, d));
  while (h.state !== 'running') {
    await new Promise(r => setImmediate(r));
  }
  h.cancel();
  expect(await h.outcome).toEqual({ status: 'cancelled', done: 0 });
  done(await p.run(spec(x, d)).outcome);
  expect(made).toBe(2); // the stuck worker was replaced
});

test('a job between two checkpoints ends cancelled, at the next checkpoint or by termination', async () => {
  // a pivoted QR of a 1000×1000 matrix runs between two checkpoints of the basis job
  const rng = new Rng(13);
  const A = rng.gaussArray(1000 * 1000);
  const p = pool({ cancelGraceMs: 20 });
  const h = p.run(
    { kind: 'basis', matrix: arr(A, [1000, 1000]) },
    { onProgress: () => h.cancel() }
  );
  expect(await h.outcome).toMatchObject({ status: 'cancelled' });
  const { x, d } = data(500, 14);
  done(await p.run(spec(x, d)).outcome);
});

test('a sweep with transfer hands over copies: the caller’s arrays stay whole', async () => {
  const { x, d } = data(3000, 12);
  const p = pool({ size: 2 });
  const sweep = p.runSweep(
    { kind: 'sweep', base: spec(x, d), parameter: 'taps', values: [2, 4] },
    { transfer: true }
  );
  const outcomes = await sweep.outcome;
  expect(x.length).toBe(3000);
  expect(d.length).toBe(3000);
  outcomes.forEach((o, k) => {
    expectSameRun(
      done(o),
      runFilter(x, d, { algorithm: 'qr-rls', taps: [2, 4][k], lambda: 0.999 })
    );
  });
  // the specs' own buffers went to the workers
  for (const s of sweep.specs) {
    const c = (s as AdaptiveFilterSpec).configuration as { reference: ArrayData };
    expect(c.reference.data.byteLength).toBe(0);
  }
});

test('interference job through the worker: harmonic directions in their own order', async () => {
  const fs = 1000;
  const N = 1000;
  const x = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    x[n] = 0.2 * Math.cos((2 * Math.PI * 50 * n) / fs) + 1 * Math.sin((2 * Math.PI * 100 * n) / fs);
  }
  const p = pool();
  const o = await p.run({
    kind: 'interference',
    signal: arr(x, [N]),
    basis: { kind: 'harmonics', f0: 50, fs, count: 2 }
  }).outcome;
  expect(o.status).toBe('done');
  const r = (o as { result: InterferenceResult }).result;
  // whole periods: energies N·A²/2 (common practice)
  expect(r.directions[0].energy).toBeCloseTo((N * 0.04) / 2, 9);
  expect(r.directions[1].energy).toBeCloseTo(N / 2, 9);
  expect(r.suppressionDb).toBeGreaterThan(250);
});

test('dispose cancels queued and running jobs', async () => {
  const { x, d } = data(200000, 11);
  const p = pool();
  const a = p.run(spec(x, d, { taps: 32 }));
  const b = p.run(spec(x, d));
  p.dispose();
  expect((await a.outcome).status).toBe('cancelled');
  expect((await b.outcome).status).toBe('cancelled');
  expect((await p.run(spec(x, d)).outcome).status).toBe('failed');
});
