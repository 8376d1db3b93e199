/**
 * The workbench of one notebook: its set-ups (kept in the notebook's metadata) and their runs
 * (kept in memory). It validates before anything runs, reads sources through the reader,
 * computes through the runner, and never loses a set-up or another run when one run fails.
 * Signals fire only on real change.
 */
import { Signal, type ISignal } from '@lumino/signaling';
import { loadWorkbench, serializeWorkbench, type StoredWorkbench } from './metadata';
import { checkParams, type FieldIssue, type Trans } from './rules';
import {
  expandSweep,
  runLabel,
  type IRunner,
  type IWorkbenchReader,
  type ResultArray,
  type Run,
  type RunHandle,
  type RunInputs,
  type RunOutcome
} from './runs';
import {
  setupRateNames,
  setupSources,
  type Setup,
  type SetupParams,
  type SourceRef
} from './setup';
import { refKey } from './catalog';
import { checkSources, refLabel } from './sources-check';
import { truthOutcome } from './truth';

/** Where the set-ups are stored: the notebook's metadata under the project's key. */
export interface IMetadataHost {
  read(): unknown;
  write(value: StoredWorkbench): void;
}

/** Most runs kept per set-up (older ones are dropped, oldest first). */
export const RUNS_KEPT = 24;

/** Quiet time after a source changes before a following set-up re-runs, ms. */
export const FOLLOW_DEBOUNCE_MS = 400;

export class WorkbenchModel {
  constructor(options: WorkbenchModel.IOptions) {
    this._trans = options.trans;
    this._host = options.host;
    this._reader = options.reader;
    this._runner = options.runner;
    const loaded = loadWorkbench(this._trans, this._host.read());
    this._setups = loaded.setups;
    this._problems = loaded.problems;
    // Entries that failed validation are kept verbatim and written back with the valid ones, so
    // nothing the notebook held is lost; set-ups of a newer schema are never overwritten.
    this._readOnly = loaded.keep;
    const raw = this._host.read() as { setups?: unknown } | undefined;
    if (raw && typeof raw === 'object' && Array.isArray(raw.setups)) {
      const valid = new Set(serializeWorkbench(this._setups).setups.map(e => JSON.stringify(e)));
      this._invalid = raw.setups.filter(e => !valid.has(JSON.stringify(e)));
    }
  }

  /** Fires when the set-ups change (added, edited, removed, follow switched). */
  get setupsChanged(): ISignal<this, void> {
    return this._setupsChanged;
  }
  /** Fires with the run that changed (started, progressed, finished, dropped). */
  get runChanged(): ISignal<this, Run> {
    return this._runChanged;
  }
  get setups(): ReadonlyArray<Setup> {
    return this._setups;
  }
  /** What loading the stored set-ups found wrong, one sentence each (empty when all loaded). */
  get problems(): ReadonlyArray<string> {
    return this._problems;
  }
  /** True when the stored set-ups could not be read as a whole (a newer Perpend's, say):
   * they are kept as they are and nothing is written back. */
  get readOnly(): boolean {
    return this._readOnly;
  }
  get runs(): ReadonlyArray<Run> {
    return this._runs;
  }
  runsOf(setupId: string): Run[] {
    return this._runs.filter(r => r.setupId === setupId);
  }
  setup(id: string): Setup | undefined {
    return this._setups.find(s => s.id === id);
  }
  get isDisposed(): boolean {
    return this._disposed;
  }

  /** Checks a set-up's parameters and its sources as listed now; empty when it may run. */
  validate(params: SetupParams): FieldIssue[] {
    const issues = checkParams(this._trans, params);
    return issues.length > 0
      ? issues
      : checkSources(this._trans, params, r => this._reader.facts(r));
  }

  /** Adds a set-up after checking its parameters; returns its id, or the issues. */
  add(params: SetupParams, title: string): { id: string } | { issues: FieldIssue[] } {
    const issues = checkParams(this._trans, params);
    if (issues.length > 0) {
      return { issues };
    }
    const id = this._newSetupId(params.tool);
    this._setups = [
      ...this._setups,
      { id, title: title.slice(0, 120), follow: false, params: clone(params) }
    ];
    this._saveAndEmit();
    return { id };
  }

  /** Replaces a set-up's parameters (and title); a run of it still in flight is cancelled. */
  update(id: string, params: SetupParams, title?: string): FieldIssue[] {
    const s = this.setup(id);
    if (!s) {
      return [{ field: '', message: this._trans.__('There is no set-up %1.', id) }];
    }
    const issues = checkParams(this._trans, params);
    if (issues.length > 0) {
      return issues;
    }
    const next: Setup = { ...s, params: clone(params), title: (title ?? s.title).slice(0, 120) };
    if (JSON.stringify(next) === JSON.stringify(s)) {
      return [];
    }
    this._cancelRunsOf(id);
    this._replace(next);
    return [];
  }

