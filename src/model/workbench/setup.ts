/**
 * Set-ups: what the user asked a tool to do, as plain data (names, cell ids, numbers and
 * enumerations; never code). A set-up is stored in the notebook's metadata and validated on
 * every load (see `metadata.ts`); a run is the result of a set-up on the arrays read at one
 * moment and lives only in memory (see `workbench.ts`).
 */
import type { Algorithm, Constellation, Precision } from '../../core';

/** Version of the stored form. Bump it when a stored field changes meaning. */
export const SETUP_SCHEMA_VERSION = 1;

/** The notebook metadata key the set-ups live under. */
export const METADATA_KEY = 'perpend';

/**
 * Where an array comes from: a kernel variable (dotted path allowed), a cell's result, or an
 * array on the Perpend panel's shelf (a result computed there, say `primary − hum`), named by
 * its label on the shelf. The shelf lives in the page's memory: after a reload the label finds
 * nothing and the set-up says so; the stored form holds the label only, never the data.
 */
export type SourceRef =
  | { kind: 'variable'; name: string }
  | { kind: 'cell'; cellId: string }
  | { kind: 'shelf'; label: string };

/** Longest shelf label a set-up stores (the shelf's labels are shorter in practice). */
export const MAX_SHELF_LABEL = 120;

/**
 * How a 2-D source maps onto the convention K×N (samples along the last axis): which axis
 * holds the samples, and whether the other one holds independent trials (averaged into an
 * ensemble learning curve) or channels (processed one by one, kept apart).
 */
export interface SourceLayout {
  samplesAxis: 0 | 1;
  rows: 'trials' | 'channels';
}

/** A source as picked: the reference, the shape seen when it was picked, and its layout. */
export interface SourcePick {
  ref: SourceRef;
  /** Shape listed when the set-up was made; a different shape at run time is reported. */
  shape: number[] | null;
  /** Only for 2-D sources. */
  layout: SourceLayout | null;
}

/** A sample rate typed in hertz, or read from a kernel variable at run time. */
export type RateRef = { kind: 'hz'; value: number } | { kind: 'variable'; name: string };

/** The four uses of an adaptive filter offered. */
export type AdaptiveUse = 'identification' | 'cancellation' | 'prediction' | 'equalization';

export interface AdaptiveSetup {
  tool: 'adaptive';
  use: AdaptiveUse;
  /** identification: the system's input; cancellation: the reference; prediction: the signal;
   * equalization: the received signal. */
  x: SourcePick;
  /** identification: the system's output; cancellation: the primary; equalization: the
   * transmitted (training) symbols; unused for prediction. */
  d: SourcePick | null;
  /** prediction: how many samples ahead (≥ 1). */
  predictionDelay: number;
  /** equalization: the decision delay Δ in samples (d(n) = s(n − Δ)). */
  decisionDelay: number;
  /** equalization: the number of training symbols before decision-directed mode. */
  trainingLength: number;
  /** equalization: continue with decisions after the training symbols. */
  decisionDirected: boolean;
  /** 'auto': BPSK for real data, QPSK for complex (the core's default). */
  constellation: Constellation | 'auto';
  algorithm: Algorithm;
  /** Number of taps M. */
  taps: number;
  lambda: number;
  delta: number;
  mu: number;
  epsilon: number;
  precision: Precision;
  /** Keep the weights every k samples (0: keep only the final weights). */
  keepEvery: number;
  /** A known minimum MSE in dB (the noise floor) for the misadjustment, or null. */
  minMseDb: number | null;
  /** The sample rate for seconds on results, or null for samples only. */
  fs: RateRef | null;
  /**
   * identification and cancellation: a 1-D kernel array holding the true impulse response of
   * the unknown system (the path from x to d), when known; absent when not. The weights are
   * compared with it (misalignment) and its response is drawn over theirs.
   */
  truth?: SourcePick;
}

/** The interference basis of a removal. */
export type BasisSpec =
  | { kind: 'matrix'; matrix: SourcePick }
  | { kind: 'harmonics'; f0: number; count: number; fs: RateRef | null }
  | {
      kind: 'array';
      /** Directions as angles from broadside in degrees, or as direction sines u = sin θ. */
      directions: number[];
      units: 'degrees' | 'sines';
      /** Element spacing and wavelength in the same unit (their ratio is what counts). */
      spacing: number;
      wavelength: number;
    }
  | { kind: 'reference'; reference: SourcePick; copies: number };

