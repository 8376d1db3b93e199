/**
 * Projection of many vectors onto span(Q) and off it, y = Q(Qᴴx) or y = x − Q(Qᴴx), streaming
 * over the vectors (the samples) in blocks, never forming the m×m projector (Golub & Van Loan,
 * Matrix Computations 4e, §2.5.1, §5.4.1: P = QQᴴ, I − P for orthonormal Q). With an m×r basis,
 * each vector costs 4mr flops (real) and only a block of r×B coefficients is held.
 *
 * The energy report gives, per basis direction k, E_k = Σ_j |q_kᴴ x_j|², whose sum is the removed
 * (projected) energy because the q_k are orthonormal (Pythagoras).
 */
import { Dense, asVector, isVectorInput, toDense, type MatrixLike } from '../dense';
import { describe } from '../errors';
import { orth } from './basis';
import type { PivotedQROptions } from '../linalg/pivoted';

const BLOCK = 64; // vectors per block in the complex kernel

/**
 * Real kernel. Q is m×r (any strides), X and Y are m×n (columns are the vectors; any strides,
 * Y may alias X). mode 'off' writes x − Q(Qᵀx), 'onto' writes Q(Qᵀx). energy (length r, or
 * null) accumulates Σ_j (q_kᵀx_j)². Allocates its packed copy of Q and one block buffer at the
 * entry only.
 */
export function dproject(
  mode: 'off' | 'onto',
  m: number,
  n: number,
  r: number,
  Q: Float64Array,
  sq1: number,
  sq2: number,
  oq: number,
  X: Float64Array,
  sx1: number,
  sx2: number,
  ox: number,
  Y: Float64Array,
  sy1: number,
  sy2: number,
  oy: number,
  energy: Float64Array | null
): void {
  // Q packed direction-major (q_k contiguous). One vector at a time: c = Qᵀx in groups of four
  // directions held in registers, then y = x − Q·c in groups of eight, then four, then one.
  // The m entries of x are touched twice while they are in L1; x is read from memory once.
  const qd = new Float64Array(m * r);
  for (let k = 0; k < r; k++) {
    for (let i = 0; i < m; i++) {
      qd[k * m + i] = Q[oq + i * sq1 + k * sq2];
    }
  }
  const qr = new Float64Array(m * r); // row-major copy for the update y = x − Q·c
  for (let i = 0; i < m; i++) {
    for (let k = 0; k < r; k++) {
      qr[i * r + k] = qd[k * m + i];
    }
  }
  const c = new Float64Array(r);
  const off = mode === 'off';
  const sg = off ? -1 : 1;
  const xs = off ? 1 : 0;
  let j = 0;
  if (r >= 4) {
    j = dprojectPairs(m, n, r, qd, X, sx1, sx2, ox, Y, sy1, sy2, oy, energy, sg, xs);
  }
  for (; j < n; j++) {
    const xj = ox + j * sx2;
    const yj = oy + j * sy2;
    let k = 0;
    for (; k + 4 <= r; k += 4) {
      const q0 = k * m;
      const q1 = q0 + m;
      const q2 = q1 + m;
      const q3 = q2 + m;
      let s0 = 0,
        s1 = 0,
        s2 = 0,
        s3 = 0;
      for (let i = 0, e = xj; i < m; i++, e += sx1) {
        const v = X[e];
        s0 += qd[q0 + i] * v;
        s1 += qd[q1 + i] * v;
        s2 += qd[q2 + i] * v;
        s3 += qd[q3 + i] * v;
      }
      c[k] = s0;
      c[k + 1] = s1;
      c[k + 2] = s2;
      c[k + 3] = s3;
    }
    for (; k < r; k++) {
      const q0 = k * m;
      let s0 = 0;
      for (let i = 0, e = xj; i < m; i++, e += sx1) {
        s0 += qd[q0 + i] * X[e];
      }
      c[k] = s0;
    }
    if (energy) {
      for (let p = 0; p < r; p++) {
        energy[p] += c[p] * c[p];
      }
    }
    // y = xs·x + Q·(sg·c) with (xs, sg) = (1, −1) for 'off' and (0, 1) for 'onto'; the first
    // group of directions writes y, later groups add to it (inputs are finite, so 0·x = 0).
    k = 0;
    for (; k + 8 <= r; k += 8) {
      const c0 = sg * c[k],
        c1 = sg * c[k + 1],
        c2 = sg * c[k + 2],
        c3 = sg * c[k + 3],
        c4 = sg * c[k + 4],
        c5 = sg * c[k + 5],
        c6 = sg * c[k + 6],
        c7 = sg * c[k + 7];
      if (k === 0) {
        for (let i = 0, e = xj, o = yj; i < m; i++, e += sx1, o += sy1) {
          const q = i * r;
          Y[o] =
            xs * X[e] +
            (qr[q] * c0 + qr[q + 1] * c1 + qr[q + 2] * c2 + qr[q + 3] * c3) +
            (qr[q + 4] * c4 + qr[q + 5] * c5 + qr[q + 6] * c6 + qr[q + 7] * c7);
        }
      } else {
        for (let i = 0, o = yj; i < m; i++, o += sy1) {
          const q = i * r + k;
          Y[o] +=
            qr[q] * c0 +
            qr[q + 1] * c1 +
            qr[q + 2] * c2 +
            qr[q + 3] * c3 +
            (qr[q + 4] * c4 + qr[q + 5] * c5 + qr[q + 6] * c6 + qr[q + 7] * c7);
        }
      }
    }
    for (; k + 4 <= r; k += 4) {
      const c0 = sg * c[k],
        c1 = sg * c[k + 1],
        c2 = sg * c[k + 2],
        c3 = sg * c[k + 3];
      if (k === 0) {
        for (let i = 0, e = xj, o = yj; i < m; i++, e += sx1, o += sy1) {
          const q = i * r;
          Y[o] = xs * X[e] + (qr[q] * c0 + qr[q + 1] * c1 + qr[q + 2] * c2 + qr[q + 3] * c3);
        }
      } else {
        for (let i = 0, o = yj; i < m; i++, o += sy1) {
          const q = i * r + k;
          Y[o] += qr[q] * c0 + qr[q + 1] * c1 + qr[q + 2] * c2 + qr[q + 3] * c3;
        }
      }
    }
    for (; k < r; k++) {
      const c0 = sg * c[k];
      if (k === 0) {
        for (let i = 0, e = xj, o = yj; i < m; i++, e += sx1, o += sy1) {
          Y[o] = xs * X[e] + qr[i * r] * c0;
        }
      } else {
        for (let i = 0, o = yj; i < m; i++, o += sy1) {
          Y[o] += qr[i * r + k] * c0;
        }
      }
    }
    if (r === 0) {
      for (let i = 0, e = xj, o = yj; i < m; i++, e += sx1, o += sy1) {
        Y[o] = xs * X[e];
      }
    }
  }
}

