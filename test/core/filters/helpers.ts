/**
 * Test helpers: a seeded generator (xoshiro128**, Blackman and Vigna, "Scrambled linear
 * pseudorandom number generators", ACM TOMS 47(4), 2021), Gaussian samples by Box–Muller,
 * coloured inputs, and a runner for the numpy reference script in the project's venv.
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import * as ts from 'typescript';
import type { FilterOptions } from '../../../src/core/filters';

// Module-level aliases: a global lookup (Math.*) per call is ~20× slower inside jest's vm context.
const { imul, sqrt, log, sin, cos, abs, PI } = Math;

export const ROOT = path.resolve(__dirname, '../../..');
export const PYTHON = path.join(ROOT, '.venv', 'bin', 'python');
export const REF_SCRIPT = path.join(ROOT, 'scripts', 'fixtures', 'filters_ref.py');

export class Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare = NaN;
  constructor(seed: number) {
    // splitmix32 to spread the seed over the state
    let z = seed >>> 0;
    const next = () => {
      z = (z + 0x9e3779b9) >>> 0;
      let t = z;
      t = imul(t ^ (t >>> 16), 0x21f0aaad);
      t = imul(t ^ (t >>> 15), 0x735a2d97);
      return (t ^ (t >>> 15)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
  }
  /** 32 random bits. */
  u32(): number {
    const r = imul(rotl(imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return r;
  }
  /** Uniform in [0, 1) with 53 random bits. */
  uniform(): number {
    return ((this.u32() >>> 5) * 67108864 + (this.u32() >>> 6)) / 9007199254740992;
  }
  /** Standard normal (Box–Muller, both outputs used). */
  gauss(): number {
    if (this.spare === this.spare) {
      const s = this.spare;
      this.spare = NaN;
      return s;
    }
    const u = 1 - this.uniform();
    const v = this.uniform();
    const r = sqrt(-2 * log(u));
    this.spare = r * sin(2 * PI * v);
    return r * cos(2 * PI * v);
  }
  /** n standard normals (real) or n circular complex normals of unit variance (interleaved). */
  gaussArray(n: number, complex = false, sigma = 1): Float64Array {
    const out = new Float64Array(complex ? 2 * n : n);
    const s = complex ? sigma / Math.SQRT2 : sigma;
    for (let i = 0; i < out.length; i++) {
      out[i] = s * this.gauss();
    }
    return out;
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** AR(1) x(n) = a x(n−1) + v(n) with unit-variance (complex: circular) white v. */
export function ar1(rng: Rng, n: number, a: number, complex = false): Float64Array {
  const v = rng.gaussArray(n, complex);
  const W = complex ? 2 : 1;
  for (let i = 1; i < n; i++) {
    for (let q = 0; q < W; q++) {
      v[W * i + q] += a * v[W * (i - 1) + q];
    }
  }
  return v;
}

/**
 * d(n) = w_oᴴ u(n) + v(n): transversal (x a signal) or regressor (x N×M rows) input, complex
 * interleaved when asked. Returns d and the noise v.
 */
export function desired(
  x: Float64Array,
  wo: Float64Array,
  M: number,
  complex: boolean,
  transversal: boolean,
  noise: Float64Array
): Float64Array {
  const W = complex ? 2 : 1;
  const N = noise.length / W;
  const d = new Float64Array(N * W);
  for (let i = 0; i < N; i++) {
    let sr = 0;
    let si = 0;
    for (let k = 0; k < M; k++) {
      let ur = 0;
      let ui = 0;
      if (transversal) {
        if (i - k < 0) {
          continue;
        }
        ur = x[W * (i - k)];
        ui = complex ? x[W * (i - k) + 1] : 0;
      } else {
        ur = x[W * (i * M + k)];
        ui = complex ? x[W * (i * M + k) + 1] : 0;
      }
      const wr = wo[W * k];
      const wi = complex ? wo[W * k + 1] : 0;
      // conj(w) u
      sr += wr * ur + wi * ui;
      si += wr * ui - wi * ur;
    }
    d[W * i] = sr + noise[W * i];
    if (complex) {
      d[W * i + 1] = si + noise[W * i + 1];
    }
  }
  return d;
}

/** RMS of a real or interleaved complex array (per complex element). */
export function rms(a: ArrayLike<number>, complex = false): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    s += a[i] * a[i];
  }
  return Math.sqrt(s / (complex ? a.length / 2 : a.length));
}

/** max |a − b| (per component). */
export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    const t = abs(a[i] - b[i]);
    if (!(t <= m)) {
      m = t;
    }
  }
  return m;
}

