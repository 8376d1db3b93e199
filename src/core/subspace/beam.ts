/**
 * The spatial response of a projection on a uniform linear array: how much of a plane wave from
 * direction θ a projector P passes, ‖P·a(θ)‖²/‖a(θ)‖², over θ ∈ [−90°, 90°]. P removes (mode
 * 'off', P = I − QQᴴ) or keeps only (mode 'onto', P = QQᴴ) the span of the steering vectors of
 * the given directions, Q an orthonormal basis of that span (rank-revealing QR, as `orth`).
 * Since P is an orthogonal projector, ‖P·a‖² = ‖a‖² − ‖Qᴴa‖² for 'off' and ‖Qᴴa‖² for 'onto'
 * (Golub and Van Loan, Matrix Computations, 4th ed., §2.5.1 / §5.4: orthogonal projections), so
 * the response is 1 at directions orthogonal to the subspace and 0 (a null) at each removed
 * direction. Steering vectors as `ulaSteering`.
 */
import { checkInteger, checkNumber, describe } from '../errors';
import { orth } from './basis';
import { ulaSteering } from './builders';

export interface BeamPatternOptions {
  /** Directions spanning the subspace, as angles θ from broadside (in `unit`), or… */
  angles?: readonly number[];
  /** …as direction sines u = sin θ. */
  sines?: readonly number[];
  /** Unit of `angles`, default 'rad'. */
  unit?: 'rad' | 'deg';
  /** Number of elements M ≥ 1. */
  elements: number;
  /** Element spacing d and wavelength λ in the same unit (> 0). */
  spacing: number;
  wavelength: number;
  /** 'off' (default): the response of I − QQᴴ; 'onto': of QQᴴ. */
  mode?: 'off' | 'onto';
  /** Angles evaluated, evenly spaced over [−90°, 90°] (default 721: every 0.25°; ≥ 2). */
  points?: number;
  /** Relative rank tolerance of the basis (as `orth`; default max(M, p)·ε). */
  rtol?: number;
}

export interface BeamPatternResult {
  /** θ of each point, degrees from broadside, ascending from −90 to 90. */
  angle: Float64Array;
  /** ‖P·a(θ)‖²/‖a(θ)‖², a power ratio in [0, 1] (dimensionless). */
  response: Float64Array;
  /** Dimension of the subspace (numerical rank of the steering vectors). */
  rank: number;
}

/** The response of the projection against angle (see the file's comment). */
export function projectionBeamPattern(options: BeamPatternOptions): BeamPatternResult {
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`options must be an object, got ${describe(options)}`);
  }
  const M = checkInteger('elements', options.elements, 1);
  const mode = options.mode ?? 'off';
  if (mode !== 'off' && mode !== 'onto') {
    throw new RangeError(`mode must be 'off' or 'onto', got ${describe(mode)}`);
  }
  const G = checkInteger('points', options.points ?? 721, 2);
  if (options.rtol !== undefined) {
    checkNumber('rtol', options.rtol);
  }
  // ulaSteering checks the directions, spacing and wavelength.
  const B = ulaSteering({
    angles: options.angles,
    sines: options.sines,
    unit: options.unit,
    elements: M,
    spacing: options.spacing,
    wavelength: options.wavelength
  });
  const { basis: Q, rank } = orth(B, options.rtol === undefined ? {} : { rtol: options.rtol });
  const angle = new Float64Array(G);
  for (let g = 0; g < G; g++) {
    angle[g] = -90 + (180 * g) / (G - 1);
  }
  // The probes a(θ), one column each (M×G, complex, column-major as ulaSteering makes them).
  const sines = new Array<number>(G);
  for (let g = 0; g < G; g++) {
    sines[g] = Math.sin((angle[g] * Math.PI) / 180);
  }
  const A = ulaSteering({
    sines,
    elements: M,
    spacing: options.spacing,
    wavelength: options.wavelength
  });
  const q = Q.data;
  const [qs0, qs1] = Q.strides;
  const q0 = Q.offset;
  const a = A.data;
  const response = new Float64Array(G);
  for (let g = 0; g < G; g++) {
    const base = 2 * g * M;
    let energy = 0;
    for (let m = 0; m < M; m++) {
      energy += a[base + 2 * m] ** 2 + a[base + 2 * m + 1] ** 2;
    }
    // ‖Qᴴa‖² = Σ_j |q_jᴴ a|²
    let inside = 0;
    for (let j = 0; j < rank; j++) {
      let re = 0;
      let im = 0;
      for (let m = 0; m < M; m++) {
        const k = 2 * (q0 + m * qs0 + j * qs1);
        const qr = q[k];
        const qi = q[k + 1];
        const ar = a[base + 2 * m];
        const ai = a[base + 2 * m + 1];
        // conj(q)·a
        re += qr * ar + qi * ai;
        im += qr * ai - qi * ar;
      }
      inside += re * re + im * im;
    }
    const passed = mode === 'off' ? Math.max(0, energy - inside) : Math.min(energy, inside);
    response[g] = passed / energy;
  }
  return { angle, response, rank };
}
