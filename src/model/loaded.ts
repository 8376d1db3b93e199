import { Signal, type ISignal } from '@lumino/signaling';
import {
  harmonicBasis,
  harmonicShares,
  projectOff,
  summarize,
  Dense,
  type SignalSummary
} from '../core';
import {
  parseArrayText,
  type ArrayData,
  type ArrayInfo,
  type ArraySource,
  type WriteResult
} from '../bridge';
import type { TranslationBundle } from '@jupyterlab/translation';
import { englishBundle } from './english';
import type { SourcesModel } from './sources';
import { planOutputRead, type IOutputSnapshot } from './output-source';

/** One array held by the panel: read from the kernel, parsed from an output, or a result. */
export interface ILoadedArray {
  readonly id: string;
  /** What the user sees: `primary`, `Out[3]`, `primary − hum`; unique on the shelf. */
  readonly label: string;
  readonly origin: 'kernel' | 'output-text' | 'result';
  /** Where it came from in the kernel (origin 'kernel'). */
  readonly source: ArraySource | null;
  readonly array: ArrayData;
  readonly summary: SignalSummary;
  /** Sentences for the user: truncation, cache caveats, what a result did. */
  readonly notes: ReadonlyArray<string>;
  /** True when values were elided in the text it was parsed from. */
  readonly truncated: boolean;
  /** A name suggested when the user saves it to the kernel. */
  readonly suggestedName: string;
}

/** Parameters of the mains-hum removal (projection off a harmonic basis). */
export interface IHumOptions {
  f0: number;
  fs: number;
  harmonics: number;
}

/**
 * The arrays the user brought into Perpend, and the first tools on them. Every operation is
 * safe to fail: an error becomes the model's message and nothing already loaded is lost.
 */
export class LoadedArraysModel {
  constructor(options: LoadedArraysModel.IOptions) {
    this._bridge = options.bridge;
    this._trans = options.trans ?? englishBundle();
  }

  get changed(): ISignal<this, void> {
    return this._changed;
  }
  get items(): ReadonlyArray<ILoadedArray> {
    return this._items;
  }
  /** 'busy' while reading or writing; 'error' after a failure (see message). */
  get status(): 'idle' | 'busy' | 'error' {
    return this._status;
  }
  get message(): string {
    return this._message;
  }

  get(id: string): ILoadedArray | undefined {
    return this._items.find(i => i.id === id);
  }

  /** Reads a listed array (or any cell result or variable) from the kernel at full precision. */
  async loadFromKernel(
    info: Pick<ArrayInfo, 'source' | 'label'> & Partial<ArrayInfo>
  ): Promise<ILoadedArray | null> {
    const bridge = this._bridge();
    if (!bridge) {
      this._fail(this._trans.__('There is no kernel to read from.'));
      return null;
    }
    try {
      const array = await this._track(bridge, 'read', info.label, () =>
        bridge.readArray(info.source)
      );
      const name =
        info.source.kind === 'variable' ? info.source.name : `out${info.source.executionCount}`;
      return this._add({
        label: info.label,
        origin: 'kernel',
        source: info.source,
        array,
        notes: info.notes ?? [],
        truncated: false,
        suggestedName: `${name}_copy`
      });
    } catch (reason) {
      this._fail(this._trans.__('Could not read %1: %2', info.label, Private.text(reason)));
      return null;
    }
  }

  /**
   * Brings in the array a cell output shows: from the kernel's output cache at full precision
   * when this kernel session produced it, otherwise parsed from the output's text. Null (with
   * the reason as the message) when neither works or the output cannot hold an array.
   */
  async loadOutput(
    output: IOutputSnapshot,
    trusts: (cellId: string, count: number) => boolean
  ): Promise<ILoadedArray | null> {
    const plans = planOutputRead(output, {
      trusts,
      hasKernel: this._bridge() !== null,
      trans: this._trans
    });
    if (plans.length === 0) {
      this._fail(
        this._trans.__(
          'This output cannot hold an array (only results and displays with text or JSON can).'
        )
      );
      return null;
    }
    for (const plan of plans) {
      const item =
        plan.kind === 'kernel'
          ? await this.loadFromKernel({ source: plan.source, label: plan.label })
          : this.loadFromText(plan.label, plan.text, plan.mimeType, plan.notes);
      if (item) {
        return item;
      }
    }
    return null;
  }

