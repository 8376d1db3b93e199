/**
 * The worker side of the protocol, independent of where it runs: a Web Worker (worker.ts) or a
 * Node worker thread (the tests and the benchmark). It announces `ready`, runs each `run` with a
 * context whose checkpoint posts progress, yields to the event loop (a MessageChannel task in a
 * browser, not setTimeout, which browsers clamp to 4 ms when nested; setImmediate in Node) so
 * that a `cancel` is seen at the next chunk border, and answers with exactly one of result / failed / cancelled.
 */
import { HeldArrays } from './held-arrays';
import {
  PROTOCOL_VERSION,
  transferables,
  type FromWorker,
  type JobSpec,
  type SupplyMessage,
  type ToWorker
} from './protocol';
import { JobCancelled, runJob, type JobContext } from './jobs';
import { PartSender } from './result-parts';

/** How the worker talks to its owner. */
export interface Endpoint {
  post(message: FromWorker, transfer: ArrayBuffer[]): void;
  listen(handler: (message: ToWorker) => void): void;
}

/** Minimum interval between two progress messages of one job, in milliseconds. */
const PROGRESS_INTERVAL_MS = 100;

/**
 * A yield to the event loop that lets pending messages in (a macrotask, unclamped). In a browser
 * every message on a port is a task of its own, queued behind a cancel that arrived earlier. Node
 * drains a port's queue in one go, running microtasks between messages, so a job that posts its
 * next yield from there would starve the thread's other port: there, setImmediate (the check
 * phase, after the poll phase that delivers the owner's messages) is the yield.
 */
export function defaultYield(): () => Promise<void> {
  const g = globalThis as { setImmediate?: (f: () => void) => unknown };
  if (typeof g.setImmediate === 'function') {
    const si = g.setImmediate;
    return () => new Promise<void>(resolve => si(resolve));
  }
  return messageChannelYield();
}

/** A yield through a MessageChannel: one task per yield, not clamped as nested timers are. */
export function messageChannelYield(): () => Promise<void> {
  const channel = new MessageChannel();
  const waiting: (() => void)[] = [];
  channel.port1.onmessage = () => {
    const next = waiting.shift();
    if (next) {
      next();
    }
  };
  return () =>
    new Promise<void>(resolve => {
      waiting.push(resolve);
      channel.port2.postMessage(0);
    });
}

/** Serves jobs on an endpoint. */
export function serve(endpoint: Endpoint, yieldNow: () => Promise<void> = defaultYield()): void {
  const cancelled = new Set<number>();
  const running = new Set<number>();
  // inputs kept for later jobs, and the runs waiting for the page to send named inputs
  const held = new HeldArrays();
  const supplies = new Map<number, (m: SupplyMessage) => void>();

  const run = async (
    id: number,
    spec: JobSpec,
    holdBytes: number,
    partsAhead: boolean
  ): Promise<void> => {
    running.add(id);
    let t0 = performance.now();
    let lastPost = -Infinity;
    let lastTotal = 0;
    const unit = spec?.kind === 'adaptive-filter' ? 'samples' : 'steps';
    const parts = new PartSender((m, transfer) => endpoint.post(m, transfer), id);
    const ctx: JobContext = {
      part: partsAhead ? (key, array, filled) => parts.note(key, array, filled) : undefined,
      checkpoint: async (done, total, stage) => {
        lastTotal = total;
        const now = performance.now();
        if (now - lastPost >= PROGRESS_INTERVAL_MS || done >= total) {
          lastPost = now;
          endpoint.post({ type: 'progress', id, done, total, unit, stage }, []);
        }
        await yieldNow();
        if (cancelled.has(id)) {
          throw new JobCancelled(done);
        }
      }
    };
    try {
      const kept = await held.fill(
        spec,
        holdBytes,
        names =>
          new Promise((resolve, reject) => {
            supplies.set(id, m => ('error' in m ? reject(new Error(m.error)) : resolve(m.arrays)));
            endpoint.post({ type: 'need', id, names }, []);
          })
      );
      if (cancelled.has(id)) {
        throw new JobCancelled(0);
      }
      // the job's time is its own, not the page's copying of inputs it was asked for
      t0 = performance.now();
      const result = parts.strip(await runJob(spec, ctx));
      const ms = performance.now() - t0;
      endpoint.post(
        {
          type: 'result',
          id,
          result,
          timing: { ms, perSecond: unit === 'samples' && ms > 0 ? lastTotal / (ms / 1000) : null }
        },
        // an input kept here stays here (a result never holds one, but a copy costs little)
        transferables(result).filter(b => !kept.has(b))
      );
    } catch (reason) {
      if (reason instanceof JobCancelled || cancelled.has(id)) {
        // (a page that stopped sending named inputs after a cancel answers with an error)
        const done = reason instanceof JobCancelled ? reason.done : 0;
        endpoint.post({ type: 'cancelled', id, done }, []);
      } else {
        const e = reason instanceof Error ? reason : new Error(String(reason));
        endpoint.post({ type: 'failed', id, error: { name: e.name, message: e.message } }, []);
      }
    } finally {
      running.delete(id);
      cancelled.delete(id);
      supplies.delete(id);
    }
  };

  endpoint.listen(message => {
    if (message?.type === 'run') {
      void run(message.id, message.spec, message.holdBytes ?? 0, message.partsAhead === true);
    } else if (message?.type === 'supply') {
      const answer = supplies.get(message.id);
      supplies.delete(message.id);
      answer?.(message);
    } else if (message?.type === 'cancel') {
      if (running.has(message.id)) {
        cancelled.add(message.id);
      }
    }
  });
  endpoint.post({ type: 'ready', protocol: PROTOCOL_VERSION }, []);
}
