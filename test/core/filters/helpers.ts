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
export function runInChild(body: string, args: string[] = [], nodeFlags: string[] = []) {
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
  fs.writeFileSync(path.join(dir, 'child.js'), body);
  const r = spawnSync(process.execPath, [...nodeFlags, 'child.js', ...args], {
    cwd: dir,
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
    env: { ...process.env, NODE_PATH: path.join(ROOT, 'node_modules') }
  });
  fs.rmSync(dir, { recursive: true, force: true });
  if (r.status !== 0) {
    throw new Error(`child failed (${r.status}): ${r.stderr}`);
  }
  return r.stdout;
}
