/**
 * Interference-basis builders: the subspaces an engineer projects off.
 *  - harmonicBasis: cos/sin pairs at f₀ and its harmonics (mains hum and the like), real;
 *  - complexExponentials: e^{j2πf n/fs} for complex (baseband) data;
 *  - ulaSteering: uniform-linear-array steering vectors (a jammer's spatial signature);
 *  - delayEmbedding: the tapped-delay (prewindowed data) matrix of a reference channel over L
 *    lags, whose span holds every FIR-filtered version of the reference.
 * Each returns an m×r Dense with one basis vector per column (DESIGN.md §3).
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { checkFinite, checkInteger, checkNumber, describe } from '../errors';

export interface HarmonicOptions {
  /** Fundamental frequency f₀ in Hz (> 0). */
  f0: number;
  /** Sample rate in Hz (> 0). */
  fs: number;
  /** Number of harmonics K ≥ 1 (f₀, 2f₀, …, Kf₀), each below fs/2. */
  harmonics: number;
  /** Number of samples N ≥ 1. */
  samples: number;
  /** Time of sample 0 in seconds (default 0). */
  t0?: number;
  /** Add a constant (DC) column first (default false). */
  dc?: boolean;
}

/**
 * N×2K real basis: columns cos(2πkf₀t_n), sin(2πkf₀t_n), k = 1..K, t_n = t0 + n/fs. Every
 * harmonic must lie strictly between 0 and the Nyquist frequency fs/2 (at fs/2 the sine column
 * vanishes).
 */
export function harmonicBasis(options: HarmonicOptions): Dense {
  const f0 = checkNumber('f0', options.f0);
  const fs = checkNumber('fs', options.fs);
  if (f0 <= 0) {
    throw new RangeError(`f0 must be > 0, got ${describe(f0)}`);
  }
  if (fs <= 0) {
    throw new RangeError(`fs must be > 0, got ${describe(fs)}`);
  }
  const K = checkInteger('harmonics', options.harmonics, 1);
  const N = checkInteger('samples', options.samples, 1);
  const t0 = checkNumber('t0', options.t0 ?? 0);
  if (K * f0 >= fs / 2) {
    throw new RangeError(
      `harmonics ${K} of f0 = ${f0} Hz reach ${K * f0} Hz, at or above the Nyquist frequency ${fs / 2} Hz`
    );
  }
  const dc = options.dc ?? false;
  const cols = 2 * K + (dc ? 1 : 0);
  const out = Dense.zeros([N, cols], { order: 'F' });
  const d = out.data;
  let c = 0;
  if (dc) {
    d.fill(1, 0, N);
    c = 1;
  }
  for (let k = 1; k <= K; k++) {
    const w = 2 * Math.PI * k * f0;
    for (let n = 0; n < N; n++) {
      // Phase from the exact sample time (no accumulated recursion error).
      const ph = w * (t0 + n / fs);
      d[c * N + n] = Math.cos(ph);
      d[(c + 1) * N + n] = Math.sin(ph);
    }
    c += 2;
  }
  return out;
}

/** N×p complex basis: column k is e^{j(2π f_k (t0 + n/fs) + 0)}, f_k in (−fs/2, fs/2]. */
export function complexExponentials(options: {
  frequencies: readonly number[];
  fs: number;
  samples: number;
  t0?: number;
}): Dense {
  const fs = checkNumber('fs', options.fs);
  if (fs <= 0) {
    throw new RangeError(`fs must be > 0, got ${describe(fs)}`);
  }
  const N = checkInteger('samples', options.samples, 1);
  const t0 = checkNumber('t0', options.t0 ?? 0);
  const freqs = options.frequencies;
  if (!Array.isArray(freqs) || freqs.length === 0) {
    throw new RangeError(`frequencies must be a non-empty array, got ${describe(freqs)}`);
  }
  freqs.forEach((f, k) => {
    checkNumber(`frequencies[${k}]`, f);
    if (f <= -fs / 2 || f > fs / 2) {
      throw new RangeError(`frequencies[${k}] must be in (${-fs / 2}, ${fs / 2}] Hz, got ${f}`);
    }
  });
  const out = Dense.zeros([N, freqs.length], { complex: true, order: 'F' });
  const d = out.data;
  for (let k = 0; k < freqs.length; k++) {
    const w = 2 * Math.PI * freqs[k];
    for (let n = 0; n < N; n++) {
      const ph = w * (t0 + n / fs);
      d[2 * (k * N + n)] = Math.cos(ph);
      d[2 * (k * N + n) + 1] = Math.sin(ph);
    }
  }
  return out;
}

