/**
 * Checks of the dialogs' fields: each refused value is named by its field with a reason, and a
 * value that passes is returned parsed. The Nyquist bound K·f₀ < fs/2 is the sampling theorem
 * (common practice), as the core's harmonic basis enforces it.
 */
import { harmonicBasis } from '../../src/core';
import { checkHumForm, checkNyquist, checkVariableName } from '../../src/model/forms';

test('good hum values pass, parsed; fs may name a kernel variable or attribute', () => {
  expect(checkHumForm({ f0: '50', fs: '4000', harmonics: '5' })).toEqual({
    ok: true,
    value: { f0: 50, fs: 4000, harmonics: 5 }
  });
  expect(checkHumForm({ f0: ' 60 ', fs: 'rec.fs', harmonics: '3' })).toEqual({
    ok: true,
    value: { f0: 60, fs: 'rec.fs', harmonics: 3 }
  });
});

test('every bad hum field is marked at once, each with its own reason', () => {
  const r = checkHumForm({ f0: '-5', fs: '4k', harmonics: '2.5' });
  expect(r.ok).toBe(false);
  if (!r.ok) {
    expect(r.errors.f0).toMatch(/above 0 Hz/);
    expect(r.errors.fs).toMatch(/4k is not a number/);
    expect(r.errors.harmonics).toMatch(/whole number/);
  }
  const empty = checkHumForm({ f0: '', fs: '', harmonics: '0' });
  expect(empty.ok).toBe(false);
  if (!empty.ok) {
    expect(Object.keys(empty.errors).sort()).toEqual(['f0', 'fs', 'harmonics']);
  }
  const bad = checkHumForm({ f0: '50', fs: '1 + 1', harmonics: '5' });
  expect(!bad.ok && bad.errors.fs).toMatch(/is not a number/);
  const notName = checkHumForm({ f0: '50', fs: 'rec[0]', harmonics: '5' });
  expect(!notName.ok && notName.errors.fs).toMatch(/neither a number nor a Python name/);
});

test('harmonics that reach fs/2 are refused on the harmonics field, with how many fit', () => {
  const r = checkHumForm({ f0: '50', fs: '1000', harmonics: '10' });
  expect(r.ok).toBe(false);
  // 10 × 50 Hz = 500 Hz = fs/2; the largest K with K·50 < 500 is 9.
  expect(!r.ok && r.errors.harmonics).toMatch(/500 Hz .* at most 9 harmonics fit/);
  expect(checkHumForm({ f0: '50', fs: '1000', harmonics: '9' }).ok).toBe(true);
  expect(checkNyquist(600, 1000, 1)).toMatch(/f₀ = 600 Hz is not below/);
});

test('the dialog accepts exactly what the core accepts at the Nyquist edge', () => {
  for (const [f0, fs, k] of [
    [50, 1000, 9],
    [50, 1000, 10],
    [49.9, 1000, 10],
    [333, 1000, 1],
    [333.4, 1000, 2]
  ]) {
    const dialogOk = checkNyquist(f0, fs, k) === null;
    let coreOk = true;
    try {
      harmonicBasis({ f0, fs, harmonics: k, samples: 8 });
    } catch {
      coreOk = false;
    }
    expect([f0, fs, k, dialogOk]).toEqual([f0, fs, k, coreOk]);
  }
});

test('a variable name is checked as a Python identifier, with the reason on refusal', () => {
  expect(checkVariableName(' primary_dehum ')).toEqual({ ok: true, value: 'primary_dehum' });
  const digit = checkVariableName('2x');
  expect(!digit.ok && digit.errors.name).toMatch(
    /Not a valid Python name: .*not a Python identifier/
  );
  const keyword = checkVariableName('lambda');
  expect(keyword.ok).toBe(false);
  expect(checkVariableName('').ok).toBe(false);
});
