/**
 * How much of a signal lies along each of the directions a user named (each harmonic, each
 * steering vector, each lag of a reference), read from least-squares coefficients on the user's
 * own columns — not from the directions of an orthonormal basis of their span.
 *
 * Why: the orthonormal basis of a rank-revealing QR (pivoted) comes in the order of the pivots,
 * not in the order of the columns given, so the k-th direction of that basis is in general not
 * the k-th harmonic. Solving min‖B·β − x‖₂ (B the m×r basis as given) instead gives the
 * coefficients β_j of each named column; a group G of columns (a harmonic's cosine and sine)
 * carries the component B_G·β_G, whose energy ‖B_G·β_G‖² is the group's share (Kay, Fundamentals
 * of Statistical Signal Processing: Estimation Theory, 1993, §4.5 (sinusoidal parameter
 * estimation by linear least squares; section from memory)). When the columns are orthogonal
 * (harmonics over whole periods) these energies add up to the energy of the projection onto
 * span(B); otherwise the cross terms `fittedEnergy − Σ groupEnergy` say by how much they do not.
 */
import { Dense, toDense, type MatrixLike } from '../dense';
import { checkInteger, describe } from '../errors';
import { harmonicBasis } from './builders';
import { lstsq, type LeastSquaresOptions } from './lstsq';

export interface ColumnSharesOptions extends LeastSquaresOptions {
  /**
   * Groups of basis columns reported together (each a list of column indices; e.g. a harmonic's
   * cosine and sine). Default: one group per column.
   */
  groups?: readonly (readonly number[])[];
  /**
   * Which way the vectors run in x: 'columns' (x is m×n, each column a vector of length m) or
   * 'rows' (x is n×m, e.g. K×N signals against a basis over the N samples). Default: whichever
   * dimension of x equals the basis' m (columns when both do).
   */
  vectors?: 'columns' | 'rows';
}

export interface ColumnShares {
  /** Coefficients β (r×n, column-major as returned by the least-squares solve). */
  coefficients: Dense;
  /** Numerical rank of the basis (minimum-norm coefficients when below r). */
  rank: number;
  /** Σ|x|² over all vectors (the unit of x, squared, summed over samples). */
  inputEnergy: number;
  /** ‖B·β‖²: the energy in span(B), Σ over vectors (measured as input − residual). */
  fittedEnergy: number;
  /** Per group: Σ over vectors of ‖B_G·β_G‖² (same unit as inputEnergy). */
  groupEnergy: Float64Array;
  /** Per group: groupEnergy / inputEnergy (a fraction of the input; 0 for a zero input). */
  share: Float64Array;
  /** Per group: 10·log10(share) in dB (−Infinity for a zero share). */
  shareDb: Float64Array;
}

/**
 * Energy of x along each (group of) column(s) of `basis`, from least-squares coefficients on
 * the columns as given. Real or complex.
 */
export function columnShares(
  basisIn: MatrixLike,
  xIn: MatrixLike,
  options: ColumnSharesOptions = {}
): ColumnShares {
  const b = toDense('basis', basisIn);
  const x0 = toDense('x', xIn);
  const m = b.rows;
  const r = b.cols;
  let vectors = options.vectors;
  if (vectors !== undefined && vectors !== 'columns' && vectors !== 'rows') {
    throw new RangeError(`vectors must be 'columns' or 'rows', got ${describe(vectors)}`);
  }
  if (vectors === undefined) {
    vectors = x0.rows === m ? 'columns' : x0.cols === m ? 'rows' : undefined;
  }
  const xv = vectors === 'rows' ? x0.transpose() : x0;
  if (vectors === undefined || xv.rows !== m) {
    throw new RangeError(
      `x is ${x0.rows}x${x0.cols} but the basis has ${m} rows; one dimension of x must be ${m}`
    );
  }
  const groups = options.groups ?? Array.from({ length: r }, (_, j) => [j]);
  if (!Array.isArray(groups)) {
    throw new TypeError(`groups must be an array of column-index lists, got ${describe(groups)}`);
  }
  groups.forEach((g, k) => {
    if (!Array.isArray(g) || g.length === 0) {
      throw new RangeError(`groups[${k}] must be a non-empty list of column indices`);
    }
    g.forEach((j, i) => checkInteger(`groups[${k}][${i}]`, j, 0, r - 1));
  });
  const ls = lstsq(b, xv, { tol: options.tol, rtol: options.rtol });
  const complex = b.complex || xv.complex;
  const n = xv.cols;
  const B = (complex && !b.complex ? b.toComplex() : b).copy('F').data;
  const beta = (complex && !ls.x.complex ? ls.x.toComplex() : ls.x).copy('F');
  const C = beta.data;
  let inputEnergy = 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      inputEnergy += xv.get(i, j) ** 2 + xv.getIm(i, j) ** 2;
    }
  }
  let residual = 0;
  for (const rn of ls.residualNorm) {
    residual += rn * rn;
  }
  const groupEnergy = new Float64Array(groups.length);
  groups.forEach((g, k) => {
    let s = 0;
    for (let v = 0; v < n; v++) {
      for (let i = 0; i < m; i++) {
        let re = 0;
        let im = 0;
        for (const j of g) {
          if (complex) {
            const br = B[2 * (i + j * m)];
            const bi = B[2 * (i + j * m) + 1];
            const cr = C[2 * (j + v * r)];
            const ci = C[2 * (j + v * r) + 1];
            re += br * cr - bi * ci;
            im += br * ci + bi * cr;
          } else {
            re += B[i + j * m] * C[j + v * r];
          }
        }
        s += re * re + im * im;
      }
    }
    groupEnergy[k] = s;
  });
  const share = new Float64Array(groups.length);
  const shareDb = new Float64Array(groups.length);
  for (let k = 0; k < groups.length; k++) {
    share[k] = inputEnergy > 0 ? groupEnergy[k] / inputEnergy : 0;
    shareDb[k] = 10 * Math.log10(share[k]);
  }
  return {
    coefficients: beta,
    rank: ls.rank,
    inputEnergy,
    fittedEnergy: Math.max(inputEnergy - residual, 0),
    groupEnergy,
    share,
    shareDb
  };
}

