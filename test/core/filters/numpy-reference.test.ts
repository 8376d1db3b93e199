/**
 * Cross-check against plain numpy reference implementations (scripts/fixtures/filters_ref.py,
 * written from the textbook equations: Haykin, Adaptive Filter Theory, 4th ed., Table 9.1 (RLS),
 * ch. 13 (QR-RLS, inverse QR-RLS), ch. 5–6 (LMS, NLMS)), run in the project's venv on seeded
 * data of ≤ 2,000 samples: same outputs to 1e−10 (relative to the RMS of each output).
 *
 * And the float32 emulation, bit for bit, against numpy float32 scalar loops with the same
 * operation order (numpy float32 scalar arithmetic rounds every +, −, ×, ÷, √ to single; so does
 * Math.fround on the double result, since double carries more than 2·24 + 2 bits — Figueroa,
 * "When is double rounding innocuous?", SIGNUM Newsletter 30(3), 1995).
 */
import * as fs from 'fs';
import { runFilter, type Algorithm } from '../../../src/core/filters';
import { Rng, desired, readF32, readF64, rms, runReference, writeF64 } from './helpers';

const ALGS: Algorithm[] = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-textbook', 'nlms', 'lms'];

interface Case {
  tag: string;
  algorithm: Algorithm;
  complex: boolean;
  transversal: boolean;
  M: number;
  lambda: number;
  delta: number;
  mu: number;
  epsilon: number;
  x: string;
  d: string;
}

test('every algorithm matches the numpy reference to 1e-10 (real/complex, transversal/regressor)', () => {
  const rng = new Rng(4100);
  const M = 6;
  const cases: Case[] = [];
  const data: Record<string, { x: Float64Array; d: Float64Array }> = {};
  for (const complex of [false, true]) {
    for (const transversal of [true, false]) {
      const N = transversal ? 2000 : 1000;
      const W = complex ? 2 : 1;
      const x = rng.gaussArray(transversal ? N : N * M, complex);
      if (transversal) {
        for (let i = 1; i < N; i++) {
          for (let q = 0; q < W; q++) {
            x[W * i + q] += 0.7 * x[W * (i - 1) + q];
          }
        }
      }
      const d = desired(
        x,
        rng.gaussArray(M, complex),
        M,
        complex,
        transversal,
        rng.gaussArray(N, complex, 0.05)
      );
      const key = `${complex ? 'c' : 'r'}${transversal ? 't' : 'g'}`;
      data[key] = { x, d };
      for (const algorithm of ALGS) {
        cases.push({
          tag: `${algorithm}-${key}`,
          algorithm,
          complex,
          transversal,
          M,
          lambda: 0.98,
          delta: 0.1,
          mu: algorithm === 'lms' ? 0.01 : 0.4,
          epsilon: 1e-3,
          x: `${key}.x.bin`,
          d: `${key}.d.bin`
        });
      }
    }
  }
  const dir = runReference('ref', dd => {
    for (const [k, v] of Object.entries(data)) {
      writeF64(dd, `${k}.x.bin`, v.x);
      writeF64(dd, `${k}.d.bin`, v.d);
    }
    fs.writeFileSync(`${dd}/meta.json`, JSON.stringify({ cases }));
  });
  const worst: string[] = [];
  for (const c of cases) {
    const { x, d } = data[c.x.slice(0, 2)];
    const r = runFilter(x, d, {
      algorithm: c.algorithm,
      taps: M,
      complex: c.complex,
      input: c.transversal ? 'transversal' : 'regressor',
      lambda: c.lambda,
      delta: c.delta,
      mu: c.mu,
      epsilon: c.epsilon,
      keepWeightsEvery: 1
    });
    // The unsymmetrised textbook form amplifies rounding like λ⁻ⁿ (that is its defect), so two correct
    // implementations part after a while: compare it over the first 400 samples (λ⁻⁴⁰⁰ ≈ 3e3).
    const span = c.algorithm === 'rls-textbook' ? 400 : Infinity;
    const rel = (a: ArrayLike<number>, name: string) => {
      const full = readF64(dir, `${c.tag}.${name}.bin`);
      expect(full.length).toBe(a.length);
      const per = full.length / r.length;
      const ref = full.subarray(0, Math.min(full.length, span * per));
      const s = rms(ref);
      let m = 0;
      for (let i = 0; i < ref.length; i++) {
        m = Math.max(m, Math.abs(a[i] - ref[i]));
      }
      return m / s;
    };
    const errs = {
      y: rel(r.y, 'y'),
      e: rel(r.e, 'e'),
      ePost: rel(r.ePost, 'ep'),
      gamma: rel(r.gamma, 'g'),
      w: rel(r.trajectory, 'w')
    };
    const mx = Math.max(...Object.values(errs));
    worst.push(`${c.tag}: ${mx.toExponential(1)}`);
    for (const [k, v] of Object.entries(errs)) {
      if (!(v <= 1e-10)) {
        throw new Error(`${c.tag} ${k}: relative difference ${v} > 1e-10`);
      }
    }
  }
  fs.rmSync(dir, { recursive: true, force: true });
  console.log(`numpy cross-check, max relative difference per case:\n${worst.join('\n')}`);
});

