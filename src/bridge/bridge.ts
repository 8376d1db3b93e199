/**
 * The kernel bridge's front door: one object per kernel connection that the model talks to.
 * It checks its options and hands each job to the part that does it:
 *
 * | job | file |
 * |---|---|
 * | requests, timeouts, kernel status, activity | `requests.ts` (`op.ts`: one request's clock) |
 * | the binary comm channel, transport choice | `comm.ts` |
 * | listing variables and cell results | `listing.ts` (`notes.ts`: the notes shown beside them) |
 * | checking cells against the kernel's history | `verify.ts` |
 * | reading arrays and scalars | `read.ts` |
 * | writing arrays | `write.ts` (`conflicts.ts`: confirming a taken name) |
 * | checking replies; the helper's refusals | `replies.ts`, `refusals.ts` |
 * | the data types | `types.ts` |
 * | the translation bundle (English by default) | `i18n.ts` |
 */
import type { Kernel } from '@jupyterlab/services';
import type { ITranslator } from '@jupyterlab/translation';
import type { IDisposable } from '@lumino/disposable';
import { Signal, type ISignal } from '@lumino/signaling';
import { CommChannel, type Transport } from './comm';
import { bridgeBundle } from './i18n';
import type { SessionLedger } from './ledger';
import { ArrayLister, ListedShapes } from './listing';
import { badArgument } from './names';
import { ArrayReader } from './read';
import { ReadCache } from './read-cache';
import { MiB } from './replies';
import { KernelRequests } from './requests';
import type {
  ArrayData,
  ArrayInfo,
  ArraySource,
  CellRef,
  ReadOptions,
  TransferLimits,
  WriteResult
} from './types';
import { CellVerifier, type CellCheck } from './verify';
import { ArrayWriter } from './write';

export namespace KernelBridge {
  export interface IOptions {
    /** The notebook's kernel connection. A new kernel (not a restart) needs a new bridge. */
    kernel: Kernel.IKernelConnection;
    /**
     * Longest silence allowed once the kernel has started a request (its `busy` status for
     * that request; progress messages restart the clock). Time spent queued behind a running
     * cell does not count. Default 60 000 ms.
     */
    timeoutMs?: number;
    /** Largest array read, in bytes as float64/complex128. Default 512 MiB. */
    maxBytes?: number;
    /** Name of the setting that holds `maxBytes`, quoted in the refusal message. */
    maxBytesSetting?: string;
    /** When given, cell results are trusted only for pairs the ledger recorded. */
    ledger?: SessionLedger;
    /** 'auto' (comm, else base64), 'comm' or 'base64'. Default 'auto'. */
    transport?: Transport;
    /**
     * Bytes per binary chunk, kernel to Perpend. Default 256 KiB: the page receives each
     * websocket message on its main thread; in Debian's chromium here 1 MiB messages held it
     * 35–57 ms each and 16 MB took 0.7–0.8 s, 256 KiB messages no task over 30 ms and 0.45–0.6 s.
     */
    readChunkBytes?: number;
    /** Bytes per binary chunk, Perpend to kernel (kept far below 10 MiB). Default 4 MiB. */
    writeChunkBytes?: number;
    /**
     * Most bytes of arrays read before that are kept, so that a read the kernel finds unchanged
     * (same SHA-256 of its bytes) is not sent again (see `read-cache.ts`). 0 keeps none. Default
     * 256 MiB.
     */
    keepReadBytes?: number;
    /**
     * Translates every sentence the bridge makes (errors, notes, questions, warnings, activity
     * labels), domain 'perpend'. Default: English, as JupyterLab's `nullTranslator` gives.
     */
    translator?: ITranslator;
  }

  /** What the bridge is doing, for the panel's status line. */
  export type IActivity = KernelRequests.IActivity;
}

/**
 * Lists, reads and writes numpy arrays in a live Python kernel, silently: every request is a
 * `silent`, `store_history: false` execute or a comm message, so the user's history and
 * execution counter never move. See the module documentation in `index.ts`.
 */
