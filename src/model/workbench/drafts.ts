/**
 * New set-ups: each tool's parameters filled with the defaults from the settings, so the first
 * screen of a form holds sensible values and only the sources are left to pick.
 */
import type { AdaptiveSetup, BasisSpec, SetupParams, SourcePick, Tool } from './setup';

/** Defaults from the settings schema (bounds are the schema's). */
export interface WorkbenchDefaults {
  taps: number;
  lambda: number;
  delta: number;
  mu: number;
  epsilon: number;
  precision: 'float64' | 'float32';
}

export const BUILTIN_DEFAULTS: WorkbenchDefaults = {
  taps: 16,
  // A memory of 1/(1 − λ) = 1000 samples.
  lambda: 0.999,
  delta: 0.01,
  mu: 0.5,
  epsilon: 1e-6,
  precision: 'float64'
};

/** An empty pick: the form asks the user to choose. */
export function emptyPick(): SourcePick {
  return { ref: { kind: 'variable', name: '' }, shape: null, layout: null };
}

export function adaptiveDraft(d: WorkbenchDefaults): AdaptiveSetup {
  return {
    tool: 'adaptive',
    use: 'cancellation',
    x: emptyPick(),
    d: emptyPick(),
    predictionDelay: 1,
    decisionDelay: 0,
    trainingLength: 500,
    decisionDirected: true,
    // BPSK decisions on complex data would drag a QPSK equalizer off its symbols
    constellation: 'auto',
    algorithm: 'qr-rls',
    taps: d.taps,
    lambda: d.lambda,
    delta: d.delta,
    mu: d.mu,
    epsilon: d.epsilon,
    precision: d.precision,
    keepEvery: 0,
    minMseDb: null,
    fs: null
  };
}

/** What the kernel defines that a new set-up can start from. */
export interface KernelHints {
  /** A variable holding the sample rate (`fs`), to name in the set-up. */
  fsName?: string | null;
  /** The mains fundamental when the kernel defines one (`f0`), in Hz. */
  f0?: number | null;
}

/** A default basis of each kind (the editor switches between them). */
export function basisDraft(kind: BasisSpec['kind'], hints: KernelHints = {}): BasisSpec {
  switch (kind) {
    case 'harmonics':
      return {
        kind,
        f0: hints.f0 ?? 50,
        count: 5,
        fs: hints.fsName ? { kind: 'variable', name: hints.fsName } : null
      };
    case 'array':
      return { kind, directions: [0], units: 'degrees', spacing: 0.5, wavelength: 1 };
    case 'reference':
      return { kind, reference: emptyPick(), copies: 8 };
    case 'matrix':
      return { kind, matrix: emptyPick() };
  }
}

/** A new set-up of `tool` with the defaults and what the kernel suggests. */
export function draftFor(tool: Tool, d: WorkbenchDefaults, hints: KernelHints = {}): SetupParams {
  const fs = hints.fsName ? { kind: 'variable' as const, name: hints.fsName } : null;
  switch (tool) {
    case 'adaptive':
      return { ...adaptiveDraft(d), fs };
    case 'sweep':
      return {
        tool,
        base: { ...adaptiveDraft(d), fs },
        parameter: 'lambda',
        values: [0.99, 0.995, 0.999]
      };
    case 'removal':
      return {
        tool,
        signal: emptyPick(),
        basis: basisDraft('harmonics', hints),
        mode: 'off',
        rankTolerance: null
      };
    case 'span':
      return { tool, matrix: emptyPick(), rankTolerance: null };
    case 'lstsq':
      return { tool, a: emptyPick(), b: emptyPick(), rankTolerance: null };
    case 'angles':
      return { tool, a: emptyPick(), b: emptyPick() };
  }
}