test('float32 emulation is bit-exact against numpy float32 scalar loops (same operation order)', () => {
  const rng = new Rng(4200);
  const M = 5;
  const N = 600;
  const x = new Float32Array(rng.gaussArray(N));
  for (let i = 1; i < N; i++) {
    x[i] = Math.fround(x[i] + Math.fround(Math.fround(0.8) * x[i - 1]));
  }
  const d = new Float32Array(
    desired(Float64Array.from(x), rng.gaussArray(M), M, false, true, rng.gaussArray(N, false, 0.05))
  );
  const cases = ALGS.map(algorithm => ({
    tag: algorithm,
    algorithm,
    M,
    transversal: true,
    lambda: 0.97,
    delta: 0.1,
    mu: algorithm === 'lms' ? 0.02 : 0.4,
    epsilon: 1e-3,
    x: 'x.f32',
    d: 'd.f32'
  }));
  const dir = runReference('f32', dd => {
    writeF64(dd, 'x.f32', x);
    writeF64(dd, 'd.f32', d);
    fs.writeFileSync(`${dd}/meta.json`, JSON.stringify({ cases }));
  });
  for (const c of cases) {
    const r = runFilter(x, d, {
      algorithm: c.algorithm,
      taps: M,
      precision: 'float32',
      lambda: c.lambda,
      delta: c.delta,
      mu: c.mu,
      epsilon: c.epsilon,
      keepWeightsEvery: 1
    });
    expect(r.e).toBeInstanceOf(Float32Array);
    const outs: [string, ArrayLike<number>][] = [
      ['e', r.e],
      ['y', r.y],
      ['g', r.gamma]
    ];
    if (c.algorithm !== 'qr-rls') {
      // QR-RLS forms its weights by back substitution in double, on request only.
      outs.push(['w', r.trajectory]);
    }
    for (const [name, a] of outs) {
      const ref = readF32(dir, `${c.tag}.${name}.f32`);
      expect(ref.length).toBe(a.length);
      let bad = -1;
      for (let i = 0; i < ref.length; i++) {
        if (!Object.is(ref[i], a[i]) && !(ref[i] === 0 && a[i] === 0)) {
          bad = i;
          break;
        }
      }
      if (bad >= 0) {
        throw new Error(`${c.tag} ${name}[${bad}]: Perpend ${a[bad]} vs numpy float32 ${ref[bad]}`);
      }
    }
  }
  fs.rmSync(dir, { recursive: true, force: true });
});

test('complex float32 emulation is bit-exact against numpy float32 scalar loops (same operation order)', () => {
  // Reference: scripts/fixtures/filters_ref.py f32c, each complex product written out in real
  // float32 operations in the emulation's order (numpy float32 scalars round every operation).
  const rng = new Rng(4300);
  const M = 4;
  const N = 400;
  const x = new Float32Array(2 * N);
  const v = rng.gaussArray(N, true);
  for (let i = 0; i < 2 * N; i++) {
    x[i] = Math.fround(v[i] + (i >= 2 ? Math.fround(Math.fround(0.7) * x[i - 2]) : 0));
  }
  const d = new Float32Array(
    desired(
      Float64Array.from(x),
      rng.gaussArray(M, true),
      M,
      true,
      true,
      rng.gaussArray(N, true, 0.05)
    )
  );
  const cases = ALGS.map(algorithm => ({
    tag: `c-${algorithm}`,
    algorithm,
    M,
    lambda: 0.97,
    delta: 0.1,
    mu: algorithm === 'lms' ? 0.02 : 0.4,
    epsilon: 1e-3,
    x: 'xc.f32',
    d: 'dc.f32'
  }));
  const dir = runReference('f32c', dd => {
    writeF64(dd, 'xc.f32', x);
    writeF64(dd, 'dc.f32', d);
    fs.writeFileSync(`${dd}/meta.json`, JSON.stringify({ cases }));
  });
  const checked: string[] = [];
  for (const c of cases) {
    const r = runFilter(x, d, {
      algorithm: c.algorithm,
      taps: M,
      complex: true,
      precision: 'float32',
      lambda: c.lambda,
      delta: c.delta,
      mu: c.mu,
      epsilon: c.epsilon,
      keepWeightsEvery: 1
    });
    const outs: [string, ArrayLike<number>][] = [
      ['e', r.e],
      ['y', r.y],
      ['g', r.gamma]
    ];
    if (c.algorithm !== 'qr-rls') {
      outs.push(['w', r.trajectory]);
    }
    for (const [name, a] of outs) {
      const ref = readF32(dir, `${c.tag}.${name}.f32`);
      expect(ref.length).toBe(a.length);
      let bad = -1;
      for (let i = 0; i < ref.length; i++) {
        if (!Object.is(ref[i], a[i]) && !(ref[i] === 0 && a[i] === 0)) {
          bad = i;
          break;
        }
      }
      if (bad >= 0) {
        throw new Error(`${c.tag} ${name}[${bad}]: Perpend ${a[bad]} vs numpy float32 ${ref[bad]}`);
      }
      checked.push(`${c.tag}.${name}[${ref.length}]`);
    }
  }
  // A run that agreed only because nothing happened would not be a check.
  expect(checked.length).toBe(23);
  fs.rmSync(dir, { recursive: true, force: true });
});
