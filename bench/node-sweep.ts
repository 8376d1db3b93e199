/**
 * The machine's own parallel speedup for bench:ui's sweep, as a baseline measured in the same
 * run: the same four QR-RLS jobs (M = 32, 1e6 samples, the λ values of the page's sweep) in the
 * real worker entry on Node worker threads, through the pool, with a pool of 2 against a pool of
 * 1 — and nothing of the page (no browser, no reads from the kernel, no drawing). Each job's
 * inputs are copied before the clock starts and handed over. On a shared 2-core machine the
 * second core is not always there; bench:ui times one pair of these after each pair of page
 * sweeps, so both see the same minute, and reports the page's speedup beside this one.
 */
import * as path from 'path';
import { WorkerPool } from '../src/worker/pool';
import type { AdaptiveFilterSpec } from '../src/worker/protocol';
import { buildNodeWorker, nodeTransport } from '../test/worker/node-worker';

const N = 1_000_000;

/** bench:filters' input (the same generator as bench/worker.ts) and a two-tap path. */
function signals(): { x: Float64Array; d: Float64Array } {
  const x = new Float64Array(N);
  let s = 12345;
  for (let i = 0; i < N; i++) {
    s = (s * 16807) % 2147483647;
    x[i] = s / 2147483647 - 0.5;
  }
  const d = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    d[i] = 0.7 * x[i] + (i >= 1 ? 0.2 * x[i - 1] : 0) + 1e-3 * x[(i * 7919) % N];
  }
  return { x, d };
}

export class NodeSweep {
  /** Builds the worker entry and starts a pool of 1 and a pool of 2, each run once (warm). */
  static async start(lambdas: number[]): Promise<NodeSweep> {
    const shim = buildNodeWorker('bench-ui-sweep', path.resolve(__dirname, '../..'));
    const make = (size: number) =>
      new WorkerPool({
        size,
        createTransport: () => nodeTransport(shim),
        memoryLimitBytes: 2 ** 31
      });
    const { x, d } = signals();
    const s = new NodeSweep(lambdas, x, d, make(1), make(2));
    await s._time(s._one);
    await s._time(s._two);
    return s;
  }

  /** One sweep on each pool (2 workers first, as the page's pairs): their times in ms. */
  async pair(): Promise<{ pool1: number; pool2: number }> {
    const pool2 = await this._time(this._two);
    const pool1 = await this._time(this._one);
    return { pool1, pool2 };
  }

  dispose(): void {
    this._one.dispose();
    this._two.dispose();
  }

  private constructor(
    private readonly _lambdas: number[],
    private readonly _x: Float64Array,
    private readonly _d: Float64Array,
    private readonly _one: WorkerPool,
    private readonly _two: WorkerPool
  ) {}

  private async _time(pool: WorkerPool): Promise<number> {
    const specs = this._lambdas.map((lambda): AdaptiveFilterSpec => ({
      kind: 'adaptive-filter',
      configuration: {
        kind: 'noise-cancellation',
        reference: { data: this._x.slice(), shape: [N], complex: false },
        primary: { data: this._d.slice(), shape: [N], complex: false }
      },
      algorithm: 'qr-rls',
      taps: 32,
      lambda,
      delta: 0.01
    }));
    const t0 = process.hrtime.bigint();
    const outcomes = await Promise.all(specs.map(s => pool.run(s, { transfer: true }).outcome));
    const ms = Number(process.hrtime.bigint() - t0) / 1e6;
    const bad = outcomes.find(o => o.status !== 'done');
    if (bad) {
      throw new Error(`a job of the Node sweep did not finish: ${JSON.stringify(bad)}`);
    }
    return ms;
  }
}
