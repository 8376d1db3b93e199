/**
 * Subspace tools on matrices: an orthonormal basis of span(A) with its null space, least squares
 * (minimum-norm when rank-deficient), and principal angles — the core's rank-revealing QR
 * routines, with rank deficiency reported as a warning carrying |r_kk| at the cut.
 */
import { type Dense } from '../../core/dense';
import { lstsq, nullSpace, orth, principalAngles } from '../../core/subspace';
import type {
  AnglesJobResult,
  AnglesSpec,
  BasisJobResult,
  BasisJobSpec,
  JobWarning,
  LeastSquaresJobResult,
  LeastSquaresSpec
} from '../protocol';
import { arrayOf, denseOf } from './arrays';
import type { JobContext } from './context';

function matrix(name: string, a: Parameters<typeof denseOf>[1]): Dense {
  const d = denseOf(name, a);
  if (d.ndim > 2) {
    throw new RangeError(`${name} must be 1-D or 2-D, got shape [${d.shape.join(', ')}]`);
  }
  return d.ndim === 1 ? d.asColumn() : d;
}

function rankWarning(
  what: string,
  full: number,
  rank: number,
  diag: Float64Array,
  tol: number
): JobWarning[] {
  if (rank >= full) {
    return [];
  }
  const v = rank < diag.length ? diag[rank] : 0;
  return [
    {
      kind: 'rank-deficient',
      message: `${what} has rank ${rank} < ${full} (|r_kk| = ${v.toExponential(3)} at the cut, tolerance ${tol.toExponential(3)})`,
      value: v
    }
  ];
}

/** Orthonormal basis of span(A) and of null(A), with rank, gap and ‖A·N‖. */
export async function runBasis(spec: BasisJobSpec, ctx: JobContext): Promise<BasisJobResult> {
  const a = matrix('matrix', spec.matrix);
  await ctx.checkpoint(0, 2, 'range');
  const o = orth(a, { tol: spec.tol, rtol: spec.rtol });
  await ctx.checkpoint(1, 2, 'null space');
  const ns = nullSpace(a, { tol: spec.tol, rtol: spec.rtol });
  await ctx.checkpoint(2, 2, 'null space');
  const d = o.diagonal;
  return {
    kind: 'basis',
    status: o.rank < Math.min(a.rows, a.cols) ? 'warning' : 'ok',
    warnings: rankWarning('the matrix', Math.min(a.rows, a.cols), o.rank, d, o.tol),
    basis: arrayOf(o.basis),
    nullSpace: arrayOf(ns.basis),
    rank: o.rank,
    nullity: ns.nullity,
    tol: o.tol,
    diagonal: d,
    gapBefore: o.rank > 0 ? d[o.rank - 1] : null,
    gapAfter: o.rank < d.length ? d[o.rank] : null,
    residual: ns.residual,
    relativeResidual: ns.relativeResidual
  };
}

/** min‖A·x − b‖₂. */
export async function runLeastSquares(
  spec: LeastSquaresSpec,
  ctx: JobContext
): Promise<LeastSquaresJobResult> {
  const a = matrix('a', spec.a);
  const b = matrix('b', spec.b);
  await ctx.checkpoint(0, 1, 'least squares');
  const r = lstsq(a, b, { tol: spec.tol, rtol: spec.rtol });
  await ctx.checkpoint(1, 1, 'least squares');
  const warnings = rankWarning('a', a.cols, r.rank, r.diagonal, r.tol);
  return {
    kind: 'least-squares',
    status: warnings.length ? 'warning' : 'ok',
    warnings,
    x: arrayOf(r.x),
    rank: r.rank,
    tol: r.tol,
    diagonal: r.diagonal,
    residualNorm: r.residualNorm,
    minimumNorm: r.rank < a.cols
  };
}

/** Principal angles between span(A) and span(B). */
export async function runAngles(spec: AnglesSpec, ctx: JobContext): Promise<AnglesJobResult> {
  const a = matrix('a', spec.a);
  const b = matrix('b', spec.b);
  await ctx.checkpoint(0, 1, 'principal angles');
  const r = principalAngles(a, b, { tol: spec.tol, rtol: spec.rtol });
  await ctx.checkpoint(1, 1, 'principal angles');
  const warnings: JobWarning[] = [];
  if (r.rankA < Math.min(a.rows, a.cols)) {
    warnings.push({
      kind: 'rank-deficient',
      message: `a has rank ${r.rankA} < ${Math.min(a.rows, a.cols)}`
    });
  }
  if (r.rankB < Math.min(b.rows, b.cols)) {
    warnings.push({
      kind: 'rank-deficient',
      message: `b has rank ${r.rankB} < ${Math.min(b.rows, b.cols)}`
    });
  }
  return {
    kind: 'angles',
    status: warnings.length ? 'warning' : 'ok',
    warnings,
    radians: r.angles,
    degrees: r.angles.map(t => (t * 180) / Math.PI),
    cosines: r.cosines,
    sines: r.sines,
    rankA: r.rankA,
    rankB: r.rankB
  };
}
