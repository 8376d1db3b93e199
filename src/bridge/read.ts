/**
 * How an array is read: the source is checked (a valid name, or a cell count this session
 * produced), then the helper sends a header and the array's bytes (float64, or interleaved
 * complex128) in chunks, over the comm as binary buffers or as base64 in silent executes.
 * Every header and chunk is checked against the others before its bytes are used.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { decodeBase64Into } from './base64';
import type { CommChannel } from './comm';
import type { ReadCache } from './read-cache';
import { BridgeError } from './errors';
import { HELPER_REF } from './helper';
import type { SessionLedger } from './ledger';
import type { ListedShapes } from './listing';
import { badArgument, pyIntLiteral, pyStringLiteral, requireName } from './names';
import { kernelRefusal, refusalOf } from './refusals';
import {
  isRecord,
  malformed,
  parseHeader,
  parseJsonExpression,
  plainText,
  sourceLabel,
  type TransferHeader
} from './replies';
import { inFlight, type KernelRequests } from './requests';
import type { ArrayData, ArraySource, ReadOptions, TransferLimits } from './types';

/** Reads arrays and scalars from the kernel. */
export class ArrayReader {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _channel: CommChannel,
    private readonly _limits: TransferLimits,
    private readonly _ledger: SessionLedger | null,
    private readonly _listed: ListedShapes | null = null,
    private readonly _cache: ReadCache | null = null
  ) {}

  /** The bundle every sentence goes through. */
  private get _trans(): TranslationBundle {
    return this._requests.trans;
  }

  /** See `KernelBridge.readArray`. */
  async read(source: ArraySource, options: ReadOptions = {}): Promise<ArrayData> {
    const src = this._sourceLiteral(source);
    const label = this._trans.__('reading %1', sourceLabel(source));
    // What the list showed: the kernel refuses (`changed`) when the name holds another shape
    // or dtype now, rather than handing over something else than the user picked.
    const listed = this._listed?.get(source);
    const expect = listed ? { shape: listed.shape, dtype: listed.dtype } : null;
    try {
      if (await this._channel.use()) {
        return await this._readComm(src.json, label, source, expect, options.shared === true);
      }
      return await this._readBase64(src.py, label, source, expect);
    } catch (e) {
      if (e instanceof BridgeError && e.code === 'changed') {
        this._listed?.forget(source);
      }
      throw e;
    }
  }

  /** See `KernelBridge.readScalar`. */
  async readScalar(path: string): Promise<number> {
    // The path may be typed by the user (a sample rate's variable): its errors are translated.
    const trans = this._trans;
    if (typeof path !== 'string') {
      throw badArgument(trans.__('path must be a string, got %1', typeof path));
    }
    // As readArray takes a name: exactly as given, spaces and newlines are not trimmed.
    const parts = path.split('.').map(p => requireName(p, trans));
    if (parts.length > 4) {
      throw new BridgeError(
        'invalid-name',
        trans.__('path must have at most 4 parts, got %1', parts.length)
      );
    }
    const dunder = parts.slice(1).find(p => p.startsWith('__'));
    if (dunder !== undefined) {
      throw new BridgeError(
        'invalid-name',
        trans.__('path must not reach private attributes, got %1', JSON.stringify(dunder))
      );
    }
    const label = trans.__('reading %1', parts.join('.'));
    // Over the comm when it is open: no execute request, so nothing in JupyterLab reacts to an
    // execution (its debugger refreshes the kernel's module list after every execute reply, a
    // 35–60 ms render on the page).
    let v: unknown;
    if (await this._channel.use()) {
      v = await this._scalarComm(parts, label);
    } else {
      const expr = `${HELPER_REF}.read_scalar([${parts.map(pyStringLiteral).join(', ')}])`;
      const r = await this._requests.evaluate(label, { r: expr });
      v = parseJsonExpression(trans, r.r, label);
    }
    if (isRecord(v) && typeof v.value === 'number') {
      return v.value;
    }
    throw kernelRefusal(trans, v, parts.join('.'), this._limits.maxBytesSetting);
  }

  /** read_scalar's answer ({value} or {error, detail}) through one comm request. */
  private _scalarComm(parts: string[], label: string): Promise<unknown> {
    const trans = this._requests.trans;
    return this._overComm<unknown>(
      label,
      { op: 'scalar', path: parts },
      (d, _buffers, resolve) => {
        if (d.op === 'scalar') {
          resolve(d);
        } else if (d.op === 'error') {
          resolve({ error: d.code, detail: d.detail });
        } else {
          throw malformed(trans, label);
        }
      },
      // the kernel went idle for this request: its answer, if any, came before
      () => malformed(trans, label)
    );
  }

  /**
   * One numbered request on the comm: `message` (with the request's number added) goes out,
   * `onMessage` sees each message of the answer until it resolves or throws; a closed channel,
   * the op's clock, or the kernel going idle first (`endedEarly`) fail it.
   */
  private async _overComm<T>(
    label: string,
    message: Record<string, unknown>,
    onMessage: (
      d: Record<string, unknown>,
      buffers: ReadonlyArray<DataView>,
      resolve: (v: T) => void
    ) => void,
    endedEarly: () => BridgeError
  ): Promise<T> {
    const requests = this._requests;
    const channel = this._channel;
    const comm = await channel.open();
    const req = requests.nextId();
    const op = requests.newOp(label);
    try {
      const work = new Promise<T>((resolve, reject) => {
        channel.handle(req, (d, buffers) => {
          op.touch();
          try {
            if (d.op === 'closed') {
              throw channelClosed(requests.trans, label);
            }
            onMessage(d, buffers, resolve);
          } catch (e) {
            channel.unhandle(req);
            reject(e);
          }
        });
        channel.send(comm, op, { req, ...message }).done.then(
          () => reject(endedEarly()),
          () => undefined
        );
      });
      return await Promise.race([work, op.promise]);
    } catch (e) {
      throw requests.toBridgeError(e, label);
    } finally {
      channel.unhandle(req);
      requests.endOp(op);
    }
  }

  /** The source as the comm's JSON and as a Python literal, after its checks. */
  private _sourceLiteral(source: ArraySource): { json: Record<string, unknown>; py: string } {
    if (!isRecord(source)) {
      throw badArgument(`source must be an ArraySource, got ${typeof source}`);
    }
    if (source.kind === 'variable') {
      const name = requireName(source.name, this._trans);
      return {
        json: { kind: 'variable', name },
        py: `{"kind": "variable", "name": ${pyStringLiteral(name)}}`
      };
    }
    if (source.kind === 'cell') {
      const n = source.executionCount;
      if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 1) {
        throw badArgument(`source.executionCount must be a positive integer, got ${String(n)}`);
      }
      if (this._ledger && !this._ledger.trusts(source.cellId, n)) {
        throw new BridgeError(
          'stale-count',
          this._trans.__(
            'The result Out[%1] shown in the notebook was not produced by the kernel running now (it was restarted or changed since), so it cannot be read. Run the cell again, or pick a variable.',
            n
          )
        );
      }
      return { json: { kind: 'cell', n }, py: `{"kind": "cell", "n": ${n}}` };
    }
    throw badArgument(
      `source.kind must be 'cell' or 'variable', got ${String((source as { kind: unknown }).kind)}`
    );
  }

  /** Header, chunks as binary buffers, end: one comm request. */
  private _readComm(
    source: Record<string, unknown>,
    label: string,
    original: ArraySource,
    expect: { shape: number[]; dtype: string } | null,
    shared: boolean
  ): Promise<ArrayData> {
    const trans = this._requests.trans;
    const limits = this._limits;
    const what = sourceLabel(original);
    // A copy read before is named by its digest; the kernel sends the bytes only if they differ.
    const cacheKey = JSON.stringify(source);
    const held = this._cache?.held(cacheKey) ?? null;
    let head: TransferHeader | null = null;
    let out: Float64Array | null = null;
    let bytes: Uint8Array | null = null;
    let seen: Uint8Array | null = null;
    let received = 0;
    return this._overComm<ArrayData>(
      label,
      {
        op: 'read',
        source,
        chunk: limits.readChunk,
        max_bytes: limits.maxBytes,
        ...(expect ? { expect } : {}),
        ...(held ? { have: held.digest } : {})
      },
      (d, buffers, resolve) => {
        switch (d.op) {
          case 'header': {
            head = parseHeader(trans, d, limits.maxBytes, label);
            if (head.same) {
              // the kernel's bytes hash to the copy held: nothing else but 'end' follows
              if (!held || head.digest !== held.digest || !held.fits(head)) {
                throw malformed(trans, label);
              }
              return;
            }
            if (head.chunks > 1) {
              out = new Float64Array(head.nbytes / 8);
              bytes = new Uint8Array(out.buffer);
            }
            seen = new Uint8Array(head.chunks);
            return;
          }
          case 'chunk': {
            const i = d.i;
            const offset = d.offset;
            if (
              !head ||
              head.same ||
              !seen ||
              typeof i !== 'number' ||
              !Number.isInteger(i) ||
              i < 0 ||
              i >= head.chunks ||
              seen[i] ||
              offset !== i * head.chunk ||
              buffers.length !== 1
            ) {
              throw malformed(trans, label);
            }
            const b = buffers[0];
            const expect = Math.min(head.chunk, head.nbytes - offset);
            if (b.byteLength !== expect) {
              throw malformed(trans, label);
            }
            if (bytes) {
              bytes.set(new Uint8Array(b.buffer, b.byteOffset, b.byteLength), offset);
            } else if (b.byteOffset % 8 === 0) {
              // One chunk: its buffer (a fresh copy made by the deserialiser) is the result.
              out = new Float64Array(b.buffer, b.byteOffset, b.byteLength / 8);
            } else {
              out = new Float64Array(b.byteLength / 8);
              new Uint8Array(out.buffer).set(new Uint8Array(b.buffer, b.byteOffset, b.byteLength));
            }
            seen[i] = 1;
            received += b.byteLength;
            return;
          }
          case 'end': {
            if (head?.same && held) {
              resolve(held.take(shared));
              return;
            }
            if (!head || !out || received !== head.nbytes) {
              throw malformed(trans, label);
            }
            const a: ArrayData = {
              data: out,
              shape: head.shape,
              complex: head.complex,
              dtype: head.dtype,
              ...(head.digest !== null ? { digest: head.digest } : {})
            };
            if (head.digest !== null) {
              this._cache?.keep(cacheKey, head.digest, a, shared);
            }
            resolve(a);
            return;
          }
          case 'error':
            throw refusalOf(trans, d.code, d.detail, what, limits.maxBytesSetting);
          default:
            throw malformed(trans, label);
        }
      },
      // The kernel went idle for this request: everything it sent has been handled.
      () =>
        new BridgeError(
          'malformed',
          trans.__(
            'The kernel finished %1 without sending the whole array (was it interrupted?). Nothing in the panel was changed; try again.',
            label
          )
        )
    );
  }

  /** A staged copy in the kernel, fetched as base64 a chunk per user expression. */
  private async _readBase64(
    src: string,
    label: string,
    original: ArraySource,
    expect: { shape: number[]; dtype: string } | null
  ): Promise<ArrayData> {
    const requests = this._requests;
    const trans = requests.trans;
    const limits = this._limits;
    const h = requests.nextId();
    const what = sourceLabel(original);
    const cs = limits.readChunk;
    // One request opens the stage and brings the first chunk (closing the stage when that
    // was all): a small array costs one round trip.
    const openR = await requests.evaluate(label, {
      r: `${HELPER_REF}.b64_open(${h}, ${src}, ${pyIntLiteral('maxBytes', limits.maxBytes)}${expectLiteral(expect)})`,
      c: `${HELPER_REF}.b64_chunk(${h}, 0, ${cs}, True)`
    });
    const head0 = parseJsonExpression(trans, openR.r, label);
    if (isRecord(head0) && typeof head0.error === 'string') {
      throw refusalOf(trans, head0.error, head0.detail, what, limits.maxBytesSetting);
    }
    let closed = false;
    try {
      const head = parseHeader(
        trans,
        {
          ...(head0 as object),
          chunk: cs,
          chunks: Math.ceil(Number((head0 as { nbytes?: unknown }).nbytes) / cs)
        },
        limits.maxBytes,
        label
      );
      const out = new Float64Array(head.nbytes / 8);
      const bytes = new Uint8Array(out.buffer);
      const offsets: number[] = [];
      for (let o = cs; o < head.nbytes; o += cs) {
        offsets.push(o);
      }
      closed = offsets.length === 0;
      const put = (entry: unknown, o: number): void => {
        const size = Math.min(cs, head.nbytes - o);
        const text = plainText(trans, entry, label);
        if (text.startsWith('{')) {
          throw new BridgeError(
            'malformed',
            trans.__(
              'The kernel lost the staged array while %1 (was the helper reset?). Try again.',
              label
            )
          );
        }
        let n: number;
        try {
          n = decodeBase64Into(text, bytes, o);
        } catch {
          throw malformed(trans, label);
        }
        if (n !== size) {
          throw malformed(trans, label);
        }
      };
      put(openR.c, 0);
      // A few requests in flight keep the kernel busy while the previous reply is decoded.
      await inFlight(offsets, async o => {
        const size = Math.min(cs, head.nbytes - o);
        const r = await requests.evaluate(label, {
          r: `${HELPER_REF}.b64_chunk(${h}, ${o}, ${size})`
        });
        put(r.r, o);
      });
      return { data: out, shape: head.shape, complex: head.complex, dtype: head.dtype };
    } finally {
      if (!closed) {
        requests.release(`${HELPER_REF}.b64_close(${h})`);
      }
    }
  }
}

/** The comm closed in the middle of a request. */
function channelClosed(trans: TranslationBundle, label: string): BridgeError {
  return new BridgeError(
    'comm-closed',
    trans.__(
      "The kernel closed Perpend's data channel while %1. Nothing in the panel was changed; try again (Perpend reopens it).",
      label
    )
  );
}

/**
 * `, {"shape": [...], "dtype": "..."}` for b64_open, or nothing: integers and an escaped
 * string literal only (the dtype came from the helper's own listing).
 */
function expectLiteral(expect: { shape: number[]; dtype: string } | null): string {
  if (!expect) {
    return '';
  }
  const shape = expect.shape.map(n => pyIntLiteral('shape', n)).join(', ');
  return `, {"shape": [${shape}], "dtype": ${pyStringLiteral(expect.dtype)}}`;
}
