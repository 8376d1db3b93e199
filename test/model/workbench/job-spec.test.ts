/**
 * From set-ups to worker job specs: the workbench's parameter names become the job's, the known
 * minimum MSE typed in dB becomes a power, 2-D sources are laid out K×N with samples along the
 * last axis (DESIGN §3), and every array handed over is a copy (its buffer is transferred).
 */
import type { ArrayData as KernelArray } from '../../../src/bridge';
import { jobArray, jobSpec } from '../../../src/model/workbench/job-spec';
import { cancellation } from './fixtures';

function kernel(data: number[], shape: number[], complex = false): KernelArray {
  return {
    data: Float64Array.from(data),
    shape,
    complex,
    dtype: complex ? 'complex128' : 'float64'
  };
}

describe('job specs', () => {
  it('copies a 1-D source and keeps a 2-D source laid out samples-last as it is', () => {
    const a = kernel([1, 2, 3], [3]);
    const j = jobArray(a, null);
    expect(Array.from(j.data)).toEqual([1, 2, 3]);
    expect(j.data.buffer).not.toBe(a.data.buffer);
    const m = kernel([1, 2, 3, 4, 5, 6], [2, 3]);
    const k = jobArray(m, {
      ref: { kind: 'variable', name: 'm' },
      shape: [2, 3],
      layout: { samplesAxis: 1, rows: 'trials' }
    });
    expect(k.shape).toEqual([2, 3]);
    expect(Array.from(k.data)).toEqual([1, 2, 3, 4, 5, 6]);
  });

  it('transposes a source whose samples run along axis 0, complex pairs kept together', () => {
    // [[1, 2, 3], [4, 5, 6]] with samples down the columns: trials are the columns.
    const m = kernel([1, 2, 3, 4, 5, 6], [2, 3]);
    const pick = {
      ref: { kind: 'variable' as const, name: 'm' },
      shape: [2, 3],
      layout: { samplesAxis: 0 as const, rows: 'trials' as const }
    };
    const t = jobArray(m, pick);
    expect(t.shape).toEqual([3, 2]);
    expect(Array.from(t.data)).toEqual([1, 4, 2, 5, 3, 6]); // numpy: m.T.ravel()
    const c = kernel([1, -1, 2, -2, 3, -3, 4, -4], [2, 2], true);
    const tc = jobArray(c, { ...pick, shape: [2, 2] });
    expect(Array.from(tc.data)).toEqual([1, -1, 3, -3, 2, -2, 4, -4]);
  });

  it('maps an adaptive set-up onto the job’s names', () => {
    const spec = jobSpec(cancellation({ taps: 12, minMseDb: -40, keepEvery: 10 }), {
      arrays: { x: kernel([1, 2], [2]), d: kernel([3, 4], [2]) },
      fs: 4000
    });
    expect(spec.kind).toBe('adaptive-filter');
    if (spec.kind !== 'adaptive-filter') {
      return;
    }
    expect(spec.taps).toBe(12);
    expect(spec.keepEvery).toBe(10);
    expect(spec.fs).toBe(4000);
    // −40 dB = 10^(−40/10) = 1e−4 in the unit of d squared (the definition of the decibel).
    expect(spec.minMse).toBeCloseTo(1e-4, 18);
    expect(spec.configuration.kind).toBe('noise-cancellation');
    if (spec.configuration.kind === 'noise-cancellation') {
      expect(Array.from(spec.configuration.reference.data)).toEqual([1, 2]);
      expect(Array.from(spec.configuration.primary.data)).toEqual([3, 4]);
    }
  });

  it('maps every kind of interference basis', () => {
    const base = {
      tool: 'removal' as const,
      signal: { ref: { kind: 'variable' as const, name: 's' }, shape: null, layout: null },
      mode: 'off' as const,
      rankTolerance: 1e-9
    };
    const inputs = {
      arrays: { signal: kernel([1, 2, 3, 4], [4]), 'basis.reference': kernel([1, 0, 0, 0], [4]) },
      fs: 4000
    };
    const h = jobSpec(
      {
        ...base,
        basis: { kind: 'harmonics', f0: 50, count: 3, fs: { kind: 'variable', name: 'fs' } }
      },
      inputs
    );
    expect(h).toMatchObject({
      kind: 'interference',
      basis: { kind: 'harmonics', f0: 50, fs: 4000, count: 3 },
      rtol: 1e-9,
      mode: 'off'
    });
    const a = jobSpec(
      {
        ...base,
        basis: {
          kind: 'array',
          directions: [-0.5, 0.25],
          units: 'sines',
          spacing: 0.5,
          wavelength: 1
        }
      },
      inputs
    );
    expect(a).toMatchObject({
      basis: { kind: 'steering', sines: [-0.5, 0.25], spacing: 0.5, wavelength: 1 }
    });
    const r = jobSpec(
      { ...base, basis: { kind: 'reference', reference: base.signal, copies: 3 } },
      inputs
    );
    expect(r).toMatchObject({ basis: { kind: 'delays', lags: 3 } });
    expect(() =>
      jobSpec(
        { ...base, basis: { kind: 'harmonics', f0: 50, count: 3, fs: null } },
        { ...inputs, fs: null }
      )
    ).toThrow(/sample rate/);
  });

  it('leaves the constellation to the data when the set-up says auto (QPSK for complex)', () => {
    const inputs = {
      arrays: { x: kernel([1, 0, 0, 1], [2], true), d: kernel([1, 0, 0, 1], [2], true) },
      fs: null
    };
    const auto = jobSpec(cancellation({ use: 'equalization', constellation: 'auto' }), inputs);
    const named = jobSpec(cancellation({ use: 'equalization', constellation: 'qam16' }), inputs);
    if (
      auto.kind !== 'adaptive-filter' ||
      auto.configuration.kind !== 'equalization' ||
      named.kind !== 'adaptive-filter' ||
      named.configuration.kind !== 'equalization'
    ) {
      throw new Error('expected equalization jobs');
    }
    // undefined: the core decides by the data (bpsk real, qpsk complex)
    expect(auto.configuration.constellation).toBeUndefined();
    expect(named.configuration.constellation).toBe('qam16');
  });
});