export interface SteeringOptions {
  /**
   * Arrival angles θ from broadside (perpendicular to the array axis), in `unit`. Give either
   * `angles` or `sines`.
   */
  angles?: readonly number[];
  /** Direction sines u = sin θ ∈ [−1, 1] (the form array engineers plot beams in), instead of `angles`. */
  sines?: readonly number[];
  /** Number of elements M ≥ 1. */
  elements: number;
  /** Element spacing d (same unit as the wavelength, > 0). */
  spacing: number;
  /** Wavelength λ (> 0). */
  wavelength: number;
  /** Unit of `angles`, default 'rad' (not used with `sines`). */
  unit?: 'rad' | 'deg';
}

/**
 * M×p complex ULA steering vectors, element 0 the phase reference:
 * a_m = exp(−j·2π·(d/λ)·m·u), u = sin θ, m = 0..M−1 (the narrowband plane-wave array manifold
 * of Van Trees, Optimum Array Processing, Wiley 2002, §2.2 (section from memory)).
 *
 * Phase sign convention, stated physically: element m sits at m·d along the array axis; a plane
 * wave from direction u = sin θ reaches element m a delay τ_m = m·d·u/c after element 0 (so
 * u > 0 means the source lies on element 0's side of broadside); with the analytic carrier
 * e^{+jωt}, the delayed carrier e^{jω(t − τ_m)} carries the factor e^{−jωτ_m} = a_m. Directions
 * come as angles θ (`angles`, in `unit`) or as direction sines u (`sines`). Column norm √M (not
 * normalised).
 */
export function ulaSteering(options: SteeringOptions): Dense {
  const M = checkInteger('elements', options.elements, 1);
  const d = checkNumber('spacing', options.spacing);
  const lam = checkNumber('wavelength', options.wavelength);
  if (d <= 0) {
    throw new RangeError(`spacing must be > 0, got ${describe(d)}`);
  }
  if (lam <= 0) {
    throw new RangeError(`wavelength must be > 0, got ${describe(lam)}`);
  }
  const unit = options.unit ?? 'rad';
  if (unit !== 'rad' && unit !== 'deg') {
    throw new RangeError(`unit must be 'rad' or 'deg', got ${describe(unit)}`);
  }
  const bySines = options.sines !== undefined;
  if (bySines === (options.angles !== undefined)) {
    throw new TypeError(
      bySines
        ? 'give either angles or sines, not both'
        : 'give the directions as angles (θ from broadside) or as sines (u = sin θ)'
    );
  }
  const name = bySines ? 'sines' : 'angles';
  const dirs = bySines ? options.sines : options.angles;
  if (!Array.isArray(dirs) || dirs.length === 0) {
    throw new RangeError(`${name} must be a non-empty array, got ${describe(dirs)}`);
  }
  const lim = bySines ? 1 : unit === 'deg' ? 90 : Math.PI / 2;
  const what = bySines ? '' : ` ${unit}`;
  dirs.forEach((t, k) => {
    checkNumber(`${name}[${k}]`, t);
    if (t < -lim || t > lim) {
      throw new RangeError(`${name}[${k}] must be in [${-lim}, ${lim}]${what}, got ${t}`);
    }
  });
  const out = Dense.zeros([M, dirs.length], { complex: true, order: 'F' });
  const data = out.data;
  for (let k = 0; k < dirs.length; k++) {
    const u = bySines ? dirs[k] : Math.sin(unit === 'deg' ? (dirs[k] * Math.PI) / 180 : dirs[k]);
    const psi = 2 * Math.PI * (d / lam) * u;
    for (let m = 0; m < M; m++) {
      data[2 * (k * M + m)] = Math.cos(psi * m);
      data[2 * (k * M + m) + 1] = -Math.sin(psi * m);
    }
  }
  return out;
}

/**
 * N×L tapped-delay matrix of a reference signal r (length N, real or complex):
 * D[n][l] = r[n − l] for n ≥ l, 0 before (the prewindowed data matrix of the method of least
 * squares: Haykin, Adaptive Filter Theory, chapter "Method of Least Squares"; chapter and
 * section numbers from memory). span(D) holds every L-tap FIR filtering of r, so projecting a channel
 * off it removes what an L-tap filter of the reference can predict (least-squares cancellation).
 */
export function delayEmbedding(reference: MatrixLike | Float64Array, lags: number): Dense {
  let r: Dense;
  if (reference instanceof Float64Array) {
    checkFinite('reference', reference);
    r = new Dense(reference, [reference.length, 1], [1, 1]);
  } else {
    r = toDense('reference', reference);
  }
  if (r.cols !== 1) {
    throw new RangeError(`reference must be 1-D (one signal), got ${r.rows}x${r.cols}`);
  }
  const N = r.rows;
  if (N === 0) {
    throw new RangeError('reference is empty; give at least one sample');
  }
  const L = checkInteger('lags', lags, 1, N);
  const out = Dense.zeros([N, L], { complex: r.complex, order: 'F' });
  for (let l = 0; l < L; l++) {
    for (let n = l; n < N; n++) {
      out.set(n, l, r.get(n - l), r.getIm(n - l));
    }
  }
  return out;
}