  /**
   * Takes an array from an output's text (numpy repr, JSON, CSV) when the kernel cannot give it:
   * a non-Python kernel, a kernel that is gone, or an output not in IPython's cache. The values
   * are what the text shows; a truncated repr is marked as incomplete.
   */
  loadFromText(
    label: string,
    text: unknown,
    mimeType?: string,
    extraNotes: ReadonlyArray<string> = []
  ): ILoadedArray | null {
    const trans = this._trans;
    try {
      const parsed = parseArrayText(text, mimeType);
      const notes = [
        trans.__(
          "Parsed from the output's text (%1): values have only the printed digits.",
          parsed.format
        ),
        ...extraNotes
      ];
      if (parsed.truncated) {
        const shown = parsed.data.length / (parsed.complex ? 2 : 1);
        notes.push(
          parsed.fullShape
            ? trans.__(
                'The text was truncated ("..."): only %1 values are shown of an array of shape (%2). Read the variable from the kernel for all of them.',
                shown,
                parsed.fullShape.join(', ')
              )
            : trans.__(
                'The text was truncated ("..."): only %1 values are shown. Read the variable from the kernel for all of them.',
                shown
              )
        );
      }
      return this._add({
        label,
        origin: 'output-text',
        source: null,
        array: {
          data: parsed.data,
          shape: parsed.shape,
          complex: parsed.complex,
          dtype: parsed.dtype ?? (parsed.complex ? 'complex128' : 'float64')
        },
        notes,
        truncated: parsed.truncated,
        suggestedName: 'parsed_output'
      });
    } catch (reason) {
      this._fail(trans.__('Could not read an array from %1: %2', label, Private.text(reason)));
      return null;
    }
  }

  /**
   * Projects the mains hum off a real signal (1-D, or K×N with samples along the last axis):
   * y = x − Q(Qᵀx), Q an orthonormal basis of the cosines and sines at f₀…K·f₀. The result is a
   * new entry; its notes give the suppression in dB, in total and per harmonic.
   */
  removeHum(id: string, options: IHumOptions): ILoadedArray | null {
    const trans = this._trans;
    const item = this.get(id);
    if (!item) {
      this._fail(trans.__('No loaded array has id %1.', JSON.stringify(id)));
      return null;
    }
    try {
      const unavailable = humUnavailable(item, trans);
      if (unavailable) {
        throw new TypeError(unavailable);
      }
      const shape = item.array.shape;
      const rows = shape.length === 2 ? shape[0] : 1;
      const samples = shape[shape.length - 1];
      const x = new Dense(item.array.data, [rows, samples]);
      const basis = harmonicBasis({ ...options, samples });
      const result = projectOff(basis, x, { vectors: 'rows' });
      const e = result.energy;
      // Each harmonic's share from least squares on its own cosine/sine pair, in the harmonics'
      // order (the pivoted-QR basis' directions come in another order, so they cannot say it).
      const shares = harmonicShares(x, { ...options });
      const perHarmonic: string[] = [];
      for (let k = 0; k < options.harmonics; k++) {
        perHarmonic.push(
          trans.__(
            '%1 Hz: %2 dB',
            shares.frequencies[k].toPrecision(4),
            Private.db(shares.share[k])
          )
        );
      }
      const y = result.output;
      const out = y.isCContiguous() && y.offset === 0 ? y.data : y.copy('C').data;
      return this._add({
        label: trans.__('%1 − hum', item.label),
        origin: 'result',
        source: null,
        array: { data: out, shape: shape.slice(), complex: false, dtype: 'float64' },
        notes: [
          trans.__(
            'Projected off %1 harmonic directions (f₀ = %2 Hz, %3 harmonics, fs = %4 Hz).',
            result.rank,
            options.f0,
            options.harmonics,
            options.fs
          ),
          trans.__(
            'Suppression %1 dB; residual energy %2 of %3 (sum of squares, in the squared unit of the signal).',
            e.suppressionDb.toFixed(1),
            e.residualEnergy.toPrecision(4),
            e.inputEnergy.toPrecision(4)
          ),
          trans.__('Share of the input energy per harmonic: %1.', perHarmonic.join(', '))
        ],
        truncated: item.truncated,
        suggestedName: `${Private.pyBase(item.suggestedName)}_dehum`
      });
    } catch (reason) {
      this._fail(trans.__('Hum removal on %1 failed: %2', item.label, Private.text(reason)));
      return null;
    }
  }

  /**
   * Writes an entry into the kernel under `name`. Returns the bridge's answer: 'exists' or
   * 'shadows' when the user must confirm (then call again with overwrite), or 'written'.
   */
  async writeBack(id: string, name: string, overwrite = false): Promise<WriteResult | null> {
    const item = this.get(id);
    const bridge = this._bridge();
    const trans = this._trans;
    if (!item || !bridge) {
      this._fail(
        item
          ? trans.__('There is no kernel to write to.')
          : trans.__('No loaded array has id %1.', JSON.stringify(id))
      );
      return null;
    }
    try {
      const result = await this._track(bridge, 'write', name, () =>
        bridge.writeArray(name, item.array, { overwrite })
      );
      this._setStatus(
        'idle',
        result.status === 'written'
          ? trans.__('Saved %1 to the kernel as %2.', item.label, result.name)
          : ''
      );
      return result;
    } catch (reason) {
      this._fail(trans.__('Could not write %1: %2', name, Private.text(reason)));
      return null;
    }
  }

