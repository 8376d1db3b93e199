/**
 * The set-ups stored in notebook metadata: a round trip keeps every set-up as it was, and
 * hostile metadata (wrong types, huge numbers, non-identifier names, unknown keys, newer
 * schema versions) is refused field by field, never executed, and never makes the loader throw.
 */
/* eslint-disable @typescript-eslint/no-explicit-any -- hostile metadata is untyped on purpose */
import fc from 'fast-check';
import {
  hasControl,
  loadWorkbench,
  serializeWorkbench,
  MAX_SETUPS
} from '../../../src/model/workbench/metadata';
import { SETUP_SCHEMA_VERSION, type Setup } from '../../../src/model/workbench/setup';
import { cancellation, setup, trans, variable } from './fixtures';

function demoSetups(): Setup[] {
  return [
    setup('nc-1', cancellation(), 'motor noise, QR-RLS'),
    {
      id: 'hum',
      title: 'mains hum off',
      follow: true,
      params: {
        tool: 'removal',
        signal: variable('primary', [32000]),
        basis: { kind: 'harmonics', f0: 50, count: 5, fs: { kind: 'variable', name: 'rec.fs' } },
        mode: 'off',
        rankTolerance: null
      }
    },
    setup(
      'nc-truth',
      cancellation({ use: 'identification', truth: variable('path', [12]) }),
      'motor path, against the true response'
    ),
    setup('sweep-lambda', {
      tool: 'sweep',
      base: cancellation({ truth: variable('path', [12]) }),
      parameter: 'lambda',
      values: [0.99, 0.995, 0.999]
    }),
    setup('rail-jam', {
      tool: 'removal',
      signal: {
        ref: { kind: 'cell', cellId: 'rail' },
        shape: [4, 32000],
        layout: { samplesAxis: 1, rows: 'channels' }
      },
      basis: {
        kind: 'array',
        directions: [-0.5, 0.25],
        units: 'sines',
        spacing: 0.5,
        wavelength: 1
      },
      mode: 'off',
      rankTolerance: 1e-10
    }),
    setup('span', { tool: 'span', matrix: variable('A', [6, 3]), rankTolerance: null }),
    setup('ls', { tool: 'lstsq', a: variable('A'), b: variable('b'), rankTolerance: 1e-12 }),
    setup('ang', { tool: 'angles', a: variable('A'), b: variable('B') })
  ];
}

