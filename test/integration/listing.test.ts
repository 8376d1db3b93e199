/**
 * Listing against a real kernel: variables and cell results (IPython's output cache), with
 * the session ledger fed from the kernel's own traffic.
 */
import type { Kernel } from '@jupyterlab/services';
import { KernelBridge, SessionLedger, watchKernelExecutions } from '../../src/bridge';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

beforeAll(async () => {
  server = await startServer('listing');
  kernel = await server.startKernel();
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

describe('listVariables', () => {
  it('lists numeric arrays and lists of numbers with shape, dtype and bytes, nothing else', async () => {
    const r = await runCell(
      kernel,
      [
        'import numpy as np',
        'a = np.arange(12, dtype=np.float32).reshape(3, 4)',
        'z = np.ones(5, dtype=np.complex128)',
        'lst = [1.5, 2.5, 3.0]',
        'tup = ((1, 2), (3, 4))',
        'cube = np.zeros((2, 2, 2))',
        'words = np.array(["a", "b"])',
        'scalar = 3.0',
        'text = "not an array"',
        '_hidden = np.ones(3)'
      ].join('\n')
    );
    expect(r.status).toBe('ok');
    const bridge = new KernelBridge({ kernel });
    const vars = await bridge.listVariables();
    const byName = new Map(vars.map(v => [v.label, v]));
    expect([...byName.keys()].sort()).toEqual(['a', 'cube', 'lst', 'tup', 'z']);
    // Expected values are numpy's own (a.nbytes = 12 * 4, z.nbytes = 5 * 16).
    expect(byName.get('a')).toMatchObject({
      shape: [3, 4],
      dtype: 'float32',
      bytes: 48,
      readable: true
    });
    expect(byName.get('z')).toMatchObject({ shape: [5], dtype: 'complex128', bytes: 80 });
    expect(byName.get('lst')).toMatchObject({ shape: [3], dtype: 'float64', readable: true });
    expect(byName.get('tup')).toMatchObject({ shape: [2, 2], dtype: 'int64' });
    expect(byName.get('cube')!.readable).toBe(false);
    expect(byName.get('a')!.source).toEqual({ kind: 'variable', name: 'a' });
    bridge.dispose();
  });

  it('does not advance the execution counter or touch history', async () => {
    const before = await runCell(kernel, '1');
    const bridge = new KernelBridge({ kernel });
    await bridge.listVariables();
    await bridge.listVariables();
    const after = await runCell(kernel, '1');
    // Two visible cells in a row: counts n and n+1 only if the silent requests stored nothing.
    expect(after.executionCount).toBe(before.executionCount! + 1);
    // The helper lives in sys.modules, not in the user's namespace.
    expect(
      await evalText(kernel, "sorted(k for k in get_ipython().user_ns if 'perpend' in k)")
    ).toBe('[]');
    bridge.dispose();
  });

  it('coalesces calls made while a listing is pending into one request', async () => {
    const bridge = new KernelBridge({ kernel });
    await bridge.listVariables(); // warm-up: kernel info fetched
    let sent = 0;
    const count = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send' && a.msg.header.msg_type === 'execute_request') {
        sent++;
      }
    };
    kernel.anyMessage.connect(count);
    const [l1, l2] = await Promise.all([bridge.listVariables(), bridge.listVariables()]);
    kernel.anyMessage.disconnect(count);
    expect(sent).toBe(1);
    expect(l2).toEqual(l1);
    bridge.dispose();
  });
});

describe('listCellResults', () => {
  it('lists array-like results of cells run in this session, and only those', async () => {
    await runCell(kernel, 'import numpy as np\na = np.arange(12, dtype=np.float32).reshape(3, 4)');
    const ledger = new SessionLedger();
    const watch = watchKernelExecutions(kernel, ledger);
    const bridge = new KernelBridge({ kernel, ledger });
    const c1 = await runCell(kernel, 'np.linspace(0, 1, 2000)', 'cell-1');
    const c2 = await runCell(kernel, 'a * 2', 'cell-2');
    const c3 = await runCell(kernel, 'np.float64(3.0)', 'cell-3');
    const c4 = await runCell(kernel, 'np.ones(3);', 'cell-4');
    const c5 = await runCell(kernel, 'a', 'cell-5');
    expect(ledger.trusts('cell-1', c1.executionCount)).toBe(true);
    const cells = [
      { cellId: 'cell-1', executionCount: c1.executionCount },
      { cellId: 'cell-2', executionCount: c2.executionCount },
      { cellId: 'cell-3', executionCount: c3.executionCount },
      { cellId: 'cell-4', executionCount: c4.executionCount },
      { cellId: 'cell-5', executionCount: c5.executionCount },
      // A count saved in the notebook from another session: not trusted, not asked for.
      { cellId: 'cell-old', executionCount: 1 },
      { cellId: 'cell-never', executionCount: null }
    ];
    const infos = await bridge.listCellResults(cells);
    expect(infos.map(i => i.label)).toEqual([
      `Out[${c1.executionCount}]`,
      `Out[${c2.executionCount}]`,
      `Out[${c5.executionCount}]`
    ]);
    expect(infos[0]).toMatchObject({
      source: { kind: 'cell', cellId: 'cell-1', executionCount: c1.executionCount },
      shape: [2000],
      dtype: 'float64',
      bytes: 16000,
      readable: true
    });
    expect(infos[1]).toMatchObject({ shape: [3, 4], dtype: 'float32' });
    expect(infos[0].notes.some(n => /reference/.test(n))).toBe(true);
    expect(infos[2].notes.some(n => /same object as the variable a/.test(n))).toBe(true);
    // display() and ';' keep results out of the output cache: reading says so.
    const c6 = await runCell(kernel, 'display(np.ones(3))', 'cell-6');
    expect(
      await bridge.listCellResults([{ cellId: 'cell-6', executionCount: c6.executionCount }])
    ).toEqual([]);
    const e = await bridge
      .readArray({ kind: 'cell', cellId: 'cell-4', executionCount: c4.executionCount! })
      .catch(x => x);
    expect(e).toMatchObject({ code: 'not-in-cache' });
    expect(e.message).toBe(
      `Out[${c4.executionCount}] is not in IPython's output cache. Results suppressed with ';' or shown with display() are not in IPython's output cache; pick the variable instead.`
    );
    // A count the ledger did not record (from another session) is refused before asking.
    const stale = await bridge
      .readArray({ kind: 'cell', cellId: 'cell-old', executionCount: 1 })
      .catch(x => x);
    expect(stale).toMatchObject({ code: 'stale-count' });
    // Without a ledger, the caller's counts are taken as given.
    const loose = new KernelBridge({ kernel });
    const all = await loose.listCellResults(cells);
    expect(all.length).toBeGreaterThanOrEqual(3);
    watch.dispose();
    bridge.dispose();
    loose.dispose();
  });
});
