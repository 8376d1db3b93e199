/**
 * The arrays on the Perpend panel's shelf (read from the kernel, parsed from an output, or
 * computed there, such as `primary − hum`) as sources of a set-up, beside the notebook's own
 * listing. A shelf array is named by its label, which the shelf keeps unique; the shelf lives
 * in the page's memory, so after a reload a stored label finds nothing and the checks say the
 * array is gone. Reading one hands over the shelf's array as it is (a job copies its inputs).
 */
import { Signal, type ISignal } from '@lumino/signaling';
import type { ArrayData } from '../../bridge';
import type { ILoadedArray } from '../loaded';
import { refKey, type ISourceCatalog, type SourceOption } from './catalog';
import type { IWorkbenchReader } from './runs';
import type { SourceRef } from './setup';
import type { SourceFacts } from './sources-check';

/** What the shelf gives: its arrays and a signal when they change. */
export interface IShelf {
  readonly items: ReadonlyArray<Pick<ILoadedArray, 'label' | 'array'>>;
  readonly changed: ISignal<unknown, void>;
}

export class ShelfSources implements ISourceCatalog {
  constructor(options: ShelfSources.IOptions) {
    this._shelf = options.shelf;
    this._gone = options.gone;
    this._shelf.changed.connect(this._onShelf, this);
    this._onShelf();
  }

  /** Fires when the shelf's arrays change (not on its status line). */
  get changed(): ISignal<this, void> {
    return this._changed;
  }

  options(): ReadonlyArray<SourceOption> {
    return this._options;
  }

  facts(ref: SourceRef): SourceFacts | null {
    const a = this._find(ref);
    return a ? { shape: a.shape, complex: a.complex } : null;
  }

  async readArray(ref: SourceRef): Promise<ArrayData> {
    const a = this._find(ref);
    if (!a || ref.kind !== 'shelf') {
      throw new Error(this._gone(ref.kind === 'shelf' ? ref.label : refKey(ref)));
    }
    return a;
  }

  dispose(): void {
    this._shelf.changed.disconnect(this._onShelf, this);
    Signal.clearData(this);
  }

  private _find(ref: SourceRef): ArrayData | null {
    if (ref.kind !== 'shelf') {
      return null;
    }
    return this._shelf.items.find(i => i.label === ref.label)?.array ?? null;
  }

  private _onShelf(): void {
    const options: SourceOption[] = this._shelf.items.map(i => ({
      ref: { kind: 'shelf', label: i.label },
      label: i.label,
      shape: [...i.array.shape],
      // What the workbench computes in (the shelf holds float64 or complex128 data).
      dtype: i.array.complex ? 'complex128' : 'float64',
      complex: i.array.complex
    }));
    const same =
      options.length === this._options.length &&
      options.every((o, i) => JSON.stringify(o) === JSON.stringify(this._options[i]));
    if (!same) {
      this._options = options;
      this._changed.emit();
    }
  }

  private readonly _shelf: IShelf;
  private readonly _gone: (label: string) => string;
  private _options: SourceOption[] = [];
  private readonly _changed = new Signal<this, void>(this);
}

export namespace ShelfSources {
  export interface IOptions {
    shelf: IShelf;
    /** The sentence when a shelf array is no longer there (translated by the caller). */
    gone: (label: string) => string;
  }
}

/**
 * The notebook's listing and the shelf as one catalog and one reader: kernel references go to
 * the kernel, shelf references to the shelf.
 */
export class CombinedSources implements IWorkbenchReader, ISourceCatalog {
  constructor(
    private readonly _kernel: IWorkbenchReader & ISourceCatalog,
    private readonly _shelf: ShelfSources | null,
    private readonly _gone: (label: string) => string
  ) {
    this._kernel.changed.connect(this._emit, this);
    this._shelf?.changed.connect(this._emit, this);
  }

  get changed(): ISignal<this, void> {
    return this._changed;
  }

  options(): ReadonlyArray<SourceOption> {
    return this._shelf
      ? [...this._kernel.options(), ...this._shelf.options()]
      : this._kernel.options();
  }

  facts(ref: SourceRef): SourceFacts | null {
    if (ref.kind === 'shelf') {
      return this._shelf?.facts(ref) ?? null;
    }
    return this._kernel.facts(ref);
  }

  readArray(ref: SourceRef): Promise<ArrayData> {
    if (ref.kind === 'shelf') {
      return this._shelf
        ? this._shelf.readArray(ref)
        : Promise.reject(new Error(this._gone(ref.label)));
    }
    return this._kernel.readArray(ref);
  }

  readScalar(name: string): Promise<number> {
    return this._kernel.readScalar(name);
  }

  dispose(): void {
    this._kernel.changed.disconnect(this._emit, this);
    this._shelf?.changed.disconnect(this._emit, this);
    Signal.clearData(this);
  }

  private _emit(): void {
    this._changed.emit();
  }

  private readonly _changed = new Signal<this, void>(this);
}
