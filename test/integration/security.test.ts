/**
 * Security against a real kernel: hostile names never reach kernel code (refused before
 * anything is sent), hostile values in the kernel (odd namespace keys, objects whose methods
 * have side effects, ndarray subclasses) are listed or read without running their code, and
 * hostile notebook metadata (cell ids, counts) cannot inject anything.
 */
import type { Kernel } from '@jupyterlab/services';
import { BridgeError, KernelBridge, SessionLedger, type ArrayData } from '../../src/bridge';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

const HOSTILE_NAMES = [
  'x; import os',
  "__import__('os')",
  "__import__('os').system('touch pwned')",
  'x"',
  "x'",
  'x\nimport os',
  'x\\',
  'x = 1',
  'globals()',
  'x)',
  '',
  ' ',
  'class',
  'None',
  '1x',
  'ｘ; import os',
  'x\u200d',
  'x\u0000'
];

beforeAll(async () => {
  server = await startServer('security');
  kernel = await server.startKernel();
  const r = await runCell(
    kernel,
    [
      'import numpy as np',
      'x = np.arange(5.0)',
      'canary = []',
      'globals()["a; b"] = np.zeros(3)',
      'globals()["\\uff58\\uff59"] = np.zeros(3)  # a non-NFKC key set behind Python\'s back',
      'class Evil:',
      '    def __array__(self, *a, **k):',
      '        canary.append("array"); return np.zeros(3)',
      '    def __float__(self):',
      '        canary.append("float"); return 1.0',
      '    def __len__(self):',
      '        canary.append("len"); return 3',
      'class EvilFloat(float):',
      '    def __float__(self):',
      '        canary.append("evilfloat"); return 2.0',
      'class Sub(np.ndarray):',
      '    def __array_finalize__(self, obj):',
      '        canary.append("finalize")',
      '    def __array_wrap__(self, *a, **k):',
      '        canary.append("wrap"); return a[0]',
      'evil = Evil()',
      'evil_list = [Evil(), Evil()]',
      'evil_floats = [EvilFloat(1.0), EvilFloat(2.0)]',
      'sub = np.arange(4.0).view(Sub)',
      'label_html = np.zeros(2)',
      'canary.clear()'
    ].join('\n')
  );
  if (r.status !== 'ok') {
    throw new Error(r.stdout);
  }
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

describe('hostile names', () => {
  it('are refused before anything is sent to the kernel', async () => {
    const bridge = new KernelBridge({ kernel });
    let sent = 0;
    const count = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send') {
        sent++;
      }
    };
    kernel.anyMessage.connect(count);
    const one: ArrayData = {
      data: new Float64Array([1]),
      shape: [1],
      complex: false,
      dtype: 'float64'
    };
    for (const name of HOSTILE_NAMES) {
      // A BridgeError like every other failure (it was a TypeError before).
      const r = bridge.readArray({ kind: 'variable', name });
      await expect(r).rejects.toThrow(BridgeError);
      await expect(r).rejects.toMatchObject({ code: 'invalid-name' });
      const s = bridge.readScalar(name);
      await expect(s).rejects.toThrow(BridgeError);
      await expect(s).rejects.toMatchObject({ code: 'invalid-name' });
      const w = bridge.writeArray(name, one);
      await expect(w).rejects.toThrow(BridgeError);
      await expect(w).rejects.toMatchObject({ code: 'invalid-name' });
    }
    await expect(bridge.readScalar('x.__class__')).rejects.toMatchObject({
      name: 'BridgeError',
      code: 'invalid-name'
    });
    await expect(
      bridge.readArray({
        kind: 'cell',
        cellId: 'c',
        executionCount: '1); import os' as unknown as number
      })
    ).rejects.toMatchObject({ name: 'BridgeError', code: 'bad-argument' });
    kernel.anyMessage.disconnect(count);
    expect(sent).toBe(0);
    expect(
      await evalText(
        kernel,
        "('pwned' in get_ipython().user_ns, __import__('os').path.exists('pwned'))"
      )
    ).toBe('(False, False)');
    bridge.dispose();
  });

  it('refuses dunder attributes in a sample-rate path inside the kernel too', async () => {
    const bridge = new KernelBridge({ kernel });
    await runCell(kernel, 'class Rec: pass\nrec = Rec(); rec.fs = 48000.0\nfs = 8000');
    expect(await bridge.readScalar('rec.fs')).toBe(48000);
    expect(await bridge.readScalar('fs')).toBe(8000);
    await expect(bridge.readScalar('x')).rejects.toMatchObject({ code: 'not-array' });
    await expect(bridge.readScalar('rec.missing')).rejects.toMatchObject({ code: 'not-found' });
    bridge.dispose();
  });
});

