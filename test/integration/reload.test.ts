/**
 * Seeding the session ledger after a page reload: cells that ran before the page watched the
 * kernel are checked against IPython's input history (by SHA-256 digest, never by sending the
 * text) and listed only when their current source is what the kernel ran as that count.
 */
import type { Kernel, KernelMessage } from '@jupyterlab/services';
import { KernelBridge, SessionLedger, watchKernelExecutions } from '../../src/bridge';
import { HELPER_REF } from '../../src/bridge/helper';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

beforeAll(async () => {
  server = await startServer('reload');
  kernel = await server.startKernel();
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

/** The execute_requests sent on `k` while `fn` runs. */
async function sentRequests<T>(
  k: Kernel.IKernelConnection,
  fn: () => Promise<T>
): Promise<{ value: T; sent: KernelMessage.IExecuteRequestMsg['content'][] }> {
  const sent: KernelMessage.IExecuteRequestMsg['content'][] = [];
  const spy = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
    if (a.direction === 'send' && a.msg.header.msg_type === 'execute_request') {
      sent.push(a.msg.content as KernelMessage.IExecuteRequestMsg['content']);
    }
  };
  k.anyMessage.connect(spy);
  try {
    return { value: await fn(), sent };
  } finally {
    k.anyMessage.disconnect(spy);
  }
}

describe('verified seeding after a reload', () => {
  it('lists cells whose source is what the kernel ran as their count, and no others', async () => {
    // An earlier page ran these; nothing watched them.
    const setup = 'import numpy as np\nsig = np.sin(np.arange(64) / 5.0)\n';
    const c0 = await runCell(kernel, setup, 'r-setup');
    const c1 = await runCell(kernel, 'np.linspace(0, 1, 50)\n', 'r-lin');
    const c2 = await runCell(kernel, 'sig * 2', 'r-twice');
    // A magic: IPython's parsed history (In, _ih) holds the transformed call, the raw one the
    // text as typed; only the raw one matches the cell.
    const c3 = await runCell(kernel, '%time np.ones(4)', 'r-magic');
    const c4 = await runCell(kernel, 'np.zeros((2, 3))', 'r-edited');
    for (const c of [c0, c1, c2, c3, c4]) {
      expect(c.status).toBe('ok');
    }
    const cells = [
      { cellId: 'r-setup', executionCount: c0.executionCount, source: setup },
      // The notebook's model may keep or drop the trailing line feed: both match.
      { cellId: 'r-lin', executionCount: c1.executionCount, source: 'np.linspace(0, 1, 50)' },
      { cellId: 'r-twice', executionCount: c2.executionCount, source: 'sig * 2\n\n' },
      { cellId: 'r-magic', executionCount: c3.executionCount, source: '%time np.ones(4)' },
      // Edited after it ran, not run again: the kernel's input differs.
      { cellId: 'r-edited', executionCount: c4.executionCount, source: 'np.zeros((2, 4))' },
      // A trailing space is an edit too.
      { cellId: 'r-space', executionCount: c2.executionCount! + 100, source: 'sig * 2 ' },
      // A count this kernel has not reached: from another kernel session.
      { cellId: 'r-future', executionCount: c4.executionCount! + 50, source: 'sig' },
      { cellId: 'r-never', executionCount: null, source: 'sig' }
    ];
    // A new page: a new ledger and bridge, watching from now on.
    const ledger = new SessionLedger();
    const watch = watchKernelExecutions(kernel, ledger);
    const bridge = new KernelBridge({ kernel, ledger });
    const { value: infos, sent } = await sentRequests(kernel, () => bridge.listCellResults(cells));
    expect(infos.map(i => i.label)).toEqual([
      `Out[${c1.executionCount}]`,
      `Out[${c2.executionCount}]`,
      `Out[${c3.executionCount}]`
    ]);
    expect(infos[0]).toMatchObject({
      source: { kind: 'cell', cellId: 'r-lin', executionCount: c1.executionCount },
      shape: [50],
      dtype: 'float64'
    });
    expect(infos[2]).toMatchObject({ shape: [4], dtype: 'float64' });
    expect(ledger.entries().sort((a, b) => a.executionCount - b.executionCount)).toEqual([
      { cellId: 'r-setup', executionCount: c0.executionCount },
      { cellId: 'r-lin', executionCount: c1.executionCount },
      { cellId: 'r-twice', executionCount: c2.executionCount },
      { cellId: 'r-magic', executionCount: c3.executionCount }
    ]);
    // One silent request checks, one lists. Only integers and digests reach the kernel: the
    // check's expression is exactly the helper call over [count, "sha256 hex"] pairs.
    expect(sent).toHaveLength(2);
    for (const s of sent) {
      expect(s).toMatchObject({ silent: true, store_history: false });
    }
    const check = String(sent[0].user_expressions!.r);
    expect(check.startsWith(`${HELPER_REF}.verify_cells(`)).toBe(true);
    expect(check.slice(HELPER_REF.length)).toMatch(
      /^\.verify_cells\(\[(\[\d+, "[0-9a-f]{64}"\](, )?)+\]\)$/
    );
    expect(check).not.toContain('linspace');
    // The reads of a verified cell are trusted now.
    const data = await bridge.readArray(infos[0].source);
    expect(data.shape).toEqual([50]);
    expect(data.data[49]).toBe(1);

    // Nothing moved in the user's history or counter.
    const after = await runCell(kernel, 'sig.shape', 'r-after');
    expect(after.executionCount).toBe(c4.executionCount! + 1);

    // Verdicts, and the second time no check is sent for what is known.
    const { value: verdicts, sent: sent2 } = await sentRequests(kernel, () =>
      bridge.verifyCells(cells)
    );
    expect(verdicts.map(v => v.verdict)).toEqual([
      'trusted',
      'trusted',
      'trusted',
      'trusted',
      'edited',
      'unknown',
      'unknown',
      'skipped'
    ]);
    // Asked once more only for the two counts with no history entry (they may still come).
    expect(sent2).toHaveLength(1);
    expect(String(sent2[0].user_expressions!.r).match(/\[\d+, "/g)).toHaveLength(2);

    // Running the edited cell again records its new count: it is listed.
    const rerun = await runCell(kernel, 'np.zeros((2, 4))', 'r-edited');
    const again = await bridge.listCellResults([
      { cellId: 'r-edited', executionCount: rerun.executionCount, source: 'np.zeros((2, 4))' }
    ]);
    expect(again).toHaveLength(1);
    expect(again[0].shape).toEqual([2, 4]);
    watch.dispose();
    bridge.dispose();
  });

  it('the kernel side ignores claims that are not [count, lowercase sha256 hex]', async () => {
    const bridge = new KernelBridge({ kernel });
    await bridge.listVariables(); // installs the helper
    bridge.dispose();
    const good = 'a'.repeat(64);
    const text = await evalText(
      kernel,
      `${HELPER_REF}.verify_cells([[True, "${good}"], [1, "${'A'.repeat(64)}"], [1, "${'g'.repeat(64)}"], [1, "${good}0"], "junk", [1], [1.0, "${good}"], [2, "${good}"]])`
    );
    // Only the last claim is well formed; its digest is not that of input 2.
    expect(JSON.parse(text)).toEqual({ aligned: true, cells: [{ n: 2, d: good, match: false }] });
  });

  it('trusts no count that two cells claim or that the ledger gives to another cell', async () => {
    const a = await runCell(kernel, 'np.arange(5)', 'd-orig');
    const ledger = new SessionLedger();
    const bridge = new KernelBridge({ kernel, ledger });
    // A copy of the cell pasted with its output: same text, same count, other id.
    const dup = await bridge.verifyCells([
      { cellId: 'd-orig', executionCount: a.executionCount, source: 'np.arange(5)' },
      { cellId: 'd-copy', executionCount: a.executionCount, source: 'np.arange(5)' }
    ]);
    expect(dup.map(v => v.verdict)).toEqual(['conflict', 'conflict']);
    expect(ledger.size).toBe(0);
    ledger.record('d-other', a.executionCount);
    const taken = await bridge.verifyCells([
      { cellId: 'd-orig', executionCount: a.executionCount, source: 'np.arange(5)' }
    ]);
    expect(taken[0].verdict).toBe('conflict');
    expect(ledger.trusts('d-orig', a.executionCount)).toBe(false);
    bridge.dispose();
  });

  it('after a restart the old counts fail: the history restarted with the kernel', async () => {
    const k = await server.startKernel();
    try {
      await runCell(k, 'import numpy as np', 'x-imp');
      const old1 = await runCell(k, 'np.full(3, 7.0)', 'x-full');
      const old2 = await runCell(k, 'np.eye(2)', 'x-eye');
      await k.restart();
      // The new process runs something else as its first inputs.
      await runCell(k, 'import numpy as np', 'y-imp');
      const y = await runCell(k, 'np.ones(9)', 'y-ones');
      expect(y.executionCount).toBe(old1.executionCount);
      const ledger = new SessionLedger();
      const bridge = new KernelBridge({ kernel: k, ledger });
      const saved = [
        // The notebook still shows the counts of the earlier process.
        { cellId: 'x-full', executionCount: old1.executionCount, source: 'np.full(3, 7.0)' },
        { cellId: 'x-eye', executionCount: old2.executionCount, source: 'np.eye(2)' }
      ];
      expect((await bridge.verifyCells(saved)).map(v => v.verdict)).toEqual(['edited', 'unknown']);
      expect(await bridge.listCellResults(saved)).toEqual([]);
      expect(ledger.size).toBe(0);
      bridge.dispose();
    } finally {
      await k.shutdown();
    }
  });

  it('verifies nothing when the history cannot be indexed by count', async () => {
    const k = await server.startKernel();
    try {
      const a = await runCell(k, '[1.0, 2.0]', 'q-list');
      const claim = { cellId: 'q-list', executionCount: a.executionCount, source: '[1.0, 2.0]' };
      const before = new KernelBridge({ kernel: k });
      expect((await before.verifyCells([claim]))[0].verdict).toBe('verified');
      before.dispose();
      // IPython counts `quit(...)` but does not store it in its input history, so later
      // inputs sit one place early in the list (IPython 9, HistoryManager.store_inputs).
      const q = await runCell(k, 'quit(keep_kernel=True)', 'q-quit');
      expect(q.status).toBe('ok');
      const b = await runCell(k, '[3.0, 4.0]', 'q-list2');
      expect(b.executionCount).toBe(a.executionCount! + 2);
      const ledger = new SessionLedger();
      const bridge = new KernelBridge({ kernel: k, ledger });
      const v = await bridge.verifyCells([
        claim,
        { cellId: 'q-list2', executionCount: b.executionCount, source: '[3.0, 4.0]' }
      ]);
      expect(v.map(x => x.verdict)).toEqual(['unknown', 'unknown']);
      expect(ledger.size).toBe(0);
      bridge.dispose();
    } finally {
      await k.shutdown();
    }
  });
});
