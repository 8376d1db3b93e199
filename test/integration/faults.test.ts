/**
 * Faults provoked for real against a live kernel: a long cell ahead in the queue, a request
 * that outlives its timeout, interrupt, restart, the kernel process killed, the comm closed by
 * the kernel, malformed replies from a tampered helper, the websocket dropped by an oversized
 * message. Every request ends (no hang) with a clear BridgeError, and the bridge works again
 * afterwards.
 */
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import type { Kernel } from '@jupyterlab/services';
import {
  BridgeError,
  KernelBridge,
  HELPER_MODULE,
  COMM_TARGET,
  SessionLedger,
  watchKernelExecutions,
  type ArrayData
} from '../../src/bridge';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

const H = `__import__('sys').modules['${HELPER_MODULE}']`;

/** Makes the helper's prepare() sleep first (fault injection inside the real kernel). */
const slowHelper = (seconds: number): string =>
  `_p = ${H}; _p.prepare_orig = getattr(_p, 'prepare_orig', _p.prepare)\n` +
  `def _slow(v, m, _o=_p.prepare_orig):\n    __import__('time').sleep(${seconds})\n    return _o(v, m)\n` +
  `_p.prepare = _slow\ndel _p, _slow`;
// Put the original back (the open comm's handler still calls into this module), then drop
// the module so that the next request installs a fresh copy.
const restoreHelper =
  `_p = ${H}\n_p.prepare = getattr(_p, 'prepare_orig', _p.prepare)\n` +
  `_p.list_vars = getattr(_p, 'list_vars_orig', _p.list_vars)\ndel _p`;

async function failure(p: Promise<unknown>): Promise<BridgeError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof BridgeError) {
      return e;
    }
    throw e;
  }
  throw new Error('the request succeeded but should have failed');
}

const sleep = (ms: number): Promise<void> => new Promise(r => setTimeout(r, ms));

async function setup(): Promise<void> {
  const r = await runCell(
    kernel,
    'import numpy as np\nx = np.arange(1000.0)\ny = np.ones((300, 300))'
  );
  expect(r.status).toBe('ok');
}

beforeAll(async () => {
  server = await startServer('faults');
  kernel = await server.startKernel();
  await setup();
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

describe.each(['comm', 'base64'] as const)('over %s', transport => {
  it('queues behind a running cell, says it is waiting, and does not count the queue time against the timeout', async () => {
    const bridge = new KernelBridge({ kernel, transport, timeoutMs: 1500 });
    await bridge.readArray({ kind: 'variable', name: 'x' }); // helper installed, comm open
    const states: string[] = [];
    bridge.activityChanged.connect((_, a) => states.push(a.state));
    const cell = runCell(kernel, 'import time; time.sleep(3)');
    await sleep(300);
    const read = bridge.readArray({ kind: 'variable', name: 'x' });
    await sleep(300);
    expect(bridge.activity).toMatchObject({ state: 'waiting', label: 'reading x' });
    const a = await read;
    expect(a.data[999]).toBe(999);
    await cell;
    expect(states).toContain('waiting');
    expect(states).toContain('running');
    expect(bridge.activity.state).toBe('idle');
    bridge.dispose();
  });

  it('defers a listing while the kernel is busy', async () => {
    const bridge = new KernelBridge({ kernel, transport, timeoutMs: 1500 });
    const cell = runCell(kernel, 'import time; time.sleep(2); late = np.zeros(4)');
    await sleep(300);
    const list = bridge.listVariables();
    await sleep(200);
    expect(bridge.activity.state).toBe('waiting');
    const vars = await list;
    // Deferred until the cell finished, so it sees the variable the cell made.
    expect(vars.map(v => v.label)).toContain('late');
    await cell;
    bridge.dispose();
  });

  it('times out when the kernel works on the request for too long, then recovers', async () => {
    const bridge = new KernelBridge({ kernel, transport, timeoutMs: 1000 });
    await bridge.listVariables();
    await runCell(kernel, slowHelper(2.5));
    const e = await failure(bridge.readArray({ kind: 'variable', name: 'x' }));
    expect(e.code).toBe('timeout');
    expect(e.message).toBe(
      'The kernel did not answer within 1 s while reading x. Nothing in the panel was changed; try again, or raise the timeout in the settings.'
    );
    await runCell(kernel, restoreHelper); // queued behind the slow request
    const a = await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(a.data[5]).toBe(5);
    bridge.dispose();
  });

  it('reports an interrupt during a read', async () => {
    const bridge = new KernelBridge({ kernel, transport, timeoutMs: 20000 });
    await bridge.listVariables();
    await runCell(kernel, slowHelper(10));
    const p = bridge.readArray({ kind: 'variable', name: 'y' });
    await sleep(800);
    expect(bridge.activity.state).toBe('running');
    await kernel.interrupt();
    const e = await failure(p);
    expect(e.code).toBe('interrupted');
    expect(e.message).toMatch(
      /^The kernel was interrupted while .*y.*Nothing in the panel was changed\.$/
    );
    await runCell(kernel, restoreHelper);
    expect((await bridge.readArray({ kind: 'variable', name: 'y' })).shape).toEqual([300, 300]);
    bridge.dispose();
  });

  it('survives an interrupted cell queued before the read', async () => {
    const bridge = new KernelBridge({ kernel, transport, timeoutMs: 20000 });
    await bridge.listVariables();
    const cell = runCell(kernel, 'import time; time.sleep(10)');
    await sleep(300);
    const p = bridge.readArray({ kind: 'variable', name: 'x' });
    await sleep(300);
    await kernel.interrupt();
    expect((await cell).status).toBe('error');
    // Either it ran after the interrupted cell, or the kernel aborted it: then it says so.
    const outcome = await p.then(
      a => `read ${a.data.length}`,
      (e: BridgeError) => e.code
    );
    expect(['read 1000', 'aborted']).toContain(outcome);
    bridge.dispose();
  });
});

describe('comm unavailable', () => {
  it("falls back to base64 when the kernel has no comm target ('auto' transport)", async () => {
    await runCell(kernel, restoreHelper);
    await runCell(kernel, `__import__('sys').modules.pop('${HELPER_MODULE}', None)`);
    const bridge = new KernelBridge({ kernel, timeoutMs: 20000 });
    await bridge.listVariables(); // installs the helper (and its comm target)
    await runCell(
      kernel,
      `get_ipython().kernel.comm_manager.unregister_target('${COMM_TARGET}', None)`
    );
    const types: string[] = [];
    const watch = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send') {
        const ue = (a.msg.content as { user_expressions?: Record<string, string> })
          .user_expressions;
        types.push(
          a.msg.header.msg_type +
            (ue && Object.values(ue).some(v => v.includes('b64_open')) ? ':b64' : '')
        );
      }
    };
    kernel.anyMessage.connect(watch);
    const a = await bridge.readArray({ kind: 'variable', name: 'y' });
    kernel.anyMessage.disconnect(watch);
    expect(a.shape).toEqual([300, 300]);
    // It tried the comm (refused: no such target), then read over base64.
    expect(types).toContain('comm_open');
    expect(types).toContain('execute_request:b64');
    // Put the target back for the tests that follow: a fresh helper registers it again.
    await runCell(kernel, `__import__('sys').modules.pop('${HELPER_MODULE}', None)`);
    bridge.dispose();
  });
});

