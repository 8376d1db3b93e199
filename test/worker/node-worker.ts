/**
 * Runs the real worker entry (src/worker/worker.ts, and everything it imports) in a Node worker
 * thread: the sources are transpiled to CommonJS (typescript's transpileModule, no type check:
 * `tsc -b` checks them) into a cache folder under node_modules, and a small shim gives the
 * thread the two globals a Web Worker has (postMessage, addEventListener('message')). Jest's
 * transform does not reach a worker thread, hence the compile step.
 */
import * as fs from 'fs';
import * as path from 'path';
import * as ts from 'typescript';
import { Worker, type ResourceLimits } from 'worker_threads';
import type { FromWorker, ToWorker } from '../../src/worker/protocol';
import type { WorkerTransport } from '../../src/worker/transport';

export const ROOT = path.resolve(__dirname, '../..');

/** Test-only behaviours of the shim (never of the worker itself). */
export interface ShimOptions {
  /** Exit the thread (code 3) when a `run` message arrives: a worker that dies mid-job. */
  exitOnRun?: boolean;
  /** Throw an uncaught error when a `run` message arrives. */
  throwOnRun?: boolean;
  /** Spin for ever when a `run` message arrives: a job that never reaches a chunk border. */
  spinOnRun?: boolean;
  /** Throw while loading, before `ready`: a worker that cannot start. */
  throwOnLoad?: boolean;
  resourceLimits?: ResourceLimits;
}

const SHIM = `
const { parentPort, workerData } = require('worker_threads');
const o = workerData || {};
if (o.throwOnLoad) { throw new Error('the worker failed while loading (test shim)'); }
const handlers = [];
globalThis.postMessage = (m, t) => parentPort.postMessage(m, t);
globalThis.addEventListener = (type, h) => { if (type === 'message') handlers.push(h); };
parentPort.on('message', data => {
  if (data && data.type === 'run') {
    if (o.exitOnRun) { process.exit(3); }
    if (o.spinOnRun) { for (;;) {} }
    if (o.throwOnRun) { setImmediate(() => { throw new Error('the worker threw (test shim)'); }); return; }
  }
  for (const h of handlers) h({ data });
});
require('./worker/worker.js');
`;

/**
 * Transpiles src/core and src/worker of the repository at `root` into a fresh folder under its
 * node_modules/.cache; returns the shim's path.
 */
export function buildNodeWorker(tag = String(process.pid), root = ROOT): string {
  const out = path.join(root, 'node_modules', '.cache', 'perpend-worker', tag);
  fs.rmSync(out, { recursive: true, force: true });
  for (const dir of ['core', 'worker']) {
    const walk = (rel: string): void => {
      const abs = path.join(root, 'src', rel);
      for (const entry of fs.readdirSync(abs, { withFileTypes: true })) {
        const r = path.join(rel, entry.name);
        if (entry.isDirectory()) {
          walk(r);
        } else if (
          entry.name.endsWith('.ts') &&
          !entry.name.endsWith('.d.ts') &&
          r !== path.join('worker', 'client.ts')
        ) {
          const js = ts.transpileModule(fs.readFileSync(path.join(root, 'src', r), 'utf8'), {
            compilerOptions: {
              module: ts.ModuleKind.CommonJS,
              target: ts.ScriptTarget.ES2020,
              esModuleInterop: true
            },
            fileName: r
          }).outputText;
          const dest = path.join(out, r.replace(/\.ts$/, '.js'));
          fs.mkdirSync(path.dirname(dest), { recursive: true });
          fs.writeFileSync(dest, js);
        }
      }
    };
    walk(dir);
  }
  const shim = path.join(out, 'node-entry.js');
  fs.writeFileSync(shim, SHIM);
  return shim;
}

/** A transport over a Node worker thread running the shim. */
export function nodeTransport(shim: string, options: ShimOptions = {}): WorkerTransport {
  const { resourceLimits, ...data } = options;
  const w = new Worker(shim, { workerData: data, resourceLimits });
  let exited = false;
  return {
    postMessage: (m: ToWorker, transfer: ArrayBuffer[]) => w.postMessage(m, transfer),
    onMessage: h => w.on('message', (m: FromWorker) => h(m)),
    onFailure: h => {
      w.on('error', (e: Error & { code?: string }) =>
        h(`${e.message}${e.code ? ` (${e.code})` : ''}`)
      );
      w.on('exit', code => {
        if (!exited) {
          h(`the worker exited with code ${code}`);
        }
      });
    },
    terminate: () => {
      exited = true;
      void w.terminate();
    }
  };
}
