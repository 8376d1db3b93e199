/**
 * A real `jupyter server` from the project's venv, for integration tests.
 *
 * Binds 127.0.0.1 on a random free port with a random token; every JUPYTER_*_DIR and
 * IPYTHONDIR points into a fresh folder under test-artifacts/ (git-ignored), so nothing outside
 * the work tree is touched. {@link JupyterServer.stop} stops it by PID (SIGTERM, then SIGKILL
 * of its process group) and is safe to call twice; a process 'exit' hook calls it too, so a
 * failing test run does not leave a server behind.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { mkdirSync, existsSync, createWriteStream, readdirSync, rmSync, statSync } from 'node:fs';
import { createServer } from 'node:net';
import path from 'node:path';
import { KernelManager, ServerConnection, type Kernel } from '@jupyterlab/services';
import WebSocket from 'ws';

/** The repository root: the nearest folder above this file with a package.json (this file
 * also runs compiled from .bench/ for the benchmark). */
export const REPO_ROOT = ((): string => {
  let d = __dirname;
  while (!existsSync(path.join(d, 'package.json')) && path.dirname(d) !== d) {
    d = path.dirname(d);
  }
  return d;
})();
export const VENV_BIN = path.join(REPO_ROOT, '.venv', 'bin');
export const PYTHON = path.join(VENV_BIN, 'python');

export interface JupyterServer {
  baseUrl: string;
  token: string;
  pid: number;
  dir: string;
  settings: ServerConnection.ISettings;
  /** A KernelManager bound to this server (polling kept slow: tests drive it). */
  kernels: KernelManager;
  startKernel(): Promise<Kernel.IKernelConnection>;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

const running = new Set<ChildProcess>();
process.on('exit', () => {
  for (const child of running) {
    killGroup(child, 'SIGKILL');
  }
});

function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (child.pid === undefined || child.exitCode !== null || child.signalCode !== null) {
    return;
  }
  try {
    // The server was spawned detached as its own process group leader: its kernels are in
    // the same group, so this stops them too.
    process.kill(-child.pid, signal);
  } catch {
    try {
      process.kill(child.pid, signal);
    } catch {
      // Already gone.
    }
  }
}

/** Keeps the newest `keep` run folders (their server.log helps after a failure). */
function pruneOldRuns(parent: string, keep: number): void {
  if (!existsSync(parent)) {
    return;
  }
  const runs = readdirSync(parent)
    .map(name => ({ name, t: statSync(path.join(parent, name)).mtimeMs }))
    .sort((a, b) => b.t - a.t);
  for (const r of runs.slice(keep)) {
    rmSync(path.join(parent, r.name), { recursive: true, force: true });
  }
}

/** Starts a server and waits until its REST API answers. */
export async function startServer(
  label = 'it',
  options: { env?: Record<string, string | undefined> } = {}
): Promise<JupyterServer> {
  if (!existsSync(path.join(VENV_BIN, 'jupyter'))) {
    throw new Error(
      `No .venv with Jupyter at ${path.relative(process.cwd(), VENV_BIN)}: create it first (see README).`
    );
  }
  const id = `${label}-${Date.now()}-${randomBytes(3).toString('hex')}`;
  const parent = path.join(REPO_ROOT, 'test-artifacts', 'integration');
  pruneOldRuns(parent, 30);
  const dir = path.join(parent, id);
  const sub = (name: string): string => {
    const d = path.join(dir, name);
    mkdirSync(d, { recursive: true });
    return d;
  };
  const root = sub('root');
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    JUPYTER_CONFIG_DIR: sub('config'),
    JUPYTER_DATA_DIR: sub('data'),
    JUPYTER_RUNTIME_DIR: sub('runtime'),
    IPYTHONDIR: sub('ipython'),
    JUPYTER_PLATFORM_DIRS: '1',
    JUPYTER_NO_CONFIG: '1',
    PYTHONDONTWRITEBYTECODE: '1',
    PATH: `${VENV_BIN}${path.delimiter}${process.env.PATH ?? ''}`
  };
  for (const [k, v] of Object.entries(options.env ?? {})) {
    if (v === undefined) {
      delete env[k];
    } else {
      env[k] = v;
    }
  }
  for (const k of Object.keys(env)) {
    if (k.startsWith('JUPYTER_') && k.endsWith('_DIR') && !env[k]!.startsWith(dir)) {
      env[k] = sub(k.toLowerCase());
    }
  }
  const port = await freePort();
  const token = randomBytes(24).toString('hex');
  const log = createWriteStream(path.join(dir, 'server.log'));
  const child = spawn(
    path.join(VENV_BIN, 'jupyter'),
    [
      'server',
      '--no-browser',
      '--ip=127.0.0.1',
      `--port=${port}`,
      '--port-retries=0',
      `--IdentityProvider.token=${token}`,
      `--ServerApp.root_dir=${root}`,
      ...(process.getuid?.() === 0 ? ['--allow-root'] : []),
      '--MappingKernelManager.cull_idle_timeout=0',
      '--KernelRestarter.restart_limit=5'
    ],
    { cwd: root, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] }
  );
  running.add(child);
  child.stdout!.pipe(log);
  child.stderr!.pipe(log);
  const baseUrl = `http://127.0.0.1:${port}/`;
  let stopped: Promise<void> | null = null;
  const stop = (): Promise<void> => {
    if (stopped) {
      return stopped;
    }
    stopped = new Promise<void>(resolve => {
      if (child.exitCode !== null || child.signalCode !== null) {
        running.delete(child);
        resolve();
        return;
      }
      const hard = setTimeout(() => killGroup(child, 'SIGKILL'), 5000);
      child.once('exit', () => {
        clearTimeout(hard);
        // Kernels left in the group (if the server died first) go too.
        killGroup(child, 'SIGKILL');
        running.delete(child);
        resolve();
      });
      killGroup(child, 'SIGTERM');
    });
    return stopped;
  };
  try {
    await waitReady(baseUrl, token, child, 60000);
  } catch (e) {
    await stop();
    throw e;
  }
  const settings = ServerConnection.makeSettings({
    baseUrl,
    wsUrl: `ws://127.0.0.1:${port}/`,
    token,
    appendToken: true,
    WebSocket: WebSocket as unknown as typeof globalThis.WebSocket
  });
  const kernels = new KernelManager({ serverSettings: settings });
  await kernels.ready;
  return {
    baseUrl,
    token,
    pid: child.pid!,
    dir,
    settings,
    kernels,
    startKernel: async () => {
      const k = await kernels.startNew({ name: 'python3' });
      await k.info;
      return k;
    },
    stop: async () => {
      kernels.dispose();
      await stop();
    }
  };
}

