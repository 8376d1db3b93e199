/**
 * The front end's side of issue 12, against a stand-in kernel that answers silent executes
 * with replies made by the test (the real helper runs in test/bridge/helper-rules.test.ts and
 * test/integration/harden.test.ts): the sentences for the helper's new refusals, sizes with
 * the digits that tell them apart, arrays under unnameable keys listed with a note, what the
 * list showed sent with a read, and one error type (BridgeError with a code) for every
 * failure, before anything is sent.
 */
import { Signal } from '@lumino/signaling';
import type { Kernel } from '@jupyterlab/services';
import type { TranslationBundle } from '@jupyterlab/translation';
import { KernelBridge } from '../../src/bridge/bridge';
import { BridgeError } from '../../src/bridge/errors';
import { bridgeBundle } from '../../src/bridge/i18n';
import { mibPair, pyShape, refusal } from '../../src/bridge/refusals';

const en = bridgeBundle();

class FakeKernel {
  status: Kernel.Status = 'idle';
  isDisposed = false;
  readonly statusChanged = new Signal<this, Kernel.Status>(this);
  readonly iopubMessage = new Signal<this, unknown>(this);
  readonly connectionStatusChanged = new Signal<this, Kernel.ConnectionStatus>(this);
  readonly disposed = new Signal<this, void>(this);
  readonly info = Promise.resolve({ language_info: { name: 'python' } });
  readonly sent: string[] = [];
  constructor(private readonly _answer: (expr: string) => unknown) {}

  requestExecute(content: { user_expressions: Record<string, string> }) {
    const exprs: Record<string, unknown> = {};
    for (const [key, expr] of Object.entries(content.user_expressions)) {
      this.sent.push(expr);
      const a = this._answer(expr);
      exprs[key] = {
        status: 'ok',
        data: { 'text/plain': typeof a === 'string' ? a : JSON.stringify(a) }
      };
    }
    return {
      done: Promise.resolve({ content: { status: 'ok', user_expressions: exprs } }),
      onIOPub: null
    };
  }
}

function bridgeWith(answer: (expr: string) => unknown): { b: KernelBridge; k: FakeKernel } {
  const k = new FakeKernel(answer);
  const b = new KernelBridge({
    kernel: k as unknown as Kernel.IKernelConnection,
    transport: 'base64'
  });
  return { b, k };
}

async function failure(p: Promise<unknown>): Promise<BridgeError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(BridgeError);
    return e as BridgeError;
  }
  throw new Error('it did not fail');
}

describe('sizes and shapes in sentences', () => {
  it('gives the two sizes the decimals that tell them apart', () => {
    // 1 MiB = 1048576 bytes (IEC 80000-13); 8 bytes over is 1.0000076 MiB.
    expect(mibPair(en, 1048584, 1048576)).toEqual(['1.00001 MiB', '1.00000 MiB']);
    expect(mibPair(en, 3 * 1048576, 1048576)).toEqual(['3.0 MiB', '1.0 MiB']);
    expect(mibPair(en, 2411724, 1048576)).toEqual(['2.3 MiB', '1.0 MiB']);
    // 512 MiB + 16 bytes against 512 MiB: 1.5e-5 MiB apart.
    expect(mibPair(en, 536870928, 536870912)).toEqual(['512.00002 MiB', '512.00000 MiB']);
    // Below 1 MiB, three decimals at least.
    expect(mibPair(en, 524296, 524288)).toEqual(['0.50001 MiB', '0.50000 MiB']);
    expect(mibPair(en, 1048576, 1048576)).toEqual(['1.0 MiB', '1.0 MiB']);
  });

  it('writes shapes as Python writes tuples', () => {
    expect(pyShape([5])).toBe('(5,)');
    expect(pyShape([2, 3])).toBe('(2, 3)');
  });
});

