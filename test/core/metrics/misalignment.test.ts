// misalignment(w, wo): 10·log₁₀(‖w − w_o‖²/‖w_o‖²) (the normalised weight-error norm; Haykin,
// Adaptive Filter Theory, 4th ed., ch. 5–6, from memory), checked on values worked by hand.
import { misalignment } from '../../../src/core';

test('worked by hand: ‖(1, 2) − (1, 1)‖²/‖(1, 1)‖² = 1/2 → −3.0103 dB', () => {
  const r = misalignment(Float64Array.from([1, 2]), Float64Array.from([1, 1]));
  expect(r.db).toBeCloseTo(10 * Math.log10(0.5), 12);
});

test('the shorter is padded with zeros, either way round', () => {
  // w = (1, 1), w_o = (1, 1, 1): the missing tap counts 1 of ‖w_o‖² = 3 → 10·log₁₀(1/3)
  expect(misalignment(Float64Array.from([1, 1]), Float64Array.from([1, 1, 1])).db).toBeCloseTo(
    10 * Math.log10(1 / 3),
    12
  );
  // w = (2, 0, 0.5), w_o = (2): the extra tap counts 0.25 of 4 → 10·log₁₀(1/16)
  expect(misalignment(Float64Array.from([2, 0, 0.5]), Float64Array.from([2])).db).toBeCloseTo(
    10 * Math.log10(1 / 16),
    12
  );
});

test('complex taps (re, im interleaved) and the mean over rows', () => {
  // w = (1 + j), w_o = (1): |j|² / 1 = 1 → 0 dB
  expect(
    misalignment(Float64Array.from([1, 1]), Float64Array.from([1, 0]), { complex: true }).db
  ).toBeCloseTo(0, 12);
  // rows (1, 0) and (0, 0) against (1, 0): ratios 0 and 1, mean 1/2
  const r = misalignment(Float64Array.from([1, 0, 0, 0]), Float64Array.from([1, 0]), { rows: 2 });
  expect(r.db).toBeCloseTo(10 * Math.log10(0.5), 12);
  expect(r.perRowDb[0]).toBe(-Infinity);
  expect(r.perRowDb[1]).toBeCloseTo(0, 12);
});

test('bad input says what is wrong', () => {
  expect(() => misalignment(Float64Array.from([1]), new Float64Array(2))).toThrow(/all zeros/);
  expect(() =>
    misalignment(Float64Array.from([1, 2, 3]), Float64Array.from([1]), { rows: 2 })
  ).toThrow(/2 row\(s\)/);
  expect(() => misalignment([1] as never, Float64Array.from([1]))).toThrow(/Float64Array/);
});
