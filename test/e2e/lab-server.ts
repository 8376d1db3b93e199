/**
 * Starts and stops the real `jupyter lab` from the project's .venv for the browser tests: loopback
 * only, a random free port and token, every Jupyter directory inside test-artifacts/, a root folder
 * holding a fresh copy of the demo notebook. Stopped by PID.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';

/** The repository: the nearest folder above with a package.json (test/e2e, or .bench/test/e2e). */
export const REPO = ((): string => {
  for (let d = __dirname; ; d = path.dirname(d)) {
    if (fs.existsSync(path.join(d, 'package.json'))) {
      return d;
    }
    if (path.dirname(d) === d) {
      return path.resolve(__dirname, '../..');
    }
  }
})();
export const ARTIFACTS = path.join(REPO, 'test-artifacts');
export const STATE_FILE = path.join(ARTIFACTS, 'e2e-server.json');

export interface ILabState {
  pid: number;
  port: number;
  token: string;
  baseUrl: string;
  rootDir: string;
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export async function startLab(): Promise<{ state: ILabState; child: ChildProcess }> {
  const venvBin = path.join(REPO, '.venv', 'bin');
  if (!fs.existsSync(path.join(venvBin, 'jupyter'))) {
    throw new Error('No .venv with JupyterLab: run scripts/setup.sh first');
  }
  const home = path.join(ARTIFACTS, 'e2e-jupyter');
  fs.rmSync(home, { recursive: true, force: true });
  const rootDir = path.join(home, 'root');
  fs.mkdirSync(rootDir, { recursive: true });
  fs.copyFileSync(
    path.join(REPO, 'demo', 'perpend-demo.ipynb'),
    path.join(rootDir, 'perpend-demo.ipynb')
  );
  // No news prompt in the screenshots (a JupyterLab user setting, written where this server reads).
  const notification = path.join(home, 'settings', '@jupyterlab', 'apputils-extension');
  fs.mkdirSync(notification, { recursive: true });
  fs.writeFileSync(
    path.join(notification, 'notification.jupyterlab-settings'),
    JSON.stringify({ fetchNews: 'false' })
  );
  const port = await freePort();
  const token = crypto.randomBytes(24).toString('hex');
  const env = {
    ...process.env,
    JUPYTER_CONFIG_DIR: path.join(home, 'config'),
    JUPYTER_DATA_DIR: path.join(home, 'data'),
    JUPYTER_RUNTIME_DIR: path.join(home, 'runtime'),
    IPYTHONDIR: path.join(home, 'ipython'),
    JUPYTERLAB_SETTINGS_DIR: path.join(home, 'settings'),
    JUPYTERLAB_WORKSPACES_DIR: path.join(home, 'workspaces'),
    PATH: `${venvBin}:${process.env.PATH ?? ''}`
  };
  const log = fs.openSync(path.join(ARTIFACTS, 'e2e-jupyter.log'), 'w');
  const child = spawn(
    path.join(venvBin, 'jupyter'),
    [
      'lab',
      '--no-browser',
      '--ip=127.0.0.1',
      `--port=${port}`,
      '--port-retries=0',
      `--IdentityProvider.token=${token}`,
      `--ServerApp.root_dir=${rootDir}`,
      '--LabApp.news_url=',
      '--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate',
      // CI and the development machines run as root.
      ...(process.getuid?.() === 0 ? ['--allow-root'] : [])
    ],
    { env, stdio: ['ignore', log, log], detached: true }
  );
  const baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60000;
  for (;;) {
    if (child.exitCode !== null) {
      throw new Error(
        `jupyter lab exited with ${child.exitCode}; see test-artifacts/e2e-jupyter.log`
      );
    }
    try {
      const r = await fetch(`${baseUrl}/api/status?token=${token}`);
      if (r.ok) {
        break;
      }
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) {
      stopPid(child.pid!);
      throw new Error('jupyter lab did not answer within 60 s; see test-artifacts/e2e-jupyter.log');
    }
    await new Promise(r => setTimeout(r, 250));
  }
  const state: ILabState = { pid: child.pid!, port, token, baseUrl, rootDir };
  return { state, child };
}

/** Ends the server's whole process group (the server and its kernels). */
export function stopPid(pid: number): void {
  for (const signal of ['SIGTERM', 'SIGKILL'] as const) {
    try {
      process.kill(-pid, signal);
    } catch {
      return;
    }
    if (signal === 'SIGTERM') {
      const until = Date.now() + 5000;
      while (Date.now() < until) {
        try {
          process.kill(-pid, 0);
        } catch {
          return;
        }
        Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 100);
      }
    }
  }
}