  /**
   * Adds a copy of a set-up under a new id and `title` (following off, so the copy does not
   * re-run beside its original); returns the new id, or null when there is no such set-up.
   */
  duplicate(id: string, title: string): string | null {
    const s = this.setup(id);
    if (!s) {
      return null;
    }
    const copy: Setup = {
      id: this._newSetupId(s.params.tool),
      title: title.slice(0, 120),
      follow: false,
      params: clone(s.params)
    };
    const at = this._setups.indexOf(s) + 1;
    this._setups = [...this._setups.slice(0, at), copy, ...this._setups.slice(at)];
    this._saveAndEmit();
    return copy.id;
  }

  /** True while a run of the set-up is reading or computing. */
  isBusy(setupId: string): boolean {
    return this._runs.some(
      r => r.setupId === setupId && (r.status === 'reading' || r.status === 'running')
    );
  }

  /** Cancels every run of a set-up still in flight. */
  cancelSetup(setupId: string): void {
    this._cancelRunsOf(setupId);
  }

  /** Drops a run (cancelled first when in flight); the set-up and its other runs stay. */
  removeRun(runId: string): void {
    const r = this._run(runId);
    if (!r) {
      return;
    }
    this.cancel(runId);
    const gone = this._run(runId) ?? r;
    this._runs = this._runs.filter(x => x.id !== runId);
    this._runChanged.emit(gone);
  }

  /** Switches following its sources on or off. */
  setFollow(id: string, follow: boolean): void {
    const s = this.setup(id);
    if (s && s.follow !== follow) {
      this._replace({ ...s, follow });
    }
  }

  /** Removes a set-up, cancelling its runs and dropping them. */
  remove(id: string): void {
    if (!this.setup(id)) {
      return;
    }
    this._cancelRunsOf(id);
    this._setups = this._setups.filter(s => s.id !== id);
    const gone = this._runs.filter(r => r.setupId === id);
    this._runs = this._runs.filter(r => r.setupId !== id);
    this._saveAndEmit();
    gone.forEach(r => this._runChanged.emit(r));
  }

  /**
   * Runs a set-up on its sources as the kernel holds them now (a sweep: one run per value, in
   * parallel on the pool). Runs of the same set-up still in flight are cancelled first.
   * Resolves when every run it started has ended; never rejects.
   */
  async run(id: string): Promise<Run[]> {
    const s = this.setup(id);
    if (!s) {
      return [];
    }
    this._cancelRunsOf(id);
    const list =
      s.params.tool === 'sweep'
        ? expandSweep(s.params.base, s.params.parameter, s.params.values)
        : [s.params];
    const runs = list.map(p => this._newRun(s, p));
    // One read serves every run of a sweep (they share their sources).
    const read = this._read(runs[0].params);
    await Promise.all(runs.map(r => this._execute(r, read)));
    return runs.map(r => this._run(r.id) ?? r);
  }

  /** Re-reads the sources of every set-up and recomputes (set-ups one after another). */
  async runAll(): Promise<void> {
    for (const s of [...this._setups]) {
      if (this._disposed) {
        return;
      }
      await this.run(s.id);
    }
  }

  /** Cancels a run in flight (reading or computing); a finished run is left as it is. */
  cancel(runId: string): void {
    const r = this._run(runId);
    if (!r || (r.status !== 'reading' && r.status !== 'running')) {
      return;
    }
    this._handles.get(runId)?.cancel();
    this._handles.delete(runId);
    this._set(runId, { status: 'cancelled', progress: 0, arrays: {}, figures: [], inputs: {} });
  }

  /** Cancels every run in flight. */
  cancelAll(): void {
    for (const r of this._runs) {
      this.cancel(r.id);
    }
  }

  /**
   * Tells the workbench which sources changed (a cell re-executed, a variable re-bound).
   * Following set-ups that read one of them re-run after a quiet time; it only reads.
   */
  sourcesChanged(refs: ReadonlyArray<SourceRef>): void {
    const keys = new Set(refs.map(refKey));
    for (const s of this._setups) {
      if (!s.follow) {
        continue;
      }
      const reads = setupSources(s.params).some(x => keys.has(refKey(x.pick.ref)));
      const rates = setupRateNames(s.params).some(n =>
        keys.has(refKey({ kind: 'variable', name: n }))
      );
      if (reads || rates) {
        clearTimeout(this._follow.get(s.id));
        this._follow.set(
          s.id,
          setTimeout(() => {
            this._follow.delete(s.id);
            void this.run(s.id);
          }, FOLLOW_DEBOUNCE_MS)
        );
      }
    }
  }

