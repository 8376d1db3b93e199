import type { CommsOverSubshells, Kernel, KernelMessage } from '@jupyterlab/services';
import type { IDisposable } from '@lumino/disposable';
import { Signal, type ISignal } from '@lumino/signaling';
import { decodeBase64Into, encodeBase64 } from './base64';
import { DIGEST_PATTERN, isWellFormed, sourceDigest } from './digest';
import { BridgeError, type BridgeErrorCode } from './errors';
import { COMM_TARGET, HELPER_REF, installCode } from './helper';
import type { SessionLedger } from './ledger';
import { checkIdentifier, normalizeIdentifier, pyIntLiteral, pyStringLiteral } from './names';

/** Where an array lives in the kernel. */
export type ArraySource =
  { kind: 'cell'; cellId: string; executionCount: number } | { kind: 'variable'; name: string };

/** What the panel lists: an array-like value in the kernel, described without moving data. */
export interface ArrayInfo {
  source: ArraySource;
  /** `x` for a variable, `Out[7]` for a cell result. */
  label: string;
  shape: number[];
  /** numpy's dtype name (`float64`, `complex64`, `int16`, `bool`, ...). */
  dtype: string;
  /** Size of the value in the kernel, in bytes (numpy's `nbytes`). */
  bytes: number;
  /**
   * False when Perpend cannot read it (more than 2-D, empty, extended precision); the bridge
   * always sets it. Absent (in objects built elsewhere) means readable.
   */
  readable?: boolean;
  /** Sentences for the user (plain text, never HTML). */
  notes: string[];
}

/** An array read from the kernel: C order, complex interleaved (re, im). */
export interface ArrayData {
  data: Float64Array;
  shape: number[];
  complex: boolean;
  /** The dtype it had in the kernel (for writes: ignored; results are float64/complex128). */
  dtype: string;
}

/** Why a write needs the user's confirmation. */
export interface WriteConflict {
  /** The name is already bound in the user's namespace. */
  exists: boolean;
  /** Type name of the value bound now, when it exists. */
  existingType: string | null;
  /** The module's name when the name is bound to a module (`np` → `numpy`). */
  module: string | null;
  /** The name is a Python builtin (`sum`, `input`, ...). */
  builtin: boolean;
}

/** The outcome of {@link KernelBridge.writeArray}. */
export type WriteResult =
  | {
      /** The name is taken: nothing was written; ask, then call again with overwrite. */
      status: 'exists';
      name: string;
      conflict: WriteConflict;
      message: string;
    }
  | {
      /** The name is free but would shadow a builtin: nothing written; ask first. */
      status: 'shadows';
      name: string;
      conflict: WriteConflict;
      message: string;
    }
  | {
      status: 'written';
      /** The name as bound in Python (NFKC form). */
      name: string;
      bytes: number;
      /** Sentences for the user, e.g. that a module or builtin is now shadowed. */
      warnings: string[];
    };

/** A code cell as the notebook shows it: its id, the count it shows, and (optionally) its text. */
export interface CellRef {
  cellId: string;
  executionCount: number | null;
  /**
   * The cell's current source (`cell.model.sharedModel.getSource()`). When given, a pair the
   * ledger has not recorded is checked against the kernel's input history first (see
   * {@link KernelBridge.verifyCells}). It never leaves the page: only its SHA-256 digest does.
   */
  source?: string;
}

/**
 * What {@link KernelBridge.verifyCells} concluded about one cell:
 * - `trusted`: the ledger already had this (cell id, count) pair; nothing was asked.
 * - `verified`: the kernel's input number `executionCount` is this cell's text; recorded.
 * - `edited`: the kernel's input with that number is other text (the cell was edited since it
 *   ran, or the count is from another kernel session).
 * - `unknown`: the kernel has no input with that number (a restarted kernel), or its history
 *   cannot be indexed by count (see the helper's `verify_cells`).
 * - `conflict`: another cell holds that count (in the ledger, or in the same call).
 * - `skipped`: no count, no source, or a source that is not well-formed text.
 */
export type CellVerdict = 'trusted' | 'verified' | 'edited' | 'unknown' | 'conflict' | 'skipped';

/** Messages the panel can show next to cell results. */
export const CACHE_NOTES = {
  reference:
    "IPython's output cache holds a reference to this result: if the array is changed in place later, the result changes too.",
  notCached:
    "Results suppressed with ';' or shown with display() are not in IPython's output cache; pick the variable instead."
};

const MiB = 1048576;

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
    transport?: 'auto' | 'comm' | 'base64';
    /** Bytes per binary chunk, kernel to Perpend. Default 8 MiB. */
    readChunkBytes?: number;
    /** Bytes per binary chunk, Perpend to kernel (kept far below 10 MiB). Default 4 MiB. */
    writeChunkBytes?: number;
  }

  /** What the bridge is doing, for the panel's status line. */
  export interface IActivity {
    /** 'waiting': queued behind a running cell; 'running': the kernel works on it. */
    state: 'idle' | 'waiting' | 'running';
    /** Requests not finished. */
    pending: number;
    /** What the oldest pending request is, e.g. "reading x". */
    label: string | null;
  }
}

/** One request in flight: its state, its timeout, and how to fail it. */
class Op {
  started = false;
  private _timer: ReturnType<typeof setTimeout> | null = null;
  private _guard: ReturnType<typeof setTimeout> | null = null;
  private _done = false;
  readonly promise: Promise<never>;
  private _reject!: (e: BridgeError) => void;

  constructor(
    readonly label: string,
    private readonly _timeoutMs: number,
    private readonly _changed: () => void
  ) {
    // Rejected by the bridge on timeout or kernel events; raced against the real work.
    this.promise = new Promise<never>((_, reject) => {
      this._reject = reject;
    });
    this.promise.catch(() => undefined);
  }

  get done(): boolean {
    return this._done;
  }

  /** The kernel went busy for this request: the clock starts. */
  start(): void {
    if (this._done) {
      return;
    }
    this.cancelGuard();
    if (!this.started) {
      this.started = true;
      this._changed();
    }
    this.touch();
  }

  /** Progress: restart the clock (only once started). */
  touch(): void {
    if (this._done || !this.started) {
      return;
    }
    if (this._timer !== null) {
      clearTimeout(this._timer);
    }
    this._timer = setTimeout(() => {
      this.fail(
        new BridgeError(
          'timeout',
          `The kernel did not answer within ${Math.round(this._timeoutMs / 1000)} s while ${this.label}. Nothing in the panel was changed; try again, or raise the timeout in the settings.`
        )
      );
    }, this._timeoutMs);
  }

  /**
   * The kernel is idle but this request has not started: if it still has not after the
   * timeout, the request was lost (a dropped connection, say).
   */
  armGuard(): void {
    if (this._done || this.started || this._guard !== null) {
      return;
    }
    this._guard = setTimeout(() => {
      this.fail(
        new BridgeError(
          'timeout',
          `The kernel is idle but never started ${this.label} (${Math.round(this._timeoutMs / 1000)} s). The request was probably lost; nothing in the panel was changed; try again.`
        )
      );
    }, this._timeoutMs);
  }

  cancelGuard(): void {
    if (this._guard !== null) {
      clearTimeout(this._guard);
      this._guard = null;
    }
  }

  fail(e: BridgeError): void {
    if (this._done) {
      return;
    }
    this.finish();
    this._reject(e);
  }

  finish(): void {
    if (this._done) {
      return;
    }
    this._done = true;
    if (this._timer !== null) {
      clearTimeout(this._timer);
    }
    this.cancelGuard();
  }
}

type CommHandler = (data: Record<string, unknown>, buffers: ReadonlyArray<DataView>) => void;

/**
 * Lists, reads and writes numpy arrays in a live Python kernel, silently: every request is a
 * `silent`, `store_history: false` execute or a comm message, so the user's history and
 * execution counter never move. See the module documentation in `index.ts`.
 */
