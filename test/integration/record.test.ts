/**
 * A whole result written at once (issue: the workbench — "a whole run at once as a dict of
 * arrays plus its parameters"): every array staged in the kernel, then one dict bound with the
 * same replacement question as a single array, on both transports, bit for bit.
 */
/* eslint-disable @typescript-eslint/no-require-imports -- node:crypto in one check */
import type { Kernel } from '@jupyterlab/services';
import { KernelBridge, isBridgeError, type ArrayData } from '../../src/bridge';
import { evalText, runCell, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

beforeAll(async () => {
  server = await startServer('record');
  kernel = await server.startKernel();
  await runCell(kernel, 'import numpy as np\ntaken = 1');
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

function real(n: number, f: (i: number) => number): ArrayData {
  return {
    data: Float64Array.from({ length: n }, (_, i) => f(i)),
    shape: [n],
    complex: false,
    dtype: 'float64'
  };
}

describe.each(['comm', 'base64'] as const)('a record over %s', transport => {
  let bridge: KernelBridge;
  beforeAll(() => {
    // Small chunks: the 200 000-sample array goes in many pieces.
    bridge = new KernelBridge({ kernel, transport, writeChunkBytes: 65536 });
  });
  afterAll(() => bridge.dispose());

  it('binds one dict of the arrays and the parameters, bit for bit', async () => {
    const error = real(200000, i => Math.sin(i * 0.37) * 10 ** ((i % 30) - 15));
    const weights: ArrayData = {
      data: Float64Array.from([1, -0.5, 0.25, 0, -0, 5e-324]),
      shape: [3],
      complex: true,
      dtype: 'complex128'
    };
    const name = `run_${transport}`;
    const params = { algorithm: 'qr-rls', taps: 16, lambda: 0.999, fs: null };
    const w = await bridge.writeRecord(name, { error, weights }, params);
    expect(w).toMatchObject({ status: 'written', name, warnings: [] });
    expect(await evalText(kernel, `sorted(${name})`)).toBe("['error', 'params', 'weights']");
    expect(await evalText(kernel, `${name}['params']`)).toBe(
      "{'algorithm': 'qr-rls', 'taps': 16, 'lambda': 0.999, 'fs': None}"
    );
    expect(await evalText(kernel, `(${name}['error'].dtype.str, ${name}['error'].shape)`)).toBe(
      "('<f8', (200000,))"
    );
    // Bit for bit: the kernel's bytes hashed against ours (SHA-256, Python's hashlib).
    const digest = await evalText(
      kernel,
      `__import__('hashlib').sha256(${name}['error'].tobytes()).hexdigest()`
    );
    const ours = require('node:crypto')
      .createHash('sha256')
      .update(Buffer.from(error.data.buffer))
      .digest('hex');
    expect(digest).toBe(`'${ours}'`);
    expect(await evalText(kernel, `${name}['weights'].tolist()`)).toBe(
      '[(1-0.5j), (0.25+0j), (-0+5e-324j)]'
    );
  });

  it('asks before replacing a name, and replaces when told to', async () => {
    const a = { e: real(4, i => i) };
    const r = await bridge.writeRecord('taken', a, {});
    expect(r.status).toBe('exists');
    expect(await evalText(kernel, 'taken')).toBe('1');
    const again = await bridge.writeRecord('taken', a, { k: 1 }, { overwrite: true });
    expect(again.status).toBe('written');
    expect(await evalText(kernel, "taken['params']")).toBe("{'k': 1}");
    await runCell(kernel, 'taken = 1');
  });

  it('refuses bad keys and reserved names before sending anything', async () => {
    await expect(
      bridge.writeRecord('ok_name', { 'not a name': real(2, i => i) }, {})
    ).rejects.toThrow(/must be a Python identifier/);
    await expect(bridge.writeRecord('ok_name', { params: real(2, i => i) }, {})).rejects.toThrow(
      /other than "params"/
    );
    const reserved = await bridge.writeRecord('__name__', { e: real(2, i => i) }, {}).catch(e => e);
    expect(isBridgeError(reserved, 'reserved')).toBe(true);
    expect(await evalText(kernel, "'ok_name' in globals()")).toBe('False');
  });
});
