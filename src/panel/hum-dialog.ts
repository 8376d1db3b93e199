import { Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { IHumOptions } from '../model/loaded';

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
      trans.__('Sample rate fs (Hz)'),
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

  getValue(): IHumOptions {
    return {
      f0: Number(this._f0.value),
      fs: this._fs.value.trim() === '' ? NaN : Number(this._fs.value),
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