export class KernelBridge implements IDisposable {
  constructor(options: KernelBridge.IOptions) {
    // Checked in this order, so that the first bad option is the one reported.
    const timeoutMs = positive('timeoutMs', options.timeoutMs ?? 60000);
    const maxBytes = positive('maxBytes', options.maxBytes ?? 512 * MiB);
    const transport = options.transport ?? 'auto';
    if (!['auto', 'comm', 'base64'].includes(transport)) {
      throw badArgument(`transport must be 'auto', 'comm' or 'base64', got ${String(transport)}`);
    }
    this._limits = {
      maxBytes,
      maxBytesSetting: options.maxBytesSetting ?? 'maxArrayMiB',
      readChunk: clampChunk('readChunkBytes', options.readChunkBytes ?? 256 * 1024, 64 * MiB),
      writeChunk: clampChunk('writeChunkBytes', options.writeChunkBytes ?? 4 * MiB, 8 * MiB)
    };
    const keep = options.keepReadBytes ?? 256 * MiB;
    if (!(keep >= 0) || !Number.isFinite(keep)) {
      throw badArgument(`keepReadBytes must be a finite number ≥ 0, got ${String(keep)}`);
    }
    this._cache = new ReadCache(keep);
    const ledger = options.ledger ?? null;
    this._requests = new KernelRequests(
      options.kernel,
      timeoutMs,
      bridgeBundle(options.translator),
      a => this._activityChanged.emit(a)
    );
    this._channel = new CommChannel(this._requests, transport);
    const verifier = new CellVerifier(this._requests, ledger);
    this._verifier = verifier;
    // What the latest listing showed, so that a read of a re-bound name is said, not done.
    const listed = new ListedShapes();
    this._lister = new ArrayLister(this._requests, verifier, ledger, listed);
    this._reader = new ArrayReader(
      this._requests,
      this._channel,
      this._limits,
      ledger,
      listed,
      this._cache
    );
    this._writer = new ArrayWriter(this._requests, this._channel, this._limits);
  }

  /** The kernel connection this bridge talks to. */
  get kernel(): Kernel.IKernelConnection {
    return this._requests.kernel;
  }

  get isDisposed(): boolean {
    return this._requests.isDisposed;
  }

  /** What the bridge is doing now. */
  get activity(): KernelBridge.IActivity {
    return this._requests.activity;
  }

  /** Emits on every change of {@link activity}. */
  get activityChanged(): ISignal<this, KernelBridge.IActivity> {
    return this._activityChanged;
  }

  /** The size limit for reads, in bytes. */
  get maxBytes(): number {
    return this._limits.maxBytes;
  }
  set maxBytes(v: number) {
    this._limits.maxBytes = positive('maxBytes', v);
  }

  /** The timeout, in milliseconds (see {@link KernelBridge.IOptions.timeoutMs}). */
  get timeoutMs(): number {
    return this._requests.timeoutMs;
  }
  set timeoutMs(v: number) {
    this._requests.timeoutMs = positive('timeoutMs', v);
  }

  /**
   * Reads served from a copy kept by the bridge (the kernel found the array unchanged) and
   * reads whose bytes were sent, over the comm, since the bridge was made.
   */
  get readCounts(): { reused: number; sent: number } {
    return { ...this._cache.counts };
  }

  dispose(): void {
    if (this._requests.isDisposed) {
      return;
    }
    this._cache.clear();
    this._requests.dispose();
    this._channel.dispose();
    Signal.clearData(this);
  }

  /**
   * Describes the results that `cells` returned, read from IPython's output cache (`Out`), for
   * the cells whose result is array-like. Cells with a null count, or (with a ledger) a count
   * this session did not produce, are skipped. One silent request; no data moved.
   *
   * With a ledger, cells given with their `source` whose pair the ledger has not recorded (the
   * page was reloaded, or the cells ran before Perpend watched) are first checked with
   * {@link verifyCells}, one more silent request, and listed when they pass.
   */
  listCellResults(cells: ReadonlyArray<CellRef>): Promise<ArrayInfo[]> {
    return this._lister.listCellResults(cells);
  }

  /**
   * Checks cells that show an execution count the ledger has not recorded against IPython's
   * input history (`history_manager.input_hist_raw[n]`, the text exactly as the cell sent it),
   * and records into the ledger the pairs whose text matches: after a page reload the kernel
   * keeps running but the ledger starts empty. In ONE silent request (no history, no count)
   * that carries only integers and SHA-256 hex digests, never the source itself.
   *
   * The rule: cell (id, n, source) is verified when the kernel's history is indexable by count
   * (its length is the next execution count) and SHA-256(UTF-8(input n without trailing "\n"))
   * equals SHA-256(UTF-8(source without trailing "\n")) (see `digest.ts`), no other cell holds
   * n (in the ledger or in this call), and the cell was not recorded meanwhile. A cell edited
   * since it ran fails; after a restart the history restarts, so old counts fail too. It
   * proves that execution n ran this text in this kernel, not that this very cell sent it (an
   * identical copy of the cell would pass as well).
   *
   * A digest found different is remembered for this kernel session (the history does not
   * change), so later calls do not ask again for it.
   */
  verifyCells(cells: ReadonlyArray<CellRef>): Promise<CellCheck[]> {
    return this._verifier.verify(cells);
  }

