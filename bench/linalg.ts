/**
 * npm run bench:linalg [-- --json] [-- --quick]
 *
 * Perpend's QR family and subspace tools against ml-matrix (same process) and LAPACK through
 * numpy/scipy (child processes of the same run, one per case right after the Perpend timing of
 * that case, single-threaded OpenBLAS, with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset for
 * those processes only), on the same matrices (written to temporary files). Medians of 5 runs after a warm-up (≥ 1 run, up to 20 runs or 300 ms, so the JIT has settled). Output: a table, or with --json the JSON lines of
 * DESIGN.md §9. Always exits 0.
 *
 * Flop counts (LAPACK Working Note 41, operation counts; complex = 4× real):
 *   geqrf (R only), m ≥ n: 2n²(m − n/3);  orgqr (thin Q from n reflectors): 2n²(m − n/3);
 *   projection off an m×r basis of N vectors: 4·m·r·N.
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import { Matrix, QrDecomposition } from 'ml-matrix';
import { Dense } from '../src/core/dense';
import { dgeqp3CM, dgeqrfCM, dorgqrCM, zgeqrfCM, zungqrCM } from '../src/core/linalg';
import { dproject, lstsq, nullSpace } from '../src/core/subspace';

const args = process.argv.slice(2);
const asJson = args.includes('--json');
const quick = args.includes('--quick');
const REPEATS = 5;
const root = path.resolve(__dirname, '..', '..');
const python = path.join(root, '.venv', 'bin', 'python');
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-bench-'));

/** Seeded uniform(−1, 1) data (xorshift32; the values only need to be reproducible). */
function randomData(n: number, seed: number): Float64Array {
  let s = seed >>> 0 || 1;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    out[i] = s / 2147483648 - 1;
  }
  return out;
}

/** Keeps results alive so that no work is optimised away. */
let sink: unknown = null;

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : (s[k - 1] + s[k]) / 2;
}

/** [median, minimum] in ms of `repeats` runs after a warm-up. */
function time(fn: () => void, repeats = REPEATS): [number, number] {
  // Warm-up until the JIT has settled: at least one run, up to 20 runs or 300 ms.
  const w0 = performance.now();
  for (let w = 0; w < 20 && (w === 0 || performance.now() - w0 < 300); w++) {
    fn();
  }
  const ts: number[] = [];
  for (let r = 0; r < repeats; r++) {
    if (typeof global.gc === 'function') {
      global.gc();
    }
    const t0 = performance.now();
    fn();
    ts.push(performance.now() - t0);
  }
  return [median(ts), Math.min(...ts)];
}

/** Times fn and stores the median under `key` in `into` and the minimum in `into[key + '@min']`. */
function measure(into: Record<string, number>, key: string, fn: () => void, repeats = REPEATS) {
  const [med, min] = time(fn, repeats);
  into[key] = med;
  into[`${key}@min`] = min;
}

interface PyCase {
  id: string;
  op: string;
  file: string;
  shape: number[];
  complex: boolean;
  file2?: string;
  shape2?: number[];
}

const PY = `
import json, sys, time, ctypes
import numpy as np, scipy, scipy.linalg as sl
from scipy.linalg import lapack
def kernel():
    out = []
    for line in open('/proc/self/maps'):
        p = line.split()[-1]
        if 'openblas' in p.lower() and p not in out:
            out.append(p)
    for p in out:
        try:
            lib = ctypes.CDLL(p)
            for sym in ('scipy_openblas_get_config64_', 'scipy_openblas_get_config', 'openblas_get_config'):
                if hasattr(lib, sym):
                    f = getattr(lib, sym); f.restype = ctypes.c_char_p
                    return f().decode()
        except OSError:
            pass
    return 'unknown (see numpy.show_config())'
def med(fn, reps):
    fn()
    ts = []
    for _ in range(reps):
        t0 = time.perf_counter(); fn(); ts.append((time.perf_counter() - t0) * 1e3)
    return float(np.median(ts)), float(np.min(ts))
spec = json.load(sys.stdin)
reps = spec['repeats']
def load(f, shape, cplx):
    a = np.fromfile(f, dtype=np.complex128 if cplx else np.float64)
    return a.reshape(shape, order=spec['order'].get(f, 'F'))
res = {'env': {'numpy': np.__version__, 'scipy': scipy.__version__, 'blas': kernel()}}
for c in spec['cases']:
    a = load(c['file'], c['shape'], c['complex'])
    op = c['op']
    if op == 'geqrf':
        # scipy.linalg.qr queries the optimal workspace (the raw lapack.dgeqrf wrapper's default
        # lwork is too small for the blocked code and would understate LAPACK).
        ms = med(lambda: sl.qr(a, mode='r'), reps)
    elif op == 'qr_econ':
        ms = med(lambda: sl.qr(a, mode='economic'), reps)
    elif op == 'geqp3':
        ms = med(lambda: sl.qr(a, mode='r', pivoting=True), reps)
    elif op == 'gelsy':
        b = load(c['file2'], c['shape2'], c['complex'])
        ms = med(lambda: sl.lstsq(a, b, lapack_driver='gelsy'), reps)
    elif op == 'null_space':
        ms = med(lambda: sl.null_space(a), reps)
    elif op == 'project':
        u = load(c['file2'], c['shape2'], c['complex'])
        ms = med(lambda: a - u @ (u.conj().T @ a), reps)
    res[c['id']] = ms[0]
    res[c['id'] + '@min'] = ms[1]
json.dump(res, sys.stdout)
`;