export class KernelBridge implements IDisposable {
  constructor(options: KernelBridge.IOptions) {
    this._kernel = options.kernel;
    this._timeoutMs = positive('timeoutMs', options.timeoutMs ?? 60000);
    this._maxBytes = positive('maxBytes', options.maxBytes ?? 512 * MiB);
    this._maxBytesSetting = options.maxBytesSetting ?? 'maxArrayMiB';
    this._ledger = options.ledger ?? null;
    this._transport = options.transport ?? 'auto';
    if (!['auto', 'comm', 'base64'].includes(this._transport)) {
      throw new RangeError(
        `transport must be 'auto', 'comm' or 'base64', got ${String(this._transport)}`
      );
    }
    this._readChunk = clampChunk('readChunkBytes', options.readChunkBytes ?? 8 * MiB, 64 * MiB);
    this._writeChunk = clampChunk('writeChunkBytes', options.writeChunkBytes ?? 4 * MiB, 8 * MiB);
    this._shellBusy = this._kernel.status === 'busy';
    this._kernel.statusChanged.connect(this._onStatus, this);
    this._kernel.iopubMessage.connect(this._onIOPub, this);
    this._kernel.connectionStatusChanged.connect(this._onConnection, this);
    this._kernel.disposed.connect(this._onKernelDisposed, this);
  }

  /** The kernel connection this bridge talks to. */
  get kernel(): Kernel.IKernelConnection {
    return this._kernel;
  }

  get isDisposed(): boolean {
    return this._disposed;
  }

  /** What the bridge is doing now. */
  get activity(): KernelBridge.IActivity {
    const ops = Array.from(this._ops);
    if (ops.length === 0) {
      return { state: 'idle', pending: 0, label: null };
    }
    const running = ops.find(o => o.started);
    return {
      state: running ? 'running' : 'waiting',
      pending: ops.length,
      label: (running ?? ops[0]).label
    };
  }

  /** Emits on every change of {@link activity}. */
  get activityChanged(): ISignal<this, KernelBridge.IActivity> {
    return this._activityChanged;
  }

  /** The size limit for reads, in bytes. */
  get maxBytes(): number {
    return this._maxBytes;
  }
  set maxBytes(v: number) {
    this._maxBytes = positive('maxBytes', v);
  }

  /** The timeout, in milliseconds (see {@link KernelBridge.IOptions.timeoutMs}). */
  get timeoutMs(): number {
    return this._timeoutMs;
  }
  set timeoutMs(v: number) {
    this._timeoutMs = positive('timeoutMs', v);
  }

