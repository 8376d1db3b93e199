/** The job runners by kind: pure functions of a spec and a context (see context.ts). */
import type { JobResult, JobSpec } from '../protocol';
import { runAdaptiveFilter } from './adaptive-filter';
import type { JobContext } from './context';
import { runInterference } from './interference';
import { runCsv } from './csv';
import { runSpectral } from './spectral';
import { runAngles, runBasis, runLeastSquares } from './subspace';

export { JobCancelled, directContext, type JobContext } from './context';
export { runAdaptiveFilter, readFigures, filterOptions, defaultChunk } from './adaptive-filter';
export { runInterference } from './interference';
export { runAngles, runBasis, runLeastSquares } from './subspace';
export { runSpectral } from './spectral';
export { expandSweep, specDataBytes } from './sweep';
export { estimateJobBytes, type MemoryEstimate } from './estimate';

/** Runs any job spec. */
export function runJob(spec: JobSpec, ctx: JobContext): Promise<JobResult> {
  if (spec === null || typeof spec !== 'object') {
    return Promise.reject(new TypeError('a job spec must be an object with a kind'));
  }
  switch (spec.kind) {
    case 'adaptive-filter':
      return runAdaptiveFilter(spec, ctx);
    case 'interference':
      return runInterference(spec, ctx);
    case 'basis':
      return runBasis(spec, ctx);
    case 'least-squares':
      return runLeastSquares(spec, ctx);
    case 'angles':
      return runAngles(spec, ctx);
    case 'spectral':
      return runSpectral(spec, ctx);
    case 'csv':
      return runCsv(spec, ctx);
    default:
      return Promise.reject(
        new RangeError(
          `spec.kind must be adaptive-filter, interference, basis, least-squares, angles, spectral or csv, got ${JSON.stringify((spec as { kind: unknown }).kind)}`
        )
      );
  }
}
