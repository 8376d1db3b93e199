/* global window, document, requestAnimationFrame, Event, getComputedStyle */
// The page the browser cases of `npm run bench:plots` load: the plot widgets on runs computed
// by the core (an invented scenario of our own, fixed seeds), and hooks that time a draw and a
// zoom. Bundled by ./run.mjs with webpack from the compiled extension (lib/).
import { Signal } from '@lumino/signaling';
import { Widget } from '@lumino/widgets';
import {
  equalize,
  harmonicBasis,
  harmonicShares,
  projectOff,
  runFilter,
  steadyStateMse,
  convergenceTime,
  movingAverage,
  misadjustment
} from '../../lib/core/index.js';
import { RunPlots, ComparePlots, loadPlotlyDist } from '../../lib/panel/plots/index.js';
import { PlotDriver } from '../../lib/panel/plots/plot-driver.js';
import { buildView, DEFAULT_VIEW_OPTIONS } from '../../lib/panel/plots/views.js';
import { DEFAULT_PLOT_SETTINGS } from '../../lib/panel/plots/settings.js';
import { readTheme } from '../../lib/panel/plots/theme.js';
import '../../style/plots.css';

const trans = { __: (m, ...a) => m.replace(/%(\d+)/g, (_, i) => String(a[Number(i) - 1])) };

/** Seeded standard normal samples (xorshift32 and Box–Muller). */
function gaussian(n, seed) {
  let s = seed >>> 0 || 1;
  const u = () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return (s + 0.5) / 4294967296;
  };
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 2) {
    const r = Math.sqrt(-2 * Math.log(u()));
    const t = 2 * Math.PI * u();
    out[i] = r * Math.cos(t);
    if (i + 1 < n) {
      out[i + 1] = r * Math.sin(t);
    }
  }
  return out;
}

const vec = (data, complex = false, shape) => ({
  data,
  shape: shape ?? [complex ? data.length / 2 : data.length],
  complex,
  description: ''
});

const base = {
  tool: 'adaptive',
  use: 'cancellation',
  x: { ref: { kind: 'variable', name: 'reference' }, shape: null, layout: null },
  d: { ref: { kind: 'variable', name: 'primary' }, shape: null, layout: null },
  predictionDelay: 1,
  decisionDelay: 0,
  trainingLength: 0,
  decisionDirected: true,
  constellation: 'qpsk',
  algorithm: 'qr-rls',
  taps: 8,
  lambda: 0.999,
  delta: 0.01,
  mu: 0.5,
  epsilon: 1e-6,
  precision: 'float64',
  keepEvery: 50,
  minMseDb: null,
  fs: null
};

function run(id, label, params, parts) {
  return {
    id,
    setupId: 's',
    label,
    params,
    status: 'ok',
    progress: 1,
    messages: [],
    figures: [],
    arrays: {},
    inputs: {},
    fs: null,
    startedAt: 0,
    readMs: 0,
    computeMs: null,
    ...parts
  };
}

/** A hum canceller: primary = speech-like noise + hum through a path, reference = hum. */
function cancellerRun(id, algorithm, extra) {
  const fs = 8000;
  const N = 40000;
  const v = gaussian(N, 11);
  const w = gaussian(N, 12);
  const hum = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    hum[n] =
      Math.sin((2 * Math.PI * 50 * n) / fs) +
      0.4 * Math.sin((2 * Math.PI * 150 * n) / fs + 0.3) +
      0.05 * w[n];
  }
  const d = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    d[n] = 0.1 * v[n] + 0.8 * hum[n] - 0.3 * (n > 2 ? hum[n - 3] : 0);
  }
  const params = { ...base, algorithm, ...extra, minMseDb: 10 * Math.log10(0.01) };
  const t0 = performance.now();
  const r = runFilter(hum, d, {
    algorithm,
    taps: params.taps,
    lambda: params.lambda,
    mu: params.mu,
    keepWeightsEvery: params.keepEvery
  });
  const ms = performance.now() - t0;
  const e = Float64Array.from(r.e);
  const lc = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    lc[n] = e[n] * e[n];
  }
  const smooth = movingAverage(lc, 400);
  const ss = steadyStateMse(smooth);
  const conv = convergenceTime(smooth, { marginDb: 3 });
  const rows = r.trajectory.length / params.taps;
  const idx = new Float64Array(rows);
  for (let k = 0; k < rows; k++) {
    idx[k] = (k + 1) * params.keepEvery - 1;
  }
  const label =
    algorithm === 'nlms' || algorithm === 'lms'
      ? `${algorithm.toUpperCase()} · M ${params.taps} · μ ${params.mu}`
      : `${algorithm === 'qr-rls' ? 'QR-RLS' : 'RLS'} · M ${params.taps} · λ ${params.lambda}`;
  return run(id, label, params, {
    fs,
    computeMs: ms,
    arrays: {
      output: vec(Float64Array.from(r.y)),
      error: vec(e),
      weights: vec(Float64Array.from(r.weights)),
      trajectory: vec(r.trajectory, false, [rows, params.taps]),
      trajectoryIndex: vec(idx),
      learningCurve: vec(lc)
    },
    inputs: { x: vec(hum), d: vec(d) },
    figures: [
      { key: 'steadyStateMseDb', label: '', value: 10 * Math.log10(ss), unit: 'dB' },
      { key: 'convergenceSamples', label: '', value: conv, unit: 'samples' },
      { key: 'misadjustment', label: '', value: 100 * misadjustment(ss, 0.01), unit: '%' }
    ]
  });
}