  dispose(): void {
    if (this._disposed) {
      return;
    }
    this._disposed = true;
    this._failAll('disposed', 'Perpend stopped talking to this kernel (the bridge was closed).');
    this._kernel.statusChanged.disconnect(this._onStatus, this);
    this._kernel.iopubMessage.disconnect(this._onIOPub, this);
    this._kernel.connectionStatusChanged.disconnect(this._onConnection, this);
    this._kernel.disposed.disconnect(this._onKernelDisposed, this);
    const comm = this._comm;
    this._comm = null;
    this._commReady = null;
    if (comm && !comm.isDisposed && !this._kernel.isDisposed) {
      try {
        comm.close();
      } catch {
        // The kernel may be gone already; nothing to release then.
      }
    }
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
  async listCellResults(cells: ReadonlyArray<CellRef>): Promise<ArrayInfo[]> {
    const ledger = this._ledger;
    if (ledger) {
      const unseen = cells.filter(
        c =>
          isRecord(c) &&
          typeof c.source === 'string' &&
          typeof c.executionCount === 'number' &&
          !ledger.trusts(c.cellId, c.executionCount)
      );
      if (unseen.length > 0) {
        try {
          await this.verifyCells(unseen);
        } catch (e) {
          // A helper that answers oddly costs only the seeding; a lost kernel fails the listing.
          if (!(e instanceof BridgeError) || !['malformed', 'kernel-error'].includes(e.code)) {
            throw e;
          }
        }
      }
    }
    const wanted = new Map<number, string>();
    for (const c of cells) {
      const n = c.executionCount;
      if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 1) {
        continue;
      }
      if (typeof c.cellId !== 'string' || c.cellId.length === 0) {
        continue;
      }
      if (this._ledger && !this._ledger.trusts(c.cellId, n)) {
        continue;
      }
      wanted.set(n, c.cellId);
    }
    if (wanted.size === 0) {
      return [];
    }
    const counts = Array.from(wanted.keys()).sort((a, b) => a - b);
    const expr = `${HELPER_REF}.list_cells([${counts.map(n => pyIntLiteral('executionCount', n)).join(', ')}])`;
    const reply = await this._listing('cells:' + counts.join(','), 'listing cell results', expr);
    const cellsOut = (reply as { cells?: unknown }).cells;
    if (!Array.isArray(cellsOut)) {
      throw malformed('the cell list');
    }
    const out: ArrayInfo[] = [];
    for (const e of cellsOut) {
      if (!isRecord(e) || e.found !== true || e.array !== true) {
        continue;
      }
      const n = e.n;
      if (typeof n !== 'number' || !wanted.has(n)) {
        throw malformed('the cell list');
      }
      const info = parseInfo(e, { kind: 'cell', cellId: wanted.get(n)!, executionCount: n });
      info.notes.push(CACHE_NOTES.reference);
      const same = e.same_as;
      if (Array.isArray(same)) {
        const names = same.filter(s => typeof s === 'string' && normalizeIdentifier(s).ok);
        if (names.length > 0) {
          info.notes.push(
            `It is the same object as the variable ${names.join(', ')}: reading the variable gives the same data.`
          );
        }
      }
      out.push(info);
    }
    return out;
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
  async verifyCells(
    cells: ReadonlyArray<CellRef>
  ): Promise<Array<{ cellId: string; executionCount: number | null; verdict: CellVerdict }>> {
    if (!Array.isArray(cells)) {
      throw new TypeError(`cells must be an array, got ${typeof cells}`);
    }
    const ledger = this._ledger;
    const generation = ledger?.generation ?? 0;
    if (this._editedGeneration !== generation) {
      this._edited.clear();
      this._editedGeneration = generation;
    }
    const results: Array<{ cellId: string; executionCount: number | null; verdict: CellVerdict }> =
      [];
    const candidates: Array<{ index: number; cellId: string; n: number; source: string }> = [];
    for (const c of cells) {
      const cellId = isRecord(c) && typeof c.cellId === 'string' ? c.cellId : '';
      const n = isRecord(c) ? c.executionCount : null;
      const count = typeof n === 'number' ? n : null;
      const index = results.push({ cellId, executionCount: count, verdict: 'skipped' }) - 1;
      if (cellId.length === 0 || cellId.length > 256) {
        continue;
      }
      if (count === null || !Number.isSafeInteger(count) || count < 1) {
        continue;
      }
      if (ledger && ledger.trusts(cellId, count)) {
        results[index].verdict = 'trusted';
        continue;
      }
      const source = (c as CellRef).source;
      if (typeof source !== 'string' || !isWellFormed(source)) {
        continue;
      }
      if (
        ledger &&
        (ledger.cellFor(count) !== undefined || ledger.countFor(cellId) !== undefined)
      ) {
        // Another cell was seen to run as this count, or this cell was seen to run again.
        results[index].verdict = 'conflict';
        continue;
      }
      candidates.push({ index, cellId, n: count, source });
    }
    const claimants = new Map<number, number>();
    for (const c of candidates) {
      claimants.set(c.n, (claimants.get(c.n) ?? 0) + 1);
    }
    const digests = await Promise.all(candidates.map(c => sourceDigest(c.source)));
    const ask: Array<{ index: number; cellId: string; n: number; digest: string }> = [];
    candidates.forEach((c, i) => {
      const digest = digests[i];
      if (claimants.get(c.n)! > 1) {
        results[c.index].verdict = 'conflict';
      } else if (!DIGEST_PATTERN.test(digest)) {
        results[c.index].verdict = 'skipped';
      } else if (this._edited.has(editedKey(c.cellId, c.n, digest))) {
        results[c.index].verdict = 'edited';
      } else {
        ask.push({ index: c.index, cellId: c.cellId, n: c.n, digest });
      }
    });
    if (ask.length === 0) {
      return results;
    }
    ask.sort((a, b) => a.n - b.n);
    const claims = ask.map(
      a => `[${pyIntLiteral('executionCount', a.n)}, ${pyStringLiteral(a.digest)}]`
    );
    const label = 'checking cells against the kernel history';
    const reply = await this._listing(
      'verify:' + ask.map(a => `${a.n}:${a.digest}`).join(','),
      label,
      `${HELPER_REF}.verify_cells([${claims.join(', ')}])`
    );
    const aligned = (reply as { aligned?: unknown }).aligned;
    const entries = (reply as { cells?: unknown }).cells;
    if (typeof aligned !== 'boolean' || !Array.isArray(entries)) {
      throw malformed(label);
    }
    const answers = new Map<string, boolean | null>();
    for (const e of entries) {
      if (
        !isRecord(e) ||
        typeof e.n !== 'number' ||
        typeof e.d !== 'string' ||
        !(e.match === true || e.match === false || e.match === null)
      ) {
        throw malformed(label);
      }
      answers.set(`${e.n}:${e.d}`, e.match);
    }
    const stale = ledger !== null && ledger.generation !== generation;
    for (const a of ask) {
      const match = stale ? null : answers.get(`${a.n}:${a.digest}`);
      const r = results[a.index];
      if (match === false) {
        r.verdict = 'edited';
        if (this._edited.size >= 10000) {
          this._edited.clear();
        }
        this._edited.add(editedKey(a.cellId, a.n, a.digest));
      } else if (match !== true) {
        r.verdict = 'unknown';
      } else if (!ledger) {
        r.verdict = 'verified';
      } else if (ledger.trusts(a.cellId, a.n)) {
        r.verdict = 'trusted';
      } else if (ledger.countFor(a.cellId) !== undefined || ledger.cellFor(a.n) !== undefined) {
        // The cell ran again, or another cell was seen to run as n, while the kernel answered.
        r.verdict = 'conflict';
      } else {
        ledger.record(a.cellId, a.n);
        r.verdict = 'verified';
      }
    }
    return results;
  }

  /**
   * Describes the array-like variables in the user's namespace (numpy arrays with a numeric
   * dtype, lists and tuples of numbers). Names starting with `_` and IPython's own are left out.
   * One silent request; no data moved. While the kernel is busy the request is deferred until
   * it is idle, and calls made meanwhile share one request.
   */
  async listVariables(): Promise<ArrayInfo[]> {
    const reply = await this._listing('vars', 'listing variables', `${HELPER_REF}.list_vars()`);
    const vars = (reply as { vars?: unknown }).vars;
    if (!Array.isArray(vars)) {
      throw malformed('the variable list');
    }
    const out: ArrayInfo[] = [];
    for (const e of vars) {
      if (!isRecord(e)) {
        throw malformed('the variable list');
      }
      const check = normalizeIdentifier(e.name);
      if (!check.ok || check.changed) {
        continue;
      }
      out.push(parseInfo(e, { kind: 'variable', name: check.name }));
    }
    out.sort((a, b) => (a.label < b.label ? -1 : a.label > b.label ? 1 : 0));
    return out;
  }

  /**
   * Reads an array at full precision: float64 as is, float32/16, ints and bool converted to
   * float64 exactly, complex64/128 as interleaved complex128. 1-D and 2-D, any layout (the
   * kernel makes a C-ordered copy when needed). Refuses, with a BridgeError whose message says
   * why: empty arrays, more than 2-D, int64/uint64 values beyond ±2⁵³ (naming the first
   * index), arrays over {@link maxBytes}, a cell count not from this session.
   */
  async readArray(source: ArraySource): Promise<ArrayData> {
    const src = this._sourceLiteral(source);
    const label = `reading ${sourceLabel(source)}`;
    if (await this._useComm()) {
      return this._readComm(src.json, label, source);
    }
    return this._readBase64(src.py, label, source);
  }

  /**
   * Reads a real scalar (a sample rate, say) from a variable or an attribute path such as
   * `fs` or `rec.fs`. Every part is validated as an identifier; dunder attributes are refused.
   */
  async readScalar(path: string): Promise<number> {
    if (typeof path !== 'string') {
      throw new TypeError(`path must be a string, got ${typeof path}`);
    }
    const parts = path.split('.').map((p, i) => checkIdentifier(`path part ${i + 1}`, p.trim()));
    if (parts.length > 4) {
      throw new RangeError(`path must have at most 4 parts, got ${parts.length}`);
    }
    const dunder = parts.slice(1).find(p => p.startsWith('__'));
    if (dunder !== undefined) {
      throw new TypeError(`path must not reach private attributes, got ${JSON.stringify(dunder)}`);
    }
    const expr = `${HELPER_REF}.read_scalar([${parts.map(pyStringLiteral).join(', ')}])`;
    const r = await this._evaluate(`reading ${parts.join('.')}`, { r: expr });
    const v = parseJsonExpression(r.r, `reading ${parts.join('.')}`);
    if (isRecord(v) && typeof v.value === 'number') {
      return v.value;
    }
    throw this._kernelRefusal(v, parts.join('.'));
  }

  /**
   * Writes `array` into the kernel as a new numpy array (float64, or complex128 when
   * `array.complex`) bound to `name`, in chunks far below the server's message limit, without
   * touching history or the execution counter. Unless `overwrite`, a name that exists or
   * shadows a builtin is not written and the result says why (status 'exists' or 'shadows').
   */
  async writeArray(
    name: string,
    array: ArrayData,
    options: { overwrite?: boolean } = {}
  ): Promise<WriteResult> {
    const check = normalizeIdentifier(name);
    if (!check.ok) {
      throw new BridgeError(
        'invalid-name',
        `Cannot write to ${JSON.stringify(String(name).slice(0, 40))}: ${check.reason}.`
      );
    }
    const pyName = check.name;
    validateArrayData(array);
    const overwrite = options.overwrite === true;
    const label = `writing ${pyName}`;
    const raw = new Uint8Array(array.data.buffer, array.data.byteOffset, array.data.byteLength);
    const shape = array.shape.slice();
    const outcome = (await this._useComm())
      ? await this._writeComm(pyName, shape, array.complex, raw, overwrite, label)
      : await this._writeBase64(pyName, shape, array.complex, raw, overwrite, label);
    if ('conflict' in outcome) {
      return conflictResult(pyName, outcome.conflict);
    }
    const warnings: string[] = [];
    if (check.changed) {
      warnings.push(
        `Written as "${pyName}", the form Python itself uses for the name you typed (NFKC normalisation).`
      );
    }
    const was = outcome.was;
    if (was.module) {
      warnings.push(`"${pyName}" was the module ${was.module}; it is now the array.`);
    } else if (was.exists) {
      warnings.push(`"${pyName}" held a ${was.existingType ?? 'value'}; it was replaced.`);
    }
    if (was.builtin) {
      warnings.push(`"${pyName}" now shadows the Python builtin of that name.`);
    }
    return { status: 'written', name: pyName, bytes: raw.byteLength, warnings };
  }

  // ---------------------------------------------------------------- internals

  private _sourceLiteral(source: ArraySource): { json: Record<string, unknown>; py: string } {
    if (!isRecord(source)) {
      throw new TypeError(`source must be an ArraySource, got ${typeof source}`);
    }
    if (source.kind === 'variable') {
      const name = checkIdentifier('source.name', source.name);
      return {
        json: { kind: 'variable', name },
        py: `{"kind": "variable", "name": ${pyStringLiteral(name)}}`
      };
    }
    if (source.kind === 'cell') {
      const n = source.executionCount;
      if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 1) {
        throw new TypeError(`source.executionCount must be a positive integer, got ${String(n)}`);
      }
      if (this._ledger && !this._ledger.trusts(source.cellId, n)) {
        throw new BridgeError(
          'stale-count',
          `The result Out[${n}] shown in the notebook was not produced by the kernel running now (it was restarted or changed since), so it cannot be read. Run the cell again, or pick a variable.`
        );
      }
      return { json: { kind: 'cell', n }, py: `{"kind": "cell", "n": ${n}}` };
    }
    throw new TypeError(
      `source.kind must be 'cell' or 'variable', got ${String((source as { kind: unknown }).kind)}`
    );
  }

