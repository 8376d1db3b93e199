/**
 * The bridge against a hostile and careless notebook, on a real kernel:
 * 1. no binding in the user's namespace (builtins' names, `np`, `numpy`, `__builtins__`,
 *    `__import__`, the helper's own names) changes what Perpend does; names whose replacement
 *    breaks the interpreter are never written; the warnings after a write are true;
 * 2. listing and reading run no code of the user's objects (they record every call into them:
 *    test/bridge/recording-objects.ts), and a value only code could give is refused, saying so;
 * 3. nothing wrong arrives silently: masked entries, a variable re-bound since the listing, and
 *    the text parsers refuse as the kernel path does;
 * 4. the messages say what happened.
 */
import type { Kernel } from '@jupyterlab/services';
import {
  type BridgeError,
  KernelBridge,
  isBridgeError,
  parseArrayText,
  HELPER_MODULE,
  type ArrayData
} from '../../src/bridge';
import { RECORDING_OBJECTS } from '../bridge/recording-objects';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

const ONE: ArrayData = {
  data: new Float64Array([1, 2]),
  shape: [2],
  complex: false,
  dtype: 'float64'
};

async function failure(p: Promise<unknown>): Promise<BridgeError> {
  try {
    await p;
  } catch (e) {
    if (isBridgeError(e)) {
      return e;
    }
    throw e;
  }
  throw new Error('it did not fail');
}

async function cell(k: Kernel.IKernelConnection, code: string): Promise<void> {
  const r = await runCell(k, code);
  if (r.status !== 'ok') {
    throw new Error(`${code}\n${r.stdout}`);
  }
}

