/**
 * The job layer's public face for the workbench (main thread): the pool, its browser factory,
 * the protocol's spec and result types, and the memory estimate. The worker entry itself
 * (worker.ts) is loaded by client.ts as a chunk of its own and is not exported.
 */
export { createBrowserWorkerPool, createJobWorker, webWorkerTransport } from './client';
export {
  WorkerPool,
  type JobHandle,
  type JobOutcome,
  type JobProgress,
  type PoolOptions,
  type RunOptions,
  type SweepHandle
} from './pool';
export type { TransportFactory, WorkerTransport } from './transport';
export * from './protocol';
export { estimateJobBytes, expandSweep, type MemoryEstimate } from './jobs';
export { workerSpectralCompute, contiguousRow, type SpectralCompute } from './spectral-client';