  /** Listing requests: deferred while the kernel is busy, coalesced by key. */
  private _listing(key: string, label: string, expr: string): Promise<unknown> {
    const existing = this._listings.get(key);
    if (existing) {
      return existing;
    }
    const p = (async () => {
      try {
        await this._whenIdle(label);
        const r = await this._evaluate(label, { r: expr });
        const v = parseJsonExpression(r.r, label);
        if (!isRecord(v)) {
          throw malformed(label);
        }
        return v;
      } finally {
        this._listings.delete(key);
      }
    })();
    this._listings.set(key, p);
    return p;
  }

  /** Resolves when the kernel is not busy (deferral of listings); fails on kernel loss. */
  private async _whenIdle(label: string): Promise<void> {
    this._checkUsable();
    if (!this._shellBusy) {
      return;
    }
    const op = this._newOp(label);
    try {
      await Promise.race([
        op.promise,
        new Promise<void>(resolve => {
          const onIdle = (): void => {
            this._shellIdle.disconnect(onIdle);
            resolve();
          };
          this._shellIdle.connect(onIdle);
          op.promise.catch(() => this._shellIdle.disconnect(onIdle));
        })
      ]);
    } finally {
      this._endOp(op);
    }
    this._checkUsable();
  }

  /**
   * One silent execute that installs the helper if needed and evaluates `expressions`.
   * Retries once when the kernel aborted it because of a failure queued before it.
   */
  private async _evaluate(
    label: string,
    expressions: Record<string, string>,
    retry = true
  ): Promise<Record<string, unknown>> {
    this._checkUsable();
    await this._checkPython();
    const op = this._newOp(label);
    let future: Kernel.IShellFuture<
      KernelMessage.IExecuteRequestMsg,
      KernelMessage.IExecuteReplyMsg
    > | null = null;
    try {
      future = this._kernel.requestExecute(
        {
          code: installCode(),
          silent: true,
          store_history: false,
          user_expressions: expressions,
          allow_stdin: false,
          stop_on_error: false
        },
        true
      );
      future.onIOPub = msg => {
        if (msg.header.msg_type === 'status') {
          const s = (msg.content as { execution_state?: string }).execution_state;
          if (s === 'busy') {
            op.start();
          }
        }
      };
      const reply = (await Promise.race([
        future.done,
        op.promise
      ])) as KernelMessage.IExecuteReplyMsg;
      const content = reply.content as unknown as Record<string, unknown>;
      if (content.status === 'aborted') {
        if (retry) {
          this._endOp(op);
          return this._evaluate(label, expressions, false);
        }
        throw new BridgeError(
          'aborted',
          `The kernel dropped the request (${label}) because a cell queued before it failed or was interrupted. Nothing in the panel was changed; try again.`
        );
      }
      if (content.status === 'error') {
        throw kernelException(content, label);
      }
      const exprs = content.user_expressions;
      if (!isRecord(exprs)) {
        throw malformed(label);
      }
      return exprs;
    } catch (e) {
      throw this._translate(e, label);
    } finally {
      this._endOp(op);
    }
  }

  private async _checkPython(): Promise<void> {
    if (this._language === null) {
      let info: KernelMessage.IInfoReply | undefined;
      let timer: ReturnType<typeof setTimeout> | undefined;
      try {
        info = await Promise.race([
          this._kernel.info,
          new Promise<undefined>(resolve => {
            timer = setTimeout(() => resolve(undefined), this._timeoutMs);
          })
        ]);
      } catch {
        info = undefined;
      } finally {
        clearTimeout(timer);
      }
      const name = info?.language_info?.name;
      this._language = typeof name === 'string' ? name.toLowerCase() : '';
    }
    if (this._language !== 'python' && this._language !== '') {
      throw new BridgeError(
        'unsupported-kernel',
        `This notebook's kernel runs ${this._language.slice(0, 40)}, not Python: Perpend can only read arrays from the notebook's outputs.`
      );
    }
  }

  private _newOp(label: string): Op {
    const op = new Op(label, this._timeoutMs, () => this._emitActivity());
    this._ops.add(op);
    if (!this._shellBusy && this._kernel.status === 'idle') {
      op.armGuard();
    }
    this._emitActivity();
    return op;
  }

  private _endOp(op: Op): void {
    op.finish();
    if (this._ops.delete(op)) {
      this._emitActivity();
    }
  }

  private _emitActivity(): void {
    if (!this._disposed) {
      this._activityChanged.emit(this.activity);
    }
  }

  private _checkUsable(): void {
    if (this._disposed) {
      throw new BridgeError(
        'disposed',
        'Perpend stopped talking to this kernel (the bridge was closed).'
      );
    }
    if (this._kernel.isDisposed || this._kernel.status === 'dead') {
      throw new BridgeError(
        'dead',
        'The kernel is not running. Start or restart it, then try again; the panel keeps what it has.'
      );
    }
  }

  private _onStatus(_: Kernel.IKernelConnection, status: Kernel.Status): void {
    if (status === 'restarting' || status === 'autorestarting') {
      // A new kernel process has a new history.
      this._edited.clear();
    }
    if (status === 'restarting') {
      // A restart the user asked for, or (when 'autorestarting' follows at once, as
      // @jupyterlab/services reports a server-side restart after a kernel died) a death.
      this._dropComm();
      this._shellBusy = false;
      this._autoRestart = false;
      setTimeout(() => {
        if (this._autoRestart) {
          return;
        }
        this._failAll(
          'restarted',
          "The kernel restarted before the request finished. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
        );
      }, 0);
    } else if (status === 'autorestarting') {
      this._autoRestart = true;
      this._dropComm();
      this._shellBusy = false;
      this._failAll(
        'dead',
        "The kernel died before the request finished and the server restarted it. Nothing in the panel was changed; the kernel's variables are gone, so run the cells again."
      );
    } else if (status === 'dead') {
      this._dropComm();
      this._failAll(
        'dead',
        'The kernel died before the request finished. Nothing in the panel was changed; restart the kernel and run the cells again.'
      );
    }
  }

  /**
   * Tracks the main shell's busy/idle from iopub status messages, ignoring those of kernel
   * subshells (other comms may run there while the main shell is busy), which the
   * connection's own `status` mixes in.
   */
  private _onIOPub(_: Kernel.IKernelConnection, msg: KernelMessage.IIOPubMessage): void {
    if (msg.header.msg_type !== 'status') {
      return;
    }
    const parent = msg.parent_header as Partial<KernelMessage.IHeader> & { subshell_id?: unknown };
    if (parent && parent.subshell_id !== undefined && parent.subshell_id !== null) {
      return;
    }
    const s = (msg.content as { execution_state?: string }).execution_state;
    if (s === 'busy') {
      this._shellBusy = true;
      for (const op of this._ops) {
        op.cancelGuard();
      }
    } else if (s === 'idle') {
      this._shellBusy = false;
      for (const op of this._ops) {
        op.armGuard();
      }
      this._shellIdle.emit(undefined);
    }
  }

  private _onConnection(_: Kernel.IKernelConnection, status: Kernel.ConnectionStatus): void {
    if (status !== 'connected') {
      this._dropComm();
      // Status messages may have been missed; the next one tells the truth again.
      this._shellBusy = false;
      this._failAll(
        'disconnected',
        'The connection to the Jupyter server dropped before the request finished. Nothing in the panel was changed; try again when the kernel is connected.'
      );
    }
  }

