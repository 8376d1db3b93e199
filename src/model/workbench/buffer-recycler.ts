/**
 * Input buffers handed back by the workers, kept a short while for the next jobs' copies.
 *
 * Every job gets copies of its run's inputs (they are transferred to the worker). Copying into
 * fresh memory is slow on the page: the browser maps new pages for each large buffer, and the
 * first write to each page faults (measured in headless chromium: 64 MB copied into fresh
 * Float64Arrays 44–78 ms, into arrays already written 5–7 ms; in a CPU profile of a sweep of
 * four 1e6-sample jobs, the copies were 235 ms of the page's thread). A worker hands a job's
 * input buffers back with its result; a sweep's or a re-run's next copies of the same sizes go
 * into them.
 *
 * Only buffers of exactly the size asked for are reused (a run's inputs repeat their sizes).
 * At most `maxBytes` are held, the most recent kept, and all are let go `holdMs` after the last
 * one came back, so an idle workbench holds no memory for long.
 */

/** Bytes held at most (a sweep of four runs on two 8 MB inputs hands back 64 MB). */
export const RECYCLE_MAX_BYTES = 128 * 2 ** 20;

/** How long buffers are held after the last one came back, in milliseconds. */
export const RECYCLE_HOLD_MS = 20000;

export class BufferRecycler {
  constructor(
    private readonly _maxBytes: number = RECYCLE_MAX_BYTES,
    private readonly _holdMs: number = RECYCLE_HOLD_MS
  ) {}

  /** Bytes held now. */
  get heldBytes(): number {
    return this._bytes;
  }

  /** Buffers handed back (detached or empty ones are ignored). */
  give(buffers: ReadonlyArray<ArrayBuffer>): void {
    for (const b of buffers) {
      // by tag: a buffer from another realm (a test's worker thread) is one too
      const isBuffer = Object.prototype.toString.call(b) === '[object ArrayBuffer]';
      if (!isBuffer || b.byteLength === 0 || b.byteLength > this._maxBytes) {
        continue;
      }
      this._held.push(b);
      this._bytes += b.byteLength;
    }
    // the oldest go first
    while (this._bytes > this._maxBytes) {
      this._bytes -= this._held.shift()!.byteLength;
    }
    if (this._timer !== null) {
      clearTimeout(this._timer);
    }
    this._timer = null;
    if (this._held.length > 0) {
      this._timer = setTimeout(() => this.clear(), this._holdMs);
      // Node (tests, benchmarks): a held buffer must not keep the process alive
      (this._timer as { unref?: () => void }).unref?.();
    }
  }

  /** `n` doubles in a held buffer of exactly that size (the newest), or in a fresh one. */
  doubles(n: number): Float64Array {
    const bytes = n * 8;
    for (let i = this._held.length - 1; i >= 0; i--) {
      const b = this._held[i];
      if (b.byteLength === bytes) {
        this._held.splice(i, 1);
        this._bytes -= bytes;
        return new Float64Array(b);
      }
    }
    return new Float64Array(n);
  }

  /** Lets every held buffer go. */
  clear(): void {
    this._held = [];
    this._bytes = 0;
    if (this._timer !== null) {
      clearTimeout(this._timer);
      this._timer = null;
    }
  }

  private _held: ArrayBuffer[] = [];
  private _bytes = 0;
  private _timer: ReturnType<typeof setTimeout> | null = null;
}