/**
 * Two vectors at a time (r ≥ 4): each loaded basis entry serves both, which the single-vector
 * loop cannot do. Returns the number of vectors done (n rounded down to even).
 */
function dprojectPairs(
  m: number,
  n: number,
  r: number,
  qd: Float64Array,
  X: Float64Array,
  sx1: number,
  sx2: number,
  ox: number,
  Y: Float64Array,
  sy1: number,
  sy2: number,
  oy: number,
  energy: Float64Array | null,
  sg: number,
  xs: number
): number {
  const c = new Float64Array(2 * r);
  const r4 = r - (r % 4);
  let j = 0;
  for (; j + 2 <= n; j += 2) {
    const xa = ox + j * sx2;
    const xb = xa + sx2;
    const ya = oy + j * sy2;
    const yb = ya + sy2;
    for (let k = 0; k < r4; k += 4) {
      const q0 = k * m;
      const q1 = q0 + m;
      const q2 = q1 + m;
      const q3 = q2 + m;
      let a0 = 0,
        a1 = 0,
        a2 = 0,
        a3 = 0,
        b0 = 0,
        b1 = 0,
        b2 = 0,
        b3 = 0;
      for (let i = 0, e = 0; i < m; i++, e += sx1) {
        const u = X[xa + e];
        const v = X[xb + e];
        const p0 = qd[q0 + i],
          p1 = qd[q1 + i],
          p2 = qd[q2 + i],
          p3 = qd[q3 + i];
        a0 += p0 * u;
        a1 += p1 * u;
        a2 += p2 * u;
        a3 += p3 * u;
        b0 += p0 * v;
        b1 += p1 * v;
        b2 += p2 * v;
        b3 += p3 * v;
      }
      c[k] = a0;
      c[k + 1] = a1;
      c[k + 2] = a2;
      c[k + 3] = a3;
      c[r + k] = b0;
      c[r + k + 1] = b1;
      c[r + k + 2] = b2;
      c[r + k + 3] = b3;
    }
    for (let k = r4; k < r; k++) {
      const q0 = k * m;
      let a0 = 0,
        b0 = 0;
      for (let i = 0, e = 0; i < m; i++, e += sx1) {
        a0 += qd[q0 + i] * X[xa + e];
        b0 += qd[q0 + i] * X[xb + e];
      }
      c[k] = a0;
      c[r + k] = b0;
    }
    if (energy) {
      for (let p = 0; p < r; p++) {
        energy[p] += c[p] * c[p] + c[r + p] * c[r + p];
      }
    }
    for (let k = 0; k < r4; k += 4) {
      const q0 = k * m;
      const q1 = q0 + m;
      const q2 = q1 + m;
      const q3 = q2 + m;
      const a0 = sg * c[k],
        a1 = sg * c[k + 1],
        a2 = sg * c[k + 2],
        a3 = sg * c[k + 3];
      const b0 = sg * c[r + k],
        b1 = sg * c[r + k + 1],
        b2 = sg * c[r + k + 2],
        b3 = sg * c[r + k + 3];
      if (k === 0) {
        for (let i = 0, e = 0, o = 0; i < m; i++, e += sx1, o += sy1) {
          const p0 = qd[q0 + i],
            p1 = qd[q1 + i],
            p2 = qd[q2 + i],
            p3 = qd[q3 + i];
          Y[ya + o] = xs * X[xa + e] + (p0 * a0 + p1 * a1 + p2 * a2 + p3 * a3);
          Y[yb + o] = xs * X[xb + e] + (p0 * b0 + p1 * b1 + p2 * b2 + p3 * b3);
        }
      } else {
        for (let i = 0, o = 0; i < m; i++, o += sy1) {
          const p0 = qd[q0 + i],
            p1 = qd[q1 + i],
            p2 = qd[q2 + i],
            p3 = qd[q3 + i];
          Y[ya + o] += p0 * a0 + p1 * a1 + p2 * a2 + p3 * a3;
          Y[yb + o] += p0 * b0 + p1 * b1 + p2 * b2 + p3 * b3;
        }
      }
    }
    for (let k = r4; k < r; k++) {
      const q0 = k * m;
      const a0 = sg * c[k];
      const b0 = sg * c[r + k];
      for (let i = 0, o = 0; i < m; i++, o += sy1) {
        Y[ya + o] += qd[q0 + i] * a0;
        Y[yb + o] += qd[q0 + i] * b0;
      }
    }
  }
  return j;
}

