/**
 * npm run bench:plots [-- --json]
 *
 * The numbers behind the plots, timed in Node (the core as a Web Worker runs it):
 *   decimate            M4 envelope (first, min, max, last per column) of 1e5, 1e6, 1e7 float64
 *                       samples into 1000 columns: decimate_ms from a scan copy (SIMD column
 *                       scans; what every redraw of a long series uses once the page has made
 *                       the copy in idle time), first_ms from the array itself (a first draw),
 *                       copy_ms the copy made in one piece (from 2²⁰ samples, as the page).
 *   decimate-vs-numpy   the same envelope of 1e7 samples against numpy's reshape-and-reduce
 *                       (x.reshape(1000, -1).min(axis=1) and .max(axis=1); values only, no
 *                       positions) in the project's venv in the same run. Target: no slower.
 *   welch               Welch PSD of 1e7 float64 samples, nperseg 4096, 50 % overlap, periodic
 *                       hann, mean removed, against scipy.signal.welch with the same parameters in
 *                       the same run. Target: within 3× SciPy.
 * Medians of 7 timed runs after warm-up runs; each Perpend case in a fresh Node process (as a
 * worker runs one job), each NumPy/SciPy baseline in a child process of the venv with
 * OPENBLAS_NUM_THREADS=1 (pocketfft in scipy.fft runs one worker by default). The two
 * comparisons alternate Perpend and baseline children over 3 rounds and report the medians of
 * the rounds, so that a shared machine's changing load falls on both. Output: a table, or
 * with --json the JSON lines of DESIGN §9. Always exits 0.
 *
 * Browser cases — drawing and redrawing in the plot views (`{"name":"draw","samples",
 * "decimate_ms","draw_ms"}`, `{"name":"zoom","samples","redraw_ms"}`) — are timed in Debian's
 * chromium through playwright-core by bench/plots-browser/run.mjs (a page with the compiled
 * plots and the real plotly.js-cartesian-dist-min, not a full JupyterLab); `node
 * bench/plots-browser/run.mjs --screens` also saves a screenshot of every view in the light
 * and dark themes to test-artifacts/screenshots/.
 */
