/**
 * Misalignment of adaptive weights against the optimum: 10·log₁₀(‖w − w_o‖²/‖w_o‖²) in dB (the
 * normalised weight-error norm of system identification; Haykin, Adaptive Filter Theory, 4th
 * ed., ch. 5–6 on the weight-error vector, from memory; the dB form is common practice). The
 * shorter of w and w_o is padded with zeros: taps one lacks count as 0 (a filter shorter than the
 * system misses the tail's energy; a longer one should hold zeros there).
 */
import { checkFloatArray, checkInteger, describe } from '../errors';

export interface MisalignmentOptions {
  /** w and w_o are interleaved complex (default false). */
  complex?: boolean;
  /** w holds this many weight vectors one after the other (K×M, rows; default 1). */
  rows?: number;
}

export interface Misalignment {
  /** 10·log₁₀ of the mean over the rows of ‖w_k − w_o‖²/‖w_o‖². */
  db: number;
  /** 10·log₁₀(‖w_k − w_o‖²/‖w_o‖²) of each row. */
  perRowDb: Float64Array;
}

/** The misalignment of `w` (M taps per row) against `wo` (L taps); see the file's comment. */
export function misalignment(
  w: Float64Array,
  wo: Float64Array,
  options: MisalignmentOptions = {}
): Misalignment {
  checkFloatArray('w', w);
  checkFloatArray('wo', wo);
  const W = options.complex ? 2 : 1;
  const K = checkInteger('rows', options.rows ?? 1, 1);
  if (w.length % (K * W) !== 0 || w.length === 0) {
    throw new RangeError(
      `w has ${w.length} values; it must hold ${K} row(s) of ${W === 2 ? 'complex ' : ''}taps`
    );
  }
  if (wo.length % W !== 0 || wo.length === 0) {
    throw new RangeError(
      `wo must hold at least one ${W === 2 ? 'complex ' : ''}tap, got ${describe(wo.length)} values`
    );
  }
  const M = w.length / (K * W);
  const L = wo.length / W;
  let ref = 0;
  for (let i = 0; i < wo.length; i++) {
    ref += wo[i] * wo[i];
  }
  if (!(ref > 0)) {
    throw new RangeError(
      'wo is all zeros: the misalignment is relative to ‖wo‖², which must be > 0'
    );
  }
  const perRowDb = new Float64Array(K);
  let sum = 0;
  const n = Math.max(M, L) * W;
  for (let k = 0; k < K; k++) {
    const base = k * M * W;
    let err = 0;
    for (let i = 0; i < n; i++) {
      const a = i < M * W ? w[base + i] : 0;
      const b = i < L * W ? wo[i] : 0;
      err += (a - b) * (a - b);
    }
    sum += err / ref;
    perRowDb[k] = 10 * Math.log10(err / ref);
  }
  return { db: 10 * Math.log10(sum / K), perRowDb };
}