  private _onKernelDisposed(): void {
    this._dropComm();
    this._failAll('dead', 'The kernel connection was closed. Nothing in the panel was changed.');
  }

  private _failAll(code: BridgeErrorCode, message: string): void {
    for (const op of Array.from(this._ops)) {
      op.fail(new BridgeError(code, message));
    }
  }

  private _translate(e: unknown, label: string): BridgeError {
    if (e instanceof BridgeError) {
      return e;
    }
    if (this._kernel.isDisposed || this._kernel.status === 'dead') {
      return new BridgeError(
        'dead',
        `The kernel died while ${label}. Nothing in the panel was changed.`
      );
    }
    const text = e instanceof Error ? e.message : String(e);
    if (/cancel/i.test(text)) {
      return new BridgeError(
        'restarted',
        `The kernel restarted or disconnected while ${label}. Nothing in the panel was changed; try again.`
      );
    }
    return new BridgeError(
      'disconnected',
      `The request failed while ${label}: ${text.slice(0, 200)}. Nothing in the panel was changed.`
    );
  }

  private _kernelRefusal(v: unknown, what: string): BridgeError {
    if (!isRecord(v) || typeof v.error !== 'string') {
      return malformed(`reading ${what}`);
    }
    return refusal(v.error, isRecord(v.detail) ? v.detail : {}, what, this._maxBytesSetting);
  }

  // ----------------------------------------------------------------- comm transport

  private async _useComm(): Promise<boolean> {
    if (this._transport === 'base64') {
      return false;
    }
    if (this._commFailed && this._transport === 'auto') {
      return false;
    }
    try {
      await this._ensureComm();
      return true;
    } catch (e) {
      if (this._transport === 'auto' && e instanceof BridgeError && e.code === 'comm-closed') {
        this._commFailed = true;
        return false;
      }
      throw e;
    }
  }

  private _ensureComm(): Promise<Kernel.IComm> {
    if (this._comm && !this._comm.isDisposed && this._commReady) {
      return this._commReady;
    }
    const ready = (async () => {
      const r = await this._evaluate('opening the data channel', { r: `${HELPER_REF}.HAS_COMM` });
      const has = r.r;
      if (!isRecord(has) || !isRecord(has.data) || has.data['text/plain'] !== 'True') {
        throw new BridgeError('comm-closed', 'The kernel has no comm support.');
      }
      const comm = this._kernel.createComm(COMM_TARGET);
      // @jupyterlab/services 7.6 sends comm messages over a kernel subshell (JEP 91) by
      // default, where they run in a thread beside the user's running cell. Perpend's reads
      // and writes stay on the main shell instead: they queue behind the running cell and see
      // the namespace between cells, never half-way through one. Set synchronously, before
      // the comm's asynchronous subshell start-up checks it.
      comm.commsOverSubshells = 'disabled' as CommsOverSubshells;
      this._comm = comm;
      const op = this._newOp('opening the data channel');
      try {
        const opened = new Promise<void>((resolve, reject) => {
          comm.onMsg = msg => {
            const data = msg.content.data as Record<string, unknown>;
            if (isRecord(data) && data.op === 'ready' && data.req === undefined) {
              resolve();
              return;
            }
            this._onCommMsg(msg);
          };
          comm.onClose = () => {
            reject(new BridgeError('comm-closed', "The kernel refused Perpend's data channel."));
            this._onCommClosed(comm);
          };
        });
        const future = comm.open({});
        future.onIOPub = msg => {
          if (
            msg.header.msg_type === 'status' &&
            (msg.content as { execution_state?: string }).execution_state === 'busy'
          ) {
            op.start();
          }
        };
        await Promise.race([opened, op.promise]);
        return comm;
      } catch (e) {
        if (this._comm === comm) {
          this._comm = null;
          this._commReady = null;
        }
        throw this._translate(e, 'opening the data channel');
      } finally {
        this._endOp(op);
      }
    })();
    this._commReady = ready;
    ready.catch(() => {
      if (this._commReady === ready) {
        this._commReady = null;
      }
    });
    return ready;
  }

  private _onCommMsg(msg: KernelMessage.ICommMsgMsg): void {
    const data = msg.content.data as Record<string, unknown>;
    if (!isRecord(data) || typeof data.req !== 'number') {
      return;
    }
    const handler = this._commHandlers.get(data.req);
    if (handler) {
      handler(data, (msg.buffers ?? []) as DataView[]);
    }
  }

  private _onCommClosed(comm: Kernel.IComm): void {
    if (this._comm !== comm) {
      return;
    }
    this._comm = null;
    this._commReady = null;
    const handlers = Array.from(this._commHandlers.values());
    this._commHandlers.clear();
    for (const h of handlers) {
      h({ op: 'closed' }, []);
    }
  }

  private _dropComm(): void {
    // A new kernel process may support the comm even if the last one did not.
    this._commFailed = false;
    this._comm = null;
    this._commReady = null;
    this._commHandlers.clear();
  }

  /** Sends one comm message for `op`, starting/extending its clock on the kernel's busy. */
  private _commSend(
    comm: Kernel.IComm,
    op: Op,
    data: Record<string, unknown>,
    buffers?: ArrayBuffer[]
  ): Kernel.IShellFuture {
    const future = comm.send(data as never, undefined, buffers, true);
    future.onIOPub = msg => {
      if (
        msg.header.msg_type === 'status' &&
        (msg.content as { execution_state?: string }).execution_state === 'busy'
      ) {
        op.start();
      }
    };
    future.onReply = msg => {
      if ((msg.content as { status?: string }).status === 'aborted') {
        op.fail(
          new BridgeError(
            'aborted',
            `The kernel dropped the request (${op.label}) because a cell queued before it failed or was interrupted. Nothing in the panel was changed; try again.`
          )
        );
      }
    };
    return future;
  }