beforeAll(async () => {
  server = await startServer('harden');
  kernel = await server.startKernel();
  await cell(kernel, RECORDING_OBJECTS);
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

const calls = (): Promise<string> => evalText(kernel, 'calls');

describe('1. the user namespace cannot switch Perpend off', () => {
  it('works in a fresh kernel whose namespace rebinds every builtin, np, numpy, __import__ and __builtins__ before the first request', async () => {
    const k = await server.startKernel();
    try {
      // As after a restart and Run All: the notebook's cells ran before Perpend asked anything.
      await cell(
        k,
        [
          'import numpy as _n, builtins as _b',
          '_ns = get_ipython().user_ns',
          'x = _n.arange(6.0).reshape(2, 3)',
          'fs = 48000.0',
          'np = "not numpy"; numpy = 4; sys = 5; types = 6; json = 7',
          `_perpend_sys = 8; ${HELPER_MODULE} = 9`,
          'globals()["__import__"] = _n.zeros(3)',
          'globals().update({k: _n.zeros(1) for k in vars(_b) if not k.startswith("__")})'
        ].join('\n')
      );
      // Every builtin name is an array now: exec, getattr, isinstance, type, list, ...
      expect(await evalText(k, 'exec.__class__.__name__')).toBe("'ndarray'");
      for (const transport of ['comm', 'base64'] as const) {
        const b = new KernelBridge({ kernel: k, transport });
        const vars = await b.listVariables();
        expect(vars.find(v => v.label === 'x')).toMatchObject({ shape: [2, 3] });
        expect(vars.find(v => v.label === 'exec')).toMatchObject({ shape: [1] });
        const a = await b.readArray({ kind: 'variable', name: 'x' });
        expect(Array.from(a.data)).toEqual([0, 1, 2, 3, 4, 5]);
        expect(await b.readScalar('fs')).toBe(48000);
        const w = await b.writeArray('y_' + transport, ONE);
        expect(w).toMatchObject({ status: 'written', warnings: [] });
        b.dispose();
      }
      // Now the builtins themselves: the notebook's print and every builtin stop working,
      // Perpend does not.
      await cell(k, '_ns["__builtins__"] = _n.zeros(3)');
      const broken = await runCell(k, 'print(1)');
      expect(broken.status).toBe('error');
      const b = new KernelBridge({ kernel: k });
      expect((await b.readArray({ kind: 'variable', name: 'y_comm' })).data[1]).toBe(2);
      expect(await b.readScalar('fs')).toBe(48000);
      expect((await b.listVariables()).some(v => v.label === 'x')).toBe(true);
      b.dispose();
      const b64 = new KernelBridge({ kernel: k, transport: 'base64' });
      expect((await b64.readArray({ kind: 'variable', name: 'x' })).shape).toEqual([2, 3]);
      b64.dispose();
    } finally {
      await k.shutdown();
      k.dispose();
    }
  });

  it('never writes names whose replacement breaks the interpreter or IPython, even with overwrite', async () => {
    const bridge = new KernelBridge({ kernel });
    let sent = 0;
    const count = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send') {
        sent++;
      }
    };
    kernel.anyMessage.connect(count);
    for (const name of [
      '__builtins__',
      '__import__',
      '__name__',
      '__spec__',
      '__loader__',
      '__package__'
    ]) {
      for (const overwrite of [false, true]) {
        const e = await failure(bridge.writeArray(name, ONE, { overwrite }));
        expect(e.code).toBe('reserved');
        expect(e.message).toContain(`"${name}"`);
        expect(e.message).toMatch(/Python's own.*break/);
      }
    }
    for (const name of ['Out', 'In', 'get_ipython', '_', '_3', '_i3', 'exit']) {
      const e = await failure(bridge.writeArray(name, ONE, { overwrite: true }));
      expect(e.code).toBe('reserved');
      expect(e.message).toMatch(/IPython keeps/);
    }
    kernel.anyMessage.disconnect(count);
    expect(sent).toBe(0);
    // The kernel's helper refuses them too (a request that bypasses the front end).
    const H = `__import__('sys').modules['${HELPER_MODULE}']`;
    await bridge.listVariables();
    expect(await evalText(kernel, `${H}.w_begin(9001, "__name__", [2], False, 16, True)`)).toBe(
      '{"error":"reserved","detail":{"why":"dunder"}}'
    );
    expect(await evalText(kernel, `${H}.w_begin(9002, "Out", [2], False, 16, True)`)).toBe(
      '{"error":"reserved","detail":{"why":"ipython"}}'
    );
    expect(await evalText(kernel, '(type(__name__).__name__, __name__, type(Out).__name__)')).toBe(
      "('str', '__main__', 'dict')"
    );
    bridge.dispose();
  });

  it('says what is true after a write: builtins shadowed, modules replaced, nothing for a free name', async () => {
    const bridge = new KernelBridge({ kernel });
    const free = await bridge.writeArray('fresh_name', ONE);
    expect(free).toMatchObject({ status: 'written', warnings: [] });
    const s = await bridge.writeArray('sum', ONE);
    expect(s).toMatchObject({ status: 'shadows' });
    const s2 = await bridge.writeArray('sum', ONE, { overwrite: true });
    expect(s2.status === 'written' && s2.warnings).toEqual([
      '"sum" now shadows the Python builtin of that name.'
    ]);
    await cell(kernel, 'import math as mod_alias');
    const m = await bridge.writeArray('mod_alias', ONE);
    expect(m).toMatchObject({ status: 'exists', conflict: { module: 'math' } });
    const m2 = await bridge.writeArray('mod_alias', ONE, { overwrite: true });
    expect(m2.status === 'written' && m2.warnings).toEqual([
      '"mod_alias" was the module math; it is now the array.'
    ]);
    await cell(kernel, 'del sum');
    bridge.dispose();
  });
});

describe('2. listing and reading run no user code', () => {
  beforeEach(async () => {
    await cell(kernel, 'calls.clear()');
  });

  it('lists variables and cell results without a single call into the recording objects', async () => {
    const bridge = new KernelBridge({ kernel });
    // A cell whose result is the lazy proxy (its display ran its __repr__: the cell's own doing).
    const r = await runCell(kernel, 'lazy');
    const r2 = await runCell(kernel, 'sub');
    await cell(kernel, 'calls.clear()');
    const vars = await bridge.listVariables();
    const cells = await bridge.listCellResults([
      { cellId: 'c-lazy', executionCount: r.executionCount },
      { cellId: 'c-sub', executionCount: r2.executionCount }
    ]);
    expect(await calls()).toBe('[]');
    const labels = vars.map(v => v.label);
    for (const n of ['rec', 'slotted', 'own', 'lazy', 'fsub', 'Cfg', 'MetaCfg']) {
      expect(labels).not.toContain(n);
    }
    expect(vars.find(v => v.label === 'sub')).toMatchObject({ shape: [4], dtype: 'float64' });
    expect(cells.map(c => c.label)).toEqual([`Out[${r2.executionCount}]`]);
    bridge.dispose();
  });

  it('reads a dotted sample rate from what is stored, running no getter (not even twice)', async () => {
    const bridge = new KernelBridge({ kernel });
    expect(await bridge.readScalar('rec.fs')).toBe(48000);
    expect(await bridge.readScalar('rec.cls_rate')).toBe(44100);
    expect(await bridge.readScalar('slotted.fs')).toBe(16000);
    expect(await bridge.readScalar('Cfg.fs')).toBe(22050);
    expect(await bridge.readScalar('sub1')).toBe(96000);
    expect(await calls()).toBe('[]');
    bridge.dispose();
  });

  it('reads over the open data channel without an execute request', async () => {
    // JupyterLab's debugger asks the kernel for its module list after every execute reply it
    // sees on the notebook's connection and renders that list again (a 35–60 ms task on the
    // page, measured with bench:ui's stall case): a run's reads must not cause one.
    const bridge = new KernelBridge({ kernel, transport: 'comm' });
    expect(await bridge.readScalar('rec.fs')).toBe(48000); // opens the channel
    const sent: string[] = [];
    const spy = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send') {
        sent.push(a.msg.header.msg_type);
      }
    };
    kernel.anyMessage.connect(spy);
    try {
      expect(await bridge.readScalar('Cfg.fs')).toBe(22050);
      const refused = await failure(bridge.readScalar('rec.rate'));
      expect(refused.code).toBe('user-code');
      expect(refused.message).toMatch(/^rec\.rate is computed by a property of Rec/);
      const a = await bridge.readArray({ kind: 'variable', name: 'sub' });
      expect(a.shape).toEqual([4]);
    } finally {
      kernel.anyMessage.disconnect(spy);
    }
    expect(sent).not.toContain('execute_request');
    expect(sent.filter(t => t === 'comm_msg')).toHaveLength(3);
    expect(await calls()).toBe('[]');
    bridge.dispose();
  });

  it('refuses values only code could give, saying so and what to do', async () => {
    const bridge = new KernelBridge({ kernel });
    const rate = await failure(bridge.readScalar('rec.rate'));
    expect(rate.code).toBe('user-code');
    expect(rate.message).toBe(
      'rec.rate is computed by a property of Rec: reading it would run that code, which Perpend never does. Bind the value to a plain variable first (for example rate = rec.rate) and read that.'
    );
    const broken = await failure(bridge.readScalar('rec.broken'));
    expect(broken.code).toBe('user-code');
    expect(broken.message).not.toMatch(/There is no variable/);
    expect(broken.message).toMatch(/^rec\.broken is computed by a property of Rec/);
    const method = await failure(bridge.readScalar('rec.method'));
    expect(method.message).toMatch(/^rec\.method is a method or computed attribute of Rec/);
    const getattr = await failure(bridge.readScalar('rec.missing'));
    expect(getattr.code).toBe('user-code');
    expect(getattr.message).toMatch(/__getattr__/);
    const lazy = await failure(bridge.readScalar('lazy.fs'));
    expect(lazy.message).toMatch(/^lazy is a LazyProxy, whose class decides attribute access/);
    const fsub = await failure(bridge.readScalar('fsub'));
    expect(fsub.code).toBe('user-code');
    expect(fsub.message).toMatch(/^fsub is a FloatSub, a subclass of a Python number type/);
    expect(fsub.message).toMatch(/fs = float\(fsub\)/);
    const arr = await failure(bridge.readArray({ kind: 'variable', name: 'lazy' }));
    expect(arr.code).toBe('not-array');
    expect(arr.message).toMatch(/it is a LazyProxy.*runs no code of it/);
    expect(await calls()).toBe('[]');
    bridge.dispose();
  });

  it('reads an ndarray subclass as its stored data on both transports without calling it', async () => {
    for (const transport of ['comm', 'base64'] as const) {
      const bridge = new KernelBridge({ kernel, transport });
      const a = await bridge.readArray({ kind: 'variable', name: 'sub' });
      expect(Array.from(a.data)).toEqual([0, 1, 2, 3]);
      bridge.dispose();
    }
    expect(await calls()).toBe('[]');
  });
});

