/**
 * The interference-removal job: builds the interference basis (a given matrix, harmonics, ULA
 * steering vectors or delayed copies of a reference), projects the signal off (or onto) its span
 * with the core's rank-revealing QR, and reports the energy along each direction the user named,
 * in the user's order, from least-squares coefficients on those columns (core `columnShares`;
 * the directions of the pivoted-QR basis come in pivot order and must not be labelled by
 * harmonic), with the total suppression and the share of the signal kept.
 */
import { Dense } from '../../core/dense';
import {
  delayEmbedding,
  harmonicBasis,
  orth,
  projectOff,
  projectOnto,
  ulaSteering
} from '../../core/subspace';
import { columnShares } from '../../core/subspace/harmonic-shares';
import type { InterferenceResult, InterferenceSpec, JobWarning } from '../protocol';
import { arrayOf, denseOf, signalShape } from './arrays';
import type { JobContext } from './context';

interface Built {
  basis: Dense;
  vectors: 'rows' | 'columns' | undefined;
  labels: string[];
  groups: number[][];
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

function buildBasis(spec: InterferenceSpec, K: number, N: number): Built {
  const b = spec.basis;
  if (b === null || typeof b !== 'object') {
    throw new TypeError('basis must be an object with a kind');
  }
  const single = (r: number, label: (j: number) => string) => ({
    labels: Array.from({ length: r }, (_, j) => label(j)),
    groups: Array.from({ length: r }, (_, j) => [j])
  });
  switch (b.kind) {
    case 'harmonics': {
      const basis = harmonicBasis({ f0: b.f0, fs: b.fs, harmonics: b.count, samples: N, t0: b.t0 });
      return {
        basis,
        vectors: 'rows',
        labels: Array.from({ length: b.count }, (_, k) => `${fmt((k + 1) * b.f0)} Hz`),
        groups: Array.from({ length: b.count }, (_, k) => [2 * k, 2 * k + 1])
      };
    }
    case 'steering': {
      const hasAngles = b.angles !== undefined;
      if (hasAngles === (b.sines !== undefined)) {
        throw new RangeError('steering needs either angles or sines (direction sines), not both');
      }
      if (spec.signal.shape.length !== 2) {
        throw new RangeError(
          'steering vectors need the signal as elements × snapshots (2-D, one row per array element)'
        );
      }
      let angles: number[];
      let unit: 'deg' | 'rad';
      if (hasAngles) {
        angles = b.angles!;
        unit = b.unit ?? 'deg';
      } else {
        const s = b.sines!;
        if (!Array.isArray(s) || s.length === 0) {
          throw new RangeError('sines must be a non-empty list of direction sines in [−1, 1]');
        }
        s.forEach((v, k) => {
          if (typeof v !== 'number' || !(v >= -1 && v <= 1)) {
            throw new RangeError(`sines[${k}] must be in [−1, 1], got ${String(v)}`);
          }
        });
        angles = s.map(v => Math.asin(v));
        unit = 'rad';
      }
      const basis = ulaSteering({
        angles,
        elements: K,
        spacing: b.spacing,
        wavelength: b.wavelength,
        unit
      });
      const lab = hasAngles
        ? (j: number) => `${fmt(angles[j])}${unit === 'deg' ? '°' : ' rad'}`
        : (j: number) => `sin θ = ${fmt(b.sines![j])}`;
      return { basis, vectors: 'columns', ...single(angles.length, lab) };
    }
    case 'delays': {
      const r = signalShape('reference', b.reference);
      if (r.K !== 1 || r.N !== N) {
        throw new RangeError(
          `reference must be 1-D with the signal's ${N} samples, got shape [${b.reference.shape.join(', ')}]`
        );
      }
      const ref = denseOf('reference', b.reference);
      const basis = delayEmbedding(b.reference.complex ? ref : b.reference.data, b.lags);
      return { basis, vectors: 'rows', ...single(b.lags, j => `lag ${j}`) };
    }
    case 'matrix': {
      const m = denseOf('basis.matrix', b.matrix);
      if (m.ndim > 2) {
        throw new RangeError(`basis.matrix must be 1-D or 2-D (m×r), got ${m.ndim}-D`);
      }
      const basis = m.ndim === 1 ? m.asColumn() : m;
      return { basis, vectors: undefined, ...single(basis.cols, j => `column ${j}`) };
    }
    default:
      throw new RangeError(
        `basis.kind must be matrix, harmonics, steering or delays, got ${JSON.stringify((b as { kind: unknown }).kind)}`
      );
  }
}

/** Runs an interference-removal spec. */
export async function runInterference(
  spec: InterferenceSpec,
  ctx: JobContext
): Promise<InterferenceResult> {
  const { K, N } = signalShape('signal', spec.signal);
  const mode = spec.mode ?? 'off';
  if (mode !== 'off' && mode !== 'onto') {
    throw new RangeError(`mode must be 'off' or 'onto', got ${JSON.stringify(mode)}`);
  }
  const sig = denseOf('signal', spec.signal);
  const x = sig.ndim === 1 ? new Dense(sig.data, [1, N], undefined, 0, sig.complex) : sig;
  await ctx.checkpoint(0, 3, 'basis');
  const built = buildBasis(spec, K, N);
  const q = orth(built.basis, { tol: spec.tol, rtol: spec.rtol });
  await ctx.checkpoint(1, 3, 'projection');
  const p = (mode === 'off' ? projectOff : projectOnto)(q.basis, x, {
    orthonormal: true,
    vectors: built.vectors
  });
  await ctx.checkpoint(2, 3, 'shares per direction');
  const shares = columnShares(built.basis, x, {
    groups: built.groups,
    vectors: built.vectors,
    tol: spec.tol,
    rtol: spec.rtol
  });
  // What is left along each direction in the output, on the same columns.
  const after = columnShares(built.basis, p.output, {
    groups: built.groups,
    vectors: built.vectors,
    tol: spec.tol,
    rtol: spec.rtol
  });
  await ctx.checkpoint(3, 3, 'shares per direction');
  const warnings: JobWarning[] = [];
  const r = built.basis.cols;
  if (q.rank < r) {
    warnings.push({
      kind: 'rank-deficient',
      message:
        `the basis has ${r} columns but rank ${q.rank} (|r_kk| = ${q.diagonal[q.rank].toExponential(3)} ` +
        `at the cut, tolerance ${q.tol.toExponential(3)}); shares of dependent directions are minimum-norm splits`,
      value: q.diagonal[q.rank]
    });
  }
  const e = p.energy;
  const out = p.output;
  const output = arrayOf(
    sig.ndim === 1 ? new Dense(out.data, [N], [out.strides[1]], out.offset, out.complex) : out
  );
  return {
    kind: 'interference',
    status: warnings.length ? 'warning' : 'ok',
    warnings,
    mode,
    output,
    basis: arrayOf(q.basis),
    columns: r,
    rank: q.rank,
    tol: q.tol,
    diagonal: q.diagonal,
    directions: built.labels.map((label, k) => ({
      label,
      energy: shares.groupEnergy[k],
      share: shares.share[k],
      shareDb: shares.shareDb[k],
      shareAfter: p.energy.inputEnergy > 0 ? after.groupEnergy[k] / p.energy.inputEnergy : 0,
      shareAfterDb:
        p.energy.inputEnergy > 0
          ? 10 * Math.log10(after.groupEnergy[k] / p.energy.inputEnergy)
          : -Infinity
    })),
    inputEnergy: e.inputEnergy,
    subspaceEnergy: e.projectedEnergy,
    residualEnergy: e.residualEnergy,
    suppressionDb: e.suppressionDb,
    keptShare: e.inputEnergy > 0 ? e.outputEnergy / e.inputEnergy : 1
  };
}
