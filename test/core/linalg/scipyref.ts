/** Shared helpers for comparing against SciPy results (fixtures and the live cross-check). */
import { Dense } from '../../../src/core/dense';

export interface Enc {
  re: number[][] | number[];
  im?: number[][] | number[];
}

export function dec(e: Enc): Dense {
  return Dense.fromNested(e.re, e.im);
}

export function enc(a: Dense): Enc {
  const re = a.toNested();
  return a.complex ? { re, im: a.toNestedIm() } : { re };
}

/**
 * max |R₁ − D·R₂| / ‖R₂‖_max over rows, D = diag of unit-modulus phases matching the diagonals:
 * R is unique up to such phases when A has full column rank (Golub & Van Loan 4e, Theorem 5.2.3).
 */
export function rowPhaseDistance(r1: Dense, r2: Dense): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < r2.rows; i++) {
    for (let j = 0; j < r2.cols; j++) {
      scale = Math.max(scale, Math.hypot(r2.get(i, j), r2.getIm(i, j)));
    }
  }
  for (let i = 0; i < Math.min(r1.rows, r2.rows); i++) {
    // phase d = r2_ii / r1_ii (unit modulus)
    const ar = r1.get(i, i);
    const ai = r1.getIm(i, i);
    const br = r2.get(i, i);
    const bi = r2.getIm(i, i);
    const den = Math.hypot(ar, ai) * Math.hypot(br, bi);
    const dr = den > 0 ? (br * ar + bi * ai) / den : 1;
    const di = den > 0 ? (bi * ar - br * ai) / den : 0;
    for (let j = 0; j < r2.cols; j++) {
      const xr = r1.get(i, j);
      const xi = r1.getIm(i, j);
      const er = dr * xr - di * xi - r2.get(i, j);
      const ei = dr * xi + di * xr - r2.getIm(i, j);
      worst = Math.max(worst, Math.hypot(er, ei));
    }
  }
  return worst / scale;
}

/** ‖P₁ − P₂‖_max for the orthogonal projectors P = QQᴴ of two orthonormal bases. */
export function projectorDistance(q1: Dense, q2: Dense): number {
  const m = q1.rows;
  let worst = 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let re = 0;
      let im = 0;
      for (const q of [q1, q2]) {
        const sgn = q === q1 ? 1 : -1;
        for (let k = 0; k < q.cols; k++) {
          const ar = q.get(i, k);
          const ai = q.getIm(i, k);
          const br = q.get(j, k);
          const bi = -q.getIm(j, k);
          re += sgn * (ar * br - ai * bi);
          im += sgn * (ar * bi + ai * br);
        }
      }
      worst = Math.max(worst, Math.hypot(re, im));
    }
  }
  return worst;
}
