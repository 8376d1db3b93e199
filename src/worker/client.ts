/**
 * The browser side: a Web Worker transport and the pool factory the workbench calls. The worker
 * is created as `new Worker(new URL('./worker.js', import.meta.url))`, the form webpack turns
 * into a chunk of its own, resolved against the extension's public path (DESIGN §5; a Blob URL
 * would be blocked by a `worker-src 'self'` content policy).
 */
import { WorkerPool, type PoolOptions } from './pool';
import type { FromWorker, ToWorker } from './protocol';
import type { WorkerTransport } from './transport';

/** A transport over a Web Worker. */
export function webWorkerTransport(worker: Worker): WorkerTransport {
  return {
    postMessage: (message: ToWorker, transfer: ArrayBuffer[]) =>
      worker.postMessage(message, transfer),
    onMessage: handler =>
      worker.addEventListener('message', (e: MessageEvent<FromWorker>) => handler(e.data)),
    onFailure: handler => {
      worker.addEventListener('error', (e: ErrorEvent) => {
        e.preventDefault();
        handler(
          e.message
            ? `${e.message} (an uncaught error, or the browser stopped the worker, e.g. out of memory)`
            : 'the worker failed to load or ran out of memory'
        );
      });
      worker.addEventListener('messageerror', () =>
        handler('a message from the worker could not be read (messageerror)')
      );
    },
    terminate: () => worker.terminate()
  };
}

/** Makes the job worker (its own webpack chunk). */
export function createJobWorker(): Worker {
  return new Worker(
    // ts-expect-error would fail the extension build, where there is no error to expect
    // eslint-disable-next-line @typescript-eslint/ban-ts-comment
    // @ts-ignore TS1343: import.meta is fine in the extension's ES module output; the CommonJS
    // type check of tests (tsconfig.test.json) never loads this file.
    new URL('./worker.js', import.meta.url),
    { name: 'perpend-jobs' }
  );
}

/** A pool of Web Workers; options as WorkerPool's, without the transport. */
export function createBrowserWorkerPool(
  options: Omit<PoolOptions, 'createTransport'> = {}
): WorkerPool {
  return new WorkerPool({
    ...options,
    createTransport: () => webWorkerTransport(createJobWorker())
  });
}