  /** The kernel restarted: runs still reading fail by themselves; computing runs are noted. */
  kernelRestarted(): void {
    const note = this._trans.__(
      'The kernel restarted during this run; it goes on with the arrays read before.'
    );
    // A restart is announced more than once (restarting, autorestarting, a new connection):
    // the run says it once.
    for (const r of this._runs) {
      if (r.status === 'running' && !r.messages.includes(note)) {
        this._set(r.id, { messages: [...r.messages, note] });
      }
    }
  }

  /** The notebook closed: every run in flight is cancelled; nothing more is written. */
  dispose(): void {
    if (this._disposed) {
      return;
    }
    this.cancelAll();
    this._follow.forEach(t => clearTimeout(t));
    this._follow.clear();
    this._disposed = true;
    Signal.clearData(this);
  }

  private _newRun(s: Setup, params: Exclude<SetupParams, { tool: 'sweep' }>): Run {
    const run: Run = {
      id: `r${++this._runCount}`,
      setupId: s.id,
      label: runLabel(params),
      params,
      status: 'reading',
      progress: 0,
      messages: [],
      figures: [],
      arrays: {},
      inputs: {},
      fs: null,
      startedAt: Date.now(),
      readMs: null,
      computeMs: null
    };
    this._runs = [...this._runs, run];
    const mine = this._runs.filter(r => r.setupId === s.id);
    if (mine.length > RUNS_KEPT) {
      const drop = new Set(mine.slice(0, mine.length - RUNS_KEPT).map(r => r.id));
      this._runs = this._runs.filter(r => !drop.has(r.id));
    }
    this._runChanged.emit(run);
    return run;
  }

  private async _execute(run: Run, read: Promise<RunInputs>): Promise<void> {
    const t0 = Date.now();
    let inputs: RunInputs;
    try {
      inputs = await read;
    } catch (e) {
      if (this._live(run.id, 'reading')) {
        this._set(run.id, { status: 'failed', messages: [messageOf(e)], readMs: Date.now() - t0 });
      }
      return;
    }
    if (!this._live(run.id, 'reading')) {
      return;
    }
    // Checked again on what was read: the kernel may have changed since the form was checked.
    const issues = checkSources(this._trans, run.params, ref => {
      const a = inputs.arrays[fieldOf(run.params, ref)];
      return a ? { shape: a.shape, complex: a.complex } : null;
    });
    if (issues.length > 0) {
      this._set(run.id, {
        status: 'failed',
        messages: issues.map(i => i.message),
        readMs: Date.now() - t0
      });
      return;
    }
    this._set(run.id, {
      status: 'running',
      readMs: Date.now() - t0,
      inputs: inputsOf(this._trans, run.params, inputs),
      fs: inputs.fs
    });
    let handle: RunHandle;
    try {
      handle = this._runner.start(run.params, inputs, f => this._progress(run.id, f));
    } catch (e) {
      this._set(run.id, { status: 'failed', messages: [messageOf(e)] });
      return;
    }
    this._handles.set(run.id, handle);
    let out: RunOutcome;
    try {
      out = await handle.result;
    } catch (e) {
      out = { status: 'failed', messages: [messageOf(e)], figures: [], arrays: {}, computeMs: 0 };
    }
    this._handles.delete(run.id);
    if (this._live(run.id, 'running')) {
      const now = this._run(run.id)!;
      const prior = now.messages;
      const cancelled = out.status === 'cancelled';
      const truth = cancelled
        ? { figures: [], messages: [] }
        : truthOutcome(this._trans, run.params, now.inputs, out.arrays);
      this._set(run.id, {
        status: out.status,
        progress: cancelled ? 0 : 1,
        messages: [...prior, ...out.messages, ...truth.messages],
        figures: cancelled ? [] : [...out.figures, ...truth.figures],
        arrays: cancelled ? {} : out.arrays,
        computeMs: out.computeMs
      });
    }
  }

  /** Reads every source and the sample rate. Throws with a sentence naming what failed. */
  private async _read(p: Exclude<SetupParams, { tool: 'sweep' }>): Promise<RunInputs> {
    const arrays: RunInputs['arrays'] = {};
    for (const { field, pick } of setupSources(p)) {
      try {
        arrays[field] = this._shared(await this._reader.readArray(pick.ref));
      } catch (e) {
        throw new Error(
          this._trans.__('Reading %1 failed: %2', refLabel(this._trans, pick.ref), messageOf(e))
        );
      }
    }
    const rate =
      p.tool === 'adaptive'
        ? p.fs
        : p.tool === 'removal' && p.basis.kind === 'harmonics'
          ? p.basis.fs
          : null;
    let fs: number | null = null;
    if (rate?.kind === 'hz') {
      fs = rate.value;
    } else if (rate?.kind === 'variable') {
      try {
        fs = await this._reader.readScalar(rate.name);
      } catch (e) {
        throw new Error(
          this._trans.__('Reading the sample rate %1 failed: %2', rate.name, messageOf(e))
        );
      }
      if (!(fs > 0) || !Number.isFinite(fs)) {
        throw new Error(
          this._trans.__(
            'The sample rate %1 is %2 Hz; it must be a positive number.',
            rate.name,
            fs
          )
        );
      }
    }
    return { arrays, fs };
  }

