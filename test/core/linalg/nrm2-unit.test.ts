/**
 * dnrm2Unit (the reflector generator's contiguous 2-norm) against scipy.linalg.norm on seeded
 * vectors at scales from 1e-300 to 1e300, and at the edges where a plain sum of squares would
 * overflow or underflow (reference BLAS dnrm2 semantics: Blue, ACM TOMS 4, 1978; the result
 * must be finite and accurate whenever the norm itself is representable). Error bound: the
 * computed norm has relative error ≤ (n/2 + 1)·u for a sum of squares (Higham, Accuracy and
 * Stability of Numerical Algorithms, 2nd ed., §3.1); 1e-13 covers n ≤ 1000 with room.
 * scipy.linalg.norm calls BLAS nrm2 for 1-D float arrays (SciPy documentation); numpy.linalg.norm
 * squares directly and overflows at 1e300, so it is not the reference here.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { dnrm2, dnrm2Unit } from '../../../src/core/linalg/blas';

const PY = path.resolve(__dirname, '../../..', '.venv', 'bin', 'python');

test('matches scipy.linalg.norm (BLAS nrm2) across scales, lengths and offsets', () => {
  const code = `
import json, numpy as np, scipy.linalg
rng = np.random.default_rng(11)
cases = []
for scale in [1e-300, 1e-160, 1e-20, 1.0, 1e20, 1e160, 1e300]:
    for n in [1, 3, 4, 7, 64, 1000]:
        x = rng.standard_normal(n + 2) * scale
        cases.append({"x": x.tolist(), "n": n, "ref": float(scipy.linalg.norm(x[2:]))})
print(json.dumps(cases))
`;
  const r = spawnSync(PY, ['-c', code], { encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) {
    throw new Error(`NumPy reference failed (run scripts/setup.sh for .venv): ${r.stderr}`);
  }
  const cases = JSON.parse(r.stdout) as Array<{ x: number[]; n: number; ref: number }>;
  expect(cases.length).toBe(42);
  for (const c of cases) {
    const x = Float64Array.from(c.x);
    const got = dnrm2Unit(c.n, x, 2);
    expect(Math.abs(got - c.ref)).toBeLessThanOrEqual(1e-13 * c.ref);
    expect(got).toBe(dnrm2Unit(c.n, x, 2)); // deterministic
    expect(Math.abs(got - dnrm2(c.n, x, 1, 2))).toBeLessThanOrEqual(1e-13 * c.ref);
  }
});

test('no overflow or underflow where the plain sum of squares would fail', () => {
  // (3e200, 4e200): squares overflow, the norm 5e200 is representable.
  expect(dnrm2Unit(2, new Float64Array([3e200, 4e200]), 0)).toBeCloseTo(5e200, -186);
  // (3e-200, 4e-200): squares underflow to 0, the norm 5e-200 is representable.
  const tiny = dnrm2Unit(2, new Float64Array([3e-200, 4e-200]), 0);
  expect(Math.abs(tiny - 5e-200)).toBeLessThanOrEqual(1e-15 * 5e-200);
});

test('empty, NaN and infinity', () => {
  expect(dnrm2Unit(0, new Float64Array(3), 1)).toBe(0);
  expect(dnrm2Unit(3, new Float64Array([1, NaN, 2]), 0)).toBeNaN();
  expect(dnrm2Unit(2, new Float64Array([Infinity, 1]), 0)).toBe(Infinity);
});