/**
 * Runs scripts/fixtures/filters_ref.py `cmd` on a fresh temporary directory prepared by `write`,
 * and returns the directory for reading its outputs.
 */
export function runReference(cmd: string, write: (dir: string) => void): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-filters-'));
  write(dir);
  const r = spawnSync(PYTHON, [REF_SCRIPT, cmd, dir], { encoding: 'utf8' });
  if (r.status !== 0) {
    throw new Error(`filters_ref.py ${cmd} failed: ${r.stderr || r.error}`);
  }
  return dir;
}

export function writeF64(dir: string, name: string, a: Float64Array | Float32Array): void {
  fs.writeFileSync(path.join(dir, name), Buffer.from(a.buffer, a.byteOffset, a.byteLength));
}

export function readF64(dir: string, name: string): Float64Array {
  const b = fs.readFileSync(path.join(dir, name));
  return new Float64Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength));
}

export function readF32(dir: string, name: string): Float32Array {
  const b = fs.readFileSync(path.join(dir, name));
  return new Float32Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength));
}

/**
 * Runs `body` (plain JavaScript) in a child Node process, outside jest's vm context (where every
 * global lookup such as Math.fround is ~20× slower). The core (src/core) and these helpers are
 * transpiled with TypeScript's transpileModule into a temporary directory: the body can
 * `require('./core/filters')`, `require('./core/metrics')` and `require('./helpers')`.
 */
let childDir: string | null = null;
let childCount = 0;

function prepareChildDir(): string {
  if (childDir !== null) {
    return childDir;
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-child-'));
  const emit = (file: string, dest: string) => {
    const out = ts.transpileModule(fs.readFileSync(file, 'utf8'), {
      compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2020 }
    }).outputText;
    fs.mkdirSync(path.dirname(dest), { recursive: true });
    fs.writeFileSync(dest, out);
  };
  const src = path.join(ROOT, 'src', 'core');
  const walk = (d: string) => {
    for (const ent of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, ent.name);
      if (ent.isDirectory()) {
        walk(p);
      } else if (ent.name.endsWith('.ts') && !ent.name.endsWith('.d.ts')) {
        emit(p, path.join(dir, 'core', path.relative(src, p).replace(/\.ts$/, '.js')));
      }
    }
  };
  walk(src);
  emit(path.join(__dirname, 'helpers.ts'), path.join(dir, 'helpers.js'));
  process.on('exit', () => fs.rmSync(dir, { recursive: true, force: true }));
  childDir = dir;
  return dir;
}

export function runInChild(body: string, args: string[] = [], nodeFlags: string[] = []): string {
  const dir = prepareChildDir();
  const name = `child${childCount++}.js`;
  fs.writeFileSync(path.join(dir, name), body);
  const r = spawnSync(process.execPath, [...nodeFlags, name, ...args], {
    cwd: dir,
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024,
    env: { ...process.env, NODE_PATH: path.join(ROOT, 'node_modules') }
  });
  if (r.status !== 0) {
    throw new Error(`child failed (${r.status}): ${r.stderr}`);
  }
  return r.stdout;
}

/**
 * Ensemble runner of the statistical checks (see statistics.test.ts); `createFilter` is passed in
 * so that the same code runs in jest and in a child process (runInChild).
 */