  private async _readComm(
    source: Record<string, unknown>,
    label: string,
    original: ArraySource
  ): Promise<ArrayData> {
    const comm = await this._ensureComm();
    const req = ++this._req;
    const op = this._newOp(label);
    const what = sourceLabel(original);
    try {
      const work = new Promise<ArrayData>((resolve, reject) => {
        let head: {
          shape: number[];
          dtype: string;
          complex: boolean;
          nbytes: number;
          chunks: number;
          chunk: number;
        } | null = null;
        let out: Float64Array | null = null;
        let bytes: Uint8Array | null = null;
        let seen: Uint8Array | null = null;
        let received = 0;
        this._commHandlers.set(req, (d, buffers) => {
          op.touch();
          try {
            switch (d.op) {
              case 'header': {
                head = parseHeader(d, this._maxBytes, label);
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
                  !seen ||
                  typeof i !== 'number' ||
                  !Number.isInteger(i) ||
                  i < 0 ||
                  i >= head.chunks ||
                  seen[i] ||
                  offset !== i * head.chunk ||
                  buffers.length !== 1
                ) {
                  throw malformed(label);
                }
                const b = buffers[0];
                const expect = Math.min(head.chunk, head.nbytes - offset);
                if (b.byteLength !== expect) {
                  throw malformed(label);
                }
                if (bytes) {
                  bytes.set(new Uint8Array(b.buffer, b.byteOffset, b.byteLength), offset);
                } else if (b.byteOffset % 8 === 0) {
                  // One chunk: its buffer (a fresh copy made by the deserialiser) is the result.
                  out = new Float64Array(b.buffer, b.byteOffset, b.byteLength / 8);
                } else {
                  out = new Float64Array(b.byteLength / 8);
                  new Uint8Array(out.buffer).set(
                    new Uint8Array(b.buffer, b.byteOffset, b.byteLength)
                  );
                }
                seen[i] = 1;
                received += b.byteLength;
                return;
              }
              case 'end': {
                if (!head || !out || received !== head.nbytes) {
                  throw malformed(label);
                }
                resolve({ data: out, shape: head.shape, complex: head.complex, dtype: head.dtype });
                return;
              }
              case 'error':
                throw refusal(
                  String(d.code),
                  isRecord(d.detail) ? d.detail : {},
                  what,
                  this._maxBytesSetting
                );
              case 'closed':
                throw new BridgeError(
                  'comm-closed',
                  `The kernel closed Perpend's data channel while ${label}. Nothing in the panel was changed; try again (Perpend reopens it).`
                );
              default:
                throw malformed(label);
            }
          } catch (e) {
            this._commHandlers.delete(req);
            reject(e);
          }
        });
        const future = this._commSend(comm, op, {
          req,
          op: 'read',
          source,
          chunk: this._readChunk,
          max_bytes: this._maxBytes
        });
        future.done.then(
          () => {
            // The kernel went idle for this request: everything it sent has been handled.
            reject(
              new BridgeError(
                'malformed',
                `The kernel finished ${label} without sending the whole array (was it interrupted?). Nothing in the panel was changed; try again.`
              )
            );
          },
          () => undefined
        );
      });
      return await Promise.race([work, op.promise]);
    } catch (e) {
      throw this._translate(e, label);
    } finally {
      this._commHandlers.delete(req);
      this._endOp(op);
    }
  }

  private async _writeComm(
    name: string,
    shape: number[],
    complex: boolean,
    raw: Uint8Array,
    overwrite: boolean,
    label: string
  ): Promise<{ conflict: WriteConflict } | { was: WriteConflict }> {
    const comm = await this._ensureComm();
    const req = ++this._req;
    const op = this._newOp(label);
    try {
      let waiter: {
        resolve: (d: Record<string, unknown>) => void;
        reject: (e: unknown) => void;
      } | null = null;
      let failure: BridgeError | null = null;
      const inbox: Record<string, unknown>[] = [];
      this._commHandlers.set(req, d => {
        op.touch();
        let err: BridgeError | null = null;
        if (d.op === 'error') {
          err = refusal(
            String(d.code),
            isRecord(d.detail) ? d.detail : {},
            name,
            this._maxBytesSetting
          );
        } else if (d.op === 'closed') {
          err = new BridgeError(
            'comm-closed',
            `The kernel closed Perpend's data channel while ${label}. "${name}" was not written; try again.`
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
        future: Kernel.IShellFuture,
        opName: string
      ): Promise<Record<string, unknown>> =>
        new Promise<Record<string, unknown>>((resolve, reject) => {
          const queued = inbox.shift();
          if (queued) {
            if (queued.op === opName) {
              resolve(queued);
            } else {
              reject(malformed(label));
            }
            return;
          }
          if (failure) {
            reject(failure);
            return;
          }
          waiter = {
            resolve: d => (d.op === opName ? resolve(d) : reject(malformed(label))),
            reject
          };
          future.done.then(
            () => reject(malformed(label)),
            () => undefined
          );
        });
      const begin = this._commSend(comm, op, {
        req,
        op: 'w-begin',
        name,
        shape,
        complex,
        nbytes: raw.byteLength,
        overwrite
      });
      const cs = this._writeChunk;
      // A small write goes in one burst (begin, data, end) without waiting for the kernel's
      // answer to begin: one round trip. A large one waits, so that nothing is sent when the
      // name needs confirmation.
      const small = raw.byteLength <= cs;
      if (!small) {
        const begun = await Promise.race([expect(begin, 'w-begun'), op.promise]);
        const early = parseWriteReply(begun, label);
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
        this._commSend(comm, op, { req, op: 'w-chunk', offset }, [chunk]);
        // Let the socket drain so that memory stays bounded on large writes.
        if (!small) {
          await yieldToEventLoop();
        }
      }
      const endF = this._commSend(comm, op, { req, op: 'w-end' });
      if (small) {
        const begun = await Promise.race([expect(begin, 'w-begun'), op.promise]);
        const early = parseWriteReply(begun, label);
        if (early && 'conflict' in early) {
          return early;
        }
      }
      const ended = await Promise.race([expect(endF, 'w-ended'), op.promise]);
      const r = parseWriteReply(ended, label);
      if (!r) {
        throw malformed(label);
      }
      return r;
    } catch (e) {
      if (this._comm === comm && !comm.isDisposed) {
        try {
          comm.send({ req, op: 'w-abort' });
        } catch {
          // Best effort: the kernel drops stale staged writes on its own.
        }
      }
      throw this._translate(e, label);
    } finally {
      this._commHandlers.delete(req);
      this._endOp(op);
    }
  }

  // --------------------------------------------------------------- base64 transport

  private async _readBase64(src: string, label: string, original: ArraySource): Promise<ArrayData> {
    const h = ++this._req;
    const what = sourceLabel(original);
    const cs = this._readChunk;
    // One request opens the stage and brings the first chunk (closing the stage when that
    // was all): a small array costs one round trip.
    const openR = await this._evaluate(label, {
      r: `${HELPER_REF}.b64_open(${h}, ${src}, ${pyIntLiteral('maxBytes', this._maxBytes)})`,
      c: `${HELPER_REF}.b64_chunk(${h}, 0, ${cs}, True)`
    });
    const head0 = parseJsonExpression(openR.r, label);
    if (isRecord(head0) && typeof head0.error === 'string') {
      throw refusal(
        head0.error,
        isRecord(head0.detail) ? head0.detail : {},
        what,
        this._maxBytesSetting
      );
    }
    let closed = false;
    try {
      const head = parseHeader(
        {
          ...(head0 as object),
          chunk: cs,
          chunks: Math.ceil(Number((head0 as { nbytes?: unknown }).nbytes) / cs)
        },
        this._maxBytes,
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
        const text = plainText(entry, label);
        if (text.startsWith('{')) {
          throw new BridgeError(
            'malformed',
            `The kernel lost the staged array while ${label} (was the helper reset?). Try again.`
          );
        }
        let n: number;
        try {
          n = decodeBase64Into(text, bytes, o);
        } catch {
          throw malformed(label);
        }
        if (n !== size) {
          throw malformed(label);
        }
      };
      put(openR.c, 0);
      // A few requests in flight keep the kernel busy while the previous reply is decoded.
      let next = 0;
      const worker = async (): Promise<void> => {
        while (next < offsets.length) {
          const o = offsets[next++];
          const size = Math.min(cs, head.nbytes - o);
          const r = await this._evaluate(label, {
            r: `${HELPER_REF}.b64_chunk(${h}, ${o}, ${size})`
          });
          put(r.r, o);
        }
      };
      await Promise.all([worker(), worker(), worker()]);
      return { data: out, shape: head.shape, complex: head.complex, dtype: head.dtype };
    } finally {
      if (!closed) {
        this._release(`${HELPER_REF}.b64_close(${h})`);
      }
    }
  }

  private async _writeBase64(
    name: string,
    shape: number[],
    complex: boolean,
    raw: Uint8Array,
    overwrite: boolean,
    label: string
  ): Promise<{ conflict: WriteConflict } | { was: WriteConflict }> {
    const h = ++this._req;
    // 3 MiB of bytes is 4 MiB of base64: far below the 10 MiB message limit.
    const cs = Math.min(this._writeChunk, 3 * MiB);
    const beginExpr = `${HELPER_REF}.w_begin(${h}, ${pyStringLiteral(name)}, [${shape.map(s => pyIntLiteral('shape', s)).join(', ')}], ${complex ? 'True' : 'False'}, ${raw.byteLength}, ${overwrite ? 'True' : 'False'})`;
    const chunkExpr = (o: number): string =>
      `${HELPER_REF}.w_chunk(${h}, ${o}, "${encodeBase64(raw.subarray(o, Math.min(o + cs, raw.byteLength)))}")`;
    const checkChunk = (entry: unknown): void => {
      const v = parseJsonExpression(entry, label);
      if (!isRecord(v) || v.ok !== true) {
        throw this._kernelRefusal(v, name);
      }
    };
    if (raw.byteLength <= cs) {
      // Small: begin, data and end in one request (evaluated in order; after a conflict the
      // later two find no stage and are ignored).
      const r = await this._evaluate(label, {
        b: beginExpr,
        c: chunkExpr(0),
        e: `${HELPER_REF}.w_end(${h})`
      });
      const b = parseWriteReply(parseJsonExpression(r.b, label), label);
      if (b && 'conflict' in b) {
        return b;
      }
      checkChunk(r.c);
      const done = parseWriteReply(parseJsonExpression(r.e, label), label);
      if (!done) {
        throw malformed(label);
      }
      return done;
    }
    const begin = await this._evaluate(label, { r: beginExpr });
    const b = parseWriteReply(parseJsonExpression(begin.r, label), label);
    if (b && 'conflict' in b) {
      return b;
    }
    try {
      const offsets: number[] = [];
      for (let o = 0; o < raw.byteLength; o += cs) {
        offsets.push(o);
      }
      // A few chunks in flight: the kernel decodes one while the next is on its way.
      let next = 0;
      const worker = async (): Promise<void> => {
        while (next < offsets.length) {
          const o = offsets[next++];
          const r = await this._evaluate(label, { r: chunkExpr(o) });
          checkChunk(r.r);
        }
      };
      await Promise.all([worker(), worker(), worker()]);
      const end = await this._evaluate(label, { r: `${HELPER_REF}.w_end(${h})` });
      const r = parseWriteReply(parseJsonExpression(end.r, label), label);
      if (!r) {
        throw malformed(label);
      }
      return r;
    } catch (e) {
      this._release(`${HELPER_REF}.w_abort(${h})`);
      throw e;
    }
  }

  /**
   * Frees a staged transfer in the kernel: fire and forget, not tracked as activity (the
   * helper also drops stale stages on its own).
   */
  private _release(expr: string): void {
    if (this._disposed || this._kernel.isDisposed || this._kernel.status === 'dead') {
      return;
    }
    try {
      const f = this._kernel.requestExecute(
        {
          code: '',
          silent: true,
          store_history: false,
          user_expressions: { r: expr },
          allow_stdin: false,
          stop_on_error: false
        },
        true
      );
      f.done.catch(() => undefined);
    } catch {
      // The connection is going away; the kernel side is dropped with it.
    }
  }

  private _kernel: Kernel.IKernelConnection;
  private _timeoutMs: number;
  private _maxBytes: number;
  private _maxBytesSetting: string;
  private _ledger: SessionLedger | null;
  private _transport: 'auto' | 'comm' | 'base64';
  private _readChunk: number;
  private _writeChunk: number;
  private _disposed = false;
  private _ops = new Set<Op>();
  private _listings = new Map<string, Promise<unknown>>();
  private _language: string | null = null;
  private _comm: Kernel.IComm | null = null;
  private _commReady: Promise<Kernel.IComm> | null = null;
  private _commFailed = false;
  private _commHandlers = new Map<number, CommHandler>();
  private _req = 0;
  private _activityChanged = new Signal<this, KernelBridge.IActivity>(this);
  private _shellIdle = new Signal<this, void>(this);
  private _shellBusy = false;
  private _autoRestart = false;
  private _edited = new Set<string>();
  private _editedGeneration = 0;
}

function editedKey(cellId: string, n: number, digest: string): string {
  return `${n}\u0000${digest}\u0000${cellId}`;
}

// ------------------------------------------------------------------- helpers (module)

function yieldToEventLoop(): Promise<void> {
  return new Promise(resolve => setTimeout(resolve, 0));
}

function positive(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
    throw new RangeError(`${name} must be a positive number, got ${String(v)}`);
  }
  return v;
}

function clampChunk(name: string, v: unknown, max: number): number {
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 65536 || v > max || v % 16 !== 0) {
    throw new RangeError(`${name} must be a multiple of 16 in [65536, ${max}], got ${String(v)}`);
  }
  return v;
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function sourceLabel(s: ArraySource): string {
  return s.kind === 'variable' ? s.name : `Out[${s.executionCount}]`;
}

function malformed(what: string): BridgeError {
  return new BridgeError(
    'malformed',
    `The kernel's reply while ${what} was not in the form Perpend expects, so it was ignored. Nothing in the panel was changed. (Was Perpend's helper in the kernel changed?)`
  );
}

function kernelException(content: Record<string, unknown>, label: string): BridgeError {
  const ename = typeof content.ename === 'string' ? content.ename.slice(0, 60) : 'Error';
  if (ename === 'KeyboardInterrupt') {
    return new BridgeError(
      'interrupted',
      `The kernel was interrupted while ${label}. Nothing in the panel was changed.`
    );
  }
  const evalue = typeof content.evalue === 'string' ? content.evalue.slice(0, 200) : '';
  return new BridgeError(
    'kernel-error',
    `The kernel raised ${ename} while ${label}${evalue ? `: ${evalue}` : ''}. Nothing in the panel was changed.`
  );
}

/** The text/plain of one user expression result, or a BridgeError. */
function plainText(entry: unknown, label: string): string {
  if (!isRecord(entry)) {
    throw malformed(label);
  }
  if (entry.status === 'error') {
    throw kernelException(entry, label);
  }
  const data = entry.data;
  if (entry.status !== 'ok' || !isRecord(data) || typeof data['text/plain'] !== 'string') {
    throw malformed(label);
  }
  return data['text/plain'];
}

function parseJsonExpression(entry: unknown, label: string): unknown {
  const text = plainText(entry, label);
  try {
    return JSON.parse(text);
  } catch {
    throw malformed(label);
  }
}

const DTYPE =
  /^(bool|u?int(8|16|32|64)|float(16|32|64|96|128)|complex(64|128|192|256)|longlong|ulonglong|longdouble|clongdouble)$/;

function parseShape(v: unknown): number[] | null {
  if (!Array.isArray(v) || v.length === 0 || v.length > 32) {
    return null;
  }
  for (const s of v) {
    if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 0) {
      return null;
    }
  }
  return v as number[];
}

