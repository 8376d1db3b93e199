/**
 * A run against the true response its set-up names (system identification, noise
 * cancellation): the misalignment of the final weights as a figure, with a sentence on how it
 * was taken. The filter computes y(n) = wᴴu(n), so the weights that reproduce an impulse
 * response h are w_o = conj(h) (h itself for real data).
 */
import { misalignment } from '../../core';
import type { Trans } from './rules';
import type { ResultArray, RunFigure } from './runs';
import type { SetupParams } from './setup';

/** The optimum weights w_o = conj(h) of a true impulse response h, laid out as the weights. */
export function optimumWeights(h: ResultArray, complex: boolean): Float64Array {
  const L = h.complex ? h.data.length / 2 : h.data.length;
  if (!complex) {
    return h.data;
  }
  const wo = new Float64Array(2 * L);
  for (let k = 0; k < L; k++) {
    wo[2 * k] = h.complex ? h.data[2 * k] : h.data[k];
    wo[2 * k + 1] = h.complex ? -h.data[2 * k + 1] : 0;
  }
  return wo;
}

/** The misalignment figure and its sentence, or nothing when the run has no true response. */
export function truthOutcome(
  trans: Trans,
  p: Exclude<SetupParams, { tool: 'sweep' }>,
  inputs: Readonly<Record<string, ResultArray>>,
  arrays: Readonly<Record<string, ResultArray>>
): { figures: RunFigure[]; messages: string[] } {
  const h = inputs.truth;
  const w = arrays.weights;
  if (p.tool !== 'adaptive' || !h || !w) {
    return { figures: [], messages: [] };
  }
  if (h.complex && !w.complex) {
    return {
      figures: [],
      messages: [
        trans.__(
          'No misalignment: the true response %1 is complex but the weights are real.',
          h.description
        )
      ]
    };
  }
  const M = w.shape[w.shape.length - 1];
  const K = w.shape.length > 1 ? w.shape[0] : 1;
  const L = h.complex ? h.data.length / 2 : h.data.length;
  let db: number;
  try {
    db = misalignment(w.data, optimumWeights(h, w.complex), { complex: w.complex, rows: K }).db;
  } catch (e) {
    return {
      figures: [],
      messages: [trans.__('No misalignment: %1', e instanceof Error ? e.message : String(e))]
    };
  }
  const messages = [
    K > 1
      ? trans.__(
          'Misalignment 10·log₁₀(‖w − w_o‖²/‖w_o‖²) of the final weights (%1 taps) against the true response %2 (%3 taps), the shorter padded with zeros; the mean ratio over the %4 rows.',
          M,
          h.description,
          L,
          K
        )
      : trans.__(
          'Misalignment 10·log₁₀(‖w − w_o‖²/‖w_o‖²) of the final weights (%1 taps) against the true response %2 (%3 taps), the shorter padded with zeros.',
          M,
          h.description,
          L
        )
  ];
  if (!Number.isFinite(db)) {
    return { figures: [], messages };
  }
  return {
    figures: [
      {
        key: 'misalignmentDb',
        label: trans.__('misalignment against the true response'),
        value: db,
        unit: 'dB'
      }
    ],
    messages
  };
}
