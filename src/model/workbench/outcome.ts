/**
 * From a worker's result to what the workbench shows: the key numbers in the user's units
 * (dB, seconds, samples, per cent, degrees), warnings as sentences with the sample index or the
 * value, and the arrays to write back, each saying what it is.
 */
import type { Trans } from './rules';
import type { ArrayData, JobResult, JobTiming, JobWarning } from '../../worker/protocol';
import type { ResultArray, RunFigure, RunOutcome } from './runs';

/**
 * What is left along a removed direction is numerically zero (10⁻³⁰ of the input, say): shown
 * at this floor, in dB of the input energy, and the plot says so.
 */
export const AFTER_FLOOR_DB = -150;

function arr(a: ArrayData, description: string): ResultArray {
  return { data: a.data, shape: a.shape, complex: a.complex, description };
}

function vec(v: Float64Array, description: string): ResultArray {
  return { data: v, shape: [v.length], complex: false, description };
}

/** A warning as a sentence: its message, and where it was seen. */
export function warningText(trans: Trans, w: JobWarning): string {
  const where: string[] = [];
  if (w.index !== undefined) {
    where.push(trans.__('at sample %1', w.index));
  }
  if (w.trial !== undefined) {
    where.push(trans.__('in trial %1', w.trial + 1));
  }
  if (w.value !== undefined && w.index === undefined) {
    where.push(trans.__('(value %1)', Number(w.value.toPrecision(4))));
  }
  return where.length > 0 ? `${w.message} (${where.join(', ')})` : w.message;
}