const NOTE_TEXT: Record<string, string> = {
  list: 'A Python list: it is converted to a numpy array when read.',
  tuple: 'A Python tuple: it is converted to a numpy array when read.',
  subclass: 'A subclass of numpy.ndarray: its plain array data is read.',
  'big-endian': 'Stored big-endian: converted when read.',
  ndim: 'More than two dimensions: Perpend reads 1-D and 2-D arrays; select a slice into a variable first.',
  empty: 'Empty: there is nothing to read.',
  extended:
    'Extended precision (long double): it cannot be held exactly in float64, so Perpend does not read it.',
  int64:
    'int64/uint64: values beyond ±2^53 cannot be held exactly in float64; such arrays are refused when read.'
};

function parseInfo(e: Record<string, unknown>, source: ArraySource): ArrayInfo {
  const shape = parseShape(e.shape);
  const dtype = e.dtype;
  const bytes = e.bytes;
  if (
    !shape ||
    typeof dtype !== 'string' ||
    !DTYPE.test(dtype) ||
    typeof bytes !== 'number' ||
    !Number.isSafeInteger(bytes) ||
    bytes < 0 ||
    typeof e.readable !== 'boolean' ||
    !Array.isArray(e.notes)
  ) {
    throw malformed(source.kind === 'cell' ? 'listing cell results' : 'listing variables');
  }
  const notes: string[] = [];
  for (const n of e.notes) {
    if (typeof n === 'string' && Object.prototype.hasOwnProperty.call(NOTE_TEXT, n)) {
      notes.push(NOTE_TEXT[n]);
    }
  }
  return {
    source,
    label: sourceLabel(source),
    shape: shape.slice(),
    dtype,
    bytes,
    readable: e.readable,
    notes
  };
}

