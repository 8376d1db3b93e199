/**
 * Kernel bridge throughput: a real `jupyter server` + ipykernel from the project's venv,
 * driven from Node through @jupyterlab/services, as the panel does in the browser.
 *
 *   npm run bench:bridge            readable table
 *   npm run bench:bridge -- --json  JSON lines (DESIGN §9): {"env"}, then one per case
 *
 * Cases: kernel → Perpend ("read") and Perpend → kernel ("write"), binary comm and base64
 * (user_expressions) paths, float64 1e5/1e6/1e7 and complex128 1e6. MB = 10^6 bytes of
 * float64/complex128 payload; ms = median of the timed repeats after one warm-up.
 * Targets (issue 5): read binary 1e7 float64 ≥ 200 MB/s, write binary 1e7 float64 ≥ 100 MB/s.
 * Exits 0 whatever it measures.
 */
import { execSync } from 'node:child_process';
import { cpus } from 'node:os';
import { KernelManager, ServerConnection } from '@jupyterlab/services';
import WebSocket from 'ws';
import { KernelBridge, type ArrayData } from '../src/bridge';
import { evalText, runCell, startServer, type JupyterServer } from '../test/integration/harness';

const json = process.argv.includes('--json');
const REPEATS = 5;

interface Case {
  name: string;
  direction: 'read' | 'write';
  transport: 'comm' | 'base64';
  elements: number;
  complex: boolean;
}

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function commit(): string {
  try {
    return execSync('git rev-parse --short HEAD', {
      encoding: 'utf8',
      stdio: ['ignore', 'pipe', 'ignore']
    }).trim();
  } catch {
    return 'unknown';
  }
}