async function waitReady(
  baseUrl: string,
  token: string,
  child: ChildProcess,
  timeoutMs: number
): Promise<void> {
  const until = Date.now() + timeoutMs;
  let last = '';
  while (Date.now() < until) {
    if (child.exitCode !== null) {
      throw new Error(`jupyter server exited with code ${child.exitCode} before it was ready`);
    }
    try {
      const r = await fetch(`${baseUrl}api/status`, {
        headers: { Authorization: `token ${token}` }
      });
      if (r.ok) {
        return;
      }
      last = `HTTP ${r.status}`;
    } catch (e) {
      last = (e as Error).message;
    }
    await new Promise(resolve => setTimeout(resolve, 200));
  }
  throw new Error(`jupyter server not ready after ${timeoutMs} ms (${last})`);
}

/**
 * Runs `code` as a normal (visible, history-storing) cell, as a user would, and returns the
 * reply content (with execution_count) and any text/plain result.
 */
export async function runCell(
  kernel: Kernel.IKernelConnection,
  code: string,
  cellId?: string
): Promise<{ status: string; executionCount: number | null; text: string | null; stdout: string }> {
  const future = kernel.requestExecute(
    { code, store_history: true, silent: false, stop_on_error: true },
    true,
    cellId ? { cellId } : undefined
  );
  let text: string | null = null;
  let stdout = '';
  future.onIOPub = msg => {
    if (msg.header.msg_type === 'execute_result') {
      const d = (msg.content as { data: Record<string, unknown> }).data;
      text = typeof d['text/plain'] === 'string' ? (d['text/plain'] as string) : null;
    } else if (msg.header.msg_type === 'stream') {
      stdout += (msg.content as { text: string }).text;
    } else if (msg.header.msg_type === 'error') {
      stdout +=
        (msg.content as { ename: string; evalue: string }).ename +
        ': ' +
        (msg.content as { evalue: string }).evalue;
    }
  };
  const reply = await future.done;
  const content = reply.content as { status: string; execution_count?: number };
  return {
    status: content.status,
    executionCount: typeof content.execution_count === 'number' ? content.execution_count : null,
    text,
    stdout
  };
}

/** Evaluates a Python expression silently and returns its text/plain (test-side checks). */
export async function evalText(kernel: Kernel.IKernelConnection, expr: string): Promise<string> {
  const reply = await kernel.requestExecute({
    code: '',
    silent: true,
    store_history: false,
    user_expressions: { r: expr }
  }).done;
  const r = (
    reply.content as unknown as {
      user_expressions: Record<
        string,
        { status: string; data?: Record<string, string>; ename?: string; evalue?: string }
      >;
    }
  ).user_expressions.r;
  if (r.status !== 'ok') {
    throw new Error(`${expr}: ${r.ename}: ${r.evalue}`);
  }
  return r.data!['text/plain'];
}

// @jupyterlab/services logs every websocket it opens with console.debug; keep test output
// readable by dropping just those lines.
const debug = console.debug.bind(console);
console.debug = (...args: unknown[]): void => {
  if (typeof args[0] === 'string' && args[0].startsWith('Starting WebSocket')) {
    return;
  }
  debug(...args);
};

/** SHA-256 (hex) of a Float64Array's bytes, as the kernel-side checks hash them. */
export function sha256Of(d: Float64Array): string {
  return createHash('sha256')
    .update(new Uint8Array(d.buffer, d.byteOffset, d.byteLength))
    .digest('hex');
}

/**
 * SHA-256 (hex) of `np.ascontiguousarray(expr, '<f8' or '<c16').tobytes()` in the kernel: numpy's
 * own conversion of each dtype to float64/complex128, the reference for what a read returns.
 */
export async function kernelSha256(
  kernel: Kernel.IKernelConnection,
  expr: string,
  complex: boolean
): Promise<string> {
  const t = await evalText(
    kernel,
    `__import__('hashlib').sha256(__import__('numpy').ascontiguousarray(${expr}, dtype='${complex ? '<c16' : '<f8'}').tobytes()).hexdigest()`
  );
  return t.replace(/'/g, '');
}
