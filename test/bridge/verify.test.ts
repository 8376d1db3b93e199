/**
 * KernelBridge.verifyCells, the front-end half: what it sends, how it reads the helper's answer,
 * and the races a real kernel cannot be made to show on demand (a restart or a new run of the
 * cell while the answer is on its way). The kernel is a stand-in that answers silent executes
 * with a reply built by the test; the kernel half is covered by test/integration/reload.test.ts.
 */
import { createHash } from 'node:crypto';
import { Signal } from '@lumino/signaling';
import type { Kernel } from '@jupyterlab/services';
import { KernelBridge } from '../../src/bridge/bridge';
import { HELPER_REF } from '../../src/bridge/helper';
import { SessionLedger } from '../../src/bridge/ledger';

type Claim = [number, string];

class FakeKernel {
  status: Kernel.Status = 'idle';
  isDisposed = false;
  readonly statusChanged = new Signal<this, Kernel.Status>(this);
  readonly iopubMessage = new Signal<this, unknown>(this);
  readonly connectionStatusChanged = new Signal<this, Kernel.ConnectionStatus>(this);
  readonly disposed = new Signal<this, void>(this);
  readonly info = Promise.resolve({ language_info: { name: 'python' } });
  readonly sent: string[] = [];
  constructor(private readonly _answer: (claims: Claim[], expr: string) => unknown) {}

  requestExecute(content: { user_expressions: Record<string, string> }) {
    const expr = content.user_expressions.r;
    this.sent.push(expr);
    const m = /\.verify_cells\((.*)\)$/.exec(expr);
    const claims = m ? (JSON.parse(m[1]) as Claim[]) : [];
    const value = this._answer(claims, expr);
    const reply = {
      content: {
        status: 'ok',
        user_expressions: {
          r: { status: 'ok', data: { 'text/plain': JSON.stringify(value) } }
        }
      }
    };
    return { done: Promise.resolve(reply), onIOPub: null };
  }
}

const sha = (s: string): string => createHash('sha256').update(s, 'utf8').digest('hex');

function bridgeWith(
  history: Record<number, string>,
  ledger: SessionLedger,
  hook: (claims: Claim[]) => void = () => undefined
): { bridge: KernelBridge; kernel: FakeKernel } {
  const kernel = new FakeKernel((claims, expr) => {
    if (expr.includes('.list_cells(')) {
      return { cells: [] };
    }
    hook(claims);
    return {
      aligned: true,
      cells: claims.map(([n, d]) => ({
        n,
        d,
        match: n in history ? sha(history[n]) === d : null
      }))
    };
  });
  const bridge = new KernelBridge({
    kernel: kernel as unknown as Kernel.IKernelConnection,
    ledger
  });
  return { bridge, kernel };
}

