/**
 * Shared pieces of the workbench model tests: a translation bundle that substitutes %1, %2, …
 * as JupyterLab's does (so messages read as the user would see them), and valid set-ups.
 */
import type { Trans } from '../../../src/model/workbench/rules';
import type { AdaptiveSetup, Setup, SourcePick } from '../../../src/model/workbench/setup';

export const trans: Trans = {
  __: (msg: string, ...args: unknown[]) =>
    msg.replace(/%(\d+)/g, (_, i: string) => String(args[Number(i) - 1]))
};

export function variable(name: string, shape: number[] | null = null): SourcePick {
  return { ref: { kind: 'variable', name }, shape, layout: null };
}

/** Noise cancellation of the demo (reference → primary), QR-RLS, M = 16. */
export function cancellation(over: Partial<AdaptiveSetup> = {}): AdaptiveSetup {
  return {
    tool: 'adaptive',
    use: 'cancellation',
    x: variable('reference', [32000]),
    d: variable('primary', [32000]),
    predictionDelay: 1,
    decisionDelay: 0,
    trainingLength: 1000,
    decisionDirected: true,
    constellation: 'bpsk',
    algorithm: 'qr-rls',
    taps: 16,
    lambda: 0.999,
    delta: 0.01,
    mu: 0.5,
    epsilon: 1e-6,
    precision: 'float64',
    keepEvery: 0,
    minMseDb: null,
    fs: { kind: 'variable', name: 'fs' },
    ...over
  };
}

export function setup(id: string, params: Setup['params'], title = id): Setup {
  return { id, title, follow: false, params };
}
