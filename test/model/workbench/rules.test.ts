/**
 * Form validation of set-ups before anything runs: parameter ranges and the checks against the
 * sources as the kernel lists them. Each broken rule names its field.
 */
import { checkParams } from '../../../src/model/workbench/rules';
import { checkSources, type SourceFacts } from '../../../src/model/workbench/sources-check';
import type { SourceRef } from '../../../src/model/workbench/setup';
import { cancellation, trans, variable } from './fixtures';

function lookup(table: Record<string, SourceFacts>) {
  return (ref: SourceRef): SourceFacts | null =>
    table[
      ref.kind === 'variable'
        ? ref.name
        : ref.kind === 'cell'
          ? `cell:${ref.cellId}`
          : `shelf:${ref.label}`
    ] ?? null;
}

const fields = (issues: { field: string }[]) => issues.map(i => i.field);

describe('parameter rules', () => {
  it('accepts the demo cancellation set-up', () => {
    expect(checkParams(trans, cancellation())).toEqual([]);
  });

  it('refuses λ = 1.5 with the interval it must lie in', () => {
    const issues = checkParams(trans, cancellation({ lambda: 1.5 }));
    expect(issues).toEqual([
      { field: 'lambda', message: 'forgetting factor λ must lie in (0, 1], got 1.5.' }
    ]);
  });

  it('refuses λ = 0, a fractional M, NaN and Infinity', () => {
    expect(fields(checkParams(trans, cancellation({ lambda: 0 })))).toEqual(['lambda']);
    expect(fields(checkParams(trans, cancellation({ taps: 2.5 })))).toEqual(['taps']);
    expect(fields(checkParams(trans, cancellation({ delta: NaN })))).toEqual(['delta']);
    expect(fields(checkParams(trans, cancellation({ delta: Infinity })))).toEqual(['delta']);
  });

  it('checks μ and ε for NLMS (μ < 2: Haykin, Adaptive Filter Theory, 4th ed., §6.1) but not λ', () => {
    expect(checkParams(trans, cancellation({ algorithm: 'nlms', mu: 0.5, lambda: 7 }))).toEqual([]);
    const two = checkParams(trans, cancellation({ algorithm: 'nlms', mu: 2 }));
    expect(fields(two)).toEqual(['mu']);
    expect(two[0].message).toMatch(/below 2/);
    expect(fields(checkParams(trans, cancellation({ algorithm: 'nlms', epsilon: -1 })))).toEqual([
      'epsilon'
    ]);
  });

  it('asks for d unless the filter predicts', () => {
    expect(fields(checkParams(trans, cancellation({ d: null })))).toEqual(['d']);
    expect(checkParams(trans, cancellation({ d: null, use: 'prediction' }))).toEqual([]);
  });

  it('needs a sample rate for harmonics and keeps them below Nyquist', () => {
    const removal = (fs: number | null, count = 5) =>
      checkParams(trans, {
        tool: 'removal',
        signal: variable('primary'),
        basis: {
          kind: 'harmonics',
          f0: 50,
          count,
          fs: fs === null ? null : { kind: 'hz', value: fs }
        },
        mode: 'off',
        rankTolerance: null
      });
    expect(removal(4000)).toEqual([]);
    expect(fields(removal(null))).toEqual(['basis.fs']);
    // 40 × 50 Hz = 2000 Hz is the Nyquist frequency of fs = 4000 Hz (common practice).
    const nyq = removal(4000, 40);
    expect(fields(nyq)).toEqual(['basis.count']);
    expect(nyq[0].message).toContain('2000 Hz');
    expect(removal(4000, 39)).toEqual([]);
  });

  it('refuses a rank tolerance outside (0, 1)', () => {
    for (const t of [0, 1, -1e-3, 2]) {
      const issues = checkParams(trans, { tool: 'span', matrix: variable('A'), rankTolerance: t });
      expect(fields(issues)).toEqual(['rankTolerance']);
    }
    expect(
      checkParams(trans, { tool: 'span', matrix: variable('A'), rankTolerance: 1e-8 })
    ).toEqual([]);
  });

  it('checks each sweep value with the swept parameter’s rule and refuses repeats', () => {
    const sweep = (values: number[], parameter: 'lambda' | 'taps' = 'lambda') =>
      checkParams(trans, { tool: 'sweep', base: cancellation(), parameter, values });
    expect(sweep([0.99, 0.995, 0.999])).toEqual([]);
    expect(sweep([0.99, 1.2])[0].message).toContain('Value 2');
    expect(fields(sweep([]))).toEqual(['values']);
    expect(fields(sweep([0.99, 0.99]))).toEqual(['values']);
    expect(fields(sweep([8, 16.5], 'taps'))).toEqual(['values']);
  });

  it('prefixes the base set-up’s fields in a sweep', () => {
    const issues = checkParams(trans, {
      tool: 'sweep',
      base: cancellation({ delta: -1 }),
      parameter: 'lambda',
      values: [0.9]
    });
    expect(fields(issues)).toEqual(['base.delta']);
  });
});

