import { Signal, type ISignal } from '@lumino/signaling';
import { harmonicBasis, projectOff, summarize, Dense, type SignalSummary } from '../core';
import {
  parseArrayText,
  type ArrayData,
  type ArrayInfo,
  type ArraySource,
  type WriteResult
} from '../bridge';
import type { SourcesModel } from './sources';

/** One array held by the panel: read from the kernel, parsed from an output, or a result. */
export interface ILoadedArray {
  readonly id: string;
  /** What the user sees: `primary`, `Out[3]`, `primary − hum`. */
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
      this._fail('There is no kernel to read from.');
      return null;
    }
    try {
      const array = await this._track(bridge, `reading ${info.label}`, () =>
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
      this._fail(`Could not read ${info.label}: ${Private.text(reason)}`);
      return null;
    }
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
    try {
      const parsed = parseArrayText(text, mimeType);
      const notes = [
        `Parsed from the output's text (${parsed.format}): values have only the printed digits.`,
        ...extraNotes
      ];
      if (parsed.truncated) {
        notes.push(
          `The text was truncated ("..."): only ${parsed.data.length / (parsed.complex ? 2 : 1)} values are shown` +
            (parsed.fullShape ? ` of an array of shape (${parsed.fullShape.join(', ')}).` : '.') +
            ' Read the variable from the kernel for all of them.'
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
      this._fail(`Could not read an array from ${label}: ${Private.text(reason)}`);
      return null;
    }
  }

  /**
   * Projects the mains hum off a real signal (1-D, or K×N with samples along the last axis):
   * y = x − Q(Qᵀx), Q an orthonormal basis of the cosines and sines at f₀…K·f₀. The result is a
   * new entry; its notes give the suppression in dB, in total and per harmonic.
   */
  removeHum(id: string, options: IHumOptions): ILoadedArray | null {
    const item = this.get(id);
    if (!item) {
      this._fail(`No loaded array has id ${JSON.stringify(id)}.`);
      return null;
    }
    try {
      if (item.array.complex) {
        throw new TypeError(
          `${item.label} is complex; hum removal with real harmonics needs a real signal`
        );
      }
      const shape = item.array.shape;
      const rows = shape.length === 2 ? shape[0] : 1;
      const samples = shape[shape.length - 1];
      const x = new Dense(item.array.data, [rows, samples]);
      const basis = harmonicBasis({ ...options, samples });
      const result = projectOff(basis, x, { vectors: 'rows' });
      const e = result.energy;
      const perHarmonic: string[] = [];
      for (let k = 0; k < options.harmonics; k++) {
        const share = e.directionEnergy[2 * k] + e.directionEnergy[2 * k + 1];
        perHarmonic.push(
          `${((k + 1) * options.f0).toPrecision(4)} Hz: ${Private.db(share / e.inputEnergy)} dB`
        );
      }
      const y = result.output;
      const out = y.isCContiguous() && y.offset === 0 ? y.data : y.copy('C').data;
      return this._add({
        label: `${item.label} − hum`,
        origin: 'result',
        source: null,
        array: { data: out, shape: shape.slice(), complex: false, dtype: 'float64' },
        notes: [
          `Projected off ${result.rank} harmonic directions (f₀ = ${options.f0} Hz, ${options.harmonics} harmonics, fs = ${options.fs} Hz).`,
          `Suppression ${e.suppressionDb.toFixed(1)} dB; residual energy ${e.residualEnergy.toPrecision(4)} of ${e.inputEnergy.toPrecision(4)}.`,
          `Share of the input per harmonic: ${perHarmonic.join(', ')}.`
        ],
        truncated: item.truncated,
        suggestedName: `${Private.pyBase(item.suggestedName)}_dehum`
      });
    } catch (reason) {
      this._fail(`Hum removal on ${item.label} failed: ${Private.text(reason)}`);
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
    if (!item || !bridge) {
      this._fail(
        item ? 'There is no kernel to write to.' : `No loaded array has id ${JSON.stringify(id)}.`
      );
      return null;
    }
    try {
      const result = await this._track(bridge, `writing ${name}`, () =>
        bridge.writeArray(name, item.array, { overwrite })
      );
      this._setStatus(
        'idle',
        result.status === 'written' ? `Saved ${item.label} to the kernel as ${result.name}.` : ''
      );
      return result;
    } catch (reason) {
      this._fail(`Could not write ${name}: ${Private.text(reason)}`);
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
      id: `a${++this._counter}`,
      summary: summarize(entry.array.data, entry.array.complex)
    };
    this._items = [...this._items, item];
    this._setStatus('idle', `Loaded ${item.label}.`, true);
    return item;
  }

  /**
   * Runs one bridge request and keeps the status line true to it: waiting behind a running
   * cell, or being worked on by the kernel.
   */
  private async _track<T>(
    bridge: SourcesModel.IBridge,
    what: string,
    run: () => Promise<T>
  ): Promise<T> {
    const show = (): void => {
      const waiting = bridge.activity.state === 'waiting';
      this._setStatus(
        'busy',
        waiting
          ? `Waiting for the kernel to finish the running cell before ${what}…`
          : `${what[0].toUpperCase()}${what.slice(1)}…`
      );
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
  }
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
