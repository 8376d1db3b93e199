/**
 * Bit-exact round trips against a real kernel, on both transports (binary comm and base64 in
 * user_expressions). The reference for every value is numpy itself: the kernel hashes
 * `np.ascontiguousarray(v, '<f8' or '<c16').tobytes()` (numpy's own, exact, conversion of
 * each dtype to float64/complex128; NumPy docs, "Data type objects" and `ndarray.astype`
 * casting rules: every bool/int ≤ 32 bits/float ≤ 64 bits value is exactly representable in
 * float64), and the test hashes the bytes Perpend received. A second, independent check
 * decodes the kernel's raw native-dtype bytes in JavaScript (typed arrays) and compares
 * values.
 */
import type { Kernel } from '@jupyterlab/services';
import { KernelBridge, isBridgeError, type ArrayData } from '../../src/bridge';
import {
  evalText,
  kernelSha256,
  runCell,
  sha256Of,
  startServer,
  type JupyterServer
} from './harness';

let server: JupyterServer;
let kernel: Kernel.IKernelConnection;

const sha = sha256Of;
const kernelSha = (expr: string, complex: boolean): Promise<string> =>
  kernelSha256(kernel, expr, complex);

const SETUP = `
import numpy as np
rng = np.random.default_rng(20261202)
special = np.array([0.0, -0.0, np.nan, np.inf, -np.inf, 5e-324, 2.2250738585072014e-308,
                    1.7976931348623157e308, -1.0, 1/3])
base = rng.standard_normal(40 * 30)
base[:special.size] = special
m = base.reshape(40, 30)
dt = {}
for name in ['int8', 'int16', 'int32', 'uint8', 'uint16', 'uint32']:
    info = np.iinfo(name)
    v = rng.integers(info.min, info.max, size=(40, 30), endpoint=True, dtype=name)
    v.flat[0] = info.min; v.flat[1] = info.max
    dt[name] = v
v = rng.integers(-2**53, 2**53, size=(40, 30), endpoint=True, dtype=np.int64)
v.flat[0] = -2**53; v.flat[1] = 2**53
dt['int64'] = v
v = rng.integers(0, 2**53, size=(40, 30), endpoint=True, dtype=np.uint64)
v.flat[1] = 2**53
dt['uint64'] = v
dt['float64'] = m.copy()
dt['float32'] = m.astype(np.float32)
dt['float16'] = (m * 100).astype(np.float16)
dt['bool'] = rng.random((40, 30)) > 0.5
dt['complex128'] = m + 1j * m[::-1, ::-1]
dt['complex64'] = dt['complex128'].astype(np.complex64)
for k, v in dt.items():
    globals()['c_' + k] = np.ascontiguousarray(v)
    globals()['f_' + k] = np.asfortranarray(v)
    globals()['s_' + k] = v[1::3, ::-2]
    globals()['r_' + k] = v[5]
    globals()['one_' + k] = v[:1, :1].reshape(1)
    globals()['row_' + k] = v[:1, :]
    globals()['col_' + k] = v[:, :1]
big_endian = m.astype('>f8')
as_list = [[1.5, -0.0, float('nan')], [2.0, float('inf'), -3.25]]
`;

beforeAll(async () => {
  server = await startServer('roundtrip');
  kernel = await server.startKernel();
  const r = await runCell(kernel, SETUP);
  if (r.status !== 'ok') {
    throw new Error('setup failed: ' + r.stdout);
  }
}, 90000);

afterAll(async () => {
  if (server) {
    await server.stop();
  }
});

const DTYPES = [
  'float64',
  'float32',
  'float16',
  'int8',
  'int16',
  'int32',
  'int64',
  'uint8',
  'uint16',
  'uint32',
  'uint64',
  'bool',
  'complex64',
  'complex128'
];
const LAYOUTS: Array<[string, (shape: number[]) => number[]]> = [
  ['c', () => [40, 30]],
  ['f', () => [40, 30]],
  ['s', () => [13, 15]],
  ['r', () => [30]],
  ['one', () => [1]],
  ['row', () => [1, 30]],
  ['col', () => [40, 1]]
];