function parseHeader(
  d: Record<string, unknown>,
  maxBytes: number,
  label: string
): {
  shape: number[];
  dtype: string;
  complex: boolean;
  nbytes: number;
  chunks: number;
  chunk: number;
} {
  const shape = parseShape(d.shape);
  const { dtype, complex, nbytes, chunks, chunk } = d;
  if (
    !shape ||
    shape.length > 2 ||
    typeof dtype !== 'string' ||
    !DTYPE.test(dtype) ||
    typeof complex !== 'boolean' ||
    typeof nbytes !== 'number' ||
    typeof chunks !== 'number' ||
    typeof chunk !== 'number' ||
    !Number.isSafeInteger(nbytes) ||
    !Number.isSafeInteger(chunks) ||
    !Number.isSafeInteger(chunk) ||
    chunk <= 0
  ) {
    throw malformed(label);
  }
  const elements = shape.reduce((a, b) => a * b, 1);
  if (
    elements * (complex ? 16 : 8) !== nbytes ||
    nbytes === 0 ||
    Math.ceil(nbytes / chunk) !== chunks
  ) {
    throw malformed(label);
  }
  if (nbytes > maxBytes) {
    throw malformed(label);
  }
  return { shape: shape.slice(), dtype, complex, nbytes, chunks, chunk };
}

function parseConflict(c: unknown): WriteConflict | null {
  if (!isRecord(c) || typeof c.exists !== 'boolean' || typeof c.builtin !== 'boolean') {
    return null;
  }
  const type = typeof c.type === 'string' ? c.type.replace(/[^\w.]/g, '').slice(0, 60) : null;
  const module =
    typeof c.module === 'string' ? c.module.replace(/[^\w.]/g, '').slice(0, 100) : null;
  return { exists: c.exists, existingType: type, module, builtin: c.builtin };
}

function parseWriteReply(
  v: unknown,
  label: string
): { conflict: WriteConflict } | { was: WriteConflict } | null {
  if (!isRecord(v)) {
    throw malformed(label);
  }
  if (typeof v.error === 'string') {
    throw refusal(v.error, isRecord(v.detail) ? v.detail : {}, label, 'maxArrayMiB');
  }
  if ('conflict' in v) {
    const c = parseConflict(v.conflict);
    if (!c) {
      throw malformed(label);
    }
    return { conflict: c };
  }
  if (v.written === true) {
    const c = parseConflict(v.was);
    if (!c) {
      throw malformed(label);
    }
    return { was: c };
  }
  if (v.ok === true) {
    return null;
  }
  throw malformed(label);
}

function conflictResult(name: string, c: WriteConflict): WriteResult {
  if (c.exists) {
    const what = c.module ? `the module ${c.module}` : `a ${c.existingType ?? 'value'}`;
    return {
      status: 'exists',
      name,
      conflict: c,
      message: `"${name}" already exists in the kernel (it holds ${what}). Overwrite it?`
    };
  }
  return {
    status: 'shadows',
    name,
    conflict: c,
    message: `"${name}" is a Python builtin; writing the array would hide it in this notebook. Write anyway?`
  };
}

function mib(bytes: number): string {
  return `${(bytes / MiB).toFixed(bytes < MiB ? 3 : 1)} MiB`;
}

/** A refusal or error code from the helper as a user-facing BridgeError. */
function refusal(
  code: string,
  detail: Record<string, unknown>,
  what: string,
  setting: string
): BridgeError {
  const shape = parseShape(detail.shape);
  const shapeText = shape ? `(${shape.join(', ')})` : '';
  switch (code) {
    case 'not-found':
      return new BridgeError(
        'not-found',
        `There is no variable ${what} in the kernel (was it deleted, or the kernel restarted?).`
      );
    case 'not-in-cache':
      return new BridgeError(
        'not-in-cache',
        `${what} is not in IPython's output cache. ${CACHE_NOTES.notCached}`
      );
    case 'not-array':
      return new BridgeError(
        'not-array',
        `${what} is not an array or a list of numbers, so Perpend cannot read it.`
      );
    case 'scalar':
      return new BridgeError('scalar', `${what} is a single number, not an array.`);
    case 'dtype':
    case 'extended': {
      const dt =
        typeof detail.dtype === 'string'
          ? detail.dtype.replace(/[^\w]/g, '').slice(0, 40)
          : 'this dtype';
      return new BridgeError(
        'unsupported-dtype',
        code === 'extended'
          ? `${what} has dtype ${dt} (extended precision), which float64 cannot hold exactly; convert it with .astype(float) first if that is acceptable.`
          : `${what} has dtype ${dt}; Perpend reads numbers only (bool, integers, floats, complex).`
      );
    }
    case 'ndim':
      return new BridgeError(
        'ndim',
        `${what} has shape ${shapeText}: Perpend reads 1-D and 2-D arrays. Select a slice into a variable first.`
      );
    case 'empty':
      return new BridgeError(
        'empty',
        `${what} is empty (shape ${shapeText}): there is nothing to read.`
      );
    case 'too-large': {
      const b = typeof detail.bytes === 'number' ? detail.bytes : NaN;
      const m = typeof detail.max === 'number' ? detail.max : NaN;
      return new BridgeError(
        'too-large',
        `${what} is ${mib(b)} as float64, over the limit of ${mib(m)} (setting "${setting}"). A read costs several times that in browser memory; raise the setting or read a slice.`
      );
    }
    case 'int-precision': {
      const idx =
        Array.isArray(detail.index) && detail.index.every(i => typeof i === 'number')
          ? detail.index.join(', ')
          : '?';
      const val =
        typeof detail.value === 'string' && /^-?\d{1,25}$/.test(detail.value) ? detail.value : '?';
      return new BridgeError(
        'int-precision',
        `${what}[${idx}] is ${val}, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.`
      );
    }
    case 'invalid-name':
      return new BridgeError('invalid-name', `${what} is not a valid Python name.`);
    case 'interrupted':
      return new BridgeError(
        'interrupted',
        `The kernel was interrupted while working on ${what}. Nothing in the panel was changed.`
      );
    case 'memory':
      return new BridgeError('memory', `The kernel ran out of memory while working on ${what}.`);
    case 'not-scalar':
      return new BridgeError('not-array', `${what} is not a real number.`);
    case 'not-finite':
      return new BridgeError('not-array', `${what} is not finite.`);
    case 'stale':
      return new BridgeError(
        'malformed',
        `The kernel lost a staged transfer for ${what} (was the helper reset?). Try again.`
      );
    default:
      return new BridgeError(
        'kernel-error',
        `The kernel could not complete the request for ${what} (${code.replace(/[^\w-]/g, '').slice(0, 40)}).`
      );
  }
}

function validateArrayData(a: ArrayData): void {
  if (!isRecord(a)) {
    throw new TypeError(`array must be an ArrayData object, got ${typeof a}`);
  }
  if (!(a.data instanceof Float64Array)) {
    throw new TypeError(
      `array.data must be a Float64Array, got ${a.data === null ? 'null' : typeof a.data}`
    );
  }
  const shape = a.shape;
  if (!Array.isArray(shape) || shape.length < 1 || shape.length > 2) {
    throw new RangeError(`array.shape must have 1 or 2 dimensions, got ${JSON.stringify(shape)}`);
  }
  for (const s of shape) {
    if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 1) {
      throw new RangeError(
        `array.shape entries must be positive integers, got ${JSON.stringify(shape)}`
      );
    }
  }
  if (typeof a.complex !== 'boolean') {
    throw new TypeError(`array.complex must be a boolean, got ${typeof a.complex}`);
  }
  const n = shape.reduce((x, y) => x * y, 1) * (a.complex ? 2 : 1);
  if (n !== a.data.length) {
    throw new RangeError(
      `array.data has length ${a.data.length} but shape ${JSON.stringify(shape)}${a.complex ? ' (complex, interleaved)' : ''} needs ${n}`
    );
  }
}