/** The run outcome of a finished job. */
export function outcomeOf(trans: Trans, r: JobResult, timing: JobTiming): RunOutcome {
  const figures: RunFigure[] = [];
  const fig = (
    key: string,
    label: string,
    value: number | null | undefined,
    unit: string
  ): void => {
    if (value !== null && value !== undefined && Number.isFinite(value)) {
      figures.push({ key, label, value, unit });
    }
  };
  const arrays: Record<string, ResultArray> = {};
  const messages = r.warnings.map(w => warningText(trans, w));
  switch (r.kind) {
    case 'adaptive-filter': {
      const f = r.figures;
      fig('finalMseDb', 'final MSE', f.finalMseDb, 'dB');
      fig('steadyStateMseDb', 'steady-state MSE', f.steadyStateMseDb, 'dB');
      fig('convergenceSamples', 'convergence time', f.convergenceSamples, 'samples');
      fig('convergenceSeconds', 'convergence time', f.convergenceSeconds, 's');
      fig(
        'misadjustment',
        'misadjustment',
        f.misadjustment === null ? null : 100 * f.misadjustment,
        '%'
      );
      fig('errorReductionDb', 'power of e below that of d', f.errorReductionDb, 'dB');
      fig(
        'symbolErrorRate',
        'symbol errors after training',
        f.symbolErrorRate === null ? null : 100 * f.symbolErrorRate,
        '%'
      );
      fig('trials', 'trials K', r.K, '');
      arrays.output = arr(r.output, 'filter output y(n)');
      arrays.error = arr(r.error, 'a-priori error e(n) = d(n) − y(n)');
      arrays.weights = arr(r.weights, 'final weights w');
      if (r.trajectory) {
        arrays.trajectory = arr(r.trajectory, 'weights kept every k samples (rows)');
      }
      if (r.trajectoryIndex) {
        arrays.trajectoryIndex = vec(r.trajectoryIndex, 'sample index of each kept weight row');
      }
      arrays.learningCurve = vec(
        r.learningCurve,
        r.K > 1 ? 'learning curve: mean |e(n)|² over the trials' : 'learning curve |e(n)|²'
      );
      if (r.learningCurveSmoothed) {
        arrays.learningCurveSmoothed = vec(
          r.learningCurveSmoothed,
          'learning curve smoothed over the figures’ window (trailing moving average)'
        );
      }
      fig('smoothingWindow', 'learning curve smoothed over', f.window, 'samples');
      if (r.learningCurveLower && r.learningCurveUpper) {
        arrays.learningCurveLower = vec(
          r.learningCurveLower,
          'lower edge of the 95 % band of the mean'
        );
        arrays.learningCurveUpper = vec(
          r.learningCurveUpper,
          'upper edge of the 95 % band of the mean'
        );
      }
      if (r.decisions) {
        arrays.decisions = {
          data: r.decisions,
          shape: [r.decisions.length / (r.complex ? 2 : 1)],
          complex: r.complex,
          description: 'symbol decisions'
        };
      }
      messages.push(
        trans.__(
          'Figures from the learning curve smoothed over %1 samples; steady state = the last %2 samples; converged = within ±%3 dB of it.',
          f.window,
          f.tail,
          f.marginDb
        )
      );
      break;
    }
    case 'interference': {
      fig('suppressionDb', 'energy removed with the subspace', r.suppressionDb, 'dB');
      fig(
        'subspaceShare',
        'share of the energy in the subspace',
        (100 * r.subspaceEnergy) / r.inputEnergy,
        '%'
      );
      fig('keptShare', 'share of the signal kept', 100 * r.keptShare, '%');
      fig('rank', 'rank of the subspace', r.rank, '');
      fig('columns', 'directions given', r.columns, '');
      for (const d of r.directions) {
        fig(`dir:${d.label}`, trans.__('energy along %1', d.label), d.shareDb, 'dB');
        // −∞ (nothing left) is not a figure; the plot draws it at its floor
        fig(
          `after:${d.label}`,
          trans.__('left along %1 after', d.label),
          Math.max(d.shareAfterDb, AFTER_FLOOR_DB),
          'dB'
        );
      }
      arrays.output = arr(
        r.output,
        r.mode === 'off' ? 'signal with the subspace removed' : 'signal projected onto the subspace'
      );
      arrays.basis = arr(r.basis, 'orthonormal basis Q of the subspace (columns)');
      messages.push(
        trans.__(
          'Per-direction figures are 10·log₁₀ of the direction’s share of the input energy, from least squares on that direction’s own columns.'
        )
      );
      break;
    }
    case 'basis':
      fig('rank', 'rank', r.rank, '');
      fig('nullity', 'null-space dimension', r.nullity, '');
      fig('gapBefore', '|r_kk| at the rank', r.gapBefore, '');
      fig('gapAfter', '|r_kk| after the rank', r.gapAfter, '');
      fig('tol', 'tolerance on |r_kk|', r.tol, '');
      fig('relativeResidual', '‖A·N‖ / ‖A‖ (Frobenius)', r.relativeResidual, '');
      arrays.basis = arr(r.basis, 'orthonormal basis of the column space');
      arrays.nullSpace = arr(r.nullSpace, 'orthonormal basis of the null space');
      break;
    case 'least-squares':
      fig('rank', 'rank of A', r.rank, '');
      fig('tol', 'tolerance on |r_kk|', r.tol, '');
      r.residualNorm.forEach((v, j) =>
        fig(
          `residual${j}`,
          r.residualNorm.length > 1
            ? trans.__('residual ‖b − A·x‖ (column %1)', j + 1)
            : 'residual ‖b − A·x‖',
          v,
          ''
        )
      );
      arrays.x = arr(
        r.x,
        r.minimumNorm ? 'minimum-norm least-squares solution x' : 'least-squares solution x'
      );
      if (r.minimumNorm) {
        messages.push(trans.__('A is rank-deficient: x is the minimum-norm solution.'));
      }
      break;
    case 'angles':
      r.degrees.forEach((v, i) => fig(`angle${i}`, trans.__('principal angle θ%1', i + 1), v, '°'));
      fig('rankA', 'rank of A', r.rankA, '');
      fig('rankB', 'rank of B', r.rankB, '');
      arrays.radians = vec(r.radians, 'principal angles (radians)');
      arrays.cosines = vec(r.cosines, 'cosines of the principal angles');
      break;
  }
  return {
    status: r.status,
    messages,
    figures: figures.map(f => ({ ...f, label: trans.__(f.label) })),
    arrays,
    computeMs: timing.ms
  };
}