describe('3. nothing wrong arrives silently', () => {
  it('never delivers masked entries as values', async () => {
    const bridge = new KernelBridge({ kernel });
    const vars = await bridge.listVariables();
    const m = vars.find(v => v.label === 'masked')!;
    expect(m.readable).toBe(false);
    expect(m.notes.join(' ')).toMatch(/masked array: 1 of its 3 entries are masked/);
    expect(vars.find(v => v.label === 'unmasked')).toMatchObject({ readable: true });
    for (const transport of ['comm', 'base64'] as const) {
      const b = new KernelBridge({ kernel, transport });
      const e = await failure(b.readArray({ kind: 'variable', name: 'masked' }));
      expect(e.code).toBe('masked');
      expect(e.message).toBe(
        'masked is a masked array with 1 of its 3 entries masked: they hold no values, so Perpend does not read it (the tools would run on whatever is stored under the mask). Fill or drop them into a plain variable first, for example masked_filled = masked.filled(np.nan) or masked.compressed().'
      );
      expect(Array.from((await b.readArray({ kind: 'variable', name: 'unmasked' })).data)).toEqual([
        1, 2
      ]);
      b.dispose();
    }
    await cell(kernel, 'one_masked = np.ma.array([5.0], mask=[True])');
    expect((await failure(bridge.readScalar('one_masked'))).code).toBe('masked');
    bridge.dispose();
  });

  it('says when a listed variable was re-bound to another shape or dtype before it was read', async () => {
    for (const transport of ['comm', 'base64'] as const) {
      const bridge = new KernelBridge({ kernel, transport });
      await cell(kernel, 'moving = np.arange(5.0)');
      const listed = (await bridge.listVariables()).find(v => v.label === 'moving')!;
      expect(listed.shape).toEqual([5]);
      await cell(kernel, 'moving = np.zeros((2, 3), dtype=np.float32)');
      const e = await failure(bridge.readArray(listed.source));
      expect(e.code).toBe('changed');
      expect(e.message).toBe(
        'moving has changed since the list was made: the list showed shape (5,) float64, the kernel now holds shape (2, 3) float32. Nothing was read; pick it again from the refreshed list.'
      );
      // Listed again: read as it is now.
      await bridge.listVariables();
      expect((await bridge.readArray(listed.source)).shape).toEqual([2, 3]);
      // The same shape and dtype with other values is the same listing: read.
      await cell(kernel, 'moving = np.ones((2, 3), dtype=np.float32)');
      expect((await bridge.readArray(listed.source)).data[0]).toBe(1);
      await cell(kernel, 'moving = "text now"');
      const t = await failure(bridge.readArray(listed.source));
      expect(t.code).toBe('changed');
      expect(t.message).toMatch(/the kernel now holds a str\./);
      bridge.dispose();
    }
  });

  it('the text parsers refuse what reading the same array refuses, with the same code', async () => {
    const bridge = new KernelBridge({ kernel });
    await cell(
      kernel,
      [
        'big1 = np.array([9007199254740993], dtype=np.int64)',
        'bigu = np.array([0, 2**64 - 1], dtype=np.uint64)',
        'empty0 = np.zeros((0, 3))',
        'cube = np.arange(8.0).reshape(2, 2, 2)',
        'edge = np.array([2**53, -2**53], dtype=np.int64)'
      ].join('\n')
    );
    for (const name of ['big1', 'bigu', 'empty0', 'cube']) {
      const viaKernel = await failure(bridge.readArray({ kind: 'variable', name }));
      const text = (await runCell(kernel, `print(repr(${name}))`)).stdout;
      let viaText: unknown = null;
      try {
        parseArrayText(text);
      } catch (e) {
        viaText = e;
      }
      expect([name, (viaText as BridgeError).code]).toEqual([name, viaKernel.code]);
    }
    const edgeText = (await runCell(kernel, 'print(repr(edge))')).stdout;
    expect(Array.from(parseArrayText(edgeText).data)).toEqual(
      Array.from((await bridge.readArray({ kind: 'variable', name: 'edge' })).data)
    );
    bridge.dispose();
  });
});

