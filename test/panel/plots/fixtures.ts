/**
 * Runs for the plot tests, built by hand (invented data, fixed seed, as the tests need) and a
 * fake plotly that records what it is given.
 */
import type { ResultArray, Run } from '../../../src/model/workbench/runs';
import type { RemovalSetup, SetupParams } from '../../../src/model/workbench/setup';
import type { PlotObject, PlotlyLike } from '../../../src/panel/plots/plotly';
import { cancellation, trans, variable } from '../../model/workbench/fixtures';

export { trans };

/** A small seeded generator (mulberry32, common practice) for test signals. */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function vec(data: Float64Array, complex = false, shape?: number[]): ResultArray {
  return {
    data,
    shape: shape ?? [complex ? data.length / 2 : data.length],
    complex,
    description: ''
  };
}

export function makeRun(
  params: Exclude<SetupParams, { tool: 'sweep' }>,
  parts: Partial<Run> = {}
): Run {
  return {
    id: 'r1',
    setupId: 's1',
    label: 'QR-RLS · M 16 · λ 0.999',
    params,
    status: 'ok',
    progress: 1,
    messages: [],
    figures: [],
    arrays: {},
    inputs: {},
    fs: null,
    startedAt: 0,
    readMs: 1,
    computeMs: 2,
    ...parts
  };
}

/** A cancellation run of N samples with every array an adaptive-filter run carries. */
export function cancellationRun(N: number, fs: number | null, over: Partial<Run> = {}): Run {
  const r = rng(7);
  const d = new Float64Array(N);
  const y = new Float64Array(N);
  const e = new Float64Array(N);
  const lc = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    d[n] = Math.sin(0.05 * n) + 0.1 * (r() - 0.5);
    y[n] = Math.sin(0.05 * n) * (1 - Math.exp(-n / 200));
    e[n] = d[n] - y[n];
    lc[n] = e[n] * e[n];
  }
  const M = 4;
  const rows = 5;
  const trajectory = new Float64Array(rows * M);
  for (let k = 0; k < trajectory.length; k++) {
    trajectory[k] = k;
  }
  return makeRun(cancellation({ taps: M, minMseDb: -20 }), {
    fs,
    arrays: {
      output: vec(y),
      error: vec(e),
      weights: vec(Float64Array.from([1, 1, 0, 0])),
      learningCurve: vec(lc),
      trajectory: vec(trajectory, false, [rows, M]),
      trajectoryIndex: vec(Float64Array.from([0, 10, 20, 30, 40]))
    },
    inputs: { x: vec(d), d: vec(d) },
    figures: [
      { key: 'steadyStateMseDb', label: 'steady-state MSE', value: -21.5, unit: 'dB' },
      { key: 'convergenceSamples', label: 'convergence time', value: 500, unit: 'samples' },
      { key: 'misadjustment', label: 'misadjustment', value: 3.2, unit: '%' }
    ],
    ...over
  });
}

export function removal(over: Partial<RemovalSetup> = {}): RemovalSetup {
  return {
    tool: 'removal',
    signal: variable('x', [4000]),
    basis: { kind: 'harmonics', f0: 50, count: 3, fs: { kind: 'hz', value: 1000 } },
    mode: 'off',
    rankTolerance: null,
    ...over
  };
}

/** A fake plotly: records react/purge/downloadImage, and lets a test fire graph events. */
export class FakePlotly implements PlotlyLike {
  reacts: Array<{ data: PlotObject[]; layout: PlotObject }> = [];
  purged = 0;
  images: Array<{ format: string; filename: string }> = [];
  handlers = new Map<string, (ev: unknown) => void>();

  react(node: HTMLElement, data: PlotObject[], layout: PlotObject): Promise<unknown> {
    this.reacts.push({ data, layout });
    const g = node as unknown as {
      on?: (e: string, h: (ev: unknown) => void) => void;
      removeAllListeners?: (e?: string) => void;
    };
    // plotly makes the graph div an event emitter on its first draw.
    g.on = (e, h) => this.handlers.set(e, h);
    g.removeAllListeners = e => {
      if (e) {
        this.handlers.delete(e);
      } else {
        this.handlers.clear();
      }
    };
    return Promise.resolve(node);
  }
  purge(): void {
    this.purged++;
  }
  downloadImage(
    _node: HTMLElement,
    o: { format: 'png' | 'svg'; filename: string }
  ): Promise<string> {
    this.images.push(o);
    return Promise.resolve('');
  }
  get last(): { data: PlotObject[]; layout: PlotObject } {
    return this.reacts[this.reacts.length - 1];
  }
}