/** Mains hum removed from a record by projection off three harmonics of 50 Hz. */
function removalRun() {
  const fs = 1000;
  const N = 20000;
  const v = gaussian(N, 5);
  const x = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    const t = n / fs;
    x[n] =
      0.3 * v[n] +
      Math.sin(2 * Math.PI * 50 * t) +
      0.5 * Math.sin(2 * Math.PI * 100 * t + 1) +
      0.25 * Math.cos(2 * Math.PI * 150 * t);
  }
  const B = harmonicBasis({ f0: 50, fs, harmonics: 3, samples: N });
  const p = projectOff(B, x);
  const shares = harmonicShares(x, { f0: 50, fs, harmonics: 3 });
  const params = {
    tool: 'removal',
    signal: { ref: { kind: 'variable', name: 'record' }, shape: null, layout: null },
    basis: { kind: 'harmonics', f0: 50, count: 3, fs: { kind: 'hz', value: fs } },
    mode: 'off',
    rankTolerance: null
  };
  let out = 0;
  let inp = 0;
  for (let n = 0; n < N; n++) {
    out += p.output.data[n] ** 2;
    inp += x[n] ** 2;
  }
  return run('removal', '− 3 × 50 Hz', params, {
    fs,
    arrays: { output: vec(Float64Array.from(p.output.data)) },
    inputs: { signal: vec(x) },
    figures: [
      ...Array.from(shares.shareDb).map((s, k) => ({
        key: `dir:${50 * (k + 1)} Hz`,
        label: '',
        value: s,
        unit: 'dB'
      })),
      { key: 'keptShare', label: '', value: (100 * out) / inp, unit: '%' }
    ]
  });
}

/** A QPSK link through a short complex channel, equalized with training then decisions. */
function equalizerRun() {
  const N = 6000;
  const s = new Float64Array(2 * N);
  const g = gaussian(4 * N, 9);
  for (let n = 0; n < N; n++) {
    s[2 * n] = g[2 * n] > 0 ? Math.SQRT1_2 : -Math.SQRT1_2;
    s[2 * n + 1] = g[2 * n + 1] > 0 ? Math.SQRT1_2 : -Math.SQRT1_2;
  }
  const h = [1, 0, 0.35, -0.2, -0.1, 0.15];
  const x = new Float64Array(2 * N);
  for (let n = 0; n < N; n++) {
    for (let k = 0; k < 3 && n - k >= 0; k++) {
      const [hr, hi] = [h[2 * k], h[2 * k + 1]];
      const [sr, si] = [s[2 * (n - k)], s[2 * (n - k) + 1]];
      x[2 * n] += hr * sr - hi * si;
      x[2 * n + 1] += hr * si + hi * sr;
    }
    x[2 * n] += 0.05 * g[2 * N + 2 * n];
    x[2 * n + 1] += 0.05 * g[2 * N + 2 * n + 1];
  }
  const train = 500;
  const r = equalize(x, s.subarray(0, 2 * train), {
    algorithm: 'qr-rls',
    taps: 11,
    complex: true,
    delay: 5,
    lambda: 0.99,
    decisionDirected: true,
    constellation: 'qpsk'
  });
  const e = Float64Array.from(r.e);
  const lc = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    lc[n] = e[2 * n] ** 2 + e[2 * n + 1] ** 2;
  }
  const params = {
    ...base,
    use: 'equalization',
    trainingLength: train,
    decisionDelay: 5,
    taps: 11,
    lambda: 0.99,
    keepEvery: 0
  };
  return run('eq', 'QR-RLS equalizer · M 11', params, {
    arrays: {
      output: vec(Float64Array.from(r.y), true),
      error: vec(e, true),
      weights: vec(Float64Array.from(r.weights), true),
      learningCurve: vec(lc)
    },
    inputs: { x: vec(x, true), d: vec(s.slice(0, 2 * train), true) }
  });
}

const runs = [
  cancellerRun('qr', 'qr-rls', {}),
  cancellerRun('rls', 'rls', { lambda: 0.99 }),
  cancellerRun('nlms', 'nlms', { mu: 0.2 }),
  removalRun(),
  equalizerRun()
];
const model = { runs, runChanged: new Signal({}) };

const host = document.getElementById('host');
let current = null;

function clear() {
  if (current) {
    current.dispose();
    current = null;
  }
}