describe('hostile values in the kernel', () => {
  it('lists without running user methods, skipping keys that are not identifiers', async () => {
    const bridge = new KernelBridge({ kernel });
    const vars = await bridge.listVariables();
    const names = vars.map(v => v.label);
    expect(names).toContain('x');
    expect(names).toContain('sub');
    expect(names).not.toContain('a; b');
    expect(names).not.toContain('\uff58\uff59');
    expect(names).not.toContain('evil');
    expect(names).not.toContain('evil_list');
    expect(names).not.toContain('evil_floats');
    expect(vars.find(v => v.label === 'sub')!.notes.join(' ')).toMatch(/subclass/);
    expect(await evalText(kernel, 'canary')).toBe('[]');
    bridge.dispose();
  });

  it('reads an ndarray subclass as plain data and refuses objects, without running their code', async () => {
    const bridge = new KernelBridge({ kernel });
    const a = await bridge.readArray({ kind: 'variable', name: 'sub' });
    expect(Array.from(a.data)).toEqual([0, 1, 2, 3]);
    await expect(bridge.readArray({ kind: 'variable', name: 'evil' })).rejects.toMatchObject({
      code: 'not-array'
    });
    await expect(bridge.readArray({ kind: 'variable', name: 'evil_list' })).rejects.toMatchObject({
      code: 'not-array'
    });
    await expect(bridge.readArray({ kind: 'variable', name: 'evil_floats' })).rejects.toMatchObject(
      { code: 'not-array' }
    );
    expect(await evalText(kernel, 'canary')).toBe('[]');
    bridge.dispose();
  });
});

describe('hostile notebook metadata', () => {
  it('cell ids and counts from the notebook cannot inject code', async () => {
    const ledger = new SessionLedger();
    const bridge = new KernelBridge({ kernel });
    const r = await runCell(kernel, 'np.ones(3)');
    let exprs: string[] = [];
    const watch = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send' && a.msg.header.msg_type === 'execute_request') {
        exprs = Object.values(
          (a.msg.content as { user_expressions: Record<string, string> }).user_expressions
        );
      }
    };
    kernel.anyMessage.connect(watch);
    const hostile = [
      {
        cellId: "'); __import__('os').system('touch pwned'); ('",
        executionCount: r.executionCount
      },
      { cellId: 'c2', executionCount: '1]); import os; ([' as unknown as number },
      { cellId: 'c3', executionCount: 1.5 },
      { cellId: 'c4', executionCount: -3 },
      { cellId: 'c5', executionCount: Number.NaN },
      { cellId: 'c6', executionCount: 2 ** 60 },
      { cellId: null as unknown as string, executionCount: 2 }
    ];
    const infos = await bridge.listCellResults(hostile);
    kernel.anyMessage.disconnect(watch);
    expect(infos.map(i => i.label)).toEqual([`Out[${r.executionCount}]`]);
    // Only the helper call with integer literals went to the kernel.
    expect(exprs).toHaveLength(1);
    expect(exprs[0]).toMatch(/\.list_cells\(\[\d+\]\)$/);
    // A ledger fed with the same hostile pairs trusts none of the malformed ones.
    for (const h of hostile) {
      ledger.record(h.cellId, h.executionCount);
    }
    expect(ledger.size).toBe(1);
    expect(await evalText(kernel, "__import__('os').path.exists('pwned')")).toBe('False');
    bridge.dispose();
  });
});
