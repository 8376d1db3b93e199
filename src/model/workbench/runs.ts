/**
 * Runs: the result of a set-up on the arrays read at one moment. Plain immutable records (a
 * change makes a new object, so views can compare by identity), and the two seams a run goes
 * through: the reader (kernel arrays, via the bridge) and the runner (a worker job).
 */
import type { ArrayData } from '../../bridge';
import type { AdaptiveSetup, SetupParams, SourceRef, SweepParameter } from './setup';
import type { SourceFacts } from './sources-check';

/** Where a run is in its life. */
export type RunStatus = 'reading' | 'running' | 'ok' | 'warning' | 'failed' | 'cancelled';

/** A key number of a result, in the user's units. */
export interface RunFigure {
  /** Stable key (`mseFinalDb`, `convergenceSamples`, `rank`, …) for tables and comparisons. */
  key: string;
  /** What it measures, for the user. */
  label: string;
  value: number;
  /** 'dB', 's', 'samples', '%', 'rad', '' (a count or ratio). */
  unit: string;
}

/** A result array, ready to write back to the kernel or to plot. */
export interface ResultArray {
  data: Float64Array;
  shape: number[];
  complex: boolean;
  /** What it is, for the user ("error e(n) = d(n) − y(n)"). */
  description: string;
  /**
   * For an input read from the kernel: the kernel's SHA-256 of its values. Runs that read the
   * same values share one array (the model's reads look for it among the runs kept).
   */
  digest?: string;
}

export interface Run {
  readonly id: string;
  readonly setupId: string;
  /** What distinguishes the run ("QR-RLS · M 16 · λ 0.999"). */
  readonly label: string;
  /** The parameters it ran with (a sweep's value substituted). */
  readonly params: Exclude<SetupParams, { tool: 'sweep' }>;
  readonly status: RunStatus;
  /** 0…1 while running. */
  readonly progress: number;
  /** Warnings, failure reasons and notes, each a sentence. */
  readonly messages: ReadonlyArray<string>;
  readonly figures: ReadonlyArray<RunFigure>;
  readonly arrays: Readonly<Record<string, ResultArray>>;
  /**
   * The arrays read from the kernel for this run, by set-up field (`x`, `d`, `signal`), shared
   * with the other runs of a sweep and never copied: the plots draw results against them.
   */
  readonly inputs: Readonly<Record<string, ResultArray>>;
  /** The sample rate the run used (Hz), or null. */
  readonly fs: number | null;
  /** Date.now() when it started. */
  readonly startedAt: number;
  /** Time spent reading from the kernel and computing, ms (null until known). */
  readonly readMs: number | null;
  readonly computeMs: number | null;
}

/** The arrays and numbers a runner needs, keyed by the set-up's field paths (`x`, `d`, …). */
export interface RunInputs {
  arrays: Record<string, ArrayData>;
  /** The sample rate in Hz, when the set-up names or types one. */
  fs: number | null;
}

/** What a runner returns. */
export interface RunOutcome {
  status: 'ok' | 'warning' | 'failed' | 'cancelled';
  messages: string[];
  figures: RunFigure[];
  arrays: Record<string, ResultArray>;
  computeMs: number;
}

/** A job in flight. */
export interface RunHandle {
  readonly result: Promise<RunOutcome>;
  /** Stops the job at its next chunk border; the result then resolves as cancelled. */
  cancel(): void;
}

/** Runs a set-up's computation off the UI thread (the worker pool). */
export interface IRunner {
  start(
    params: Exclude<SetupParams, { tool: 'sweep' }>,
    inputs: RunInputs,
    onProgress: (fraction: number) => void
  ): RunHandle;
}

/** Reads what a set-up names from the kernel. */
export interface IWorkbenchReader {
  /** The source as the kernel lists it now, or null when it is not listed. */
  facts(ref: SourceRef): SourceFacts | null;
  readArray(ref: SourceRef): Promise<ArrayData>;
  readScalar(name: string): Promise<number>;
}

const ALGORITHM_LABEL: Record<AdaptiveSetup['algorithm'], string> = {
  'qr-rls': 'QR-RLS',
  'inverse-qr-rls': 'inverse QR-RLS',
  rls: 'RLS',
  'rls-textbook': 'RLS (unsymmetrised textbook form)',
  nlms: 'NLMS',
  lms: 'LMS'
};

/** The algorithm's name as the user reads it. */
export function algorithmLabel(a: AdaptiveSetup['algorithm']): string {
  return ALGORITHM_LABEL[a];
}

/** A run's short label: algorithm and the parameters that matter for it. */
export function runLabel(p: Exclude<SetupParams, { tool: 'sweep' }>): string {
  switch (p.tool) {
    case 'adaptive': {
      const parts = [ALGORITHM_LABEL[p.algorithm], `M ${p.taps}`];
      if (p.algorithm === 'nlms' || p.algorithm === 'lms') {
        parts.push(`μ ${p.mu}`);
      } else {
        parts.push(`λ ${p.lambda}`);
      }
      if (p.precision === 'float32') {
        parts.push('float32');
      }
      return parts.join(' · ');
    }
    case 'removal': {
      const verb = p.mode === 'off' ? 'remove' : 'keep only';
      switch (p.basis.kind) {
        case 'harmonics':
          return `${verb} ${p.basis.count} harmonics of ${p.basis.f0} Hz`;
        case 'array':
          return `${verb} ${p.basis.directions.length} array directions`;
        case 'reference':
          return `${verb} ${p.basis.copies} delayed copies of the reference`;
        case 'matrix':
          return `${verb} the columns of a matrix`;
      }
      break;
    }
    case 'span':
      return 'basis and null space';
    case 'lstsq':
      return 'least squares';
    case 'angles':
      return 'principal angles';
  }
}

/** The set-ups a sweep runs: its base with the swept parameter set to each value. */
export function expandSweep(
  base: AdaptiveSetup,
  parameter: SweepParameter,
  values: number[]
): AdaptiveSetup[] {
  return values.map(v => ({ ...base, [parameter]: v }));
}
