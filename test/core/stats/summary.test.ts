/**
 * summarize() against NumPy (mean, RMS as sqrt(mean(|x|²)), max |x|, min, max) on seeded data,
 * and compensated summation on a case plain summation gets wrong (Higham, Accuracy and Stability
 * of Numerical Algorithms, 2nd ed., §4.3: Neumaier's variant recovers the small term exactly).
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { summarize } from '../../../src/core/stats';

const PY = path.resolve(__dirname, '../../..', '.venv', 'bin', 'python');

function numpySummary(complex: boolean): { x: number[]; ref: Record<string, number> } {
  const code = `
import json, numpy as np
rng = np.random.default_rng(7)
x = rng.standard_normal(5000) * 3 + 0.25
if ${complex ? 'True' : 'False'}:
    x = x + 1j * (rng.standard_normal(5000) - 0.5)
flat = np.column_stack([x.real, x.imag]).ravel() if np.iscomplexobj(x) else x
print(json.dumps({"x": flat.tolist(), "ref": {"mean": float(np.mean(x.real)), "meanImag": float(np.mean(x.imag)) if np.iscomplexobj(x) else 0.0,
  "rms": float(np.sqrt(np.mean(np.abs(x)**2))), "peak": float(np.max(np.abs(x))), "min": float(np.min(x.real)), "max": float(np.max(x.real))}}))
`;
  const r = spawnSync(PY, ['-c', code], { encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) {
    throw new Error(`NumPy reference failed (is .venv set up? run scripts/setup.sh): ${r.stderr}`);
  }
  return JSON.parse(r.stdout);
}

test.each([false, true])('matches NumPy on seeded data (complex: %s)', complex => {
  const { x, ref } = numpySummary(complex);
  const s = summarize(Float64Array.from(x), complex);
  expect(s.count).toBe(5000);
  // Error bound: a few ulps of the magnitudes involved (both sides sum 5000 terms).
  for (const key of ['mean', 'meanImag', 'rms', 'peak', 'min', 'max'] as const) {
    expect(Math.abs(s[key] - ref[key])).toBeLessThanOrEqual(
      1e-13 * Math.max(1, Math.abs(ref[key]))
    );
  }
});

test('compensated sums keep the small term that plain summation loses', () => {
  // Plain left-to-right summation of (1e16, 1, -1e16) gives 0; the exact sum is 1.
  const s = summarize(new Float64Array([1e16, 1, -1e16]));
  expect(s.mean * 3).toBe(1);
});

test('peak does not overflow for huge complex values', () => {
  const s = summarize(new Float64Array([3e200, 4e200]), true);
  expect(s.peak).toBeCloseTo(5e200, -186);
  expect(Number.isFinite(s.peak)).toBe(true);
});

test('empty input and bad arguments', () => {
  expect(summarize(new Float64Array(0)).count).toBe(0);
  expect(() => summarize(new Float64Array(3), true)).toThrow(/length must be even, got 3/);
  expect(() => summarize([1, 2] as unknown as Float64Array)).toThrow(TypeError);
});
