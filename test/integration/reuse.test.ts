/**
 * Reading a source the kernel still holds unchanged moves a digest instead of its bytes
 * (src/bridge/read-cache.ts). The reference for "unchanged" is numpy and hashlib in the kernel:
 * the bytes Perpend returns hash (SHA-256, FIPS 180-4) to what the kernel hashes of
 * `np.ascontiguousarray(v, '<f8' or '<c16').tobytes()`, on every read, reused or sent; a value
 * changed in place (same name, same shape) is sent again.
 */
import type { Kernel } from '@jupyterlab/services';
import { KernelBridge, type ArrayData } from '../../src/bridge';
import { kernelSha256, runCell, sha256Of, startServer, type JupyterServer } from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

const sha = sha256Of;
const kernelSha = (expr: string, complex: boolean): Promise<string> =>
  kernelSha256(kernel, expr, complex);

async function run(code: string): Promise<void> {
  const r = await runCell(kernel, code);
  if (r.status !== 'ok') {
    throw new Error(`cell failed: ${r.stdout}`);
  }
}

beforeAll(async () => {
  server = await startServer('reuse');
  kernel = await server.startKernel();
  await run(`
import numpy as np
rng = np.random.default_rng(20261203)
x = rng.standard_normal(300000)          # 2.3 MiB: three chunks of 1 MiB
z = (rng.standard_normal((3, 5000)) + 1j * rng.standard_normal((3, 5000))).astype(np.complex64)
i16 = rng.integers(-30000, 30000, size=7000, dtype=np.int16)
`);
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

test('a second read of an unchanged array is served from the copy kept, bit for bit', async () => {
  const bridge = new KernelBridge({ kernel, transport: 'comm' });
  try {
    const want = await kernelSha('x', false);
    const a = await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(bridge.readCounts).toEqual({ reused: 0, sent: 1 });
    expect(sha(a.data)).toBe(want);
    // the read names its values by the kernel's digest (what a job worker keeps them under)
    expect(a.digest).toBe(want);
    // what the caller does to its array does not reach the copy kept
    a.data.fill(0);
    const b = await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(bridge.readCounts).toEqual({ reused: 1, sent: 1 });
    expect(sha(b.data)).toBe(want);
    expect(b.digest).toBe(want);
    expect(b.shape).toEqual([300000]);
    expect(b.complex).toBe(false);
    expect(b.dtype).toBe('float64');
    expect(b.data).not.toBe(a.data);
    // complex64 (converted to complex128 on both sides) and int16, 2-D and 1-D
    for (const [name, complex] of [
      ['z', true],
      ['i16', false]
    ] as const) {
      const w = await kernelSha(name, complex);
      const first: ArrayData = await bridge.readArray({ kind: 'variable', name });
      const again: ArrayData = await bridge.readArray({ kind: 'variable', name });
      expect(sha(first.data)).toBe(w);
      expect(sha(again.data)).toBe(w);
      expect([first.digest, again.digest]).toEqual([w, w]);
      expect(again.shape).toEqual(first.shape);
      expect(again.dtype).toBe(first.dtype);
    }
    expect(bridge.readCounts).toEqual({ reused: 3, sent: 3 });
  } finally {
    bridge.dispose();
  }
});

test('shared reads (a reader that never writes into them) take the kept array itself, no copy', async () => {
  const bridge = new KernelBridge({ kernel, transport: 'comm' });
  try {
    const want = await kernelSha('z', true);
    const first = await bridge.readArray({ kind: 'variable', name: 'z' }, { shared: true });
    const again = await bridge.readArray({ kind: 'variable', name: 'z' }, { shared: true });
    expect(bridge.readCounts).toEqual({ reused: 1, sent: 1 });
    expect(again.data).toBe(first.data);
    expect(sha(again.data)).toBe(want);
    // a reader that may write still gets a copy of its own
    const own = await bridge.readArray({ kind: 'variable', name: 'z' });
    expect(own.data).not.toBe(first.data);
    expect(sha(own.data)).toBe(want);
  } finally {
    bridge.dispose();
  }
});

test('a value changed in place, or re-bound to another shape, is sent again', async () => {
  const bridge = new KernelBridge({ kernel, transport: 'comm' });
  try {
    await bridge.readArray({ kind: 'variable', name: 'x' });
    // one sample of the last chunk, same name, same shape, same dtype
    await run('x[-1] += 1.0');
    const c = await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(bridge.readCounts).toEqual({ reused: 0, sent: 2 });
    expect(sha(c.data)).toBe(await kernelSha('x', false));
    await run('x = x[:1000].copy()');
    const d = await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(d.shape).toEqual([1000]);
    expect(sha(d.data)).toBe(await kernelSha('x', false));
    expect(bridge.readCounts).toEqual({ reused: 0, sent: 3 });
    // unchanged since: reused
    await bridge.readArray({ kind: 'variable', name: 'x' });
    expect(bridge.readCounts).toEqual({ reused: 1, sent: 3 });
  } finally {
    bridge.dispose();
  }
});

test('keepReadBytes: 0 keeps nothing; every read moves the bytes', async () => {
  const bridge = new KernelBridge({ kernel, transport: 'comm', keepReadBytes: 0 });
  try {
    for (let k = 0; k < 2; k++) {
      const a = await bridge.readArray({ kind: 'variable', name: 'i16' });
      expect(sha(a.data)).toBe(await kernelSha('i16', false));
    }
    expect(bridge.readCounts).toEqual({ reused: 0, sent: 2 });
  } finally {
    bridge.dispose();
  }
  expect(() => new KernelBridge({ kernel, keepReadBytes: -1 })).toThrow(
    /keepReadBytes must be a finite number ≥ 0, got -1/
  );
});