/** Complex kernel (interleaved; strides and offsets in complex elements): c = Qᴴx. */
export function zproject(
  mode: 'off' | 'onto',
  m: number,
  n: number,
  r: number,
  Q: Float64Array,
  sq1: number,
  sq2: number,
  oq: number,
  X: Float64Array,
  sx1: number,
  sx2: number,
  ox: number,
  Y: Float64Array,
  sy1: number,
  sy2: number,
  oy: number,
  energy: Float64Array | null
): void {
  const qr = new Float64Array(2 * m * r);
  for (let i = 0; i < m; i++) {
    for (let k = 0; k < r; k++) {
      const s = 2 * (oq + i * sq1 + k * sq2);
      qr[2 * (i * r + k)] = Q[s];
      qr[2 * (i * r + k) + 1] = Q[s + 1];
    }
  }
  const B = Math.min(BLOCK, Math.max(1, n));
  const c = new Float64Array(2 * r * B);
  const t = new Float64Array(2 * B);
  const off = mode === 'off';
  const dx = 2 * sx2;
  for (let j0 = 0; j0 < n; j0 += B) {
    const nb = Math.min(B, n - j0);
    c.fill(0);
    for (let i = 0; i < m; i++) {
      const xi = 2 * (ox + i * sx1 + j0 * sx2);
      for (let k = 0; k < r; k++) {
        const qr0 = qr[2 * (i * r + k)];
        const qi0 = -qr[2 * (i * r + k) + 1]; // conj(q)
        const c0 = 2 * k * B;
        for (let b = 0, e = xi; b < nb; b++, e += dx) {
          const vr = X[e],
            vi = X[e + 1];
          c[c0 + 2 * b] += qr0 * vr - qi0 * vi;
          c[c0 + 2 * b + 1] += qr0 * vi + qi0 * vr;
        }
      }
    }
    if (energy) {
      for (let k = 0; k < r; k++) {
        let s = 0;
        for (let b = 0; b < 2 * nb; b++) {
          s += c[2 * k * B + b] * c[2 * k * B + b];
        }
        energy[k] += s;
      }
    }
    for (let i = 0; i < m; i++) {
      t.fill(0);
      for (let k = 0; k < r; k++) {
        const qr0 = qr[2 * (i * r + k)];
        const qi0 = qr[2 * (i * r + k) + 1];
        const c0 = 2 * k * B;
        for (let b = 0; b < 2 * nb; b += 2) {
          const cr = c[c0 + b],
            ci = c[c0 + b + 1];
          t[b] += qr0 * cr - qi0 * ci;
          t[b + 1] += qr0 * ci + qi0 * cr;
        }
      }
      const xi = 2 * (ox + i * sx1 + j0 * sx2);
      const yi = 2 * (oy + i * sy1 + j0 * sy2);
      for (let b = 0; b < nb; b++) {
        const xe = xi + b * dx;
        const ye = yi + 2 * b * sy2;
        Y[ye] = off ? X[xe] - t[2 * b] : t[2 * b];
        Y[ye + 1] = off ? X[xe + 1] - t[2 * b + 1] : t[2 * b + 1];
      }
    }
  }
}

