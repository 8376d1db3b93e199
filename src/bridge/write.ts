/**
 * How an array is written: the name is validated, then the helper is told the name, shape and
 * byte count (`begin`, which reports a conflict and stops unless overwrite), receives the
 * bytes in chunks far below the server's 10 MiB message limit, and binds the new numpy array
 * only at `end`. Over the comm as binary buffers, or as base64 in silent executes. What the
 * replies mean, and the question asked on a conflict, are in `conflicts.ts`.
 */
import { encodeBase64 } from './base64';
import type { CommChannel } from './comm';
import { conflictResult, parseWriteReply, writtenWarnings, type WriteReply } from './conflicts';
import { BridgeError } from './errors';
import { HELPER_REF } from './helper';
import {
  badArgument,
  normalizeIdentifier,
  pyIntLiteral,
  pyStringLiteral,
  reservedName
} from './names';
import { kernelRefusal, refusalOf, reservedError } from './refusals';
import { MiB, isRecord, malformed, parseJsonExpression } from './replies';
import { inFlight, type KernelRequests } from './requests';
import type { ArrayData, TransferLimits, WriteResult } from './types';

/** One write, as both transports take it. */
interface WriteJob {
  /** The name as bound in Python (NFKC form). */
  name: string;
  shape: number[];
  complex: boolean;
  /** The bytes of the float64/complex128 data. */
  raw: Uint8Array;
  overwrite: boolean;
  /** "writing <name>", for messages and the activity line. */
  label: string;
  /** A record's handle: the array is staged as that record's entry `name`, not bound. */
  into?: number;
}