describe.each(['comm', 'base64'] as const)('read over %s', transport => {
  let bridge: KernelBridge;
  beforeAll(() => {
    bridge = new KernelBridge({ kernel, transport, readChunkBytes: 65536 * 2 });
  });
  afterAll(() => bridge.dispose());

  it.each(DTYPES)(
    '%s: every layout bit-exact (C, Fortran, strided view, row, 1, 1×n, n×1)',
    async dtype => {
      const complex = dtype.startsWith('complex');
      for (const [prefix, shape] of LAYOUTS) {
        const name = `${prefix}_${dtype}`;
        const a = await bridge.readArray({ kind: 'variable', name });
        expect({ name, shape: a.shape, complex: a.complex, dtype: a.dtype }).toEqual({
          name,
          shape: shape([]),
          complex,
          dtype
        });
        expect(sha(a.data)).toBe(await kernelSha(name, complex));
      }
    }
  );

  it('matches an independent decoding of the native bytes in JavaScript', async () => {
    const cases: Array<[string, (b: ArrayBuffer) => ArrayLike<number | bigint>]> = [
      ['c_float32', b => new Float32Array(b)],
      ['c_int64', b => new BigInt64Array(b)],
      ['c_uint64', b => new BigUint64Array(b)],
      ['c_int8', b => new Int8Array(b)],
      ['c_uint32', b => new Uint32Array(b)],
      ['c_complex64', b => new Float32Array(b)]
    ];
    for (const [name, view] of cases) {
      const b64 = (
        await evalText(
          kernel,
          `__import__('base64').b64encode(${name}.astype(${name}.dtype.newbyteorder('<')).tobytes()).decode()`
        )
      ).replace(/'/g, '');
      const raw = Buffer.from(b64, 'base64');
      const native = view(raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.byteLength));
      const got = await bridge.readArray({ kind: 'variable', name });
      expect(got.data.length).toBe(native.length);
      for (let i = 0; i < native.length; i++) {
        const want = Number(native[i]);
        if (!Object.is(got.data[i], want)) {
          throw new Error(`${name}[${i}]: got ${got.data[i]}, want ${want}`);
        }
      }
    }
  });

  it('reads big-endian arrays and lists of numbers (nan, inf, -0 kept)', async () => {
    const be = await bridge.readArray({ kind: 'variable', name: 'big_endian' });
    expect(sha(be.data)).toBe(await kernelSha('big_endian', false));
    const l = await bridge.readArray({ kind: 'variable', name: 'as_list' });
    expect(l.shape).toEqual([2, 3]);
    expect(Array.from(l.data)).toEqual([1.5, -0, NaN, 2, Infinity, -3.25]);
    expect(Object.is(l.data[1], -0)).toBe(true);
  });

  it('refuses with a clear message: empty, 3-D, scalar, string array, missing, int64 beyond 2^53, over the size limit', async () => {
    await runCell(
      kernel,
      'empty = np.zeros((0, 3))\ncube3 = np.zeros((2,2,2))\nsc = np.float64(2.0)\nstrs = np.array(["a"])\n' +
        'bigint = np.arange(6, dtype=np.int64).reshape(2, 3); bigint[1, 2] = 2**53 + 1\n' +
        'bigu = np.zeros(4, np.uint64); bigu[3] = 2**64 - 1\nhuge = np.zeros(300000)'
    );
    const msg = async (name: string, b = bridge): Promise<string> => {
      try {
        await b.readArray({ kind: 'variable', name });
      } catch (e) {
        if (isBridgeError(e)) {
          return `${e.code}: ${e.message}`;
        }
        throw e;
      }
      throw new Error(`${name} was read`);
    };
    expect(await msg('empty')).toMatch(/^empty: .*empty \(shape \(0, 3\)\)/);
    expect(await msg('cube3')).toMatch(/^ndim: .*shape \(2, 2, 2\).*1-D and 2-D/);
    expect(await msg('sc')).toMatch(/^scalar:/);
    expect(await msg('strs')).toMatch(/^unsupported-dtype: .*str/);
    expect(await msg('no_such_name')).toMatch(/^not-found: There is no variable no_such_name/);
    expect(await msg('bigint')).toBe(
      'int-precision: bigint[1, 2] is 9007199254740993, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.'
    );
    expect(await msg('bigu')).toMatch(/^int-precision: bigu\[3\] is 18446744073709551615/);
    const small = new KernelBridge({
      kernel,
      transport,
      maxBytes: 1048576,
      maxBytesSetting: 'maxArrayMiB'
    });
    expect(await msg('huge', small)).toMatch(
      /^too-large: huge is 2\.3 MiB as float64, over the limit of 1\.0 MiB \(setting "maxArrayMiB"\)/
    );
    small.dispose();
  });
});