  /**
   * Describes the array-like variables in the user's namespace (numpy arrays with a numeric
   * dtype, lists and tuples of numbers). Names starting with `_` and IPython's own are left out.
   * One silent request; no data moved. While the kernel is busy the request is deferred until
   * it is idle, and calls made meanwhile share one request.
   *
   * Decided by the values' types and stored data only: no method, property, `__getattr__` or
   * conversion of the user's classes runs. A masked array with masked entries is listed
   * unreadable with their count. An array under a key Perpend cannot name (over
   * `MAX_NAME_LENGTH` characters, not an identifier) is listed unreadable, after the
   * others, with a note saying why, rather than left out.
   */
  listVariables(): Promise<ArrayInfo[]> {
    return this._lister.listVariables();
  }

  /**
   * Reads an array at full precision: float64 as is, float32/16, ints and bool converted to
   * float64 exactly, complex64/128 as interleaved complex128. 1-D and 2-D, any layout (the
   * kernel makes a C-ordered copy when needed). Refuses, with a BridgeError whose message says
   * why: empty arrays, more than 2-D, int64/uint64 values beyond ±2⁵³ (naming the first
   * index), arrays over {@link maxBytes}, a cell count not from this session, a masked array
   * with masked entries (`masked`), a value that is not an array by its type (`not-array`: no
   * `__array__` or other code of it runs), a source listed with another shape or dtype than it
   * holds now (`changed`; read again to take it as it is), a name that is not one exactly as
   * given (`invalid-name`: nothing is trimmed). `options.shared`: the caller never writes into
   * the data (see {@link ReadOptions}).
   */
  readArray(source: ArraySource, options?: ReadOptions): Promise<ArrayData> {
    return this._reader.read(source, options);
  }

  /**
   * Reads a real scalar (a sample rate, say) from a variable or an attribute path such as
   * `fs` or `rec.fs`. Every part is validated as an identifier, exactly as given (as
   * {@link readArray} does); dunder attributes are refused. The value is what is stored (in the
   * instance, a slot, the class), found by Python's lookup rules without running a property,
   * `__getattr__`, a method or a number subclass's `__float__`: such values are refused
   * (`user-code`) with a message saying how to bind them to a plain variable.
   */
  readScalar(path: string): Promise<number> {
    return this._reader.readScalar(path);
  }

  /**
   * Writes `array` into the kernel as a new numpy array (float64, or complex128 when
   * `array.complex`) bound to `name`, in chunks far below the server's message limit, without
   * touching history or the execution counter. Unless `overwrite`, a name that exists or
   * shadows a builtin is not written and the result says why (status 'exists' or 'shadows').
   * Names whose replacement breaks the interpreter or IPython (`__builtins__`, `__name__`,
   * every `__*__`, `Out`, `get_ipython`, `_7`...) are never written, overwrite or not
   * (`reserved`; see `reservedName` in names.ts).
   */
  writeArray(
    name: string,
    array: ArrayData,
    options: { overwrite?: boolean } = {}
  ): Promise<WriteResult> {
    return this._writer.write(name, array, options);
  }

  /**
   * Writes a whole result at once: every array of `arrays` and the JSON `params` as one dict
   * bound to `name` (`name["error"]`, …, `name["params"]`), with the same checks and the same
   * replacement question as {@link writeArray}.
   */
  writeRecord(
    name: string,
    arrays: Readonly<Record<string, ArrayData>>,
    params: unknown,
    options: { overwrite?: boolean } = {}
  ): Promise<WriteResult> {
    return this._writer.writeRecord(name, arrays, params, options);
  }

  private readonly _limits: TransferLimits;
  private readonly _requests: KernelRequests;
  private readonly _channel: CommChannel;
  private readonly _verifier: CellVerifier;
  private readonly _lister: ArrayLister;
  private readonly _reader: ArrayReader;
  private readonly _cache: ReadCache;
  private readonly _writer: ArrayWriter;
  private readonly _activityChanged = new Signal<this, KernelBridge.IActivity>(this);
}

function positive(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
    throw badArgument(`${name} must be a positive number, got ${String(v)}`);
  }
  return v;
}

function clampChunk(name: string, v: unknown, max: number): number {
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 65536 || v > max || v % 16 !== 0) {
    throw badArgument(`${name} must be a multiple of 16 in [65536, ${max}], got ${String(v)}`);
  }
  return v;
}
