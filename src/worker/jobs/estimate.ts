/**
 * Memory a job needs beyond its inputs, estimated from the spec alone (no array is read), so
 * that the pool can refuse a run before dispatching it. Counts the result arrays and the large
 * working copies (8 bytes per float64 value, twice that for complex), not small scratch.
 */
import type { ArrayData, JobSpec } from '../protocol';
import { shapeSize } from '../protocol';

export interface MemoryEstimate {
  /** Bytes of results and working copies. */
  bytes: number;
  /** What they are, for the message. */
  detail: string;
}

const size = (a: ArrayData | undefined) => (a ? shapeSize(a.shape) * (a.complex ? 2 : 1) : 0);
const mb = (b: number) => `${(b / 2 ** 20).toFixed(1)} MB`;

/** The estimate for one job spec (sources must have shapes; their data is not touched). */
export function estimateJobBytes(spec: JobSpec): MemoryEstimate {
  switch (spec.kind) {
    case 'adaptive-filter': {
      const c = spec.configuration;
      const src =
        c.kind === 'system-identification'
          ? c.output
          : c.kind === 'noise-cancellation'
            ? c.primary
            : c.kind === 'linear-prediction'
              ? c.signal
              : c.received;
      const values = size(src); // K·N·W
      const complex = Object.values(c).some(v => (v as ArrayData)?.complex === true);
      const W = complex ? 2 : 1;
      const N = src.shape[src.shape.length - 1] ?? 0;
      const K = values / Math.max(1, N) / (src.complex ? 2 : 1);
      const keep = spec.keepEvery ?? 0;
      const traj = keep > 0 ? K * Math.floor(N / keep) * spec.taps * W * 8 : 0;
      // x and d built per trial, y and e, the squared-error curves, the ensemble band
      const work = 8 * (K * N * W * 4 + K * N + (K > 1 ? 4 * N : N));
      return {
        bytes: work + traj,
        detail: `output, error and learning curve ${mb(work)}${traj ? `, weight trajectory ${mb(traj)}` : ''}`
      };
    }
    case 'interference': {
      const n = size(spec.signal);
      const N = spec.signal.shape[spec.signal.shape.length - 1] ?? 0;
      const rows = spec.signal.shape.length === 2 ? spec.signal.shape[0] : 1;
      const b = spec.basis;
      const r =
        b.kind === 'harmonics'
          ? 2 * b.count
          : b.kind === 'delays'
            ? b.lags
            : b.kind === 'steering'
              ? (b.angles ?? b.sines ?? []).length
              : (b.matrix.shape[1] ?? 1);
      const m = b.kind === 'steering' ? rows : b.kind === 'matrix' ? b.matrix.shape[0] : N;
      const W = spec.signal.complex || b.kind === 'steering' ? 2 : 1;
      // output, the basis and its orthonormal copies, the least-squares copy of [B x]
      const out = 8 * n * 2;
      const basis = 8 * m * r * W * 4 + 8 * m * (r + rows) * W;
      return {
        bytes: out + basis,
        detail: `projected signal ${mb(out)}, basis and its factors ${mb(basis)}`
      };
    }
    case 'csv': {
      // the text: up to ~25 bytes per value, and its UTF-8 copy
      const values = spec.columns.reduce((n, c) => n + c.values.length, 0);
      const bytes = 50 * values;
      return { bytes, detail: `the CSV text ${mb(bytes)}` };
    }
    case 'spectral': {
      // detrended, windowed segments and their spectra are small; a strided or float32 row
      // may be copied once
      const bytes = 8 * (size(spec.x) + (spec.op === 'coherence' ? size(spec.y) : 0));
      return { bytes, detail: `a working copy of the signal ${mb(bytes)}` };
    }
    default: {
      const a = spec.kind === 'basis' ? spec.matrix : spec.a;
      const bb = spec.kind === 'basis' ? undefined : spec.b;
      const bytes = 8 * (size(a) * 6 + size(bb) * 3);
      return { bytes, detail: `factors and results ${mb(bytes)}` };
    }
  }
}