import { execSync, spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { m4Envelope, scanCopy, welch } from '../src/core/dsp';

const ROOT = path.resolve(__dirname, '../..');
const JSON_OUT = process.argv.includes('--json');
const REPEATS = 7;
const ROUNDS = 3;
const COLUMNS = 1000;
const WELCH = { nperseg: 4096, noverlap: 2048 };

/** Seeded standard normal samples (xorshift32 and Box–Muller; only reproducibility matters). */
function gaussian(n: number, seed: number): Float64Array {
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

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : (s[k - 1] + s[k]) / 2;
}

let sink = 0;

/** Median ms of REPEATS runs after `warm` warm-up runs. */
function timeIt(fn: () => number, warm: number): number {
  for (let w = 0; w < warm; w++) {
    sink += fn();
  }
  const ts: number[] = [];
  for (let r = 0; r < REPEATS; r++) {
    if (typeof global.gc === 'function') {
      global.gc();
    }
    const t0 = process.hrtime.bigint();
    sink += fn();
    ts.push(Number(process.hrtime.bigint() - t0) / 1e6);
  }
  return median(ts);
}

interface Case {
  /**
   * decimate: the envelope of a series the page holds a scan copy of (every redraw after the
   * copy is made in idle time: pan, resize, zoom out); decimate-first: of the array itself (the
   * first draw); copy: making the scan copy in one piece (the page makes it in slices).
   */
  kind: 'decimate' | 'decimate-first' | 'copy' | 'welch';
  samples: number;
}

/** One case in this process (the child side of `timeInChild`). */
function runCase(c: Case): number {
  const x = gaussian(c.samples, 20261211);
  if (c.kind === 'copy') {
    return timeIt(() => scanCopy(x)?.length ?? NaN, 1);
  }
  if (c.kind === 'decimate' || c.kind === 'decimate-first') {
    const xo = new Float64Array(4 * COLUMNS);
    const yo = new Float64Array(4 * COLUMNS);
    const data = c.kind === 'decimate' ? scanCopy(x) : x;
    if (!data) {
      throw new Error('no WebAssembly SIMD in this Node: no scan copy');
    }
    // warm-up on the same data: the kernel is compiled for it before the timed runs
    return timeIt(() => m4Envelope(data, 1, 0, 0, c.samples, COLUMNS, xo, yo), 5);
  }
  return timeIt(() => welch(x, WELCH).psd[1], 2);
}

function timeInChild(c: Case): number {
  const r = spawnSync(process.execPath, ['--expose-gc', __filename, '--case', JSON.stringify(c)], {
    encoding: 'utf8',
    maxBuffer: 16 * 1024 * 1024
  });
  const m = /^CASE_MS (\S+)$/m.exec(r.stdout);
  if (r.status !== 0 || !m) {
    throw new Error(`bench case failed: ${r.stderr}`);
  }
  return Number(m[1]);
}

const PY = `
import json, sys, time
import numpy as np, scipy
from scipy import signal
spec = json.loads(sys.argv[1])
def med(fn, warm, reps):
    for _ in range(warm):
        fn()
    ts = []
    for _ in range(reps):
        t0 = time.perf_counter(); fn(); ts.append((time.perf_counter() - t0) * 1e3)
    return float(np.median(ts))
x = np.random.default_rng(20261211).standard_normal(spec['samples'])
if spec['kind'] == 'decimate':
    r = x.reshape(spec['columns'], -1)
    ms = med(lambda: (r.min(axis=1), r.max(axis=1)), 3, spec['repeats'])
else:
    ms = med(lambda: signal.welch(x, window='hann', nperseg=spec['nperseg'],
                                  noverlap=spec['noverlap'], detrend='constant'), 1, spec['repeats'])
print(json.dumps({'env': {'numpy': np.__version__, 'scipy': scipy.__version__}, 'ms': ms}))
`;

/** One baseline child (numpy min/max or scipy.signal.welch of 1e7 samples): its median ms. */
function runPython(kind: 'decimate' | 'welch'): { env: Record<string, string>; ms: number } | null {
  const py = path.join(ROOT, '.venv', 'bin', 'python');
  if (!fs.existsSync(py)) {
    console.error('bench:plots: no .venv/bin/python — NumPy/SciPy baselines left out');
    return null;
  }
  const env: NodeJS.ProcessEnv = { ...process.env, OPENBLAS_NUM_THREADS: '1' };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const spec = { kind, samples: 1e7, columns: COLUMNS, repeats: REPEATS, ...WELCH };
  const r = spawnSync(py, ['-c', PY, JSON.stringify(spec)], { encoding: 'utf8', env });
  if (r.status !== 0) {
    console.error(`bench:plots: the NumPy/SciPy baseline failed: ${r.stderr}`);
    return null;
  }
  return JSON.parse(r.stdout);
}

/** The JSON lines of the browser cases (none, with a note on stderr, when they cannot run). */
function browserRows(): Record<string, unknown>[] {
  const r = spawnSync(process.execPath, [path.join(ROOT, 'bench/plots-browser/run.mjs')], {
    cwd: ROOT,
    encoding: 'utf8',
    maxBuffer: 1 << 24
  });
  if (r.stderr) {
    process.stderr.write(r.stderr);
  }
  return (r.stdout ?? '')
    .split('\n')
    .filter(l => l.startsWith('{'))
    .map(l => JSON.parse(l) as Record<string, unknown>);
}

/**
 * Perpend and its baseline timed alternately, ROUNDS times (each a fresh child with its own
 * median of REPEATS), so that both see the same load on a shared machine; the medians of the
 * rounds are reported.
 */
function versus(kind: 'decimate' | 'welch'): {
  perpend: number;
  baseline: number | undefined;
  env: Record<string, string> | undefined;
} {
  const ours: number[] = [];
  const theirs: number[] = [];
  let env: Record<string, string> | undefined;
  for (let k = 0; k < ROUNDS; k++) {
    const b = runPython(kind);
    if (b) {
      theirs.push(b.ms);
      env = b.env;
    }
    ours.push(timeInChild({ kind, samples: 1e7 }));
  }
  return { perpend: median(ours), baseline: theirs.length ? median(theirs) : undefined, env };
}

function main(): void {
  let commit = 'unknown';
  try {
    commit = execSync('git rev-parse --short HEAD', { cwd: ROOT, encoding: 'utf8' }).trim();
  } catch {
    // not a git checkout
  }
  const rows: Record<string, unknown>[] = [];
  const dv = versus('decimate');
  for (const samples of [1e5, 1e6, 1e7]) {
    // 1e7: the median of the rounds timed against numpy (decimate-vs-numpy)
    const ms = samples === 1e7 ? dv.perpend : timeInChild({ kind: 'decimate', samples });
    const first = timeInChild({ kind: 'decimate-first', samples });
    const row: Record<string, unknown> = {
      name: 'decimate',
      samples,
      columns: COLUMNS,
      dtype: 'float64',
      decimate_ms: +ms.toFixed(3),
      msps: +(samples / ms / 1e3).toFixed(1),
      first_ms: +first.toFixed(3)
    };
    if (samples >= 2 ** 20) {
      row.copy_ms = +timeInChild({ kind: 'copy', samples }).toFixed(1);
    }
    row.repeats = REPEATS;
    rows.push(row);
  }
  const vsNumpy: Record<string, unknown> = {
    name: 'decimate-vs-numpy',
    samples: 1e7,
    columns: COLUMNS,
    dtype: 'float64',
    perpend_ms: +dv.perpend.toFixed(3)
  };
  if (dv.baseline !== undefined) {
    vsNumpy.numpy_ms = +dv.baseline.toFixed(3);
    vsNumpy.ratio = +(dv.baseline / dv.perpend).toFixed(2);
    vsNumpy.target = 'perpend_ms ≤ numpy_ms';
    vsNumpy.met = dv.perpend <= dv.baseline;
  }
  vsNumpy.repeats = REPEATS;
  vsNumpy.rounds = ROUNDS;
  rows.push(vsNumpy);
  const wv = versus('welch');
  const w: Record<string, unknown> = {
    name: 'welch',
    samples: 1e7,
    nperseg: WELCH.nperseg,
    noverlap: WELCH.noverlap,
    dtype: 'float64',
    perpend_ms: +wv.perpend.toFixed(1)
  };
  if (wv.baseline !== undefined) {
    w.scipy_ms = +wv.baseline.toFixed(1);
    w.ratio = +(wv.perpend / wv.baseline).toFixed(2);
    w.target = 'perpend_ms ≤ 3 × scipy_ms';
    w.met = wv.perpend <= 3 * wv.baseline;
  }
  w.repeats = REPEATS;
  w.rounds = ROUNDS;
  rows.push(w);
  const pyEnv = dv.env ?? wv.env;
  const env = {
    commit,
    node: process.version,
    numpy: pyEnv?.numpy,
    scipy: pyEnv?.scipy,
    cpu: os.cpus()[0]?.model,
    cores: os.cpus().length,
    loadavg: os.loadavg().map(v => +v.toFixed(2))
  };
  // Browser cases: the plot views drawing in Debian's chromium (bench/plots-browser/run.mjs,
  // which bundles the compiled extension's plots with the real plotly.js-cartesian-dist-min).
  rows.push(...browserRows());
  if (JSON_OUT) {
    console.log(JSON.stringify({ env }));
    for (const r of rows) {
      console.log(JSON.stringify(r));
    }
    return;
  }
  console.log(
    `perpend plots bench — commit ${commit}, Node ${process.version}, numpy ${env.numpy ?? 'n/a'}, ` +
      `scipy ${env.scipy ?? 'n/a'}, CPU ${env.cpu} ×${env.cores}, load ${env.loadavg.join(' ')}`
  );
  console.log(
    'decimate: M4 envelope into 1000 columns of a series held as a scan copy (SIMD; the first ' +
      'draw scans the array itself: first ms; the copy, made once in idle time: copy ms); ' +
      'ratio for decimate-vs-numpy = numpy_ms / perpend_ms ' +
      '(> 1: Perpend faster); for welch = perpend_ms / scipy_ms. draw: one 1000 px trace in ' +
      'chromium, envelope + Plotly.react to the next frame (Perpend ms = the envelope); zoom: ' +
      'the redraw after a zoom to 1000 samples of 1e7'
  );
  const head = [
    'case',
    'samples',
    'Perpend ms',
    'Msamples/s',
    'first ms',
    'copy ms',
    'baseline ms',
    'ratio',
    'draw ms',
    'target'
  ];
  const table = [
    head,
    ...rows.map(r => [
      String(r.name),
      String(r.samples),
      String(r.decimate_ms ?? r.perpend_ms ?? ''),
      r.msps === undefined ? '' : String(r.msps),
      String(r.first_ms ?? ''),
      String(r.copy_ms ?? ''),
      String(r.numpy_ms ?? r.scipy_ms ?? ''),
      r.ratio === undefined ? '' : String(r.ratio),
      String(r.draw_ms ?? r.redraw_ms ?? ''),
      r.target === undefined ? '' : `${r.target}: ${r.met ? 'met' : 'MISSED'}`
    ])
  ];
  const wd = head.map((_, c) => Math.max(...table.map(r => r[c].length)));
  for (const r of table) {
    console.log(r.map((v, c) => v.padEnd(wd[c])).join('  '));
  }
}

const caseArg = process.argv.indexOf('--case');
if (caseArg >= 0) {
  console.log(`CASE_MS ${runCase(JSON.parse(process.argv[caseArg + 1]))}`);
  if (sink === Infinity) {
    console.log('');
  }
} else {
  main();
}
process.exit(0);
