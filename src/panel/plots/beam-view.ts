/**
 * The beam pattern of an interference removal on a uniform line array: the power the
 * projection passes for a plane wave from each direction θ ∈ [−90°, 90°] (the core's
 * `projectionBeamPattern`), in dB, with the directions given in the set-up marked.
 */
import { projectionBeamPattern } from '../../core';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { emptySpec, type PlotSpec } from './spec';

/** Responses below this are drawn at it (a null's depth is limited by rounding anyway). */
export const BEAM_FLOOR_DB = -100;

/** Number of array elements M: the input's channels (its layout), or the basis' rows. */
function elementsOf(run: Run): number | null {
  if (run.params.tool !== 'removal') {
    return null;
  }
  const s = run.inputs.signal;
  const layout = run.params.signal.layout;
  if (s && s.shape.length === 2 && layout) {
    return s.shape[1 - layout.samplesAxis];
  }
  const q = run.arrays.basis;
  return q && q.shape.length >= 1 ? q.shape[0] : null;
}

export function beamView(trans: Trans, run: Run): PlotSpec {
  const p = run.params;
  if (p.tool !== 'removal' || p.basis.kind !== 'array') {
    throw new Error(trans.__('run "%1" has no array steering directions', run.label));
  }
  const b = p.basis;
  const M = elementsOf(run);
  if (M === null) {
    throw new Error(trans.__('run "%1" does not say how many sensors its array has', run.label));
  }
  const r = projectionBeamPattern({
    ...(b.units === 'degrees' ? { angles: b.directions, unit: 'deg' } : { sines: b.directions }),
    elements: M,
    spacing: b.spacing,
    wavelength: b.wavelength,
    mode: p.mode,
    rtol: p.rankTolerance ?? undefined
  });
  const y = new Float64Array(r.response.length);
  for (let g = 0; g < y.length; g++) {
    y[g] = Math.max(BEAM_FLOOR_DB, 10 * Math.log10(r.response[g]));
  }
  const spec = emptySpec(
    trans.__('Beam pattern of the projection'),
    trans.__('direction θ from broadside (°)'),
    '°',
    trans.__('power passed (dB)')
  );
  spec.traces.push({
    name: trans.__('‖P a(θ)‖² / ‖a(θ)‖²'),
    kind: 'line',
    x: r.angle,
    y,
    color: 0
  });
  for (const d of b.directions) {
    const deg = b.units === 'degrees' ? d : (Math.asin(d) * 180) / Math.PI;
    const text = Number(deg.toPrecision(4));
    spec.markers.push({
      orientation: 'v',
      value: deg,
      label: p.mode === 'off' ? trans.__('removed %1°', text) : trans.__('kept %1°', text),
      color: 3
    });
  }
  spec.note = trans.__(
    'Power a plane wave from direction θ keeps after the projection, ‖P a(θ)‖²/‖a(θ)‖², for the %1-element line array with spacing d/λ = %2 (steering vectors as the set-up builds them; subspace rank %3). %4 Values below %5 dB are drawn at %5 dB.',
    M,
    Number((b.spacing / b.wavelength).toPrecision(4)),
    r.rank,
    p.mode === 'off'
      ? trans.__('Nulls are expected at the removed directions.')
      : trans.__('Only the kept directions pass in full.'),
    BEAM_FLOOR_DB
  );
  return spec;
}