describe('checks against the sources', () => {
  const demo = lookup({
    reference: { shape: [32000], complex: false },
    primary: { shape: [32000], complex: false },
    short: { shape: [16000], complex: false },
    baseband: { shape: [4000], complex: true },
    rail: { shape: [4, 32000], complex: false },
    cube: { shape: [2, 2, 2], complex: false }
  });

  it('accepts the demo cancellation', () => {
    expect(checkSources(trans, cancellation(), demo)).toEqual([]);
  });

  it('asks nothing of d in a prediction (a d left from another use in the form is not read)', () => {
    const p = cancellation({ use: 'prediction', x: variable('baseband'), d: variable('') });
    expect(checkSources(trans, p, demo)).toEqual([]);
    // the same d in a cancellation is asked for, on its field
    expect(fields(checkSources(trans, { ...p, use: 'cancellation' }, demo))).toEqual(['d']);
  });

  it('says x and d differ in length, naming both', () => {
    const issues = checkSources(trans, cancellation({ d: variable('short') }), demo);
    expect(fields(issues)).toEqual(['d']);
    expect(issues[0].message).toContain('reference has 32000 samples');
    expect(issues[0].message).toContain('short has 16000');
  });

  it('refuses real x with complex d', () => {
    const issues = checkSources(
      trans,
      cancellation({ d: variable('baseband'), x: variable('baseband') }),
      demo
    );
    expect(issues).toEqual([]);
    const mixed = checkSources(
      trans,
      cancellation({ x: variable('reference'), d: variable('baseband') }),
      demo
    );
    expect(mixed.map(i => i.message).join(' ')).toMatch(/both must be real or both complex/);
  });

  it('refuses M longer than the signal', () => {
    const issues = checkSources(trans, cancellation({ taps: 40000 }), demo);
    expect(fields(issues)).toEqual(['taps']);
    expect(issues[0].message).toContain('32000 samples');
  });

  it('says a source is gone, or has changed shape since the set-up was made', () => {
    const gone = checkSources(trans, cancellation({ x: variable('deleted', [32000]) }), demo);
    expect(fields(gone)).toEqual(['x']);
    expect(gone[0].message).toMatch(/not in the kernel now/);
    const changed = checkSources(trans, cancellation({ d: variable('short', [32000]) }), demo);
    expect(changed[0].message).toContain('it was 32000, it is 16000 now');
  });

  it('asks which axis holds the samples of a 2-D source, refuses 3-D', () => {
    const two = checkSources(
      trans,
      cancellation({ x: variable('rail'), d: variable('rail') }),
      demo
    );
    expect(two[0].message).toMatch(/choose which axis holds the samples/);
    const laid = {
      ref: { kind: 'variable' as const, name: 'rail' },
      shape: [4, 32000],
      layout: { samplesAxis: 1 as const, rows: 'trials' as const }
    };
    expect(checkSources(trans, cancellation({ x: laid, d: laid }), demo)).toEqual([]);
    const cube = checkSources(trans, cancellation({ x: variable('cube') }), demo);
    expect(cube[0].message).toMatch(/3 dimensions/);
  });

  it('checks the basis against the signal for every kind of removal', () => {
    const base = {
      tool: 'removal' as const,
      signal: variable('primary'),
      mode: 'off' as const,
      rankTolerance: null
    };
    const wrongRows = checkSources(
      trans,
      { ...base, basis: { kind: 'matrix', matrix: variable('rail') } },
      demo
    );
    expect(wrongRows[0].message).toMatch(/basis has 4 rows but primary has 32000 samples/);
    const ref = checkSources(
      trans,
      { ...base, basis: { kind: 'reference', reference: variable('short'), copies: 8 } },
      demo
    );
    expect(fields(ref)).toEqual(['basis.reference']);
    const array = checkSources(
      trans,
      {
        ...base,
        basis: { kind: 'array', directions: [10], units: 'degrees', spacing: 0.5, wavelength: 1 }
      },
      demo
    );
    expect(array[0].message).toMatch(/sensors × samples/);
  });
});