describe("the helper's refusals as sentences", () => {
  const r = (code: string, detail: Record<string, unknown>, what = 'x'): BridgeError =>
    refusal(en, code, detail, what, 'maxArrayMiB');

  it('says a size over the limit with the digits that show by how much', () => {
    expect(r('too-large', { bytes: 1048584, max: 1048576 }, 'over8').message).toBe(
      'over8 is 1.00001 MiB as float64, over the limit of 1.00000 MiB (setting "maxArrayMiB"). A read costs several times that in browser memory; raise the setting or read a slice.'
    );
  });

  it("keeps numpy's dtype names whole", () => {
    expect(r('dtype', { dtype: 'datetime64[D]' }, 'days').message).toBe(
      'days has dtype datetime64[D]; Perpend reads numbers only (bool, integers, floats, complex).'
    );
    expect(r('dtype', { dtype: 'timedelta64[ns]' }).message).toContain('timedelta64[ns]');
    expect(r('dtype', { dtype: '<b>x</b>' }).message).toContain('has dtype bxb;');
  });

  it('tells a missing variable from a missing attribute', () => {
    expect(r('not-found', {}, 'x').message).toBe(
      'There is no variable x in the kernel (was it deleted, or the kernel restarted?).'
    );
    expect(r('not-found', { path: 'rec' }, 'rec.fs').message).toMatch(/^There is no variable rec /);
    const a = r('not-found', { path: 'rec', attr: 'x', type: 'Rec' }, 'rec.x');
    expect(a.code).toBe('not-found');
    expect(a.message).toBe(
      'rec has no attribute x (nothing of that name is stored in it or in its class Rec).'
    );
  });

  it('says why a value that only code could give is refused, and what to do', () => {
    const cases: Array<[Record<string, unknown>, RegExp]> = [
      [
        { why: 'property', path: 'rec', attr: 'fs', type: 'Rec' },
        /^rec\.fs is computed by a property of Rec: .*fs = rec\.fs/
      ],
      [
        { why: 'method', path: 'rec', attr: 'f', type: 'Rec' },
        /^rec\.f is a method or computed attribute of Rec/
      ],
      [
        { why: 'getattr', path: 'rec', attr: 'fs', type: 'Rec' },
        /^rec has no stored attribute fs; its class Rec would compute one with __getattr__/
      ],
      [
        { why: 'getattribute', path: 'lazy', type: 'Proxy' },
        /^lazy is a Proxy, whose class decides attribute access/
      ],
      [
        { why: 'subclass', type: 'MyFloat' },
        /^x is a MyFloat, a subclass of a Python number type.*fs = float\(x\)/
      ]
    ];
    for (const [detail, re] of cases) {
      const e = r('user-code', detail);
      expect(e.code).toBe('user-code');
      expect(e.message).toMatch(re);
      expect(e.message).toMatch(/never/);
    }
  });

  it('counts masked entries, and says when it cannot', () => {
    const e = r('masked', { count: 2, size: 10 }, 'sig');
    expect(e.code).toBe('masked');
    expect(e.message).toMatch(/^sig is a masked array with 2 of its 10 entries masked/);
    expect(e.message).toContain('sig_filled = sig.filled(np.nan)');
    expect(r('masked', { count: -1 }, 'sig').message).toMatch(/mask Perpend cannot count/);
  });

  it('says what the list showed and what the kernel holds now', () => {
    expect(
      r(
        'changed',
        { shape: [2, 3], dtype: 'float32', listed_shape: [5], listed_dtype: 'float64' },
        'v'
      ).message
    ).toBe(
      'v has changed since the list was made: the list showed shape (5,) float64, the kernel now holds shape (2, 3) float32. Nothing was read; pick it again from the refreshed list.'
    );
    expect(
      r('changed', { type: 'str', listed_shape: [5], listed_dtype: 'float64' }, 'v').message
    ).toContain('the kernel now holds a str.');
  });

  it('says what a scalar is when it is not a real number', () => {
    expect(r('not-scalar', { type: 'ndarray', shape: [3] }, 'fs').message).toBe(
      'fs is not a real number (it is a ndarray of shape (3,)).'
    );
    expect(r('not-scalar', { type: 'complex' }, 'fs').message).toBe(
      'fs is not a real number (it is a complex).'
    );
    expect(r('int-precision', { value: '9007199254740993' }, 'fs').message).toBe(
      'fs is 9007199254740993, beyond ±2^53: float64 cannot hold it exactly, so it was not read.'
    );
  });

  it('every new sentence goes through the translation bundle', () => {
    const english = en as unknown as Record<string, (...a: unknown[]) => string>;
    const pseudo = Object.fromEntries(
      Object.keys(english).map(k => [k, (...a: unknown[]) => `‹fr›${english[k](...a)}`])
    ) as unknown as TranslationBundle;
    const codes: Array<[string, Record<string, unknown>]> = [
      ['user-code', { why: 'property', path: 'a', attr: 'b', type: 'T' }],
      ['user-code', { why: 'other' }],
      ['masked', { count: 1, size: 2 }],
      ['changed', { shape: [1], dtype: 'float64', listed_shape: [2], listed_dtype: 'float64' }],
      ['reserved', { why: 'dunder' }],
      ['reserved', { why: 'ipython' }],
      ['not-found', { path: 'a', attr: 'b', type: 'T' }],
      ['not-scalar', { type: 'str' }]
    ];
    for (const [code, detail] of codes) {
      expect(refusal(pseudo, code, detail, 'x', 's').message.startsWith('‹fr›')).toBe(true);
    }
  });
});