/** Writes arrays into the kernel's namespace. */
export class ArrayWriter {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _channel: CommChannel,
    private readonly _limits: TransferLimits
  ) {}

  /** See `KernelBridge.writeArray`. */
  async write(
    name: string,
    array: ArrayData,
    options: { overwrite?: boolean } = {}
  ): Promise<WriteResult> {
    const trans = this._requests.trans;
    const check = this._checkName(name);
    const pyName = check.name;
    validateArrayData(array);
    const job: WriteJob = {
      name: pyName,
      shape: array.shape.slice(),
      complex: array.complex,
      raw: new Uint8Array(array.data.buffer, array.data.byteOffset, array.data.byteLength),
      overwrite: options.overwrite === true,
      label: trans.__('writing %1', pyName)
    };
    const outcome = (await this._channel.use())
      ? await this._writeComm(job)
      : await this._writeBase64(job);
    if ('conflict' in outcome) {
      return conflictResult(trans, pyName, outcome.conflict);
    }
    const warnings = writtenWarnings(trans, pyName, check.changed, outcome.was);
    return { status: 'written', name: pyName, bytes: job.raw.byteLength, warnings };
  }

  /**
   * Writes several arrays and JSON parameters as one dict bound to `name`: each array is staged
   * in the kernel under its key (begin, chunks, end as for one array, on either transport), then
   * one request binds `{key: array, …, "params": params}` with the same replacement check as a
   * single array. Keys are Python identifiers; `params` must survive JSON.
   */
  async writeRecord(
    name: string,
    arrays: Readonly<Record<string, ArrayData>>,
    params: unknown,
    options: { overwrite?: boolean } = {}
  ): Promise<WriteResult> {
    const trans = this._requests.trans;
    const check = this._checkName(name);
    const pyName = check.name;
    const keys = Object.keys(arrays);
    if (keys.length === 0) {
      throw badArgument('arrays must hold at least one array');
    }
    for (const k of keys) {
      const c = normalizeIdentifier(k, trans);
      if (!c.ok || c.changed || k === 'params') {
        throw badArgument(
          `array key ${JSON.stringify(k)} must be a Python identifier other than "params"`
        );
      }
      validateArrayData(arrays[k]);
    }
    let paramsJson: string;
    try {
      paramsJson = JSON.stringify(params ?? null);
    } catch (e) {
      throw badArgument(`params must be JSON: ${String(e)}`);
    }
    const label = trans.__('writing %1', pyName);
    const rec = this._requests.nextId();
    let bytes = 0;
    for (const k of keys) {
      const a = arrays[k];
      const job: WriteJob = {
        name: k,
        shape: a.shape.slice(),
        complex: a.complex,
        raw: new Uint8Array(a.data.buffer, a.data.byteOffset, a.data.byteLength),
        overwrite: true,
        label,
        into: rec
      };
      bytes += job.raw.byteLength;
      const staged = (await this._channel.use())
        ? await this._writeComm(job)
        : await this._writeBase64(job);
      if ('conflict' in staged) {
        throw malformed(trans, label);
      }
    }
    const r = await this._requests.evaluate(label, {
      r: `${HELPER_REF}.w_record(${rec}, ${pyStringLiteral(pyName)}, ${pyStringLiteral(paramsJson)}, ${options.overwrite === true ? 'True' : 'False'})`
    });
    const outcome = parseWriteReply(trans, parseJsonExpression(trans, r.r, label), label);
    if (!outcome) {
      throw malformed(trans, label);
    }
    if ('conflict' in outcome) {
      return conflictResult(trans, pyName, outcome.conflict);
    }
    const warnings = writtenWarnings(trans, pyName, check.changed, outcome.was);
    return { status: 'written', name: pyName, bytes, warnings };
  }

  /** A name to bind: an identifier in NFKC form, not one the interpreter or IPython keeps. */
  private _checkName(name: string): { name: string; changed: boolean } {
    const trans = this._requests.trans;
    const check = normalizeIdentifier(name, trans);
    if (!check.ok) {
      throw new BridgeError(
        'invalid-name',
        trans.__('Cannot write to %1: %2.', JSON.stringify(String(name).slice(0, 40)), check.reason)
      );
    }
    // Not a question for the user: replacing these breaks the interpreter or IPython (the
    // helper refuses them as well).
    const reserved = reservedName(check.name);
    if (reserved !== null) {
      throw reservedError(trans, check.name, reserved);
    }
    return { name: check.name, changed: check.changed };
  }

  /** Begin, chunks, end on the comm; a small write in one burst. */
  private async _writeComm(job: WriteJob): Promise<WriteReply> {
    const { name, raw, label } = job;
    const requests = this._requests;
    const trans = requests.trans;
    const channel = this._channel;
    const comm = await channel.open();
    const req = requests.nextId();
    const op = requests.newOp(label);
    try {
      let waiter: {
        resolve: (d: Record<string, unknown>) => void;
        reject: (e: unknown) => void;
      } | null = null;
      let failure: BridgeError | null = null;
      const inbox: Record<string, unknown>[] = [];
      channel.handle(req, d => {
        op.touch();
        let err: BridgeError | null = null;
        if (d.op === 'error') {
          err = refusalOf(trans, d.code, d.detail, name, this._limits.maxBytesSetting);
        } else if (d.op === 'closed') {
          err = new BridgeError(
            'comm-closed',
            trans.__(
              'The kernel closed Perpend\'s data channel while %1. "%2" was not written; try again.',
              label,
              name
            )
          );
        } else if (waiter) {
          const w = waiter;
          waiter = null;
          w.resolve(d);
          return;
        } else {
          // Pipelined small writes: a reply may come before anyone waits for it.
          inbox.push(d);
          return;
        }
        if (err) {
          failure = err;
          if (waiter) {
            const w = waiter;
            waiter = null;
            w.reject(err);
          }
        }
      });
      const expect = (
        future: { done: Promise<unknown> },
        opName: string
      ): Promise<Record<string, unknown>> =>
        new Promise<Record<string, unknown>>((resolve, reject) => {
          const queued = inbox.shift();
          if (queued) {
            if (queued.op === opName) {
              resolve(queued);
            } else {
              reject(malformed(trans, label));
            }
            return;
          }
          if (failure) {
            reject(failure);
            return;
          }
          waiter = {
            resolve: d => (d.op === opName ? resolve(d) : reject(malformed(trans, label))),
            reject
          };
          future.done.then(
            () => reject(malformed(trans, label)),
            () => undefined
          );
        });
      const begin = channel.send(comm, op, {
        req,
        op: 'w-begin',
        name,
        shape: job.shape,
        complex: job.complex,
        nbytes: raw.byteLength,
        overwrite: job.overwrite,
        into: job.into ?? null
      });
      const cs = this._limits.writeChunk;
      // A small write goes in one burst (begin, data, end) without waiting for the kernel's
      // answer to begin: one round trip. A large one waits, so that nothing is sent when the
      // name needs confirmation.
      const small = raw.byteLength <= cs;
      if (!small) {
        const begun = await Promise.race([expect(begin, 'w-begun'), op.promise]);
        const early = parseWriteReply(trans, begun, label);
        if (early && 'conflict' in early) {
          return early;
        }
      }
      for (let offset = 0; offset < raw.byteLength; offset += cs) {
        if (failure && !small) {
          throw failure;
        }
        if (op.done) {
          await op.promise;
        }
        // A standalone ArrayBuffer per chunk: @jupyterlab/services 7.6 serialises a view's
        // whole underlying buffer, not the view.
        const end = Math.min(offset + cs, raw.byteLength);
        const chunk = raw.buffer.slice(
          raw.byteOffset + offset,
          raw.byteOffset + end
        ) as ArrayBuffer;
        channel.send(comm, op, { req, op: 'w-chunk', offset }, [chunk]);
        // Let the socket drain so that memory stays bounded on large writes.
        if (!small) {
          await yieldToEventLoop();
        }
      }
      const endF = channel.send(comm, op, { req, op: 'w-end' });
      if (small) {
        const begun = await Promise.race([expect(begin, 'w-begun'), op.promise]);
        const early = parseWriteReply(trans, begun, label);
        if (early && 'conflict' in early) {
          return early;
        }
      }
      const ended = await Promise.race([expect(endF, 'w-ended'), op.promise]);
      const r = parseWriteReply(trans, ended, label);
      if (!r) {
        throw malformed(trans, label);
      }
      return r;
    } catch (e) {
      if (channel.isCurrent(comm)) {
        try {
          comm.send({ req, op: 'w-abort' });
        } catch {
          // Best effort: the kernel drops stale staged writes on its own.
        }
      }
      throw requests.toBridgeError(e, label);
    } finally {
      channel.unhandle(req);
      requests.endOp(op);
    }
  }

  /** Begin, chunks, end as helper calls in silent executes; a small write in one request. */
  private async _writeBase64(job: WriteJob): Promise<WriteReply> {
    const { name, shape, raw, label } = job;
    const requests = this._requests;
    const trans = requests.trans;
    const h = requests.nextId();
    // 3 MiB of bytes is 4 MiB of base64: far below the 10 MiB message limit.
    const cs = Math.min(this._limits.writeChunk, 3 * MiB);
    const beginExpr = `${HELPER_REF}.w_begin(${h}, ${pyStringLiteral(name)}, [${shape.map(s => pyIntLiteral('shape', s)).join(', ')}], ${job.complex ? 'True' : 'False'}, ${raw.byteLength}, ${job.overwrite ? 'True' : 'False'}${job.into === undefined ? '' : `, into=${pyIntLiteral('into', job.into)}`})`;
    const chunkExpr = (o: number): string =>
      `${HELPER_REF}.w_chunk(${h}, ${o}, "${encodeBase64(raw.subarray(o, Math.min(o + cs, raw.byteLength)))}")`;
    const checkChunk = (entry: unknown): void => {
      const v = parseJsonExpression(trans, entry, label);
      if (!isRecord(v) || v.ok !== true) {
        throw kernelRefusal(trans, v, name, this._limits.maxBytesSetting);
      }
    };
    if (raw.byteLength <= cs) {
      // Small: begin, data and end in one request (evaluated in order; after a conflict the
      // later two find no stage and are ignored).
      const r = await requests.evaluate(label, {
        b: beginExpr,
        c: chunkExpr(0),
        e: `${HELPER_REF}.w_end(${h})`
      });
      const b = parseWriteReply(trans, parseJsonExpression(trans, r.b, label), label);
      if (b && 'conflict' in b) {
        return b;
      }
      checkChunk(r.c);
      const done = parseWriteReply(trans, parseJsonExpression(trans, r.e, label), label);
      if (!done) {
        throw malformed(trans, label);
      }
      return done;
    }
    const begin = await requests.evaluate(label, { r: beginExpr });
    const b = parseWriteReply(trans, parseJsonExpression(trans, begin.r, label), label);
    if (b && 'conflict' in b) {
      return b;
    }
    try {
      const offsets: number[] = [];
      for (let o = 0; o < raw.byteLength; o += cs) {
        offsets.push(o);
      }
      // A few chunks in flight: the kernel decodes one while the next is on its way.
      await inFlight(offsets, async o => {
        const r = await requests.evaluate(label, { r: chunkExpr(o) });
        checkChunk(r.r);
      });
      const end = await requests.evaluate(label, { r: `${HELPER_REF}.w_end(${h})` });
      const r = parseWriteReply(trans, parseJsonExpression(trans, end.r, label), label);
      if (!r) {
        throw malformed(trans, label);
      }
      return r;
    } catch (e) {
      requests.release(`${HELPER_REF}.w_abort(${h})`);
      throw e;
    }
  }
}