export interface EnergyReport {
  /** Σ|x|² over all vectors. */
  inputEnergy: number;
  /** Σ|y|² of the output (the residual for 'off', the projection for 'onto'). */
  outputEnergy: number;
  /** Energy in span(Q): Σ_k E_k. */
  projectedEnergy: number;
  /** Energy off span(Q): Σ|x − Q(Qᴴx)|², measured. */
  residualEnergy: number;
  /** 10·log10(input / residual): how much projecting off suppresses (Infinity if residual 0). */
  suppressionDb: number;
  /** Per basis direction k: E_k = Σ_j |q_kᴴ x_j|². */
  directionEnergy: Float64Array;
  /** Per direction: 10·log10(E_k / input), the share of the input along q_k in dB. */
  directionShareDb: Float64Array;
  /** Per direction: 10·log10(input / (input − E_k)), the suppression removing q_k alone gives. */
  directionSuppressionDb: Float64Array;
}

export interface ProjectOptions extends PivotedQROptions {
  /** The basis columns are already orthonormal: skip the rank-revealing QR. */
  orthonormal?: boolean;
  /**
   * Which way the vectors run in x: 'columns' (x is m×N, each column a vector of length m) or
   * 'rows' (x is N×m, e.g. K×N signals against a basis over the N samples). Default: whichever
   * dimension of x equals the basis' m (columns when both do).
   */
  vectors?: 'columns' | 'rows';
}

export interface ProjectionResult {
  /** Same shape (and C/F order when contiguous) as x: a 1-D x gives a 1-D output. */
  output: Dense;
  /** The orthonormal basis used (m×rank). */
  basis: Dense;
  rank: number;
  energy: EnergyReport;
}