describe('KernelBridge.verifyCells (front-end half)', () => {
  it('sends counts and digests only, records matches, and says why the others fail', async () => {
    const ledger = new SessionLedger();
    ledger.record('watched', 5);
    const { bridge, kernel } = bridgeWith(
      { 1: 'import numpy as np', 2: 'x = np.ones(3)\nx', 3: 'y = 2' },
      ledger
    );
    const v = await bridge.verifyCells([
      { cellId: 'a', executionCount: 1, source: 'import numpy as np\n' },
      { cellId: 'b', executionCount: 2, source: 'x = np.ones(3)\nx' },
      { cellId: 'c', executionCount: 3, source: 'y = 3' },
      { cellId: 'd', executionCount: 9, source: 'z' },
      { cellId: 'watched', executionCount: 5, source: 'anything' },
      { cellId: 'e', executionCount: 5, source: 'claims a watched count' },
      { cellId: 'f', executionCount: null, source: 'never ran' },
      { cellId: 'g', executionCount: 4 },
      { cellId: '', executionCount: 6, source: 'no id' },
      { cellId: 'h', executionCount: 7, source: 'lone \uD800 surrogate' }
    ]);
    expect(v.map(x => x.verdict)).toEqual([
      'verified',
      'verified',
      'edited',
      'unknown',
      'trusted',
      'conflict',
      'skipped',
      'skipped',
      'skipped',
      'skipped'
    ]);
    expect(ledger.trusts('a', 1)).toBe(true);
    expect(ledger.trusts('b', 2)).toBe(true);
    expect(ledger.trusts('c', 3)).toBe(false);
    expect(kernel.sent).toHaveLength(1);
    // Sorted by count; the source text never appears, only its digest.
    expect(kernel.sent[0]).toBe(
      `${HELPER_REF}.verify_cells([[1, "${sha('import numpy as np')}"], [2, "${sha('x = np.ones(3)\nx')}"], [3, "${sha('y = 3')}"], [9, "${sha('z')}"]])`
    );
    // Asked again: the edited cell is remembered, the unknown count is asked for again.
    const again = await bridge.verifyCells([
      { cellId: 'c', executionCount: 3, source: 'y = 3' },
      { cellId: 'd', executionCount: 9, source: 'z' }
    ]);
    expect(again.map(x => x.verdict)).toEqual(['edited', 'unknown']);
    expect(kernel.sent).toHaveLength(2);
    expect(kernel.sent[1]).toContain('[[9, "');
    bridge.dispose();
  });

  it('records nothing when the kernel restarted or the cell ran again meanwhile', async () => {
    const ledger = new SessionLedger();
    const { bridge } = bridgeWith({ 1: 'a', 2: 'b' }, ledger, claims => {
      if (claims.some(([n]) => n === 1)) {
        ledger.reset(); // a restart while the answer was on its way
      } else {
        ledger.record('q', 3); // the cell ran again as execution 3
      }
    });
    const r1 = await bridge.verifyCells([{ cellId: 'p', executionCount: 1, source: 'a' }]);
    expect(r1[0].verdict).toBe('unknown');
    expect(ledger.size).toBe(0);
    const r2 = await bridge.verifyCells([{ cellId: 'q', executionCount: 2, source: 'b' }]);
    expect(r2[0].verdict).toBe('conflict');
    expect(ledger.countFor('q')).toBe(3);
    bridge.dispose();
  });

  it('two cells claiming one count are both refused, without asking', async () => {
    const ledger = new SessionLedger();
    const { bridge, kernel } = bridgeWith({ 4: 's' }, ledger);
    const v = await bridge.verifyCells([
      { cellId: 'x', executionCount: 4, source: 's' },
      { cellId: 'y', executionCount: 4, source: 's' }
    ]);
    expect(v.map(x => x.verdict)).toEqual(['conflict', 'conflict']);
    expect(kernel.sent).toHaveLength(0);
    bridge.dispose();
  });

  it('a history that cannot be indexed verifies nothing; a malformed answer is refused', async () => {
    const ledger = new SessionLedger();
    const unaligned = new FakeKernel(() => ({ aligned: false, cells: [] }));
    const b1 = new KernelBridge({
      kernel: unaligned as unknown as Kernel.IKernelConnection,
      ledger
    });
    const v = await b1.verifyCells([{ cellId: 'x', executionCount: 1, source: 's' }]);
    expect(v[0].verdict).toBe('unknown');
    b1.dispose();
    const odd = new FakeKernel((_, expr) =>
      expr.includes('.list_cells(') ? { cells: [] } : { cells: [{ n: 1, d: 'x', match: 'yes' }] }
    );
    const b2 = new KernelBridge({ kernel: odd as unknown as Kernel.IKernelConnection, ledger });
    await expect(
      b2.verifyCells([{ cellId: 'x', executionCount: 1, source: 's' }])
    ).rejects.toMatchObject({ code: 'malformed' });
    // listCellResults goes on without the seeding: the listing itself is still asked for.
    await expect(
      b2.listCellResults([{ cellId: 'x', executionCount: 1, source: 's' }])
    ).resolves.toEqual([]);
    expect(odd.sent.filter(e => e.includes('.verify_cells('))).toHaveLength(2);
    b2.dispose();
    await expect(
      new KernelBridge({
        kernel: odd as unknown as Kernel.IKernelConnection
      }).verifyCells('cells' as unknown as [])
    ).rejects.toThrow('cells must be an array, got string');
  });

  it('listCellResults asks nothing more for cells the ledger trusts', async () => {
    const ledger = new SessionLedger();
    ledger.record('a', 1);
    const { bridge, kernel } = bridgeWith({ 1: 'a' }, ledger);
    await bridge.listCellResults([{ cellId: 'a', executionCount: 1, source: 'edited since' }]);
    expect(kernel.sent).toHaveLength(1);
    expect(kernel.sent[0]).toContain('.list_cells([1])');
    bridge.dispose();
  });
});