describe('4. messages say what happened', () => {
  it('names datetime64 dtypes as numpy does', async () => {
    const bridge = new KernelBridge({ kernel });
    await cell(kernel, "days = np.array(['2020-01-01', '2020-01-02'], dtype='datetime64[D]')");
    const e = await failure(bridge.readArray({ kind: 'variable', name: 'days' }));
    expect(e.message).toBe(
      'days has dtype datetime64[D]; Perpend reads numbers only (bool, integers, floats, complex).'
    );
    bridge.dispose();
  });

  it('gives sizes with the digits that show the difference from the limit', async () => {
    const bridge = new KernelBridge({ kernel, maxBytes: 1048576, maxBytesSetting: 'maxArrayMiB' });
    await cell(kernel, 'over8 = np.zeros(131073)\nexact = np.zeros(131072)');
    const e = await failure(bridge.readArray({ kind: 'variable', name: 'over8' }));
    expect(e.code).toBe('too-large');
    expect(e.message).toMatch(
      /^over8 is 1\.00001 MiB as float64, over the limit of 1\.00000 MiB \(setting "maxArrayMiB"\)\. A read costs/
    );
    expect((await bridge.readArray({ kind: 'variable', name: 'exact' })).data.length).toBe(131072);
    bridge.dispose();
  });

  it('lists an array whose name it cannot read as a note, not by dropping it', async () => {
    const bridge = new KernelBridge({ kernel });
    await cell(
      kernel,
      `globals()["${'a'.repeat(250)}"] = np.zeros(3)\nglobals()["bad key"] = np.zeros(2)`
    );
    const vars = await bridge.listVariables();
    const long = vars.find(v => v.label.startsWith('aaaa'))!;
    expect(long).toMatchObject({ readable: false, shape: [3], dtype: 'float64' });
    expect(long.label).toBe(`${'a'.repeat(40)}…`);
    expect(long.notes.join(' ')).toMatch(/name has 250 characters, more than the 200/);
    const bad = vars.find(v => v.label === '"bad key"')!;
    expect(bad).toMatchObject({ readable: false, shape: [2] });
    expect(bad.notes.join(' ')).toMatch(/not a Python name/);
    await cell(kernel, `del globals()["${'a'.repeat(250)}"], globals()["bad key"]`);
    bridge.dispose();
  });

  it('refuses bad names with a BridgeError, and readScalar and readArray agree on whitespace', async () => {
    const bridge = new KernelBridge({ kernel });
    await cell(kernel, 'fs = 8000.0');
    for (const name of [' fs', 'fs ', 'fs\n', '\tfs', 'f s', 'x; import os', '']) {
      const a = await failure(bridge.readArray({ kind: 'variable', name }));
      const s = await failure(bridge.readScalar(name));
      expect([name, a.code, s.code]).toEqual([name, 'invalid-name', 'invalid-name']);
    }
    expect((await failure(bridge.readScalar('rec. fs'))).code).toBe('invalid-name');
    expect((await failure(bridge.readScalar(42 as unknown as string))).code).toBe('bad-argument');
    expect(
      (await failure(bridge.readArray({ kind: 'cell', cellId: 'c', executionCount: 1.5 }))).code
    ).toBe('bad-argument');
    expect(
      (await failure(bridge.writeArray('x', { data: [1] } as unknown as ArrayData))).code
    ).toBe('bad-argument');
    expect(await bridge.readScalar('fs')).toBe(8000);
    bridge.dispose();
  });

  it('names the missing part of a path: a variable, or an attribute of one', async () => {
    const bridge = new KernelBridge({ kernel });
    const v = await failure(bridge.readScalar('nothing_here.fs'));
    expect(v.message).toBe(
      'There is no variable nothing_here in the kernel (was it deleted, or the kernel restarted?).'
    );
    const a = await failure(bridge.readScalar('slotted.missing'));
    expect(a.code).toBe('not-found');
    expect(a.message).toBe(
      'slotted has no attribute missing (nothing of that name is stored in it or in its class Slotted).'
    );
    bridge.dispose();
  });
});