describe('writes under faults', () => {
  it('an interrupt mid-write binds nothing and says so', async () => {
    const bridge = new KernelBridge({ kernel, timeoutMs: 20000 });
    await bridge.listVariables();
    // The slowed chunk handler leaves a marker when the first chunk arrives, so the interrupt
    // lands inside the write however long the client took to start sending (a fixed delay
    // once fired before the first chunk reached a loaded machine's kernel).
    const marker = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-int-')), 'started');
    await runCell(
      kernel,
      `_p = ${H}; _p.w_put_orig = getattr(_p, 'w_put_orig', _p.w_put)\n` +
        `def _slow(h, o, d, _o=_p.w_put_orig):\n` +
        `    open(${JSON.stringify(marker)}, 'a').close()\n` +
        `    __import__('time').sleep(0.5)\n    return _o(h, o, d)\n` +
        `_p.w_put = _slow\ndel _p, _slow`
    );
    const n = 3_000_000;
    const data = new Float64Array(n).fill(1.25);
    const p = bridge.writeArray('half_written', {
      data,
      shape: [n],
      complex: false,
      dtype: 'float64'
    });
    for (let t = 0; !fs.existsSync(marker); t += 20) {
      if (t > 20000) {
        throw new Error('the write never reached the kernel');
      }
      await sleep(20);
    }
    await sleep(700);
    await kernel.interrupt();
    const e = await failure(p);
    expect(e.code).toBe('interrupted');
    expect(e.message).toBe(
      'The kernel was interrupted while working on half_written. Nothing in the panel was changed.'
    );
    await runCell(kernel, `${H}.w_put = ${H}.w_put_orig`);
    fs.rmSync(path.dirname(marker), { recursive: true, force: true });
    expect(await evalText(kernel, "'half_written' in get_ipython().user_ns")).toBe('False');
    // And the next write goes through whole.
    const ok = await bridge.writeArray('half_written', {
      data,
      shape: [n],
      complex: false,
      dtype: 'float64'
    });
    expect(ok.status).toBe('written');
    expect(await evalText(kernel, 'float(half_written.sum())')).toBe('3750000.0');
    bridge.dispose();
  }, 60000);
});

