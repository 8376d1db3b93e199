/**
 * Spectral estimates for the plots, in the worker: Welch PSD, magnitude-squared coherence and a
 * spectrogram pooled to a drawable number of columns, each the core's routine on a 1-D row.
 * One checkpoint before the work lets a cancel that arrived meanwhile stop it.
 */
import { coherence, poolSpectrogram, spectrogram, welch } from '../../core/dsp';
import { checkArrayData, type SpectralJobResult, type SpectralSpec } from '../protocol';
import type { JobContext } from './context';

function oneRow(name: string, a: unknown): { data: Float64Array; complex: boolean } {
  const v = checkArrayData(name, a);
  if (v.shape.length !== 1) {
    throw new RangeError(`${name} must be 1-D (one row of a result), got shape [${v.shape}]`);
  }
  return { data: v.data, complex: v.complex };
}

export async function runSpectral(spec: SpectralSpec, ctx: JobContext): Promise<SpectralJobResult> {
  const x = oneRow('x', spec.x);
  await ctx.checkpoint(0, 1, spec.op);
  const base = { kind: 'spectral' as const, status: 'ok' as const, warnings: [] };
  switch (spec.op) {
    case 'welch':
      return { ...base, op: 'welch', psd: welch(x, spec.options) };
    case 'coherence': {
      const y = oneRow('y', spec.y);
      return { ...base, op: 'coherence', coherence: coherence(x, y, spec.options) };
    }
    case 'spectrogram': {
      const cols = spec.maxColumns;
      if (!Number.isInteger(cols) || cols < 1) {
        throw new RangeError(`maxColumns must be a whole number ≥ 1, got ${String(cols)}`);
      }
      return {
        ...base,
        op: 'spectrogram',
        spectrogram: poolSpectrogram(spectrogram(x, spec.options), cols)
      };
    }
    default:
      throw new RangeError(
        `spec.op must be welch, coherence or spectrogram, got ${JSON.stringify((spec as { op: unknown }).op)}`
      );
  }
}