  remove(id: string): void {
    const before = this._items.length;
    this._items = this._items.filter(i => i.id !== id);
    if (this._items.length !== before) {
      this._changed.emit();
    }
  }

  private _add(entry: Omit<ILoadedArray, 'id' | 'summary'>): ILoadedArray {
    const item: ILoadedArray = {
      ...entry,
      // Labels are unique on the shelf: a set-up of the workbench names a shelf array by it.
      label: this._freeLabel(entry.label),
      id: `a${++this._counter}`,
      summary: summarize(entry.array.data, entry.array.complex)
    };
    this._items = [...this._items, item];
    this._setStatus('idle', this._trans.__('Loaded %1.', item.label), true);
    return item;
  }

  /** `label`, or `label (2)`, `label (3)`, … when the shelf already holds that label. */
  private _freeLabel(label: string): string {
    const taken = new Set(this._items.map(i => i.label));
    let free = label;
    for (let n = 2; taken.has(free); n++) {
      free = `${label} (${n})`;
    }
    return free;
  }

  /**
   * Runs one bridge request and keeps the status line true to it: waiting behind a running
   * cell, or being worked on by the kernel.
   */
  private async _track<T>(
    bridge: SourcesModel.IBridge,
    what: 'read' | 'write',
    name: string,
    run: () => Promise<T>
  ): Promise<T> {
    const trans = this._trans;
    const show = (): void => {
      const waiting = bridge.activity.state === 'waiting';
      let text: string;
      if (what === 'read') {
        text = waiting
          ? trans.__('Waiting for the kernel to finish the running cell before reading %1…', name)
          : trans.__('Reading %1…', name);
      } else {
        text = waiting
          ? trans.__('Waiting for the kernel to finish the running cell before writing %1…', name)
          : trans.__('Writing %1…', name);
      }
      this._setStatus('busy', text);
    };
    bridge.activityChanged.connect(show);
    show();
    try {
      return await run();
    } finally {
      bridge.activityChanged.disconnect(show);
    }
  }

  private _fail(message: string): void {
    console.error(`Perpend: ${message}`);
    this._setStatus('error', message);
  }

  private _setStatus(status: 'idle' | 'busy' | 'error', message: string, force = false): void {
    if (!force && status === this._status && message === this._message) {
      return;
    }
    this._status = status;
    this._message = message;
    this._changed.emit();
  }

  private readonly _bridge: () => SourcesModel.IBridge | null;
  private readonly _trans: TranslationBundle;
  private _items: ILoadedArray[] = [];
  private _status: 'idle' | 'busy' | 'error' = 'idle';
  private _message = '';
  private _counter = 0;
  private _changed = new Signal<this, void>(this);
}

export namespace LoadedArraysModel {
  export interface IOptions {
    /** The bridge to the active notebook's kernel, or null (SourcesModel.bridge). */
    bridge: () => SourcesModel.IBridge | null;
    /** Translates what the model says to the user; English when absent. */
    trans?: TranslationBundle;
  }
}

/** The dtype Perpend computes in: float64, or complex128 for a complex array. */
export function workingDtype(array: Pick<ArrayData, 'complex'>): string {
  return array.complex ? 'complex128' : 'float64';
}

/**
 * Why hum removal cannot run on an entry, as a sentence for the user, or null when it can:
 * the harmonic basis is real, so the signal must be real.
 */
export function humUnavailable(
  item: Pick<ILoadedArray, 'label' | 'array'>,
  trans: TranslationBundle = englishBundle()
): string | null {
  if (item.array.complex) {
    return trans.__(
      '%1 is complex; hum removal with real harmonics needs a real signal.',
      item.label
    );
  }
  return null;
}

namespace Private {
  export function text(reason: unknown): string {
    return reason instanceof Error ? reason.message : String(reason);
  }
  export function db(ratio: number): string {
    return ratio > 0 ? (10 * Math.log10(ratio)).toFixed(1) : '−∞';
  }
  /** A Python-identifier-friendly stem for a suggested name. */
  export function pyBase(name: string): string {
    const stem = name.replace(/_copy$/, '').replace(/[^A-Za-z0-9_]/g, '_');
    return /^[A-Za-z_]/.test(stem) ? stem : `x_${stem}`;
  }
}