export interface Ens {
  /** Mean over runs of |e_a(n)|² / σᵥ², per sample. */
  excess: Float64Array;
  failed: number;
  firstFailure: number[];
}

/**
 * K runs of N samples with independent regressors u(n) = diag(√eig)·g(n) (g standard Gaussian,
 * real or circular complex), so R = diag(eig) (the eigen-coordinates of any R).
 */
export function ensemble(
  createFilter: (o: FilterOptions) => {
    process: (x: Float64Array, d: Float64Array) => { e: ArrayLike<number> };
    health: () => { status: string; firstIndex: number };
  },
  seed: number,
  K: number,
  N: number,
  eig: number[],
  sigmaV: number,
  options: Omit<FilterOptions, 'taps'>,
  transversal = false,
  stopOnFailure = false
): Ens {
  const M = eig.length;
  const cx = options.complex ?? false;
  const W = cx ? 2 : 1;
  const rng = new Rng(seed);
  const excess = new Float64Array(N);
  const firstFailure: number[] = [];
  let failed = 0;
  const sq = eig.map(Math.sqrt);
  // Regressor input is generated and filtered in chunks (so a diverged run can stop early);
  // tapped-delay input in one piece.
  const C = transversal ? N : Math.min(N, 2000);
  const X = new Float64Array(transversal ? N * W : C * M * W);
  const D = new Float64Array(C * W);
  const V = new Float64Array(C * W);
  const sc = cx ? Math.SQRT1_2 : 1;
  for (let k = 0; k < K; k++) {
    const wo = rng.gaussArray(M, cx);
    const f = createFilter({
      ...options,
      taps: M,
      input: transversal ? 'transversal' : 'regressor'
    });
    for (let s0 = 0; s0 < N; s0 += C) {
      const n = Math.min(C, N - s0);
      if (transversal) {
        // white input of power eig[0] through the delay line
        for (let i = 0; i < N * W; i++) {
          X[i] = sq[0] * sc * rng.gauss();
        }
      } else {
        for (let i = 0; i < n; i++) {
          for (let m = 0; m < M; m++) {
            for (let q = 0; q < W; q++) {
              X[W * (i * M + m) + q] = sq[m] * sc * rng.gauss();
            }
          }
        }
      }
      for (let i = 0; i < n; i++) {
        let sr = 0;
        let si = 0;
        for (let m = 0; m < M; m++) {
          let ur: number;
          let ui: number;
          if (transversal) {
            if (i - m < 0) {
              continue;
            }
            ur = X[W * (i - m)];
            ui = cx ? X[W * (i - m) + 1] : 0;
          } else {
            ur = X[W * (i * M + m)];
            ui = cx ? X[W * (i * M + m) + 1] : 0;
          }
          const wr = wo[W * m];
          const wi = cx ? wo[W * m + 1] : 0;
          sr += wr * ur + wi * ui;
          si += wr * ui - wi * ur;
        }
        for (let q = 0; q < W; q++) {
          V[W * i + q] = sigmaV * sc * rng.gauss();
        }
        D[W * i] = sr + V[W * i];
        if (cx) {
          D[W * i + 1] = si + V[W * i + 1];
        }
      }
      const r = f.process(X.subarray(0, n * W * (transversal ? 1 : M)), D.subarray(0, n * W));
      for (let i = 0; i < n; i++) {
        const ar = r.e[W * i] - V[W * i];
        const ai = cx ? r.e[W * i + 1] - V[W * i + 1] : 0;
        excess[s0 + i] += (ar * ar + ai * ai) / (sigmaV * sigmaV);
      }
      if (stopOnFailure && f.health().status === 'failed') {
        break;
      }
    }
    const h = f.health();
    if (h.status === 'failed') {
      failed++;
      firstFailure.push(h.firstIndex);
    }
  }
  for (let i = 0; i < N; i++) {
    excess[i] /= K;
  }
  return { excess, failed, firstFailure };
}