describe.each(['comm', 'base64'] as const)('write over %s', transport => {
  let bridge: KernelBridge;
  beforeAll(() => {
    bridge = new KernelBridge({ kernel, transport, writeChunkBytes: 65536 });
  });
  afterAll(() => bridge.dispose());

  it('writes float64 and complex128 silently, bit-exact, and reads them back', async () => {
    const n = 20000;
    const data = new Float64Array(n * 2);
    for (let i = 0; i < data.length; i++) {
      data[i] = Math.sin(i * 0.37) * 10 ** ((i % 40) - 20);
    }
    data[0] = -0;
    data[1] = NaN;
    data[2] = -Infinity;
    data[3] = 5e-324;
    const before = await runCell(kernel, '1');
    const real: ArrayData = { data, shape: [200, 200], complex: false, dtype: 'float64' };
    const name = `w_${transport}`;
    const w = await bridge.writeArray(name, real);
    expect(w).toEqual({ status: 'written', name, bytes: data.byteLength, warnings: [] });
    expect(
      await evalText(
        kernel,
        `(${name}.dtype.str, ${name}.shape, ${name}.flags.c_contiguous, ${name}.flags.writeable)`
      )
    ).toBe("('<f8', (200, 200), True, True)");
    expect(await kernelSha(name, false)).toBe(sha(data));
    const cplx: ArrayData = { data, shape: [n], complex: true, dtype: 'complex128' };
    const wc = await bridge.writeArray(`${name}_c`, cplx);
    expect(wc.status).toBe('written');
    expect(await evalText(kernel, `(${name}_c.dtype.str, ${name}_c.shape)`)).toBe(
      "('<c16', (20000,))"
    );
    expect(await kernelSha(`${name}_c`, true)).toBe(sha(data));
    const back = await bridge.readArray({ kind: 'variable', name: `${name}_c` });
    expect(sha(back.data)).toBe(sha(data));
    const after = await runCell(kernel, '1');
    expect(after.executionCount).toBe(before.executionCount! + 1);
  });

  it('asks before overwriting, warns about modules and builtins, normalises look-alikes', async () => {
    const one: ArrayData = {
      data: new Float64Array([1, 2, 3]),
      shape: [3],
      complex: false,
      dtype: 'float64'
    };
    await runCell(kernel, 'taken = 5');
    const e = await bridge.writeArray('taken', one);
    expect(e).toMatchObject({
      status: 'exists',
      name: 'taken',
      conflict: { exists: true, existingType: 'int' }
    });
    expect(await evalText(kernel, 'taken')).toBe('5');
    const np1 = await bridge.writeArray('np', one);
    expect(np1).toMatchObject({ status: 'exists', conflict: { module: 'numpy' } });
    expect(np1.status !== 'written' && np1.message).toMatch(/the module numpy/);
    const sum1 = await bridge.writeArray('sum', one);
    expect(sum1).toMatchObject({ status: 'shadows', conflict: { builtin: true, exists: false } });
    expect(await evalText(kernel, "'sum' in get_ipython().user_ns")).toBe('False');
    const ok = await bridge.writeArray('taken', one, { overwrite: true });
    expect(ok).toMatchObject({
      status: 'written',
      warnings: ['"taken" held a int; it was replaced.']
    });
    expect(await evalText(kernel, 'taken.tolist()')).toBe('[1.0, 2.0, 3.0]');
    // Full-width "ｗｉｄｅ" is the same identifier as "wide" for Python (NFKC).
    const wide = await bridge.writeArray('ｗｉｄｅ' + transport, one);
    expect(wide).toMatchObject({ status: 'written', name: 'wide' + transport });
    expect(wide.status === 'written' && wide.warnings[0]).toMatch(/NFKC/);
    expect(await bridge.writeArray('ｗｉｄｅ' + transport, one)).toMatchObject({
      status: 'exists'
    });
  });
});

