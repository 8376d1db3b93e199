/**
 * What a learning-curve plot draws, from the error signals as the kernel holds them: each trial's
 * squared a-priori error |e(n)|², smoothed by a trailing moving average (`learningCurve`), the
 * ensemble mean over K trials with its confidence band (`ensembleAverage`: mean ± z·s/√K), and
 * all three in dB (10·log10 of a power; Haykin, Adaptive Filter Theory, 4th ed., §5.4 and §6.3,
 * for the learning curve and its ensemble average).
 *
 * The band's lower end in dB: where mean − z·s/√K ≤ 0 (few trials, heavy-tailed |e|²) it has no
 * value in dB and is NaN, so a plot leaves that stretch of the band's lower edge open rather
 * than draw a number that was never measured.
 */
import { checkInteger, describe } from '../errors';
import { ensembleAverage, type EnsembleCurve } from './ensemble';
import { learningCurve } from './learning';

export interface EnsembleCurveDb {
  /** 10·log10(mean) (−Infinity where the mean is 0). */
  meanDb: Float64Array;
  /** 10·log10(lower); NaN where the lower end is ≤ 0. */
  lowerDb: Float64Array;
  /** 10·log10(upper). */
  upperDb: Float64Array;
}

export interface LearningCurveBand extends EnsembleCurve, EnsembleCurveDb {
  /** Moving-average window applied to each trial's |e|² before averaging (1: none). */
  window: number;
}

/** The mean and band of an ensemble curve in dB (see the module comment for the lower end). */
export function ensembleDb(curve: EnsembleCurve): EnsembleCurveDb {
  const N = curve.mean.length;
  const meanDb = new Float64Array(N);
  const lowerDb = new Float64Array(N);
  const upperDb = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    meanDb[i] = 10 * Math.log10(curve.mean[i]);
    lowerDb[i] = curve.lower[i] > 0 ? 10 * Math.log10(curve.lower[i]) : NaN;
    upperDb[i] = 10 * Math.log10(curve.upper[i]);
  }
  return { meanDb, lowerDb, upperDb };
}

/**
 * The ensemble learning curve of K trials' a-priori errors: `errors` is K rows back to back
 * (K×N, C order, with `options.K`) or a list of K rows; real, or interleaved complex with
 * `options.complex`. Each row's |e|² is smoothed over `window` samples (default 1), then
 * averaged with a `confidence` band (default 0.95); mean and band also in dB.
 */
export function learningCurveEnsemble(
  errors: ArrayLike<number> | ArrayLike<number>[],
  options: { K?: number; complex?: boolean; window?: number; confidence?: number } = {}
): LearningCurveBand {
  const complex = options.complex ?? false;
  if (typeof complex !== 'boolean') {
    throw new TypeError(`options.complex must be a boolean, got ${describe(complex)}`);
  }
  const window = checkInteger('options.window', options.window ?? 1, 1);
  let rows: ArrayLike<number>[];
  if (Array.isArray(errors) && errors.length > 0 && typeof errors[0] !== 'number') {
    rows = errors as ArrayLike<number>[];
  } else {
    const flat = errors as ArrayLike<number>;
    if (!ArrayBuffer.isView(flat) && !Array.isArray(flat)) {
      throw new TypeError(
        `errors must be K rows back to back (a typed array or number[]) or a list of rows, got ${describe(errors)}`
      );
    }
    const K = checkInteger('options.K', options.K, 1);
    if (flat.length % K !== 0) {
      throw new RangeError(`errors has ${flat.length} values, not a multiple of K = ${K}`);
    }
    const L = flat.length / K;
    rows = [];
    for (let k = 0; k < K; k++) {
      rows.push(
        ArrayBuffer.isView(flat)
          ? (flat as Float64Array).subarray(k * L, (k + 1) * L)
          : Array.prototype.slice.call(flat, k * L, (k + 1) * L)
      );
    }
  }
  if (rows.length === 0) {
    throw new RangeError('errors must hold at least one trial');
  }
  const curves = rows.map((r, k) => {
    if (r.length !== rows[0].length) {
      throw new RangeError(
        `errors[${k}] has length ${r.length} but errors[0] has length ${rows[0].length}; they must match`
      );
    }
    return learningCurve(r, { complex, window });
  });
  const ens = ensembleAverage(curves, { confidence: options.confidence });
  return { ...ens, ...ensembleDb(ens), window };
}