window.pp = {
  /** Shows one view of one run in the RunPlots widget. */
  async showRun(runId, view, complexAs) {
    clear();
    const w = new RunPlots({ trans, model });
    w.node.style.height = '100%';
    Widget.attach(w, host);
    w.runId = runId;
    w.view = view;
    await new Promise(res => requestAnimationFrame(() => res()));
    if (complexAs) {
      const sel = w.node.querySelector('select');
      sel.value = complexAs;
      sel.dispatchEvent(new Event('change'));
    }
    current = w;
    return w.views;
  },
  /** Shows the comparison of the three cancellers. */
  showCompare() {
    clear();
    const w = new ComparePlots({ trans, model });
    w.node.style.height = '100%';
    Widget.attach(w, host);
    w.runIds = ['qr', 'rls', 'nlms'];
    current = w;
  },
  /**
   * Zooms the shown plot as a drag does (Plotly.relayout with xaxis.range[0]/[1]) and returns
   * the number of points of each trace before and after, and the first trace's x after.
   */
  async zoomCheck(a, b) {
    const Plotly = await loadPlotlyDist();
    const gd = document.querySelector('.pp-PlotPane-graph');
    const before = gd.data.map(t => t.x.length);
    await Plotly.relayout(gd, { 'xaxis.range[0]': a, 'xaxis.range[1]': b });
    for (let k = 0; k < 10; k++) {
      await new Promise(res => requestAnimationFrame(() => res()));
    }
    const x = Array.from(gd.data[0].x);
    return { before, after: gd.data.map(t => t.x.length), x0: x[0], x1: x[x.length - 1] };
  },
  /** The plot's background colour as drawn. */
  paperColor() {
    const svg = document.querySelector('.pp-PlotPane-graph .main-svg');
    return svg ? getComputedStyle(svg).backgroundColor : null;
  },
  /** Number of drawn plotly graphs with an SVG line on the page. */
  drawnLines() {
    return document.querySelectorAll('.pp-PlotPane-graph .scatterlayer .trace').length;
  },
  text(sel) {
    return Array.from(document.querySelectorAll(sel)).map(e => e.textContent);
  },
  /**
   * Times a draw of one real series of `samples` through PlotDriver: envelope and Plotly.react
   * up to the next animation frame after react resolves.
   */
  async benchDraw(samples, repeats) {
    clear();
    host.replaceChildren();
    const node = document.createElement('div');
    node.style.width = '1000px';
    node.style.height = '400px';
    host.append(node);
    const e = gaussian(samples, 3);
    const r = run('b', 'bench', { ...base }, { arrays: { error: vec(e) } });
    const spec = buildView(trans, r, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
    const theme = readTheme(node);
    const size = { width: 1000, height: 400 };
    const frame = () => new Promise(res => requestAnimationFrame(() => res()));
    const draws = [];
    const decs = [];
    const zooms = [];
    let columns = 1000;
    for (let k = 0; k < repeats + 1; k++) {
      const driver = new PlotDriver({
        node,
        loadPlotly: loadPlotlyDist,
        settings: DEFAULT_PLOT_SETTINGS,
        onError: err => console.error(err)
      });
      await loadPlotlyDist();
      await frame();
      const t0 = performance.now();
      driver.spec = spec;
      await driver.draw(theme, size);
      await frame();
      const t1 = performance.now();
      // the envelope alone, as the draw computed it
      const { buildFigure } = await import('../../lib/panel/plots/figure.js');
      const d0 = performance.now();
      buildFigure(spec, theme, null, driver.columns, size);
      const d1 = performance.now();
      columns = driver.columns;
      // zoom to 1000 samples in the middle
      const mid = Math.floor(samples / 2);
      const z0 = performance.now();
      await driver.zoom([mid, mid + 999]);
      await frame();
      const z1 = performance.now();
      const points = node.querySelectorAll('.scatterlayer .trace path.js-line').length;
      driver.dispose();
      if (k > 0) {
        draws.push(t1 - t0);
        decs.push(d1 - d0);
        zooms.push(z1 - z0);
      }
      if (points === 0) {
        throw new Error('nothing was drawn');
      }
    }
    const med = v => [...v].sort((a, b) => a - b)[v.length >> 1];
    // The same envelope once the page has had idle time to make its scan copy of a long series
    // (lines.ts): what a pan, resize or zoom-out redraw computes from then on.
    const idle = () =>
      new Promise(res => window.requestIdleCallback(() => res(), { timeout: 1000 }));
    for (let k = 0; k < 40; k++) {
      await idle();
    }
    const { buildFigure } = await import('../../lib/panel/plots/figure.js');
    const again = [];
    for (let k = 0; k < repeats; k++) {
      const a0 = performance.now();
      buildFigure(spec, theme, null, columns, size);
      again.push(performance.now() - a0);
    }
    return {
      draw_ms: med(draws),
      decimate_ms: med(decs),
      redraw_ms: med(zooms),
      decimate_again_ms: med(again)
    };
  }
};
document.body.dataset.ready = '1';
