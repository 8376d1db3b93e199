/**
 * The job worker's entry. In the browser it is loaded as
 * `new Worker(new URL('./worker.js', import.meta.url))` (client.ts), which webpack turns into a
 * chunk of its own with its own runtime: nothing here or below may import a JupyterLab or DOM
 * package (it compiles with tsconfig.worker.json: the WebWorker lib, no DOM). The global scope is
 * reached through globalThis so that a Node worker thread can stand in for it (the tests give it
 * postMessage and addEventListener).
 */
import type { FromWorker, ToWorker } from './protocol';
import { serve } from './serve';

interface WorkerScope {
  postMessage(message: FromWorker, transfer: ArrayBuffer[]): void;
  addEventListener(type: 'message', handler: (event: { data: ToWorker }) => void): void;
}

const scope = globalThis as unknown as WorkerScope;

serve({
  post: (message, transfer) => scope.postMessage(message, transfer),
  listen: handler => scope.addEventListener('message', event => handler(event.data))
});
