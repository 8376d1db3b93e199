/**
 * ulaSteering takes direction sines u = sin θ as well as angles, and its phase sign follows the
 * documented physical convention (issue 9, point 4).
 */
import { ulaSteering } from '../../../src/core';

test('sines u = sin θ give the same vectors as the angles θ', () => {
  const deg = [-35, 0, 20, 90];
  const a = ulaSteering({ angles: deg, elements: 8, spacing: 0.5, wavelength: 1, unit: 'deg' });
  const u = ulaSteering({
    sines: deg.map(t => Math.sin((t * Math.PI) / 180)),
    elements: 8,
    spacing: 0.5,
    wavelength: 1
  });
  for (let k = 0; k < deg.length; k++) {
    for (let m = 0; m < 8; m++) {
      expect(u.get(m, k)).toBeCloseTo(a.get(m, k), 14);
      expect(u.getIm(m, k)).toBeCloseTo(a.getIm(m, k), 14);
    }
  }
});

test('phase convention: a_m is the carrier e^{jω(t − τ_m)} of a plane wave delayed by τ_m = m·d·u/c, over element 0', () => {
  // The narrowband plane-wave model (common practice; Van Trees, Optimum Array Processing,
  // 2002, ch. 2, from memory): sound in air, c = 343 m/s, f = 1 kHz, d = 0.1 m, u = 0.3.
  const c = 343;
  const f = 1000;
  const d = 0.1;
  const u = 0.3;
  const w = 2 * Math.PI * f;
  const a = ulaSteering({ sines: [u], elements: 6, spacing: d, wavelength: c / f });
  const t = 0.0123; // any instant: the ratio to element 0 does not depend on it
  for (let m = 0; m < 6; m++) {
    const tau = (m * d * u) / c;
    // x_m / x_0 = e^{jω(t − τ_m)} / e^{jωt}
    const re =
      Math.cos(w * (t - tau)) * Math.cos(w * t) + Math.sin(w * (t - tau)) * Math.sin(w * t);
    const im =
      Math.sin(w * (t - tau)) * Math.cos(w * t) - Math.cos(w * (t - tau)) * Math.sin(w * t);
    expect(a.get(m, 0)).toBeCloseTo(re, 12);
    expect(a.getIm(m, 0)).toBeCloseTo(im, 12);
  }
  // u > 0: element 1 lags element 0, so its phase is negative (−2π·d·u/λ).
  expect(Math.atan2(a.getIm(1, 0), a.get(1, 0))).toBeCloseTo((-2 * Math.PI * d * u * f) / c, 12);
});

test('directions: exactly one of angles and sines, sines within [−1, 1]', () => {
  const base = { elements: 4, spacing: 0.5, wavelength: 1 };
  expect(() => ulaSteering(base)).toThrow(/^give the directions as angles .* or as sines/);
  expect(() => ulaSteering({ ...base, angles: [0], sines: [0] })).toThrow(
    /^give either angles or sines, not both/
  );
  expect(() => ulaSteering({ ...base, sines: [0.5, 1.2] })).toThrow(
    /^sines\[1\] must be in \[-1, 1\], got 1.2/
  );
});