  /**
   * An array read, with the values of a kept run's input that has the same digest (the kernel
   * confirmed the values unchanged): re-running a set-up then keeps one copy of its sources, not
   * one per run (24 runs of a 1e6-sample x and d held 384 MB). Inputs are only ever read.
   */
  private _shared(a: RunInputs['arrays'][string]): RunInputs['arrays'][string] {
    if (typeof a.digest !== 'string') {
      return a;
    }
    for (const r of this._runs) {
      for (const v of Object.values(r.inputs)) {
        if (
          v.digest === a.digest &&
          v.complex === a.complex &&
          v.data.length === a.data.length &&
          v.shape.length === a.shape.length &&
          v.shape.every((n, i) => n === a.shape[i])
        ) {
          return { ...a, data: v.data };
        }
      }
    }
    return a;
  }

  private _progress(id: string, f: number): void {
    const r = this._run(id);
    // Whole per cent steps only: a redraw per chunk would be noise.
    if (r && r.status === 'running' && Math.floor(f * 100) !== Math.floor(r.progress * 100)) {
      this._set(id, { progress: Math.min(1, Math.max(0, f)) });
    }
  }

  private _live(id: string, status: Run['status']): boolean {
    return !this._disposed && this._run(id)?.status === status;
  }

  private _run(id: string): Run | undefined {
    return this._runs.find(r => r.id === id);
  }

  private _set(id: string, patch: Partial<Run>): void {
    const i = this._runs.findIndex(r => r.id === id);
    if (i < 0 || this._disposed) {
      return;
    }
    const next = { ...this._runs[i], ...patch };
    this._runs = [...this._runs.slice(0, i), next, ...this._runs.slice(i + 1)];
    this._runChanged.emit(next);
  }

  private _cancelRunsOf(setupId: string): void {
    for (const r of this._runs) {
      if (r.setupId === setupId) {
        this.cancel(r.id);
      }
    }
  }

  private _replace(next: Setup): void {
    this._setups = this._setups.map(s => (s.id === next.id ? next : s));
    this._saveAndEmit();
  }

  private _saveAndEmit(): void {
    if (!this._readOnly && !this._disposed) {
      const stored = serializeWorkbench(this._setups);
      stored.setups.push(...this._invalid);
      this._host.write(stored);
    }
    this._setupsChanged.emit();
  }

  private _newSetupId(tool: string): string {
    let n = this._setups.length + 1;
    while (this._setups.some(s => s.id === `${tool}-${n}`)) {
      n++;
    }
    return `${tool}-${n}`;
  }

  private readonly _trans: Trans;
  private readonly _host: IMetadataHost;
  private readonly _reader: IWorkbenchReader;
  private readonly _runner: IRunner;
  private _setups: Setup[];
  private _invalid: unknown[] = [];
  private _problems: string[];
  private _readOnly: boolean;
  private _runs: Run[] = [];
  private _runCount = 0;
  private _disposed = false;
  private readonly _handles = new Map<string, RunHandle>();
  private readonly _follow = new Map<string, ReturnType<typeof setTimeout>>();
  private readonly _setupsChanged = new Signal<this, void>(this);
  private readonly _runChanged = new Signal<this, Run>(this);
}

export namespace WorkbenchModel {
  export interface IOptions {
    trans: Trans;
    host: IMetadataHost;
    reader: IWorkbenchReader;
    runner: IRunner;
  }
}

function clone<T>(v: T): T {
  return JSON.parse(JSON.stringify(v));
}

/** The set-up field a source was read under (for the second check on the arrays read). */
function fieldOf(p: Exclude<SetupParams, { tool: 'sweep' }>, ref: SourceRef): string {
  return setupSources(p).find(s => refKey(s.pick.ref) === refKey(ref))?.field ?? '';
}

/** The arrays a run read, kept beside its results for the plots (not copied). */
function inputsOf(
  trans: Trans,
  p: Exclude<SetupParams, { tool: 'sweep' }>,
  inputs: RunInputs
): Record<string, ResultArray> {
  const out: Record<string, ResultArray> = {};
  for (const { field, pick } of setupSources(p)) {
    const a = inputs.arrays[field];
    if (a) {
      out[field] = {
        data: a.data,
        shape: a.shape,
        complex: a.complex,
        description: refLabel(trans, pick.ref),
        ...(a.digest !== undefined ? { digest: a.digest } : {})
      };
    }
  }
  return out;
}

function messageOf(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}