describe('kernel lifecycle', () => {
  it('reports a restart mid-transfer, forgets the comm, and works after the restart', async () => {
    const ledger = new SessionLedger();
    const watch = watchKernelExecutions(kernel, ledger);
    const bridge = new KernelBridge({ kernel, timeoutMs: 20000, ledger });
    const before = await runCell(kernel, 'np.arange(3.0)', 'cell-r');
    const cells = [{ cellId: 'cell-r', executionCount: before.executionCount }];
    expect(await bridge.listCellResults(cells)).toHaveLength(1);
    await bridge.listVariables();
    await runCell(kernel, slowHelper(10));
    const p = bridge.readArray({ kind: 'variable', name: 'y' });
    await sleep(800);
    const restart = kernel.restart();
    const e = await failure(p);
    expect(e.code).toBe('restarted');
    expect(e.message).toBe(
      "The kernel restarted before the request finished. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
    );
    await restart;
    // After the restart the notebook's counts point at nothing: the ledger forgot them.
    expect(ledger.size).toBe(0);
    expect(await bridge.listCellResults(cells)).toEqual([]);
    const stale = await failure(
      bridge.readArray({ kind: 'cell', cellId: 'cell-r', executionCount: before.executionCount! })
    );
    expect(stale.code).toBe('stale-count');
    expect(stale.message).toMatch(/was not produced by the kernel running now/);
    watch.dispose();
    const err = await failure(bridge.readArray({ kind: 'variable', name: 'y' }));
    expect(err.code).toBe('not-found');
    await setup();
    expect((await bridge.readArray({ kind: 'variable', name: 'y' })).shape).toEqual([300, 300]);
    bridge.dispose();
  }, 60000);

  it('reports the kernel process killed mid-transfer (the server restarts it)', async () => {
    const bridge = new KernelBridge({ kernel, timeoutMs: 30000 });
    await bridge.listVariables();
    const pid = Number(await evalText(kernel, "__import__('os').getpid()"));
    expect(pid).toBeGreaterThan(1);
    await runCell(kernel, slowHelper(20));
    const p = bridge.readArray({ kind: 'variable', name: 'y' });
    await sleep(800);
    process.kill(pid, 'SIGKILL');
    const e = await failure(p);
    expect(e.code).toBe('dead');
    expect(e.message).toBe(
      "The kernel died before the request finished and the server restarted it. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
    );
    // Wait for the automatic restart to reconnect, then it works again.
    for (let i = 0; i < 100 && kernel.connectionStatus !== 'connected'; i++) {
      await sleep(200);
    }
    await setup();
    expect((await bridge.readArray({ kind: 'variable', name: 'x' })).data[3]).toBe(3);
    bridge.dispose();
  }, 60000);

  it('reports the comm closed by the kernel, then reopens it', async () => {
    const bridge = new KernelBridge({ kernel, transport: 'comm', timeoutMs: 20000 });
    await bridge.readArray({ kind: 'variable', name: 'x' });
    const cell = runCell(
      kernel,
      `import time; time.sleep(1)\nfor _c in list(${H}.comms): _c.close()`
    );
    await sleep(300);
    const e = await failure(bridge.readArray({ kind: 'variable', name: 'y' }));
    expect(e.code).toBe('comm-closed');
    expect(e.message).toBe(
      "The kernel closed Perpend's data channel while reading y. Nothing in the panel was changed; try again (Perpend reopens it)."
    );
    await cell;
    expect((await bridge.readArray({ kind: 'variable', name: 'y' })).shape).toEqual([300, 300]);
    bridge.dispose();
  });

  it('rejects malformed replies from a tampered helper and keeps working', async () => {
    const bridge = new KernelBridge({ kernel, timeoutMs: 20000 });
    await bridge.listVariables();
    const expectMalformed = (e: BridgeError): void => {
      expect(e.code).toBe('malformed');
      expect(e.message).toMatch(/not in the form Perpend expects|without sending the whole array/);
    };
    await runCell(kernel, `${H}.list_vars_orig = ${H}.list_vars`);
    // Not JSON at all.
    await runCell(kernel, `${H}.list_vars = lambda: ${H}.Text('<script>alert(1)</script>')`);
    expectMalformed(await failure(bridge.listVariables()));
    // JSON, but a hostile dtype string and an HTML name.
    await runCell(
      kernel,
      `${H}.list_vars = lambda: ${H}.reply({"vars": [{"name": "x", "shape": [3], "dtype": "<img src=x onerror=alert(1)>", "bytes": 24, "readable": True, "notes": []}]})`
    );
    expectMalformed(await failure(bridge.listVariables()));
    await runCell(
      kernel,
      `${H}.list_vars = lambda: ${H}.reply({"vars": [{"name": "<b>x</b>", "shape": [3], "dtype": "float64", "bytes": 24, "readable": True, "notes": ["<i>note</i>"]}], "skipped": 0})`
    );
    expect(await bridge.listVariables()).toEqual([]);
    // A header whose size does not match its shape.
    await runCell(
      kernel,
      `_p = ${H}; _p.prepare_orig = getattr(_p, 'prepare_orig', _p.prepare)\n` +
        `def _bad(v, m, _o=_p.prepare_orig):\n    h, raw = _o(v, m)\n    h['shape'] = [h['shape'][0] + 1]\n    return h, raw\n_p.prepare = _bad\ndel _p, _bad`
    );
    expectMalformed(await failure(bridge.readArray({ kind: 'variable', name: 'x' })));
    // A chunk that is short (truncated buffer).
    await runCell(
      kernel,
      `_p = ${H}\ndef _short(v, m, _o=_p.prepare_orig):\n    h, raw = _o(v, m)\n    h['nbytes'] = h['nbytes']\n    return h, raw[:-8]\n_p.prepare = _short\ndel _p, _short`
    );
    expectMalformed(await failure(bridge.readArray({ kind: 'variable', name: 'x' })));
    await runCell(kernel, restoreHelper);
    expect((await bridge.readArray({ kind: 'variable', name: 'x' })).data[7]).toBe(7);
    bridge.dispose();
  });

  it('reports a dropped websocket (a message over the server limit, sent by someone else) and recovers', async () => {
    const bridge = new KernelBridge({ kernel, timeoutMs: 20000 });
    await bridge.listVariables();
    await runCell(kernel, slowHelper(3));
    const p = bridge.readArray({ kind: 'variable', name: 'y' });
    await sleep(500);
    // 11 MiB in one browser→server message: tornado's default limit is 10 MiB; the server
    // closes the websocket (DESIGN §4). This is exactly what Perpend's own chunking avoids.
    kernel.requestExecute({
      code: '#' + 'x'.repeat(11 * 1048576),
      silent: true,
      store_history: false
    });
    const e = await failure(p);
    expect(e.code).toBe('disconnected');
    expect(e.message).toMatch(
      /^The connection to the Jupyter server dropped before the request finished\. Nothing in the panel was changed/
    );
    for (let i = 0; i < 100 && kernel.connectionStatus !== 'connected'; i++) {
      await sleep(200);
    }
    await runCell(kernel, restoreHelper);
    expect((await bridge.readArray({ kind: 'variable', name: 'x' })).data[9]).toBe(9);
    bridge.dispose();
  }, 60000);

  it('writes large arrays in chunks that never reach the server limit', async () => {
    const bridge = new KernelBridge({ kernel });
    const sizes: number[] = [];
    const watch = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
      if (a.direction === 'send') {
        const bufs = (a.msg.buffers ?? []) as ArrayBuffer[];
        sizes.push(
          bufs.reduce((s, b) => s + b.byteLength, 0) + JSON.stringify(a.msg.content).length
        );
      }
    };
    kernel.anyMessage.connect(watch);
    const n = 3_000_000; // 24 MB: several times the limit
    const data = new Float64Array(n).map((_, i) => i * 0.5);
    const arr: ArrayData = { data, shape: [n], complex: false, dtype: 'float64' };
    const r = await bridge.writeArray('written_big', arr);
    kernel.anyMessage.disconnect(watch);
    expect(r.status).toBe('written');
    expect(Math.max(...sizes)).toBeLessThan(5 * 1048576);
    expect(await evalText(kernel, 'float(written_big[-1])')).toBe(String((n - 1) * 0.5));
    bridge.dispose();
  });

  it('fails at once, clearly, when the kernel is shut down', async () => {
    const k2 = await server.startKernel();
    const bridge = new KernelBridge({ kernel: k2 });
    await bridge.listVariables();
    await k2.shutdown();
    const e = await failure(bridge.listVariables());
    expect(e.code).toBe('dead');
    expect(e.message).toMatch(/not running|closed/);
    bridge.dispose();
  });

  it('refuses a non-Python kernel language without running anything', async () => {
    // A connection whose kernel info reports another language: the bridge checks the real
    // kernel_info reply, so fake only that field on a real connection object.
    const k3 = await server.startKernel();
    const info = await k3.info;
    Object.defineProperty(k3, 'info', {
      value: Promise.resolve({ ...info, language_info: { ...info.language_info, name: 'julia' } })
    });
    const bridge = new KernelBridge({ kernel: k3 });
    const e = await failure(bridge.listVariables());
    expect(e.code).toBe('unsupported-kernel');
    expect(e.message).toMatch(/runs julia, not Python/);
    bridge.dispose();
    await k3.shutdown();
  });
});
