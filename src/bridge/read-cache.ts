/**
 * Copies of arrays read before, so that reading a source the kernel still holds unchanged costs
 * a digest instead of its bytes. Re-running a set-up while tuning its parameters reads the same
 * arrays again and again; through the browser's websocket that is tens of milliseconds per MiB,
 * while the kernel hashes a MiB in well under one.
 *
 * How a read uses it: the reader names the digest of the copy it holds for the source; the
 * kernel hashes the bytes it would send (SHA-256 of the float64/complex128 bytes, the same
 * conversion as the transfer) and, when the digests are equal, sends the header alone. A value
 * changed in place, re-bound, or converted differently has other bytes and is sent in full.
 *
 * The cache keeps its own copy and hands out fresh copies, so that nothing a caller does to the
 * arrays it got can change what a later read returns — except to a reader that says it never
 * writes into what it reads (`shared`: the workbench, whose runs already share inputs by digest),
 * which is handed the copy kept itself and whose full reads are kept without a copy: re-running
 * a sweep on unchanged data then copies nothing (two 8 MB copies were 44 ms of the page's
 * thread before its jobs could start). Entries are kept least recently used first out, within a
 * byte budget (0: nothing is kept).
 */
import type { ArrayData } from './types';

interface Entry {
  digest: string;
  data: Float64Array;
  /** The bytes of `data` when kept (a detached buffer has none left). */
  bytes: number;
  shape: number[];
  complex: boolean;
  dtype: string;
}

/** A copy held for one source, as named to the kernel. */
export interface HeldCopy {
  readonly digest: string;
  /**
   * The array, when the kernel found it unchanged: a fresh copy, or (`shared`, for a reader that
   * never writes into it) the copy kept itself.
   */
  take(shared?: boolean): ArrayData;
  /** True when the header of a read describes this copy (shape, complex, dtype, size). */
  fits(head: { shape: number[]; complex: boolean; dtype: string; nbytes: number }): boolean;
}

export class ReadCache {
  /** `budgetBytes`: most bytes kept (the copies' float64 bytes); 0 keeps nothing. */
  constructor(budgetBytes: number) {
    this.budgetBytes = budgetBytes;
  }

  /** Most bytes kept; lowering it drops the least recently used copies at once. */
  get budgetBytes(): number {
    return this._budget;
  }
  set budgetBytes(v: number) {
    if (!(v >= 0) || !Number.isFinite(v)) {
      throw new RangeError(`budgetBytes must be a finite number ≥ 0, got ${String(v)}`);
    }
    this._budget = v;
    this._evict();
  }

  /** Bytes held now. */
  get bytes(): number {
    return this._bytes;
  }

  /** Reads served from a held copy, and reads whose bytes were sent (since creation). */
  readonly counts = { reused: 0, sent: 0 };

  /** The copy held for `key`, or null. The copy stays usable even if it is evicted meanwhile. */
  held(key: string): HeldCopy | null {
    const e = this._entries.get(key);
    if (!e) {
      return null;
    }
    if (e.data.byteLength !== e.bytes) {
      // its buffer was handed to a worker (detached) by a reader that broke the promise: drop
      // it, so that the kernel sends the bytes again
      this.forget(key);
      return null;
    }
    // most recently used last
    this._entries.delete(key);
    this._entries.set(key, e);
    return {
      digest: e.digest,
      take: (shared = false) => {
        this.counts.reused++;
        return {
          data: shared ? e.data : e.data.slice(),
          shape: e.shape.slice(),
          complex: e.complex,
          dtype: e.dtype,
          digest: e.digest
        };
      },
      fits: head =>
        head.complex === e.complex &&
        head.dtype === e.dtype &&
        head.nbytes === e.bytes &&
        head.shape.length === e.shape.length &&
        head.shape.every((n, i) => n === e.shape[i])
    };
  }

  /**
   * Keeps a copy of `a` (read in full, with the kernel's `digest`) for `key`; `shared` (the
   * reader never writes into `a.data`) keeps `a.data` itself.
   */
  keep(key: string, digest: string, a: ArrayData, shared = false): void {
    this.counts.sent++;
    this.forget(key);
    if (a.data.byteLength > this._budget) {
      return;
    }
    this._entries.set(key, {
      digest,
      data: shared ? a.data : a.data.slice(),
      bytes: a.data.byteLength,
      shape: a.shape.slice(),
      complex: a.complex,
      dtype: a.dtype
    });
    this._bytes += a.data.byteLength;
    this._evict();
  }

  /** Drops the copy held for `key`. */
  forget(key: string): void {
    const e = this._entries.get(key);
    if (e) {
      this._entries.delete(key);
      this._bytes -= e.bytes;
    }
  }

  /** Drops every copy. */
  clear(): void {
    this._entries.clear();
    this._bytes = 0;
  }

  private _evict(): void {
    for (const [key, e] of this._entries) {
      if (this._bytes <= this._budget) {
        return;
      }
      this._entries.delete(key);
      this._bytes -= e.bytes;
    }
  }

  private _budget = 0;
  private _bytes = 0;
  private readonly _entries = new Map<string, Entry>();
}