function runPython(cases: PyCase[], order: Record<string, 'C' | 'F'>): Record<string, unknown> {
  if (!fs.existsSync(python)) {
    return { error: `no ${path.relative(root, python)}: LAPACK columns left out` };
  }
  const env: NodeJS.ProcessEnv = { ...process.env, OPENBLAS_NUM_THREADS: '1' };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const run = spawnSync(python, ['-c', PY], {
    input: JSON.stringify({ cases, repeats: REPEATS, order }),
    encoding: 'utf8',
    env,
    maxBuffer: 1 << 26
  });
  if (run.status !== 0) {
    return { error: run.stderr };
  }
  return JSON.parse(run.stdout);
}

function writeTmp(name: string, data: Float64Array): string {
  const f = path.join(tmp, name);
  fs.writeFileSync(f, Buffer.from(data.buffer, data.byteOffset, data.byteLength));
  return f;
}

interface Row {
  name: string;
  size: string;
  dtype: string;
  [k: string]: unknown;
}

function main() {
  const rows: Row[] = [];
  const order: Record<string, 'C' | 'F'> = {};
  // Each LAPACK case runs right after the Perpend and ml-matrix timings of the same matrix (one
  // short Python process per case), so that load from other jobs on this shared machine falls
  // on both sides of a ratio alike.
  const py: Record<string, unknown> = {};
  const pyCases = { push: (c: PyCase) => Object.assign(py, runPython([c], order)) };
  const perpend: Record<string, number> = {};
  const mlm: Record<string, number> = {};
  const qrSizes: [number, number, boolean][] = [
    [200, 200, false],
    [1000, 1000, false],
    [10000, 50, false],
    [1000, 1000, true],
    [10000, 50, true]
  ];
  let seed = 1;
  for (const [m, n, complex] of qrSizes) {
    const f = complex ? 2 : 1;
    const a0 = randomData(f * m * n, seed++);
    const id = `${m}x${n}${complex ? 'c' : 'r'}`;
    const file = writeTmp(`${id}.bin`, a0);
    const k = Math.min(m, n);
    const tau = new Float64Array(f * k);
    measure(perpend, `qr_r_${id}`, () => {
      const a = a0.slice();
      (complex ? zgeqrfCM : dgeqrfCM)(m, n, a, 0, m, tau, 0);
    });
    measure(perpend, `qr_qr_${id}`, () => {
      const a = a0.slice();
      (complex ? zgeqrfCM : dgeqrfCM)(m, n, a, 0, m, tau, 0);
      const q = new Float64Array(f * m * k);
      (complex ? zungqrCM : dorgqrCM)(m, k, k, a, 0, m, tau, 0, q, 0, m);
    });
    if (!complex) {
      const mat = new Matrix(m, n);
      for (let j = 0; j < n; j++) {
        for (let i = 0; i < m; i++) {
          mat.set(i, j, a0[i + j * m]);
        }
      }
      const reps = quick && m * n >= 1e6 ? 1 : REPEATS;
      measure(
        mlm,
        `qr_r_${id}`,
        () => {
          sink = new QrDecomposition(mat).upperTriangularMatrix;
        },
        reps
      );
      measure(
        mlm,
        `qr_qr_${id}`,
        () => {
          const qr = new QrDecomposition(mat);
          sink = [qr.upperTriangularMatrix, qr.orthogonalMatrix];
        },
        reps
      );
    }
    pyCases.push({ id: `qr_r_${id}`, op: 'geqrf', file, shape: [m, n], complex });
    pyCases.push({ id: `qr_qr_${id}`, op: 'qr_econ', file, shape: [m, n], complex });
  }
  // Pivoted QR 1000×1000 (real).
  {
    const m = 1000;
    const n = 1000;
    const a0 = randomData(m * n, 77);
    const file = writeTmp('piv.bin', a0);
    const tau = new Float64Array(n);
    const jpvt = new Int32Array(n);
    measure(perpend, 'pivoted', () => {
      const a = a0.slice();
      dgeqp3CM(m, n, a, 0, m, jpvt, tau, 0);
    });
    pyCases.push({ id: 'pivoted', op: 'geqp3', file, shape: [m, n], complex: false });
  }
  // Least squares 10000×50 (real), one right-hand side.
  {
    const m = 10000;
    const n = 50;
    const a0 = randomData(m * n, 88);
    const b0 = randomData(m, 89);
    const fa = writeTmp('ls_a.bin', a0);
    const fb = writeTmp('ls_b.bin', b0);
    const A = Dense.fromBuffer(a0, [m, n], { order: 'F' });
    const B = Dense.fromBuffer(b0, [m, 1], { order: 'F' });
    measure(perpend, 'lstsq', () => {
      lstsq(A, B);
    });
    const am = A.toMatrix();
    const bm = B.toMatrix();
    measure(mlm, 'lstsq', () => {
      new QrDecomposition(am).solve(bm);
    });
    pyCases.push({
      id: 'lstsq',
      op: 'gelsy',
      file: fa,
      shape: [m, n],
      complex: false,
      file2: fb,
      shape2: [m, 1]
    });
  }
  // Null space of 300×1000 (real, full row rank: nullity 700).
  {
    const m = 300;
    const n = 1000;
    const a0 = randomData(m * n, 99);
    const file = writeTmp('ns.bin', a0);
    const A = Dense.fromBuffer(a0, [m, n], { order: 'F' });
    measure(perpend, 'null_space', () => {
      nullSpace(A, { measureResidual: false });
    });
    measure(perpend, 'null_space_residual', () => {
      nullSpace(A);
    });
    pyCases.push({ id: 'null_space', op: 'null_space', file, shape: [m, n], complex: false });
  }
  // Projection of 1e7 samples (16 channels × 625,000 samples, C order) off a rank-8 basis.
  {
    const ch = 16;
    const N = 625000;
    const r = 8;
    const x0 = randomData(ch * N, 111);
    const fx = writeTmp('px.bin', x0);
    order[fx] = 'C';
    // orthonormal 16×8 basis: Q of a random matrix
    const ub = randomData(ch * r, 112);
    const tau = new Float64Array(r);
    dgeqrfCM(ch, r, ub, 0, ch, tau, 0);
    const q = new Float64Array(ch * r);
    dorgqrCM(ch, r, r, ub, 0, ch, tau, 0, q, 0, ch);
    const fu = writeTmp('pu.bin', q);
    const y = new Float64Array(ch * N);
    const energy = new Float64Array(r);
    measure(perpend, 'project', () => {
      energy.fill(0);
      dproject('off', ch, N, r, q, 1, ch, 0, x0, N, 1, 0, y, N, 1, 0, energy);
    });
    pyCases.push({
      id: 'project',
      op: 'project',
      file: fx,
      shape: [ch, N],
      complex: false,
      file2: fu,
      shape2: [ch, r]
    });
  }

  fs.rmSync(tmp, { recursive: true, force: true });
  const lap = (id: string) => (typeof py[id] === 'number' ? (py[id] as number) : undefined);
  const pyEnv = (py.env ?? {}) as Record<string, string>;
  const commit = spawnSync('git', ['rev-parse', '--short', 'HEAD'], {
    cwd: root,
    encoding: 'utf8'
  });
  const env = {
    commit: commit.status === 0 ? commit.stdout.trim() : 'unknown',
    node: process.version,
    numpy: pyEnv.numpy,
    scipy: pyEnv.scipy,
    blas: pyEnv.blas,
    blas_threads: 1,
    cpu: os.cpus()[0]?.model ?? 'unknown',
    python_error: typeof py.error === 'string' ? py.error.slice(0, 200) : undefined
  };

  const gflops = (flops: number, ms: number) => Math.round((flops / (ms * 1e6)) * 100) / 100;
  const r2 = (v: number) => Math.round(v * 100) / 100;
  const qrTargets: Record<string, [number, number]> = {
    '200x200r': [7, 4.5],
    '1000x1000r': [9, 13],
    '10000x50r': [3, 8]
  };
  for (const [m, n, complex] of qrSizes) {
    const id = `${m}x${n}${complex ? 'c' : 'r'}`;
    const flopsR = (complex ? 4 : 1) * 2 * n * n * (m - n / 3);
    for (const kind of ['qr_r', 'qr_qr'] as const) {
      const key = `${kind}_${id}`;
      const p = perpend[key];
      const l = lap(key);
      const ml = mlm[key];
      const pMin = perpend[`${key}@min`];
      const lMin = lap(`${key}@min`);
      const mlMin = mlm[`${key}@min`];
      const flops = kind === 'qr_r' ? flopsR : 2 * flopsR;
      const row: Row = {
        name: kind === 'qr_r' ? 'householder_qr_r' : 'householder_qr_q_and_r',
        size: `${m}x${n}`,
        dtype: complex ? 'complex128' : 'float64',
        precision: 'double',
        perpend_ms: r2(p),
        perpend_min_ms: r2(pMin),
        perpend_gflops: gflops(flops, p),
        repeats: REPEATS
      };
      if (ml !== undefined) {
        row.mlmatrix_ms = r2(ml);
        row.mlmatrix_min_ms = r2(mlMin);
        row.speedup_vs_mlmatrix = r2(ml / p);
      }
      if (l !== undefined && lMin !== undefined) {
        row.lapack_ms = r2(l);
        row.lapack_min_ms = r2(lMin);
        row.lapack_gflops = gflops(flops, l);
        row.ratio_vs_lapack = r2(p / l);
        row.ratio_vs_lapack_min = r2(pMin / lMin);
        row.lapack_routine =
          kind === 'qr_r'
            ? `scipy.linalg.qr(mode=r) (${complex ? 'zgeqrf' : 'dgeqrf'})`
            : `scipy.linalg.qr(mode=economic) (${complex ? 'zgeqrf+zungqr' : 'dgeqrf+dorgqr'})`;
      }
      const t = qrTargets[id];
      if (kind === 'qr_r' && t && l !== undefined && ml !== undefined) {
        row.target = `within ${t[0]}x LAPACK and >= ${t[1]}x faster than ml-matrix`;
        row.met = p / l <= t[0] && ml / p >= t[1];
        row.met_on_min = lMin !== undefined && pMin / lMin <= t[0] && mlMin / pMin >= t[1];
      }
      rows.push(row);
    }
    const ratio = perpend[`qr_qr_${id}`] / perpend[`qr_r_${id}`];
    const ratioMin = perpend[`qr_qr_${id}@min`] / perpend[`qr_r_${id}@min`];
    rows.push({
      name: 'householder_q_and_r_over_r_only',
      size: `${m}x${n}`,
      dtype: complex ? 'complex128' : 'float64',
      ratio: r2(ratio),
      ratio_min: r2(ratioMin),
      repeats: REPEATS,
      target: 'Q and R together <= 2.2x the R-only time',
      met: ratio <= 2.2,
      met_on_min: ratioMin <= 2.2
    });
  }
  for (const size of ['1000x1000', '10000x50']) {
    const ratio = perpend[`qr_r_${size}c`] / perpend[`qr_r_${size}r`];
    const ratioMin = perpend[`qr_r_${size}c@min`] / perpend[`qr_r_${size}r@min`];
    rows.push({
      name: 'householder_complex_over_real',
      size,
      dtype: 'complex128/float64',
      ratio: r2(ratio),
      ratio_min: r2(ratioMin),
      repeats: REPEATS,
      target: 'complex R-only <= 4x real',
      met: ratio <= 4,
      met_on_min: ratioMin <= 4
    });
  }
  const simple = (
    name: string,
    key: string,
    size: string,
    limit: number | undefined,
    what: string,
    extra: Record<string, unknown> = {}
  ) => {
    const p = perpend[key];
    const l = lap(key);
    const pMin = perpend[`${key}@min`];
    const lMin = lap(`${key}@min`);
    const row: Row = {
      name,
      size,
      dtype: 'float64',
      precision: 'double',
      perpend_ms: r2(p),
      perpend_min_ms: r2(pMin),
      ...extra
    };
    if (mlm[key] !== undefined) {
      row.mlmatrix_ms = r2(mlm[key]);
      row.mlmatrix_min_ms = r2(mlm[`${key}@min`]);
      row.speedup_vs_mlmatrix = r2(mlm[key] / p);
    }
    if (l !== undefined && lMin !== undefined) {
      row.lapack_ms = r2(l);
      row.lapack_min_ms = r2(lMin);
      row.ratio_vs_lapack = r2(p / l);
      row.ratio_vs_lapack_min = r2(pMin / lMin);
      row.lapack_routine = what;
    }
    row.repeats = REPEATS;
    if (limit !== undefined && l !== undefined && lMin !== undefined) {
      row.target = `within ${limit}x ${what}`;
      row.met = p / l <= limit;
      row.met_on_min = pMin / lMin <= limit;
    }
    rows.push(row);
  };
  simple(
    'pivoted_qr_r',
    'pivoted',
    '1000x1000',
    undefined,
    'scipy.linalg.qr(pivoting=True, mode=r) (dgeqp3)',
    {
      perpend_gflops: gflops(2 * 1000 * 1000 * (1000 - 1000 / 3), perpend.pivoted)
    }
  );
  simple('least_squares', 'lstsq', '10000x50', 2.5, 'scipy.linalg.lstsq(gelsy)');
  simple('null_space', 'null_space', '300x1000', 8, 'scipy.linalg.null_space', {
    residual: 'not measured'
  });
  rows.push({
    name: 'null_space_with_residual',
    size: '300x1000',
    dtype: 'float64',
    perpend_ms: r2(perpend.null_space_residual),
    residual: 'measured',
    repeats: REPEATS
  });
  simple('project_off', 'project', '16x625000', 2, 'numpy X - U @ (U.conj().T @ X)', {
    samples: 1e7,
    M: 8,
    perpend_gflops: gflops(4 * 16 * 8 * 625000, perpend.project),
    perpend_msps: Math.round(625000 / perpend.project) / 1e3
  });

  if (asJson) {
    console.log(JSON.stringify({ env }));
    for (const r of rows) {
      console.log(JSON.stringify(r));
    }
    return;
  }
  console.log(
    `bench:linalg — commit ${env.commit}, Node ${env.node}, numpy ${env.numpy}, scipy ${env.scipy}`
  );
  console.log(`BLAS: ${env.blas} (1 thread); CPU: ${env.cpu}`);
  console.log(
    'Flops: geqrf 2n²(m−n/3), orgqr 2n²(m−n/3), projection 4·m·r·N; complex ×4. Medians (and minima) of 5 after warm-up; "met" judges the medians, "met_on_min" the minima (the least-disturbed runs on a shared machine).'
  );
  const cols = [
    'name',
    'size',
    'dtype',
    'perpend_ms',
    'perpend_min_ms',
    'perpend_gflops',
    'mlmatrix_ms',
    'speedup_vs_mlmatrix',
    'lapack_ms',
    'lapack_min_ms',
    'lapack_gflops',
    'ratio_vs_lapack',
    'ratio_vs_lapack_min',
    'ratio',
    'ratio_min',
    'target',
    'met',
    'met_on_min'
  ];
  const table = rows.map(r => cols.map(c => (r[c] === undefined ? '' : String(r[c]))));
  const widths = cols.map((c, i) => Math.max(c.length, ...table.map(t => t[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' | ');
  console.log(line(cols));
  console.log(widths.map(w => '-'.repeat(w)).join('-|-'));
  for (const t of table) {
    console.log(line(t));
  }
  if (env.python_error) {
    console.log(`LAPACK run failed: ${env.python_error}`);
  }
}

try {
  main();
  if (sink === undefined) {
    console.log('');
  }
} catch (e) {
  console.error('bench:linalg failed:', e);
}
process.exit(0);
