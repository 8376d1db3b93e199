/**
 * What the user is working on in one workbench: the current set-up (the card last clicked or
 * focused), the run shown in detail, and the runs ticked for comparison. The workbench's
 * commands act on these when they are given no set-up or run of their own. It follows the
 * model: a removed set-up or run stops being current (the next set-up takes over), and a
 * dropped run leaves the comparison. Plain state with one signal; no DOM.
 */
import { Signal, type ISignal } from '@lumino/signaling';
import type { Run } from './runs';
import type { WorkbenchModel } from './workbench';

export class WorkbenchSelection {
  constructor(model: WorkbenchModel) {
    this._model = model;
    this._order = model.setups.map(s => s.id);
    model.setupsChanged.connect(this._prune, this);
    model.runChanged.connect(this._onRun, this);
  }

  /** Fires when the current set-up, the shown run or the comparison changes. */
  get changed(): ISignal<this, void> {
    return this._changed;
  }

  /**
   * The current set-up: the one chosen last, or the first set-up when none was chosen (so a
   * shortcut always has a card it acts on, and the card shows it); null without set-ups.
   */
  get setupId(): string | null {
    return this._setup ?? this._model.setups[0]?.id ?? null;
  }

  /** The run shown in detail, or null. */
  get runId(): string | null {
    return this._run;
  }

  /** The runs ticked for comparison, in the order they were ticked. */
  get compared(): ReadonlyArray<string> {
    return this._compared;
  }

  isCompared(runId: string): boolean {
    return this._compared.includes(runId);
  }

  /** Makes a set-up current; the shown run stays only when it is one of that set-up's. */
  selectSetup(id: string | null): void {
    const setup = id !== null && this._model.setup(id) ? id : null;
    const run = this._run && this._setupOfRun(this._run) === setup ? this._run : null;
    this._assign(setup, run, this._compared);
  }

  /** Shows a run in detail and makes its set-up current. */
  selectRun(runId: string | null): void {
    const setup = runId !== null ? this._setupOfRun(runId) : undefined;
    if (runId !== null && setup === undefined) {
      return;
    }
    this._assign(setup ?? this._setup, runId, this._compared);
  }

  /** Ticks a run for comparison or takes it out. */
  setCompared(runId: string, on: boolean): void {
    if (on === this.isCompared(runId) || (on && !this._model.runs.some(r => r.id === runId))) {
      return;
    }
    const next = on ? [...this._compared, runId] : this._compared.filter(id => id !== runId);
    this._assign(this._setup, this._run, next);
  }

  /** Replaces the comparison with `runIds` (those that exist). */
  compareOnly(runIds: ReadonlyArray<string>): void {
    const known = new Set(this._model.runs.map(r => r.id));
    this._assign(
      this._setup,
      this._run,
      runIds.filter(id => known.has(id))
    );
  }

  dispose(): void {
    this._model.setupsChanged.disconnect(this._prune, this);
    this._model.runChanged.disconnect(this._onRun, this);
    Signal.clearData(this);
  }

  private _setupOfRun(runId: string): string | undefined {
    return this._model.runs.find(r => r.id === runId)?.setupId;
  }

  private _onRun(_: WorkbenchModel, r: Run): void {
    // Only a run that left the model matters here (progress and results change nothing).
    if (!this._model.runs.some(x => x.id === r.id)) {
      this._prune();
    }
  }

  /** Forgets what the model no longer holds; a removed current set-up passes to its neighbour. */
  private _prune(): void {
    const ids = this._model.setups.map(s => s.id);
    let setup = this._setup;
    if (setup !== null && !ids.includes(setup)) {
      const i = this._order.indexOf(setup);
      const after = this._order.slice(i + 1).find(id => ids.includes(id));
      const before = this._order
        .slice(0, Math.max(0, i))
        .reverse()
        .find(id => ids.includes(id));
      setup = after ?? before ?? null;
    }
    this._order = ids;
    const runs = new Set(this._model.runs.map(r => r.id));
    const run = this._run !== null && runs.has(this._run) ? this._run : null;
    this._assign(
      setup,
      run,
      this._compared.filter(id => runs.has(id))
    );
  }

  private _assign(setup: string | null, run: string | null, compared: ReadonlyArray<string>): void {
    const same =
      setup === this._setup &&
      run === this._run &&
      compared.length === this._compared.length &&
      compared.every((id, i) => id === this._compared[i]);
    this._order = this._model.setups.map(s => s.id);
    if (same) {
      return;
    }
    this._setup = setup;
    this._run = run;
    this._compared = [...compared];
    this._changed.emit();
  }

  private readonly _model: WorkbenchModel;
  private _setup: string | null = null;
  private _run: string | null = null;
  private _compared: string[] = [];
  /** The set-ups' order when last seen (to find a removed one's neighbour). */
  private _order: string[] = [];
  private readonly _changed = new Signal<this, void>(this);
}
