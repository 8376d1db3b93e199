/**
 * The worker's warm filter twins (src/worker/jobs/warm-filters.ts): a job leaves a twin of the
 * filter kind it ran, the most recent kinds are kept up to the bound, options a one-tap filter
 * refuses are ignored, and a job's result does not depend on what earlier jobs left behind.
 * (Whether V8 keeps the kernel's code is measured by bench:ui, not asserted here.)
 */
import type { AdaptiveFilterResult, AdaptiveFilterSpec } from '../../src/worker/protocol';
import { directContext, runJob } from '../../src/worker/jobs';
import { MAX_TWINS, keepWarm, warmKinds } from '../../src/worker/jobs/warm-filters';
import { Rng } from '../core/filters/helpers';

function spec(algorithm: AdaptiveFilterSpec['algorithm'], complex = false): AdaptiveFilterSpec {
  const rng = new Rng(7);
  const N = 400;
  const W = complex ? 2 : 1;
  const x = rng.gaussArray(N, complex);
  const d = x.map((v, i) => 0.5 * v + (i >= W ? 0.25 * x[i - W] : 0));
  return {
    kind: 'adaptive-filter',
    configuration: {
      kind: 'noise-cancellation',
      reference: { data: x, shape: [N], complex },
      primary: { data: d, shape: [N], complex }
    },
    algorithm,
    taps: 4,
    lambda: 0.99,
    delta: 0.01,
    mu: algorithm === 'lms' ? 0.05 : 0.5,
    precision: 'float64'
  };
}

describe('warm filter twins', () => {
  it('keeps the kind a job ran, most recent last', async () => {
    await runJob(spec('qr-rls'), directContext);
    await runJob(spec('nlms', true), directContext);
    const kinds = warmKinds();
    expect(kinds[kinds.length - 1]).toBe('nlms/float64/complex/transversal/no-trajectory');
    expect(kinds).toContain('qr-rls/float64/real/transversal/no-trajectory');
    await runJob(spec('qr-rls'), directContext);
    expect(warmKinds().slice(-1)[0]).toBe('qr-rls/float64/real/transversal/no-trajectory');
  });

  it(`keeps at most ${MAX_TWINS} kinds, dropping the least recently used`, () => {
    const algorithms = ['qr-rls', 'inverse-qr-rls', 'rls', 'nlms', 'lms'] as const;
    for (const algorithm of algorithms) {
      for (const complex of [false, true]) {
        keepWarm({ algorithm, taps: 8, complex, lambda: 0.99, delta: 0.01, mu: 0.1 });
      }
    }
    const kinds = warmKinds();
    expect(kinds).toHaveLength(MAX_TWINS);
    // 10 kinds kept in turn: the first two are gone
    expect(kinds[0]).toBe('inverse-qr-rls/float64/real/transversal/no-trajectory');
    expect(kinds).not.toContain('qr-rls/float64/real/transversal/no-trajectory');
  });

  it('ignores options it cannot make a twin of, without throwing', () => {
    const before = warmKinds();
    expect(() => keepWarm({ algorithm: 'qr-rls', taps: 4, lambda: 7 } as never)).not.toThrow();
    expect(warmKinds()).toEqual(before);
  });

  it('leaves results unchanged, bit for bit, whatever ran before', async () => {
    const first = (await runJob(spec('inverse-qr-rls'), directContext)) as AdaptiveFilterResult;
    await runJob(spec('rls', true), directContext);
    await runJob(spec('lms'), directContext);
    const again = (await runJob(spec('inverse-qr-rls'), directContext)) as AdaptiveFilterResult;
    expect(Array.from(again.error.data)).toEqual(Array.from(first.error.data));
    expect(Array.from(again.weights.data)).toEqual(Array.from(first.weights.data));
  });
});
