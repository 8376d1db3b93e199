/**
 * Gram–Schmidt: backward error for all three (LAWN 41 factor ratio), orthogonality ratio for
 * CGS2 where κ·u < 1, and the measured loss of orthogonality against κ for CGS and MGS, which
 * grows like κ²·u and κ·u respectively (Björck, Numerical Methods for Least Squares Problems,
 * SIAM 1996, §2.4.3–2.4.5; Giraud, Langou, Rozložník, Comput. Math. Appl. 50, 2005).
 */
import { gramSchmidt, householderQR, type GramSchmidtMethod } from '../../../src/core/linalg';
import {
  FAMILIES,
  Rng,
  U,
  logspace,
  makeMatrix,
  matmul,
  orthLoss1,
  orthonormalCols,
  ratioFactor,
  ratioOrth,
  withSingularValues
} from './helpers';

const THRESHOLD = 30;
const PER_FAMILY = 25;

describe.each(['cgs', 'mgs', 'cgs2'] as GramSchmidtMethod[])('%s', method => {
  test.each([false, true])('backward error over the families (complex %s)', complex => {
    const rng = new Rng(3000 + method.length + (complex ? 50 : 0));
    const out: Record<string, number> = {};
    for (const family of FAMILIES) {
      let worst = 0;
      for (let t = 0; t < PER_FAMILY; t++) {
        let { a } = makeMatrix(rng, family, complex);
        if (a.rows < a.cols) {
          a = a.transpose(); // Gram–Schmidt wants m ≥ n
        }
        const g = gramSchmidt(a, { method });
        worst = Math.max(worst, ratioFactor(a, matmul(g.Q, g.R)));
        // The reported loss is the measured ‖I − QᴴQ‖₁.
        expect(g.orthogonalityLoss).toBeCloseTo(orthLoss1(g.Q), 10);
      }
      out[family] = worst;
      expect(worst).toBeLessThan(THRESHOLD);
    }
    console.log(
      `${method} backward-error ratio maxima (complex=${complex}): ${JSON.stringify(out)}`
    );
  });
});

describe('loss of orthogonality against κ (known behaviour)', () => {
  test.each([false, true])('CGS ≫ MGS ≫ CGS2 ≈ Householder as κ grows (complex %s)', complex => {
    const rng = new Rng(77 + (complex ? 1 : 0));
    const rows: string[] = [];
    for (const logk of [2, 4, 6, 8, 10, 12]) {
      const kappa = 10 ** logk;
      const m = 60;
      const n = 20;
      const a = withSingularValues(rng, m, n, logspace(0, -logk, n), complex, orthonormalCols);
      const loss = (method: GramSchmidtMethod) => gramSchmidt(a, { method }).orthogonalityLoss;
      const cgs = loss('cgs');
      const mgs = loss('mgs');
      const cgs2 = loss('cgs2');
      const hh = orthLoss1(householderQR(a).Q());
      rows.push(
        `κ=1e${logk}: cgs ${cgs.toExponential(1)} mgs ${mgs.toExponential(1)} cgs2 ${cgs2.toExponential(1)} householder ${hh.toExponential(1)}`
      );
      // CGS2 and Householder: O(u) while κ·u < 1 (LAWN 41 orthogonality ratio).
      expect(cgs2 / (m * U)).toBeLessThan(THRESHOLD);
      expect(hh / (m * U)).toBeLessThan(THRESHOLD);
      // MGS: ‖I − QᵀQ‖ ≤ c·κ·u (Björck & Paige 1992); c = 100·n as a generous constant.
      expect(mgs).toBeLessThan(100 * n * kappa * U);
      // CGS loses more than MGS once κ is large (it behaves like κ²·u).
      if (logk >= 6) {
        expect(cgs).toBeGreaterThan(mgs);
        expect(mgs).toBeGreaterThan(1e3 * cgs2);
      }
    }
    console.log(`orthogonality loss vs κ (complex=${complex}):\n${rows.join('\n')}`);
  });
});

describe('CGS2 orthogonality ratio over the well-conditioned families', () => {
  test.each([false, true])('complex %s', complex => {
    const rng = new Rng(31 + (complex ? 1 : 0));
    let worst = 0;
    for (const family of ['random', 'tall'] as const) {
      for (let t = 0; t < 40; t++) {
        let { a } = makeMatrix(rng, family, complex);
        if (a.rows < a.cols) {
          a = a.transpose();
        }
        worst = Math.max(worst, ratioOrth(gramSchmidt(a, { method: 'cgs2' }).Q));
      }
    }
    expect(worst).toBeLessThan(THRESHOLD);
  });
});

describe('dependence and errors', () => {
  test('an exactly dependent column is reported, not thrown', () => {
    const g = gramSchmidt(
      [
        [1, 2, 0],
        [1, 2, 1],
        [0, 0, 1]
      ],
      { method: 'mgs' }
    );
    expect(g.dependent).toEqual([1]);
  });
  test('bad method and tolerance', () => {
    expect(() => gramSchmidt([[1]], { method: 'qr' as never })).toThrow(/method must be/);
    expect(() => gramSchmidt([[1]], { tol: 2 })).toThrow(/tol must be in \[0, 1\), got 2/);
  });
});