export interface RemovalSetup {
  tool: 'removal';
  signal: SourcePick;
  basis: BasisSpec;
  /** 'off' removes the subspace, 'onto' keeps only it. */
  mode: 'off' | 'onto';
  /** Relative rank tolerance (a multiple of |r₁₁|), or null for max(m, r)·ε. */
  rankTolerance: number | null;
}

/** Orthonormal basis and null space of a kernel matrix. */
export interface SpanSetup {
  tool: 'span';
  matrix: SourcePick;
  rankTolerance: number | null;
}

/** Least squares A·x ≈ b (minimum norm when A is rank-deficient). */
export interface LeastSquaresSetup {
  tool: 'lstsq';
  a: SourcePick;
  b: SourcePick;
  rankTolerance: number | null;
}

/** Principal angles between the column spaces of A and B. */
export interface AnglesSetup {
  tool: 'angles';
  a: SourcePick;
  b: SourcePick;
}

/** The adaptive-filter parameters a sweep can vary. */
export type SweepParameter = 'lambda' | 'mu' | 'taps' | 'delta' | 'epsilon';

/** One adaptive-filter set-up run once per value of one parameter. */
export interface SweepSetup {
  tool: 'sweep';
  base: AdaptiveSetup;
  parameter: SweepParameter;
  values: number[];
}

export type SetupParams =
  AdaptiveSetup | RemovalSetup | SpanSetup | LeastSquaresSetup | AnglesSetup | SweepSetup;

export type Tool = SetupParams['tool'];

export const TOOLS: ReadonlyArray<Tool> = [
  'adaptive',
  'removal',
  'span',
  'lstsq',
  'angles',
  'sweep'
];

/** A set-up as stored: an id, a title the user gave, the follow switch and the parameters. */
export interface Setup {
  /** Unique within the notebook: letters, digits, '-' and '_' (≤ 64). */
  id: string;
  /** The user's title (≤ 120 characters; plain text). */
  title: string;
  /** Re-read and re-run when a source cell is re-executed or a source variable changes. */
  follow: boolean;
  params: SetupParams;
}

/** Whether an adaptive set-up's use has a true response to compare with (an unknown system). */
export function usesTruth(p: AdaptiveSetup): boolean {
  return p.use === 'identification' || p.use === 'cancellation';
}

/** Every source a set-up reads, with the field path it sits under (for messages). */
export function setupSources(p: SetupParams): Array<{ field: string; pick: SourcePick }> {
  switch (p.tool) {
    case 'adaptive': {
      const out = [{ field: 'x', pick: p.x }];
      // prediction reads x alone (its d is x ahead of itself): a d left in the draft is not asked for
      if (p.d && p.use !== 'prediction') {
        out.push({ field: 'd', pick: p.d });
      }
      if (p.truth && usesTruth(p)) {
        out.push({ field: 'truth', pick: p.truth });
      }
      return out;
    }
    case 'sweep':
      return setupSources(p.base).map(s => ({ field: `base.${s.field}`, pick: s.pick }));
    case 'removal': {
      const out = [{ field: 'signal', pick: p.signal }];
      if (p.basis.kind === 'matrix') {
        out.push({ field: 'basis.matrix', pick: p.basis.matrix });
      } else if (p.basis.kind === 'reference') {
        out.push({ field: 'basis.reference', pick: p.basis.reference });
      }
      return out;
    }
    case 'span':
      return [{ field: 'matrix', pick: p.matrix }];
    case 'lstsq':
    case 'angles':
      return [
        { field: 'a', pick: p.a },
        { field: 'b', pick: p.b }
      ];
  }
}

/** Kernel variables a set-up reads besides its arrays (sample rates). */
export function setupRateNames(p: SetupParams): string[] {
  const rate =
    p.tool === 'adaptive'
      ? p.fs
      : p.tool === 'sweep'
        ? p.base.fs
        : p.tool === 'removal' && p.basis.kind === 'harmonics'
          ? p.basis.fs
          : null;
  return rate && rate.kind === 'variable' ? [rate.name] : [];
}