describe('large writes that need confirmation', () => {
  it.each(['comm', 'base64'] as const)(
    'over %s: nothing but the request is sent when the name is taken',
    async transport => {
      const bridge = new KernelBridge({ kernel, transport });
      await runCell(kernel, 'taken_big = "keep me"');
      let sent = 0;
      const watch = (_: unknown, a: Kernel.IAnyMessageArgs): void => {
        if (a.direction === 'send') {
          const bufs = (a.msg.buffers ?? []) as ArrayBuffer[];
          sent += bufs.reduce((n, b) => n + b.byteLength, 0) + JSON.stringify(a.msg.content).length;
        }
      };
      kernel.anyMessage.connect(watch);
      const data = new Float64Array(1_000_000); // 8 MB: more than one chunk
      const r = await bridge.writeArray('taken_big', {
        data,
        shape: [data.length],
        complex: false,
        dtype: 'float64'
      });
      kernel.anyMessage.disconnect(watch);
      expect(r).toMatchObject({ status: 'exists', conflict: { existingType: 'str' } });
      expect(sent).toBeLessThan(100_000);
      expect(await evalText(kernel, 'taken_big')).toBe("'keep me'");
      bridge.dispose();
    }
  );
});

describe('large arrays', () => {
  it('reads 1e7 float64 bit-exact over the comm and writes them back', async () => {
    await runCell(kernel, 'big = np.random.default_rng(7).standard_normal(10_000_000)');
    const bridge = new KernelBridge({ kernel });
    const a = await bridge.readArray({ kind: 'variable', name: 'big' });
    expect(a.shape).toEqual([10_000_000]);
    expect(sha(a.data)).toBe(await kernelSha('big', false));
    const w = await bridge.writeArray('big_back', a);
    expect(w.status).toBe('written');
    expect(await kernelSha('big_back', false)).toBe(sha(a.data));
    expect(await evalText(kernel, 'bool((big_back == big).all())')).toBe('True');
    await runCell(kernel, 'del big, big_back');
    bridge.dispose();
  }, 120000);

  it('reads 1e6 float64 over base64 (chunked below the websocket limit)', async () => {
    await runCell(kernel, 'mid = np.random.default_rng(8).standard_normal(1_000_000)');
    const bridge = new KernelBridge({ kernel, transport: 'base64' });
    const a = await bridge.readArray({ kind: 'variable', name: 'mid' });
    expect(sha(a.data)).toBe(await kernelSha('mid', false));
    bridge.dispose();
  }, 120000);
});

describe('cell results', () => {
  it('reads a truncated-repr result at full precision from the output cache', async () => {
    const r = await runCell(kernel, 'np.random.default_rng(3).standard_normal(5000) / 3', 'cell-x');
    expect(r.text).toContain('...');
    const bridge = new KernelBridge({ kernel });
    const a = await bridge.readArray({
      kind: 'cell',
      cellId: 'cell-x',
      executionCount: r.executionCount!
    });
    expect(a.shape).toEqual([5000]);
    expect(sha(a.data)).toBe(await kernelSha(`Out[${r.executionCount}]`, false));
    bridge.dispose();
  });
});