function yieldToEventLoop(): Promise<void> {
  return new Promise(resolve => setTimeout(resolve, 0));
}

/** Checks an {@link ArrayData} given to a write: a caller's mistake throws a BridgeError `bad-argument`. */
function validateArrayData(a: ArrayData): void {
  if (!isRecord(a)) {
    throw badArgument(`array must be an ArrayData object, got ${typeof a}`);
  }
  if (!(a.data instanceof Float64Array)) {
    throw badArgument(
      `array.data must be a Float64Array, got ${a.data === null ? 'null' : typeof a.data}`
    );
  }
  const shape = a.shape;
  if (!Array.isArray(shape) || shape.length < 1 || shape.length > 2) {
    throw badArgument(`array.shape must have 1 or 2 dimensions, got ${JSON.stringify(shape)}`);
  }
  for (const s of shape) {
    if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 1) {
      throw badArgument(
        `array.shape entries must be positive integers, got ${JSON.stringify(shape)}`
      );
    }
  }
  if (typeof a.complex !== 'boolean') {
    throw badArgument(`array.complex must be a boolean, got ${typeof a.complex}`);
  }
  const n = shape.reduce((x, y) => x * y, 1) * (a.complex ? 2 : 1);
  if (n !== a.data.length) {
    throw badArgument(
      `array.data has length ${a.data.length} but shape ${JSON.stringify(shape)}${a.complex ? ' (complex, interleaved)' : ''} needs ${n}`
    );
  }
}
