/**
 * Spectral estimates for the plots computed in a worker of a pool: the plots' `PlotCompute`
 * seam (src/panel/plots/compute.ts) implemented with `spectral` jobs. Each call copies the row
 * it needs into a buffer of its own (contiguous float64, transferred, so the run keeps its
 * arrays) and resolves with the core's result, or rejects with the worker's reason.
 */
import {
  checkSignal,
  type CoherenceResult,
  type PsdResult,
  type SignalView,
  type SpectrogramOptions,
  type SpectrogramResult,
  type WelchOptions
} from '../core/dsp';
import type { WorkerPool } from './pool';
import type { CsvColumn } from './jobs/csv-text';
import type { ArrayData, CsvSpec, JobResult, SpectralSpec } from './protocol';

/** The spectral estimates the plots ask for (the same shape as the plots' PlotCompute). */
export interface SpectralCompute {
  welch(signal: SignalView, options: WelchOptions): Promise<PsdResult>;
  coherence(
    x: SignalView,
    y: SignalView,
    options: Omit<WelchOptions, 'average' | 'scaling'>
  ): Promise<CoherenceResult>;
  spectrogram(
    signal: SignalView,
    options: SpectrogramOptions,
    maxColumns: number
  ): Promise<SpectrogramResult>;
  /** CSV text of columns, UTF-8 (a missing or NaN number is an empty field). */
  csv(columns: ReadonlyArray<CsvColumn>): Promise<Uint8Array>;
}

/** A column as the `csv` job takes it: numbers as a Float64Array of its own (NaN: missing). */
export function csvJobColumn(c: CsvColumn): CsvSpec['columns'][number] {
  const v = c.values as ArrayLike<unknown>;
  let numeric = true;
  for (let i = 0; i < v.length && numeric; i++) {
    numeric = v[i] === null || typeof v[i] === 'number';
  }
  if (numeric) {
    const out = new Float64Array(v.length);
    for (let i = 0; i < v.length; i++) {
      out[i] = v[i] === null ? NaN : (v[i] as number);
    }
    return { header: c.header, values: out };
  }
  return { header: c.header, values: Array.from(v as ArrayLike<string | number | null>) };
}

/** The samples a view names, as a contiguous float64 array of their own (1-D). */
export function contiguousRow(name: string, view: SignalView): ArrayData {
  const s = checkSignal(name, view, view.complex ?? false);
  const W = s.complex ? 2 : 1;
  const out = new Float64Array(s.n * W);
  if (s.stride === 1 && s.data instanceof Float64Array) {
    out.set(s.data.subarray(s.offset * W, (s.offset + s.n) * W));
  } else {
    for (let i = 0; i < s.n; i++) {
      const q = (s.offset + i * s.stride) * W;
      out[i * W] = s.data[q];
      if (W === 2) {
        out[i * W + 1] = s.data[q + 1];
      }
    }
  }
  return { data: out, shape: [s.n], complex: s.complex };
}

/** PlotCompute on the pool `pool()` (a pool of its own keeps plots from queueing behind runs). */
export function workerSpectralCompute(pool: () => Pick<WorkerPool, 'run'>): SpectralCompute {
  const run = async (spec: SpectralSpec | CsvSpec): Promise<JobResult> => {
    const o = await pool().run(spec, { transfer: true }).outcome;
    switch (o.status) {
      case 'done':
        return o.result;
      case 'failed':
        throw new Error(o.reason);
      case 'cancelled':
        throw new Error('the job was cancelled');
    }
  };
  return {
    welch: async (signal, options) => {
      const r = await run({
        kind: 'spectral',
        op: 'welch',
        x: contiguousRow('signal', signal),
        options
      });
      if (r.kind !== 'spectral' || r.op !== 'welch') {
        throw new Error('internal: the worker answered a Welch estimate with another result');
      }
      return r.psd;
    },
    coherence: async (x, y, options) => {
      const r = await run({
        kind: 'spectral',
        op: 'coherence',
        x: contiguousRow('x', x),
        y: contiguousRow('y', y),
        options
      });
      if (r.kind !== 'spectral' || r.op !== 'coherence') {
        throw new Error('internal: the worker answered a coherence estimate with another result');
      }
      return r.coherence;
    },
    spectrogram: async (signal, options, maxColumns) => {
      const r = await run({
        kind: 'spectral',
        op: 'spectrogram',
        x: contiguousRow('signal', signal),
        options,
        maxColumns
      });
      if (r.kind !== 'spectral' || r.op !== 'spectrogram') {
        throw new Error('internal: the worker answered a spectrogram with another result');
      }
      return r.spectrogram;
    },
    csv: async columns => {
      const r = await run({ kind: 'csv', columns: columns.map(csvJobColumn) });
      if (r.kind !== 'csv') {
        throw new Error('internal: the worker answered a CSV request with another result');
      }
      return r.bytes;
    }
  };
}