async function main(): Promise<void> {
  let server: JupyterServer | null = null;
  try {
    // numpy in the kernel: one BLAS thread, OpenBLAS core type and L2 size left to detect
    // (CONVENTIONS: set for this child process only).
    server = await startServer('bench', {
      env: { OPENBLAS_NUM_THREADS: '1', OPENBLAS_CORETYPE: undefined, OPENBLAS_L2_SIZE: undefined }
    });
    const kernel = await server.startKernel();
    await runCell(kernel, 'import numpy as np');
    const numpy = (await evalText(kernel, 'np.__version__')).replace(/'/g, '');
    let blas = 'unknown';
    try {
      blas = (
        await evalText(
          kernel,
          "'; '.join(f\"{d.get('internal_api')} {d.get('version')} {d.get('architecture')} threads={d.get('num_threads')}\" for d in __import__('threadpoolctl').threadpool_info())"
        )
      ).replace(/^'|'$/g, '');
    } catch {
      blas = (
        await evalText(
          kernel,
          "str(np.__config__.CONFIG.get('Build Dependencies', {}).get('blas', {}).get('name'))"
        )
      ).replace(/'/g, '');
    }
    const env = {
      commit: commit(),
      node: process.version,
      numpy,
      blas,
      cpu: cpus()[0]?.model ?? 'unknown',
      cpus: cpus().length,
      jupyter_server: (
        await evalText(
          kernel,
          "__import__('importlib.metadata').metadata.version('jupyter_server')"
        )
      ).replace(/'/g, ''),
      ipykernel: (await evalText(kernel, "__import__('ipykernel').__version__")).replace(/'/g, ''),
      repeats: REPEATS,
      mb: '1e6 bytes of float64/complex128 payload'
    };
    if (json) {
      console.log(JSON.stringify({ env }));
    } else {
      console.log('Perpend kernel bridge benchmark (real jupyter server + ipykernel, Node client)');
      console.log(
        Object.entries(env)
          .map(([k, v]) => `  ${k}: ${v}`)
          .join('\n')
      );
      console.log(`  ms: median of ${REPEATS} after 1 warm-up; MB = 10^6 bytes\n`);
      console.log(
        [
          'name'.padEnd(28),
          'elements'.padStart(10),
          'bytes'.padStart(11),
          'ms'.padStart(9),
          'MB/s'.padStart(8),
          '  target'
        ].join(' ')
      );
    }
    const cases: Case[] = [];
    for (const direction of ['read', 'write'] as const) {
      for (const transport of ['comm', 'base64'] as const) {
        for (const [elements, complex] of [
          [1e5, false],
          [1e6, false],
          [1e7, false],
          [1e6, true]
        ] as Array<[number, boolean]>) {
          cases.push({
            name: `${direction} ${transport === 'comm' ? 'binary' : 'base64'} ${complex ? 'complex128' : 'float64'}`,
            direction,
            transport,
            elements,
            complex
          });
        }
      }
    }
    const bridges = {
      comm: new KernelBridge({ kernel, transport: 'comm', maxBytes: 2 ** 31 }),
      base64: new KernelBridge({ kernel, transport: 'base64', maxBytes: 2 ** 31 })
    };
    for (const c of cases) {
      const bridge = bridges[c.transport];
      const bytes = c.elements * (c.complex ? 16 : 8);
      const times: number[] = [];
      if (c.direction === 'read') {
        await runCell(
          kernel,
          `bench_src = np.random.default_rng(1).standard_normal(${c.elements * (c.complex ? 2 : 1)})${c.complex ? '.view(np.complex128)' : ''}`
        );
        for (let r = 0; r <= REPEATS; r++) {
          (globalThis as { gc?: () => void }).gc?.();
          const t0 = performance.now();
          const a = await bridge.readArray({ kind: 'variable', name: 'bench_src' });
          const t1 = performance.now();
          if (a.data.byteLength !== bytes) {
            throw new Error(`${c.name}: got ${a.data.byteLength} bytes`);
          }
          if (r > 0) {
            times.push(t1 - t0);
          }
        }
      } else {
        const data = new Float64Array(c.elements * (c.complex ? 2 : 1));
        for (let i = 0; i < data.length; i++) {
          data[i] = Math.sin(i) * 1e3;
        }
        const arr: ArrayData = {
          data,
          shape: [c.elements],
          complex: c.complex,
          dtype: c.complex ? 'complex128' : 'float64'
        };
        for (let r = 0; r <= REPEATS; r++) {
          (globalThis as { gc?: () => void }).gc?.();
          const t0 = performance.now();
          const w = await bridge.writeArray('bench_dst', arr, { overwrite: true });
          const t1 = performance.now();
          if (w.status !== 'written') {
            throw new Error(`${c.name}: ${w.status}`);
          }
          if (r > 0) {
            times.push(t1 - t0);
          }
        }
        await runCell(kernel, 'del bench_dst');
      }
      const ms = median(times);
      const mbps = bytes / 1e6 / (ms / 1000);
      const out: Record<string, unknown> = {
        name: c.name,
        elements: c.elements,
        bytes,
        dtype: c.complex ? 'complex128' : 'float64',
        complex: c.complex,
        ms: Number(ms.toFixed(2)),
        mb_per_s: Number(mbps.toFixed(1)),
        repeats: REPEATS
      };
      if (c.transport === 'comm' && !c.complex && c.elements === 1e7) {
        const target = c.direction === 'read' ? 200 : 100;
        out.target = `>= ${target} MB/s`;
        out.met = mbps >= target;
      }
      if (json) {
        console.log(JSON.stringify(out));
      } else {
        console.log(
          [
            c.name.padEnd(28),
            String(c.elements).padStart(10),
            String(bytes).padStart(11),
            ms.toFixed(1).padStart(9),
            mbps.toFixed(1).padStart(8),
            out.target ? `  ${out.target}: ${out.met ? 'met' : 'MISSED'}` : ''
          ].join(' ')
        );
      }
    }
    bridges.comm.dispose();
    bridges.base64.dispose();

    // Node's ws masks every client frame in JavaScript (bufferutil is not installed); a
    // browser masks natively. An all-zero mask makes ws skip that loop (RFC 6455 §5.3 masking
    // is XOR with the key), which shows the write cost without it. Informational: the target
    // above is judged on the ordinary client.
    class ZeroMaskWebSocket extends WebSocket {
      constructor(url: string, protocols?: string | string[]) {
        super(url, protocols, { generateMask: (mask: Buffer) => mask.fill(0) });
      }
    }
    const settings = ServerConnection.makeSettings({
      baseUrl: server.settings.baseUrl,
      wsUrl: server.settings.wsUrl,
      token: server.token,
      appendToken: true,
      WebSocket: ZeroMaskWebSocket as unknown as typeof globalThis.WebSocket
    });
    const km = new KernelManager({ serverSettings: settings });
    await km.ready;
    const k2 = km.connectTo({ model: { id: kernel.id, name: kernel.name } });
    await k2.info;
    const zm = new KernelBridge({ kernel: k2, transport: 'comm', maxBytes: 2 ** 31 });
    {
      const n = 1e7;
      const data = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        data[i] = Math.sin(i) * 1e3;
      }
      const arr: ArrayData = { data, shape: [n], complex: false, dtype: 'float64' };
      const times: number[] = [];
      for (let r = 0; r <= REPEATS; r++) {
        (globalThis as { gc?: () => void }).gc?.();
        const t0 = performance.now();
        await zm.writeArray('bench_dst', arr, { overwrite: true });
        const t1 = performance.now();
        if (r > 0) {
          times.push(t1 - t0);
        }
      }
      const ms = median(times);
      const bytes = n * 8;
      const mbps = bytes / 1e6 / (ms / 1000);
      const out = {
        name: 'write binary float64 (zero-mask ws client)',
        elements: n,
        bytes,
        dtype: 'float64',
        complex: false,
        ms: Number(ms.toFixed(2)),
        mb_per_s: Number(mbps.toFixed(1)),
        repeats: REPEATS
      };
      if (json) {
        console.log(JSON.stringify(out));
      } else {
        console.log(
          [
            out.name.padEnd(28),
            String(n).padStart(10),
            String(bytes).padStart(11),
            ms.toFixed(1).padStart(9),
            mbps.toFixed(1).padStart(8)
          ].join(' ')
        );
      }
    }
    zm.dispose();
    k2.dispose();
    km.dispose();
  } catch (e) {
    console.error('bench:bridge failed:', e instanceof Error ? e.message : e);
  } finally {
    if (server) {
      await server.stop();
    }
  }
}

void main().then(() => process.exit(0));
