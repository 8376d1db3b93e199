// The spatial response of a projection on a uniform linear array, checked against closed forms
// computed here from the steering vectors a_m(u) = exp(−j2π(d/λ)·m·u), u = sin θ (the narrowband
// plane-wave array manifold; Van Trees, Optimum Array Processing, Wiley 2002, §2.2, section from
// memory).
import { projectionBeamPattern } from '../../../src/core';

const deg = (t: number): number => (t * Math.PI) / 180;

/**
 * |a(u0)ᴴ a(u)|² for an M-element ULA: the Dirichlet kernel sin²(Mψ/2)/sin²(ψ/2) with
 * ψ = 2π(d/λ)(u − u0), M² at ψ = 0 (a geometric series; common practice).
 */
function dirichlet2(M: number, psi: number): number {
  const s = Math.sin(psi / 2);
  if (Math.abs(s) < 1e-12) {
    return M * M;
  }
  return Math.sin((M * psi) / 2) ** 2 / (s * s);
}

describe('projectionBeamPattern', () => {
  test('one removed direction: 1 − |a(θ0)ᴴa(θ)|²/M² (P = I − a0a0ᴴ/M), a null at θ0', () => {
    const M = 8;
    const r = projectionBeamPattern({
      angles: [35],
      unit: 'deg',
      elements: M,
      spacing: 0.5,
      wavelength: 1,
      points: 181
    });
    expect(r.rank).toBe(1);
    expect(r.angle[0]).toBe(-90);
    expect(r.angle[180]).toBe(90);
    expect(r.angle[125]).toBeCloseTo(35, 12);
    let worst = 0;
    for (let g = 0; g < r.angle.length; g++) {
      const psi = 2 * Math.PI * 0.5 * (Math.sin(deg(r.angle[g])) - Math.sin(deg(35)));
      const expected = 1 - dirichlet2(M, psi) / (M * M);
      worst = Math.max(worst, Math.abs(r.response[g] - expected));
    }
    expect(worst).toBeLessThan(1e-12);
    // the null: at θ0 the projection passes nothing
    expect(r.response[125]).toBeLessThan(1e-12);
  });

  test('two removed directions: 1 − aᴴA(AᴴA)⁻¹Aᴴa/M (the Gram form of the projector)', () => {
    const M = 6;
    const d = 0.4;
    const u = [Math.sin(deg(-20)), Math.sin(deg(50))];
    const r = projectionBeamPattern({
      sines: u,
      elements: M,
      spacing: d,
      wavelength: 1,
      points: 61
    });
    expect(r.rank).toBe(2);
    // Gram entries g_ij = a_iᴴ a_j = Σ_m exp(j2πd·m·(u_i − u_j)) (complex), b_i = a_iᴴ a(θ).
    const inner = (ui: number, uj: number): [number, number] => {
      let re = 0;
      let im = 0;
      for (let m = 0; m < M; m++) {
        const ph = 2 * Math.PI * d * m * (ui - uj);
        re += Math.cos(ph);
        im += Math.sin(ph);
      }
      return [re, im];
    };
    let worst = 0;
    for (let g = 0; g < r.angle.length; g++) {
      const v = Math.sin(deg(r.angle[g]));
      const g00 = M;
      const g11 = M;
      const [g01r, g01i] = inner(u[0], u[1]);
      const [b0r, b0i] = inner(u[0], v);
      const [b1r, b1i] = inner(u[1], v);
      // (AᴴA)⁻¹ = [g11, −g01; −g10, g00]/det, det = g00·g11 − |g01|² (real)
      const det = g00 * g11 - (g01r * g01r + g01i * g01i);
      // q = bᴴ G⁻¹ b = (g11|b0|² + g00|b1|² − 2 Re(conj(b0)·g01·b1))/det
      const cr = b0r * g01r + b0i * g01i; // conj(b0)·g01, real part
      const ci = b0r * g01i - b0i * g01r; // imaginary part
      const cross = cr * b1r - ci * b1i; // Re(conj(b0)·g01·b1)
      const q = (g11 * (b0r ** 2 + b0i ** 2) + g00 * (b1r ** 2 + b1i ** 2) - 2 * cross) / det;
      worst = Math.max(worst, Math.abs(r.response[g] - (1 - q / M)));
    }
    expect(worst).toBeLessThan(1e-10);
  });

  test("'onto' is the complement of 'off'; a repeated direction adds no rank", () => {
    const common = { elements: 8, spacing: 0.5, wavelength: 1, unit: 'deg' as const };
    const off = projectionBeamPattern({ ...common, angles: [10, 10] });
    const onto = projectionBeamPattern({ ...common, angles: [10], mode: 'onto' });
    expect(off.rank).toBe(1);
    expect(off.angle.length).toBe(721);
    for (let g = 0; g < off.angle.length; g += 37) {
      expect(off.response[g] + onto.response[g]).toBeCloseTo(1, 12);
    }
  });

  test('bad options say what is wrong', () => {
    const ok = { angles: [0], elements: 4, spacing: 0.5, wavelength: 1 };
    expect(() => projectionBeamPattern({ ...ok, points: 1 })).toThrow(/points/);
    expect(() => projectionBeamPattern({ ...ok, mode: 'away' as never })).toThrow(
      "mode must be 'off' or 'onto'"
    );
    expect(() => projectionBeamPattern({ ...ok, angles: [], sines: undefined })).toThrow(
      /angles must be a non-empty array/
    );
  });
});
