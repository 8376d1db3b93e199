import { Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { IHumOptions } from '../model/loaded';

/** What the dialog returns: the hum options, with fs possibly naming a kernel variable. */
export interface IHumDialogValue extends Omit<IHumOptions, 'fs'> {
  fs: number | string;
}

/**
 * The body of the hum-removal dialog: fundamental, sample rate and number of harmonics. It only
 * collects numbers; the core checks them (and says which one is wrong) when the tool runs.
 */
export class HumDialogBody extends Widget {
  constructor(options: { trans: TranslationBundle; fs: number | null }) {
    super();
    const trans = options.trans;
    this.addClass('pp-Form');
    this._f0 = Private.field(this.node, trans.__('Fundamental f₀ (Hz)'), '50', 'f0');
    this._fs = Private.field(
      this.node,
      trans.__('Sample rate fs (Hz, or a kernel variable such as fs or rec.fs)'),
      options.fs === null ? '' : String(options.fs),
      'fs'
    );
    this._harmonics = Private.field(this.node, trans.__('Harmonics (f₀ … K·f₀)'), '5', 'harmonics');
    const hint = document.createElement('p');
    hint.className = 'pp-Form-hint';
    hint.textContent = trans.__(
      'Projects the signal off the cosines and sines at f₀, 2f₀, …, K·f₀ (a rank-revealing QR basis) and reports the suppression per harmonic.'
    );
    this.node.append(hint);
  }

  /** The numbers typed; `fs` may instead be the name of a kernel variable or attribute. */
  getValue(): IHumDialogValue {
    const fs = this._fs.value.trim();
    return {
      f0: Number(this._f0.value),
      fs: fs === '' ? NaN : /^[+-]?[\d.]/.test(fs) ? Number(fs) : fs,
      harmonics: Number(this._harmonics.value)
    };
  }

  private readonly _f0: HTMLInputElement;
  private readonly _fs: HTMLInputElement;
  private readonly _harmonics: HTMLInputElement;
}

namespace Private {
  export function field(
    parent: HTMLElement,
    label: string,
    value: string,
    name: string
  ): HTMLInputElement {
    const row = document.createElement('label');
    row.className = 'pp-Form-row';
    const span = document.createElement('span');
    span.textContent = label;
    const input = document.createElement('input');
    input.className = 'jp-mod-styled pp-Form-input';
    input.name = name;
    input.inputMode = 'decimal';
    input.value = value;
    row.append(span, input);
    parent.append(row);
    return input;
  }
}
