import type { TranslationBundle } from '@jupyterlab/translation';
import type { IHumOptions } from '../model/loaded';
import {
  checkHumForm,
  checkNyquist,
  checkVariableName,
  type FormCheck,
  type HumField
} from '../model/forms';
import { FormBody } from './form-dialog';

/**
 * The body of the hum-removal dialog: fundamental, sample rate and number of harmonics. A sample
 * rate given by name is read from the kernel when the user accepts, and a name that cannot be
 * read is marked on the field like any other refused value.
 */
export class HumDialogBody extends FormBody<IHumOptions, HumField> {
  constructor(options: HumDialogBody.IOptions) {
    super();
    const trans = options.trans;
    this._trans = trans;
    this._readScalar = options.readScalar;
    this.addField({
      name: 'f0',
      label: trans.__('Fundamental f₀ (Hz)'),
      value: '50',
      inputMode: 'decimal'
    });
    this.addField({
      name: 'fs',
      label: trans.__('Sample rate fs (Hz)'),
      value: options.fs === null ? '' : String(options.fs),
      hint: trans.__('A number, or a kernel variable such as fs or rec.fs.')
    });
    this.addField({
      name: 'harmonics',
      label: trans.__('Harmonics K (f₀ … K·f₀)'),
      value: '5',
      inputMode: 'numeric'
    });
    const hint = document.createElement('p');
    hint.className = 'pp-Form-hint';
    hint.textContent = trans.__(
      'Projects the signal off the cosines and sines at f₀, 2f₀, …, K·f₀ (a rank-revealing QR basis) and reports the suppression per harmonic in dB.'
    );
    this.node.append(hint);
  }

  async check(): Promise<FormCheck<IHumOptions, HumField>> {
    const trans = this._trans;
    const form = checkHumForm(this.values(), trans);
    if (!form.ok) {
      return form;
    }
    const { f0, harmonics } = form.value;
    let fs = form.value.fs;
    if (typeof fs === 'string') {
      const name = fs;
      if (!this._readScalar) {
        return {
          ok: false,
          errors: { fs: trans.__('There is no kernel to read %1 from; type the rate in Hz.', name) }
        };
      }
      try {
        fs = await this._readScalar(name);
      } catch (reason) {
        return {
          ok: false,
          errors: {
            fs: trans.__(
              'Could not read %1 from the kernel: %2',
              name,
              reason instanceof Error ? reason.message : String(reason)
            )
          }
        };
      }
      if (!(fs > 0) || !Number.isFinite(fs)) {
        return {
          ok: false,
          errors: {
            fs: trans.__('%1 is %2 in the kernel; a sample rate must be above 0 Hz.', name, fs)
          }
        };
      }
      const nyquist = checkNyquist(f0, fs, harmonics, trans);
      if (nyquist) {
        return { ok: false, errors: { harmonics: nyquist } };
      }
    }
    return { ok: true, value: { f0, fs, harmonics } };
  }

  private readonly _trans: TranslationBundle;
  private readonly _readScalar: ((name: string) => Promise<number>) | null;
}

export namespace HumDialogBody {
  export interface IOptions {
    trans: TranslationBundle;
    /** The sample rate to prefill (from a kernel variable `fs`), or null. */
    fs: number | null;
    /** Reads a named sample rate from the kernel; null when there is no kernel. */
    readScalar: ((name: string) => Promise<number>) | null;
  }
}

/** The body of the save dialog: the name of the kernel variable to write. */
export class SaveDialogBody extends FormBody<string, 'name'> {
  constructor(options: { trans: TranslationBundle; name: string }) {
    super();
    this._trans = options.trans;
    this.addField({
      name: 'name',
      label: options.trans.__('Variable name'),
      value: options.name,
      hint: options.trans.__(
        'Written as a numpy array, float64 or complex128. A name in use is not replaced without asking.'
      )
    });
  }

  check(): FormCheck<string, 'name'> {
    return checkVariableName(this.values().name, this._trans);
  }

  private readonly _trans: TranslationBundle;
}
