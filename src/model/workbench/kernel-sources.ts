/**
 * The workbench's view of its notebook's kernel: the arrays it lists (for the source pickers
 * and the checks before a run), reads at full precision through the bridge, and which sources
 * changed between two listings (for set-ups that follow their sources). It wraps the notebook's
 * own SourcesModel; it never runs a cell.
 */
import { Signal, type ISignal } from '@lumino/signaling';
import type { ArrayData, ArrayInfo } from '../../bridge';
import type { SourcesModel } from '../sources';
import type { CatalogState, ISourceCatalog, SourceOption } from './catalog';
import { refKey } from './catalog';
import type { IWorkbenchReader } from './runs';
import type { SourceRef } from './setup';
import type { SourceFacts } from './sources-check';

const SHARED = { shared: true } as const;

export class KernelSources implements IWorkbenchReader, ISourceCatalog {
  constructor(options: KernelSources.IOptions) {
    this._sources = options.sources;
    this._notListed = options.notListed;
    this._noKernel = options.noKernel;
    this._sources.changed.connect(this._onListing, this);
    this._onListing();
  }

  /** Fires when the listing changes (the pickers re-render). */
  get changed(): ISignal<this, void> {
    return this._changed;
  }

  /** Fires with the sources whose listing changed: a cell run again, a variable re-bound. */
  get sourcesChanged(): ISignal<this, SourceRef[]> {
    return this._sourcesChanged;
  }

  options(): ReadonlyArray<SourceOption> {
    return this._options;
  }

  state(): CatalogState {
    const s = this._sources;
    switch (s.status) {
      case 'waiting':
      case 'refreshing':
        return { state: 'busy', message: s.message };
      case 'error':
        return { state: 'error', message: s.message };
      case 'none':
      case 'no-kernel':
        return { state: 'none', message: s.message || this._noKernel };
      default:
        return { state: 'listed', message: '' };
    }
  }

  relist(): void {
    void this._sources.refresh();
  }

  facts(ref: SourceRef): SourceFacts | null {
    const o = this._byKey.get(refKey(ref));
    return o ? { shape: o.info.shape, complex: o.option.complex } : null;
  }

  /**
   * Reads `ref` for a run. Shared: runs never write into their inputs (they share them by
   * digest, and jobs get copies or names), so a re-read of unchanged values takes the bridge's
   * kept copy itself.
   */
  async readArray(ref: SourceRef): Promise<ArrayData> {
    const bridge = this._sources.bridge;
    if (!bridge) {
      throw new Error(this._noKernel);
    }
    if (ref.kind === 'variable') {
      return bridge.readArray({ kind: 'variable', name: ref.name }, SHARED);
    }
    if (ref.kind === 'shelf') {
      // The panel's arrays are not the kernel's (CombinedSources sends them to the shelf).
      throw new Error(this._notListed(ref.label));
    }
    const listed = this._byKey.get(refKey(ref));
    if (!listed) {
      throw new Error(this._notListed(ref.cellId));
    }
    return bridge.readArray(listed.info.source, SHARED);
  }

  async readScalar(name: string): Promise<number> {
    const bridge = this._sources.bridge;
    if (!bridge) {
      throw new Error(this._noKernel);
    }
    return bridge.readScalar(name);
  }

  dispose(): void {
    this._sources.changed.disconnect(this._onListing, this);
    Signal.clearData(this);
  }

  private _onListing(): void {
    const next = new Map<string, { option: SourceOption; info: ArrayInfo; stamp: string }>();
    const options: SourceOption[] = [];
    for (const info of [...this._sources.variables, ...this._sources.cellResults]) {
      if (info.readable === false) {
        continue;
      }
      const ref: SourceRef =
        info.source.kind === 'variable'
          ? { kind: 'variable', name: info.source.name }
          : { kind: 'cell', cellId: info.source.cellId };
      const option: SourceOption = {
        ref,
        label: info.label,
        shape: info.shape,
        dtype: info.dtype,
        complex: info.dtype.startsWith('complex')
      };
      // What identifies this value in the listing: a cell's execution count, a variable's
      // shape, dtype and size (a re-bound variable of the same shape is caught by the plugin
      // from the executed cell's text).
      const stamp =
        info.source.kind === 'cell'
          ? `${info.source.executionCount}`
          : `${info.shape.join('x')}|${info.dtype}|${info.bytes}`;
      next.set(refKey(ref), { option, info, stamp });
      options.push(option);
    }
    const changed: SourceRef[] = [];
    for (const [key, v] of next) {
      const before = this._byKey.get(key);
      if (before && before.stamp !== v.stamp) {
        changed.push(v.option.ref);
      }
    }
    const same =
      options.length === this._options.length &&
      options.every((o, i) => JSON.stringify(o) === JSON.stringify(this._options[i]));
    const state = JSON.stringify(this.state());
    const sameState = state === this._state;
    this._state = state;
    this._byKey = next;
    this._options = options;
    if (!same || !sameState) {
      this._changed.emit();
    }
    if (changed.length > 0) {
      this._sourcesChanged.emit(changed);
    }
  }

  private readonly _sources: Pick<
    SourcesModel,
    'changed' | 'variables' | 'cellResults' | 'bridge' | 'status' | 'message' | 'refresh'
  >;
  private readonly _notListed: (cellId: string) => string;
  private readonly _noKernel: string;
  private _byKey = new Map<string, { option: SourceOption; info: ArrayInfo; stamp: string }>();
  private _options: SourceOption[] = [];
  private _state = '';
  private readonly _changed = new Signal<this, void>(this);
  private readonly _sourcesChanged = new Signal<this, SourceRef[]>(this);
}

export namespace KernelSources {
  export interface IOptions {
    sources: Pick<
      SourcesModel,
      'changed' | 'variables' | 'cellResults' | 'bridge' | 'status' | 'message' | 'refresh'
    >;
    /** The sentence when a cell's result is not listed (translated by the caller). */
    notListed: (cellId: string) => string;
    /** The sentence when the notebook has no kernel. */
    noKernel: string;
  }
}