export interface HarmonicSharesOptions extends LeastSquaresOptions {
  /** Fundamental frequency f₀ in Hz (> 0). */
  f0: number;
  /** Sample rate in Hz (> 0). */
  fs: number;
  /** Number of harmonics K ≥ 1 (f₀ … K·f₀, each below fs/2). */
  harmonics: number;
  /** Time of sample 0 in seconds (default 0). */
  t0?: number;
}

export interface HarmonicShares extends ColumnShares {
  /** k·f₀ in Hz, k = 1..K. */
  frequencies: Float64Array;
  /** Number of signals (rows of a K×N input; 1 for a 1-D signal). */
  signals: number;
  /**
   * Amplitude A of each harmonic in each signal (signals × K, row-major), in the unit of x:
   * the fitted component is A·cos(2πk·f₀·t + φ).
   */
  amplitude: Float64Array;
  /** Phase φ in radians (signals × K, row-major), same model as `amplitude`. */
  phase: Float64Array;
}

/**
 * Each harmonic's share of a real signal (1-D of length N, or K×N with samples along the last
 * axis): least squares on the cosine/sine pair of every harmonic (columns 2k, 2k+1 of
 * `harmonicBasis`), the pair's energy ‖a·cos + b·sin‖² summed over the signals, and the
 * amplitude √(a² + b²) and phase atan2(−b, a) of each fit.
 */
export function harmonicShares(
  x: Float64Array | Dense,
  options: HarmonicSharesOptions
): HarmonicShares {
  let xd: Dense;
  if (x instanceof Float64Array) {
    xd = new Dense(x, [1, x.length]);
  } else if (x instanceof Dense) {
    if (x.ndim === 1) {
      xd = x.asColumn().transpose();
    } else if (x.ndim === 2) {
      xd = x;
    } else {
      throw new RangeError(`x must be 1-D or 2-D (K×N), got ${x.ndim}-D`);
    }
  } else {
    throw new TypeError(`x must be a Float64Array or a Dense array, got ${describe(x)}`);
  }
  if (xd.complex) {
    throw new TypeError('x is complex; harmonic shares on cosine/sine pairs need a real signal');
  }
  const signals = xd.rows;
  const N = xd.cols;
  const K = checkInteger('harmonics', options.harmonics, 1);
  if (N < 2 * K) {
    throw new RangeError(
      `x has ${N} samples, fewer than the ${2 * K} cosine/sine columns of ${K} harmonics`
    );
  }
  const basis = harmonicBasis({
    f0: options.f0,
    fs: options.fs,
    harmonics: K,
    samples: N,
    t0: options.t0
  });
  const groups = Array.from({ length: K }, (_, k) => [2 * k, 2 * k + 1]);
  const cs = columnShares(basis, xd, {
    groups,
    vectors: 'rows',
    tol: options.tol,
    rtol: options.rtol
  });
  const amplitude = new Float64Array(signals * K);
  const phase = new Float64Array(signals * K);
  const C = cs.coefficients.data; // 2K × signals, column-major
  for (let s = 0; s < signals; s++) {
    for (let k = 0; k < K; k++) {
      const a = C[2 * k + s * 2 * K];
      const b = C[2 * k + 1 + s * 2 * K];
      amplitude[s * K + k] = Math.hypot(a, b);
      phase[s * K + k] = Math.atan2(-b, a);
    }
  }
  const frequencies = new Float64Array(K);
  for (let k = 0; k < K; k++) {
    frequencies[k] = (k + 1) * options.f0;
  }
  return { ...cs, frequencies, signals, amplitude, phase };
}