function project(
  mode: 'off' | 'onto',
  basisIn: MatrixLike,
  xIn: MatrixLike,
  options: ProjectOptions
): ProjectionResult {
  const b = toDense('basis', basisIn);
  const x0 = toDense('x', xIn);
  const m = b.rows;
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
  let q: Dense;
  let rank: number;
  if (options.orthonormal) {
    q = b;
    rank = b.cols;
  } else {
    const o = orth(b, options);
    q = o.basis;
    rank = o.rank;
  }
  const complex = q.complex || xv.complex;
  const qq = complex && !q.complex ? q.toComplex() : q;
  const xx = complex && !xv.complex ? xv.toComplex() : xv;
  const outFull = Dense.zeros(x0.shape, {
    complex,
    order: x0.isFContiguous() && !x0.isCContiguous() ? 'F' : 'C'
  });
  const out = vectors === 'rows' ? outFull.transpose() : outFull;
  const n = xx.cols;
  const energy = new Float64Array(rank);
  (complex ? zproject : dproject)(
    mode,
    m,
    n,
    rank,
    qq.data,
    qq.strides[0],
    qq.strides[1],
    qq.offset,
    xx.data,
    xx.strides[0],
    xx.strides[1],
    xx.offset,
    out.data,
    out.strides[0],
    out.strides[1],
    out.offset,
    energy
  );
  const inputEnergy = sumSq(xx);
  const outputEnergy = sumSq(out);
  let projected = 0;
  for (const e of energy) {
    projected += e;
  }
  const residual = mode === 'off' ? outputEnergy : Math.max(inputEnergy - outputEnergy, 0);
  const share = new Float64Array(rank);
  const supp = new Float64Array(rank);
  // A zero input has nothing to suppress: 0 dB in total and per direction, share −Infinity.
  const silent = inputEnergy === 0;
  for (let k = 0; k < rank; k++) {
    share[k] = silent ? -Infinity : 10 * Math.log10(energy[k] / inputEnergy);
    supp[k] = silent ? 0 : 10 * Math.log10(inputEnergy / Math.max(inputEnergy - energy[k], 0));
  }
  return {
    output: isVectorInput(xIn) ? asVector(outFull) : outFull,
    basis: q,
    rank,
    energy: {
      inputEnergy,
      outputEnergy,
      projectedEnergy: projected,
      residualEnergy: residual,
      suppressionDb: silent ? 0 : 10 * Math.log10(inputEnergy / residual),
      directionEnergy: energy,
      directionShareDb: share,
      directionSuppressionDb: supp
    }
  };
}

/**
 * Projects x off span(basis): y = x − Q(Qᴴx), Q an orthonormal basis of span(basis) (found by
 * rank-revealing QR unless `orthonormal`). Streams over the vectors; never forms QQᴴ.
 */
export function projectOff(
  basis: MatrixLike,
  x: MatrixLike,
  options: ProjectOptions = {}
): ProjectionResult {
  return project('off', basis, x, options);
}

/** Projects x onto span(basis): y = Q(Qᴴx). See `projectOff`. */
export function projectOnto(
  basis: MatrixLike,
  x: MatrixLike,
  options: ProjectOptions = {}
): ProjectionResult {
  return project('onto', basis, x, options);
}

/** Σ|a_ij|² of a 1-D or 2-D array (any `MatrixLike`; a Dense at any strides, not copied). */
export function sumSquares(a: MatrixLike): number {
  return sumSq(toDense('a', a));
}

function sumSq(a: Dense): number {
  const m = a.rows;
  const n = a.cols;
  const s0 = a.strides[0];
  const s1 = a.ndim > 1 ? a.strides[1] : 0;
  const d = a.data;
  let s = 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      const e = a.offset + i * s0 + j * s1;
      if (a.complex) {
        s += d[2 * e] * d[2 * e] + d[2 * e + 1] * d[2 * e + 1];
      } else {
        s += d[e] * d[e];
      }
    }
  }
  return s;
}

/**
 * Suppression of `after` relative to `before` (same data, e.g. before and after projecting off
 * an interference subspace): energies and 10·log10(E_before / E_after) in dB, in total and per
 * row (channel or trial; for a 1-D signal there is one row).
 */
export function suppression(
  beforeIn: MatrixLike,
  afterIn: MatrixLike
): { before: number; after: number; db: number; perRowDb: Float64Array } {
  const before = toDense('before', beforeIn);
  const after = toDense('after', afterIn);
  if (before.rows !== after.rows || before.cols !== after.cols) {
    throw new RangeError(
      `before is ${before.rows}x${before.cols} but after is ${after.rows}x${after.cols}; they must match`
    );
  }
  // A 1-D signal arrives as a column: report it as one row.
  const b = before.cols === 1 ? before.transpose() : before;
  const a = after.cols === 1 ? after.transpose() : after;
  const perRow = new Float64Array(b.rows);
  for (let i = 0; i < b.rows; i++) {
    perRow[i] = 10 * Math.log10(sumSq(b.row(i)) / sumSq(a.row(i)));
  }
  const eb = sumSq(b);
  const ea = sumSq(a);
  return { before: eb, after: ea, db: 10 * Math.log10(eb / ea), perRowDb: perRow };
}
