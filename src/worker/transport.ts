/**
 * The seam between the pool and a worker: the browser's Web Worker (client.ts) and a Node worker
 * thread (the tests and the benchmark) both fit it.
 */
import type { FromWorker, ToWorker } from './protocol';

export interface WorkerTransport {
  /** Sends a message; the buffers in `transfer` move to the worker (detached here). */
  postMessage(message: ToWorker, transfer: ArrayBuffer[]): void;
  /** Every message from the worker. */
  onMessage(handler: (message: FromWorker) => void): void;
  /**
   * The worker is gone or unusable: an uncaught error, a failed load, running out of memory,
   * an exit. Called with a reason a user can read; may be called more than once.
   */
  onFailure(handler: (reason: string) => void): void;
  /** Stops the worker at once. */
  terminate(): void;
}

/** Makes a new worker. */
export type TransportFactory = () => WorkerTransport;