describe('listing', () => {
  const vars = {
    vars: [
      {
        name: 'm',
        shape: [4],
        dtype: 'float64',
        bytes: 32,
        readable: false,
        notes: ['masked'],
        masked: 3
      },
      {
        name: 'u',
        shape: [2],
        dtype: 'float64',
        bytes: 16,
        readable: true,
        notes: ['masked'],
        masked: 0
      }
    ],
    skipped: [
      {
        name: 'a'.repeat(60),
        why: 'long',
        length: 250,
        shape: [3],
        dtype: 'float64',
        bytes: 24,
        readable: true,
        notes: []
      },
      {
        name: 'a; b',
        why: 'name',
        length: 4,
        shape: [2],
        dtype: 'int8',
        bytes: 2,
        readable: true,
        notes: []
      }
    ],
    more: 2
  };

  it('lists masked arrays with their count, and arrays it cannot name as unreadable notes', async () => {
    const { b } = bridgeWith(() => vars);
    const infos = await b.listVariables();
    expect(infos.map(i => [i.label, i.readable])).toEqual([
      ['m', false],
      ['u', true],
      [`${'a'.repeat(40)}…`, false],
      ['"a; b"', false]
    ]);
    expect(infos[0].notes).toEqual([
      'A numpy masked array: 3 of its 4 entries are masked, so it is not read (masked entries hold no values). Fill or drop them into a plain variable first.'
    ]);
    expect(infos[1].notes[0]).toMatch(/no entry masked/);
    expect(infos[2].notes[0]).toBe(
      'Its name has 250 characters, more than the 200 Perpend accepts, so it cannot be read. Bind it to a shorter name first.'
    );
    expect(infos[3].notes[0]).toMatch(/not a Python name/);
    expect(infos[3].notes[1]).toBe('2 more arrays under keys Perpend cannot name are not shown.');
    b.dispose();
  });

  it('sends what the list showed with a read, and forgets it once the kernel said it changed', async () => {
    let changed = true;
    const { b, k } = bridgeWith(expr => {
      if (expr.includes('.list_vars(')) {
        return {
          vars: [{ name: 'u', shape: [2], dtype: 'float64', bytes: 16, readable: true, notes: [] }]
        };
      }
      if (expr.includes('.b64_open(') && changed) {
        changed = false;
        return {
          error: 'changed',
          detail: { shape: [3], dtype: 'float64', listed_shape: [2], listed_dtype: 'float64' }
        };
      }
      if (expr.includes('.b64_open(')) {
        return { shape: [3], dtype: 'float64', complex: false, nbytes: 24 };
      }
      return 'AAAAAAAA8D8AAAAAAAAAQAAAAAAAAAhA'; // base64 of float64 [1, 2, 3], little-endian
    });
    await b.listVariables();
    const e = await failure(b.readArray({ kind: 'variable', name: 'u' }));
    expect(e.code).toBe('changed');
    const open = k.sent.filter(s => s.includes('.b64_open('));
    expect(open[0]).toMatch(
      /\.b64_open\(\d+, \{"kind": "variable", "name": "u"\}, \d+, \{"shape": \[2\], "dtype": "float64"\}\)$/
    );
    const a = await b.readArray({ kind: 'variable', name: 'u' });
    expect(Array.from(a.data)).toEqual([1, 2, 3]);
    expect(k.sent.filter(s => s.includes('.b64_open('))[1]).toMatch(/, \d+\)$/);
    b.dispose();
  });
});

describe('one error type for every failure, before anything is sent', () => {
  it('refuses bad names, bad arguments and reserved names as BridgeErrors with codes', async () => {
    const { b, k } = bridgeWith(() => ({}));
    const one = { data: new Float64Array([1]), shape: [1], complex: false, dtype: 'float64' };
    for (const name of [' fs', 'fs\n', 'f s', '', '1x', 'x; y']) {
      expect((await failure(b.readScalar(name))).code).toBe('invalid-name');
      expect((await failure(b.readArray({ kind: 'variable', name }))).code).toBe('invalid-name');
    }
    expect((await failure(b.readScalar(' fs'))).message).toMatch(
      /^" fs" is not a name Perpend can read/
    );
    expect((await failure(b.readScalar('a.b.c.d.e'))).code).toBe('invalid-name');
    expect((await failure(b.readScalar(7 as unknown as string))).code).toBe('bad-argument');
    expect(
      (await failure(b.readArray(null as unknown as { kind: 'variable'; name: string }))).code
    ).toBe('bad-argument');
    expect((await failure(b.writeArray('w', { ...one, shape: [2] }))).code).toBe('bad-argument');
    expect((await failure(b.verifyCells('x' as unknown as []))).code).toBe('bad-argument');
    for (const name of ['__builtins__', '__name__', 'Out', '_5', 'get_ipython']) {
      const e = await failure(b.writeArray(name, one, { overwrite: true }));
      expect(e.code).toBe('reserved');
    }
    expect(k.sent).toEqual([]);
    expect(
      () => new KernelBridge({ kernel: k as unknown as Kernel.IKernelConnection, timeoutMs: -1 })
    ).toThrow(expect.objectContaining({ code: 'bad-argument' }));
    b.dispose();
  });
});
