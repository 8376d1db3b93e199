/**
 * Per-harmonic (per-column) shares from least-squares coefficients, checked against
 *  - the demo scenario's known hum (demo/perpend-demo.ipynb, generated live with NumPy from the
 *    notebook's own cells and seed): amplitudes 0.8/k at k·50 Hz, k = 1..5;
 *  - NumPy's lstsq on the same cosine/sine basis (numpy.linalg.lstsq, LAPACK gelsd);
 *  - Pythagoras for orthogonal columns (the pair energies add up to the projected energy).
 * The standard error of a sinusoid's least-squares amplitude in white noise of variance σ² is
 * σ·√(2/N) (Kay, Fundamentals of Statistical Signal Processing: Estimation Theory, 1993, §3.11
 * and Example 4.2 (from memory)); the residual here is coloured, so the bound below is five times
 * that estimate.
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as path from 'path';
import { Dense } from '../../../src/core/dense';
import { columnShares, harmonicShares } from '../../../src/core/subspace/harmonic-shares';
import { harmonicBasis, projectOff, ulaSteering } from '../../../src/core/subspace';

const root = path.resolve(__dirname, '../../..');
const python = path.join(root, '.venv', 'bin', 'python');

const SCRIPT = `
import json, sys
import numpy as np
nb = json.load(open(sys.argv[1]))
ns = {}
for cell in nb["cells"]:
    if cell["cell_type"] == "code":
        exec("".join(cell["source"]), ns)
primary, rail, fs, f0 = ns["primary"], ns["rail"], ns["fs"], ns["f0"]
N = primary.size
t = np.arange(N) / fs
B = np.column_stack([f(2 * np.pi * k * f0 * t) for k in range(1, 6) for f in (np.cos, np.sin)])
coef = np.linalg.lstsq(B, np.column_stack([primary, rail.T]), rcond=None)[0]
# complex case: 8-element ULA, half-wavelength spacing, three arrivals plus noise
rng = np.random.default_rng(77)
m = np.arange(8)[:, None]
th = np.deg2rad(np.array([-20.0, 5.0, 40.0]))
A = np.exp(-1j * np.pi * m * np.sin(th))
S = rng.standard_normal((3, 200)) + 1j * rng.standard_normal((3, 200))
X = A @ S + 0.1 * (rng.standard_normal((8, 200)) + 1j * rng.standard_normal((8, 200)))
cz = np.linalg.lstsq(A, X, rcond=None)[0]
json.dump({"primary": primary.tolist(), "rail": rail.tolist(), "fs": fs, "f0": f0,
           "coef": coef.tolist(), "xr": X.real.tolist(), "xi": X.imag.tolist(),
           "czr": cz.real.tolist(), "czi": cz.imag.tolist()}, sys.stdout)
`;

interface Ref {
  primary: number[];
  rail: number[][];
  fs: number;
  f0: number;
  coef: number[][];
  xr: number[][];
  xi: number[][];
  czr: number[][];
  czi: number[][];
}

let ref: Ref;

beforeAll(() => {
  if (!fs.existsSync(python)) {
    throw new Error(
      `the NumPy cross-check needs the project's Python at ${path.relative(root, python)}: ` +
        'run `bash scripts/setup.sh`'
    );
  }
  const run = spawnSync(python, ['-c', SCRIPT, path.join(root, 'demo', 'perpend-demo.ipynb')], {
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024
  });
  if (run.status !== 0) {
    throw new Error(`the NumPy cross-check failed to run: ${run.stderr}`);
  }
  ref = JSON.parse(run.stdout) as Ref;
});

describe('harmonicShares on the demo (known hum 0.8/k·sin(2πk·50t + 0.3k), k = 1..5)', () => {
  test('amplitudes, phases and shares attach to their own harmonic', () => {
    const x = Float64Array.from(ref.primary);
    const N = x.length;
    const r = harmonicShares(x, { f0: ref.f0, fs: ref.fs, harmonics: 5 });
    expect(r.rank).toBe(10);
    expect(Array.from(r.frequencies)).toEqual([50, 100, 150, 200, 250]);
    // σ of the residual → standard error of each amplitude (see the header)
    const sigma = Math.sqrt((r.inputEnergy - r.fittedEnergy) / N);
    const se = sigma * Math.sqrt(2 / N);
    for (let k = 1; k <= 5; k++) {
      const A = 0.8 / k;
      expect(Math.abs(r.amplitude[k - 1] - A)).toBeLessThan(5 * se);
      // A·sin(θ + 0.3k) = A·cos(θ + 0.3k − π/2): the phase of the cosine model
      const dphi = r.phase[k - 1] - (0.3 * k - Math.PI / 2);
      expect(Math.abs(Math.atan2(Math.sin(dphi), Math.cos(dphi)))).toBeLessThan((5 * se) / A);
      // energy of a whole number of periods of A·sin: N·A²/2 (common practice)
      const known = (N * A * A) / 2;
      expect(Math.abs(r.groupEnergy[k - 1] - known) / known).toBeLessThan((2 * 5 * se) / A + 1e-12);
      // the same bound in dB: |Δ| ≤ 10·log10(1 + relative energy error)
      expect(Math.abs(r.shareDb[k - 1] - 10 * Math.log10(known / r.inputEnergy))).toBeLessThan(
        10 * Math.log10(1 + (2 * 5 * se) / A)
      );
    }
    // the shares decrease with k as 1/k²: the 150 Hz share is the third largest, not the first
    for (let k = 1; k < 5; k++) {
      expect(r.share[k - 1]).toBeGreaterThan(r.share[k]);
    }
  });

  test('coefficients equal NumPy lstsq; orthogonal pairs add up to the projected energy', () => {
    const x = Float64Array.from(ref.primary);
    const r = harmonicShares(x, { f0: ref.f0, fs: ref.fs, harmonics: 5 });
    let scale = 0;
    let worst = 0;
    for (let j = 0; j < 10; j++) {
      scale = Math.max(scale, Math.abs(ref.coef[j][0]));
      worst = Math.max(worst, Math.abs(r.coefficients.get(j, 0) - ref.coef[j][0]));
    }
    // backward-stable QR least squares: relative error ≲ κ·u·N; κ ≈ 1 here (common practice)
    expect(worst / scale).toBeLessThan(1e-10);
    let sum = 0;
    for (const e of r.groupEnergy) {
      sum += e;
    }
    expect(Math.abs(sum - r.fittedEnergy) / r.fittedEnergy).toBeLessThan(1e-9);
    // and the projection's energy along span(B) is the same total (Pythagoras)
    const basis = harmonicBasis({ f0: ref.f0, fs: ref.fs, harmonics: 5, samples: x.length });
    const p = projectOff(basis, new Dense(x, [1, x.length]), { vectors: 'rows' });
    expect(Math.abs(p.energy.projectedEnergy - r.fittedEnergy) / r.fittedEnergy).toBeLessThan(1e-9);
  });

  test('K×N signals (the demo rail): per-signal amplitudes equal NumPy, energies summed', () => {
    const K = ref.rail.length;
    const N = ref.rail[0].length;
    const flat = new Float64Array(K * N);
    ref.rail.forEach((row, k) => flat.set(row, k * N));
    const r = harmonicShares(new Dense(flat, [K, N]), { f0: ref.f0, fs: ref.fs, harmonics: 5 });
    expect(r.signals).toBe(K);
    let total = 0;
    for (let s = 0; s < K; s++) {
      for (let k = 0; k < 5; k++) {
        const a = ref.coef[2 * k][s + 1];
        const b = ref.coef[2 * k + 1][s + 1];
        expect(Math.abs(r.amplitude[s * 5 + k] - Math.hypot(a, b))).toBeLessThan(1e-10);
      }
    }
    for (const e of r.groupEnergy) {
      total += e;
    }
    expect(Math.abs(total - r.fittedEnergy) / r.fittedEnergy).toBeLessThan(1e-9);
  });
});

describe('columnShares', () => {
  test('complex ULA steering columns: coefficients equal NumPy lstsq', () => {
    const X = Dense.fromNested(ref.xr, ref.xi);
    const A = ulaSteering({
      angles: [-20, 5, 40],
      elements: 8,
      spacing: 0.5,
      wavelength: 1,
      unit: 'deg'
    });
    const r = columnShares(A, X);
    expect(r.rank).toBe(3);
    let worst = 0;
    for (let j = 0; j < 3; j++) {
      for (let v = 0; v < 200; v++) {
        worst = Math.max(
          worst,
          Math.hypot(
            r.coefficients.get(j, v) - ref.czr[j][v],
            r.coefficients.getIm(j, v) - ref.czi[j][v]
          )
        );
      }
    }
    expect(worst).toBeLessThan(1e-10);
    // each column's energy is ‖a_j‖²·Σ|β_jv|² = 8·Σ|β_jv|²
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let v = 0; v < 200; v++) {
        s += ref.czr[j][v] ** 2 + ref.czi[j][v] ** 2;
      }
      expect(Math.abs(r.groupEnergy[j] - 8 * s) / (8 * s)).toBeLessThan(1e-10);
    }
  });

  test('a hand-made case: x = 3·b₀ + 4·b₁ on non-orthogonal columns', () => {
    // b₀ = (1, 0, 0), b₁ = (1, 1, 0): exact fit, group energies ‖3b₀‖² = 9 and ‖4b₁‖² = 32,
    // together 41 ≠ ‖x‖² = 7² + 4² = 65 − cross term 2·3·4·(b₀·b₁) = 24 (arithmetic)
    const B = Dense.fromNested([
      [1, 1],
      [0, 1],
      [0, 0]
    ]);
    const x = Dense.fromNested([[7], [4], [0]]);
    const r = columnShares(B, x);
    expect(r.groupEnergy[0]).toBeCloseTo(9, 12);
    expect(r.groupEnergy[1]).toBeCloseTo(32, 12);
    expect(r.fittedEnergy).toBeCloseTo(65, 12);
    const both = columnShares(B, x, { groups: [[0, 1]] });
    expect(both.groupEnergy[0]).toBeCloseTo(65, 12);
    expect(both.share[0]).toBeCloseTo(1, 12);
  });

  test('bad input is named', () => {
    const B = Dense.fromNested([
      [1, 0],
      [0, 1],
      [0, 0]
    ]);
    expect(() => columnShares(B, Dense.fromNested([[1], [2]]))).toThrow(
      /x is 2x1 but the basis has 3 rows/
    );
    expect(() => columnShares(B, Dense.fromNested([[1], [2], [3]]), { groups: [[0, 2]] })).toThrow(
      /groups\[0\]\[1\] must be in \[0, 1\]/
    );
    expect(() =>
      harmonicShares(new Dense(new Float64Array(8), [4], undefined, 0, true), {
        f0: 50,
        fs: 4000,
        harmonics: 1
      })
    ).toThrow(/x is complex/);
    expect(() => harmonicShares(new Float64Array(5), { f0: 50, fs: 4000, harmonics: 3 })).toThrow(
      /x has 5 samples, fewer than the 6/
    );
  });
});