describe('notebook metadata of the workbench', () => {
  it('round-trips every kind of set-up through JSON unchanged', () => {
    const setups = demoSetups();
    const stored = JSON.parse(JSON.stringify(serializeWorkbench(setups)));
    expect(stored.version).toBe(SETUP_SCHEMA_VERSION);
    const back = loadWorkbench(trans, stored);
    expect(back.problems).toEqual([]);
    expect(back.setups).toEqual(setups);
  });

  it('round-trips random valid adaptive set-ups (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.record({
          taps: fc.integer({ min: 1, max: 4096 }),
          lambda: fc.double({ min: 1e-6, max: 1, noNaN: true }),
          delta: fc.double({ min: 1e-9, max: 1e9, noNaN: true }),
          constellation: fc.constantFrom('auto', 'bpsk', 'qpsk', 'pam4', 'qam16' as const),
          algorithm: fc.constantFrom(
            'qr-rls',
            'inverse-qr-rls',
            'rls',
            'rls-textbook',
            'lms' as const
          ),
          title: fc.string({ maxLength: 120 }).filter(s => !hasControl(s)),
          follow: fc.boolean()
        }),
        r => {
          const s: Setup = {
            id: 'x',
            title: r.title,
            follow: r.follow,
            params: cancellation({
              taps: r.taps,
              lambda: r.lambda,
              delta: r.delta,
              algorithm: r.algorithm,
              constellation: r.constellation
            })
          };
          const back = loadWorkbench(trans, JSON.parse(JSON.stringify(serializeWorkbench([s]))));
          expect(back.problems).toEqual([]);
          expect(back.setups).toEqual([s]);
        }
      )
    );
  });

  it('never throws on arbitrary JSON and loads nothing that is not a valid set-up', () => {
    fc.assert(
      fc.property(fc.jsonValue(), fc.array(fc.jsonValue(), { maxLength: 4 }), (raw, list) => {
        for (const candidate of [
          raw,
          { version: 1, setups: list },
          { version: 1, setups: [raw] }
        ]) {
          const r = loadWorkbench(trans, candidate);
          expect(Array.isArray(r.problems)).toBe(true);
          // Anything loaded survives a second load unchanged: it was a valid set-up.
          const again = loadWorkbench(trans, serializeWorkbench(r.setups));
          expect(again.setups).toEqual(r.setups);
          expect(again.problems).toEqual([]);
        }
      })
    );
  });

  it('names the field of a value out of range, keeps the other set-ups', () => {
    const good = demoSetups();
    const stored = serializeWorkbench(good) as { version: number; setups: any[] };
    stored.setups[0].params.lambda = 1.5;
    const r = loadWorkbench(trans, stored);
    expect(r.setups.map(s => s.id)).toEqual(good.slice(1).map(s => s.id));
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0]).toContain('Stored set-up 1');
    expect(r.problems[0]).toContain('params.lambda');
    expect(r.problems[0]).toContain('(0, 1]');
  });

  it('refuses wrong types, huge numbers, non-identifier names and unknown keys, each by field', () => {
    const cases: Array<[(s: any) => void, string]> = [
      [s => (s.params.taps = '16'), 'params.taps'],
      [s => (s.params.taps = JSON.parse('1e400')), 'params.taps'], // parses to Infinity
      [s => (s.params.taps = 1e300), 'params.taps'],
      [s => (s.params.x.ref.name = "__import__('os').system('rm -rf ~')"), 'params.x.ref.name'],
      [s => (s.params.x.ref.name = 'class'), 'params.x.ref.name'], // a keyword
      [s => (s.params.x.ref.name = 'ｐrimary'), 'params.x.ref.name'], // a full-width look-alike
      [s => (s.params.x.ref = { kind: 'cell', cellId: 'a b' }), 'params.x.ref.cellId'],
      [s => (s.params.code = 'print(1)'), 'params.code'],
      [s => (s.params.fs = { kind: 'expr', name: 'fs' }), 'params.fs.kind'],
      [s => (s.params.x.shape = [1, 2, 3]), 'params.x.shape'],
      [s => (s.params.x.shape = [-1]), 'params.x.shape[0]'],
      [s => (s.title = 'a\u0000b'), 'title'],
      [s => (s.id = '../../etc'), 'id'],
      [s => (s.follow = 'yes'), 'follow'],
      [s => (s.params.algorithm = 'magic'), 'params.algorithm'],
      [s => (s.params.__proto__ = { polluted: true }), ''],
      [s => (s.params = []), 'params.tool'],
      // the optional true response: a pick like any other source, or absent
      [s => (s.params.truth = 'path'), 'params.truth'],
      [
        s => (s.params.truth = { ref: { kind: 'variable', name: 'os.system("x")' } }),
        'params.truth.ref.name'
      ],
      [s => (s.params.truth = { ...s.params.x, code: 'print(1)' }), 'params.truth.code'],
      [s => (s.params.truth = { ...s.params.x, shape: [-2] }), 'params.truth.shape[0]']
    ];
    for (const [spoil, field] of cases) {
      const stored = serializeWorkbench([setup('a', cancellation())]) as {
        version: number;
        setups: any[];
      };
      spoil(stored.setups[0]);
      const r = loadWorkbench(trans, JSON.parse(JSON.stringify(stored)));
      if (field === '') {
        // JSON.stringify drops a __proto__ assignment (it sets the prototype, not a key): the set-up
        // is loaded and nothing leaks into Object.prototype.
        expect(({} as any).polluted).toBeUndefined();
        continue;
      }
      expect(r.setups).toEqual([]);
      expect(r.problems).toHaveLength(1);
      expect(r.problems[0]).toContain(`"${field}"`);
    }
  });

  it('reads a set-up without a true response (or with null) as having none, and writes none', () => {
    const stored = serializeWorkbench([setup('a', cancellation())]) as {
      version: number;
      setups: any[];
    };
    expect('truth' in stored.setups[0].params).toBe(false);
    stored.setups[0].params.truth = null;
    const r = loadWorkbench(trans, stored);
    expect(r.problems).toEqual([]);
    expect('truth' in r.setups[0].params).toBe(false);
  });

  it('round-trips a set-up whose source is an array on the panel (its label only)', () => {
    const s = setup('dehum-nc', {
      ...cancellation(),
      d: { ref: { kind: 'shelf', label: 'primary − hum' }, shape: [32000], layout: null }
    });
    const stored = JSON.parse(JSON.stringify(serializeWorkbench([s])));
    // What the notebook keeps: the label, never the array's values.
    expect(stored.setups[0].params.d.ref).toEqual({ kind: 'shelf', label: 'primary − hum' });
    const back = loadWorkbench(trans, stored);
    expect(back.problems).toEqual([]);
    expect(back.setups).toEqual([s]);
  });

  it('refuses hostile panel references by field: data, code keys, control characters, size', () => {
    const cases: Array<[unknown, string]> = [
      [{ kind: 'shelf', label: [1, 2, 3] }, 'params.x.ref.label'],
      [{ kind: 'shelf', label: { data: [0.1, 0.2] } }, 'params.x.ref.label'],
      [{ kind: 'shelf', label: 'x'.repeat(121) }, 'params.x.ref.label'],
      [{ kind: 'shelf', label: 'primary\u001b[31m' }, 'params.x.ref.label'],
      [{ kind: 'shelf', label: '   ' }, 'params.x.ref.label'],
      [{ kind: 'shelf' }, 'params.x.ref.label'],
      [{ kind: 'shelf', label: 'a', code: "__import__('os')" }, 'params.x.ref.code'],
      [{ kind: 'shelf', label: 'a', name: 'primary' }, 'params.x.ref.name'],
      [{ kind: 'shelf', label: 'a', data: [1, 2] }, 'params.x.ref.data'],
      [{ kind: 'panel', label: 'a' }, 'params.x.ref.kind']
    ];
    for (const [ref, field] of cases) {
      const stored = serializeWorkbench([setup('a', cancellation())]) as {
        version: number;
        setups: any[];
      };
      stored.setups[0].params.x.ref = ref;
      const r = loadWorkbench(trans, JSON.parse(JSON.stringify(stored)));
      expect(r.setups).toEqual([]);
      expect(r.problems).toHaveLength(1);
      expect(r.problems[0]).toContain(`"${field}"`);
    }
    // Code in a label is only a label: it loads as text and is matched against the panel's
    // labels, never run (the check below finds nothing and says the array is gone).
    const stored = serializeWorkbench([setup('a', cancellation())]) as { setups: any[] };
    stored.setups[0].params.x.ref = { kind: 'shelf', label: "__import__('os').system('rm')" };
    const r = loadWorkbench(trans, JSON.parse(JSON.stringify(stored)));
    expect(r.problems).toEqual([]);
    expect(r.setups[0].params).toMatchObject({
      x: { ref: { kind: 'shelf', label: "__import__('os').system('rm')" } }
    });
  });

  it('refuses a key named __proto__ in stored JSON as an unknown field', () => {
    const text = JSON.stringify(serializeWorkbench([setup('a', cancellation())])).replace(
      '"tool":"adaptive"',
      '"__proto__":{"polluted":1},"tool":"adaptive"'
    );
    const r = loadWorkbench(trans, JSON.parse(text));
    expect(r.setups).toEqual([]);
    expect(r.problems[0]).toContain('params.__proto__');
    expect(({} as any).polluted).toBeUndefined();
  });

  it('leaves set-ups of a newer schema alone and says so', () => {
    const r = loadWorkbench(trans, {
      version: SETUP_SCHEMA_VERSION + 1,
      setups: [{ anything: 1 }]
    });
    expect(r.setups).toEqual([]);
    expect(r.problems[0]).toMatch(/newer Perpend/);
  });

  it('refuses duplicate ids and a missing version, and bounds the number of set-ups', () => {
    const twice = serializeWorkbench([setup('a', cancellation()), setup('a', cancellation())]);
    const r = loadWorkbench(trans, twice);
    expect(r.setups).toHaveLength(1);
    expect(r.problems[0]).toMatch(/used twice/);
    expect(loadWorkbench(trans, { setups: [] }).problems[0]).toMatch(/schema version/);
    const many = serializeWorkbench(
      Array.from({ length: MAX_SETUPS + 3 }, (_, i) => setup(`s${i}`, cancellation()))
    );
    const m = loadWorkbench(trans, many);
    expect(m.setups).toHaveLength(MAX_SETUPS);
    expect(m.problems[0]).toMatch(/first 200 of 203/);
  });

  it('serialises to a copy that shares nothing with the model', () => {
    const s = demoSetups();
    const stored = serializeWorkbench(s) as { setups: any[] };
    stored.setups[0].params.taps = 99;
    expect((s[0].params as any).taps).toBe(16);
  });
});
