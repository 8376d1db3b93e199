import { Dialog } from '@jupyterlab/apputils';
import { Widget } from '@lumino/widgets';
import type { FieldErrors, FormCheck } from '../model/forms';

/** Makes the ids that tie each field to its label, hint and error unique in the page. */
let fieldCounter = 0;

/**
 * The body of a dialog whose fields are checked when the user accepts: a refused value is marked
 * on its own field with the reason, the dialog stays open and nothing typed is lost. Subclasses
 * add their fields with `addField` and implement `check`.
 */
export abstract class FormBody<T, K extends string> extends Widget {
  constructor() {
    super();
    this.addClass('pp-Form');
  }

  /** Checks what is typed; may ask the kernel (a sample rate given by name). */
  abstract check(): Promise<FormCheck<T, K>> | FormCheck<T, K>;

  /** The value accepted by the last successful check (what the dialog resolves with). */
  getValue(): T | null {
    return this._value;
  }

  /** The text typed in each field. */
  values(): Record<K, string> {
    const out = {} as Record<K, string>;
    for (const [name, field] of this._fields) {
      out[name] = field.input.value;
    }
    return out;
  }

  /** The input of a field (for tests and focus). */
  input(name: K): HTMLInputElement {
    return this._fields.get(name)!.input;
  }

  /**
   * Runs the check; on refusal marks every refused field with its reason and focuses the first.
   * Returns whether the values were accepted.
   */
  async validate(): Promise<boolean> {
    this._setBusy(true);
    let result: FormCheck<T, K>;
    try {
      result = await this.check();
    } finally {
      this._setBusy(false);
    }
    if (result.ok) {
      this._value = result.value;
      this.showErrors({});
      return true;
    }
    this._value = null;
    this.showErrors(result.errors);
    return false;
  }

  /** Marks the given fields with their reasons and clears the marks of the others. */
  showErrors(errors: FieldErrors<K>): void {
    let first: HTMLInputElement | null = null;
    for (const [name, field] of this._fields) {
      const reason = errors[name];
      field.row.classList.toggle('pp-mod-invalid', reason !== undefined);
      field.input.setAttribute('aria-invalid', reason !== undefined ? 'true' : 'false');
      field.error.textContent = reason ?? '';
      field.error.hidden = reason === undefined;
      if (reason !== undefined && !first) {
        first = field.input;
      }
    }
    first?.focus();
  }

  /**
   * Adds a labelled text field; `hint` is a line under it that stays visible. The reason a value
   * is refused appears under the field (and is announced by screen readers).
   */
  protected addField(options: {
    name: K;
    label: string;
    value: string;
    hint?: string;
    inputMode?: string;
  }): HTMLInputElement {
    const id = `pp-field-${++fieldCounter}`;
    const row = document.createElement('div');
    row.className = 'pp-Form-field';
    row.dataset.field = options.name;
    const label = document.createElement('label');
    label.className = 'pp-Form-label';
    label.htmlFor = id;
    label.textContent = options.label;
    const input = document.createElement('input');
    input.className = 'jp-mod-styled pp-Form-input';
    input.id = id;
    input.name = options.name;
    input.value = options.value;
    input.autocomplete = 'off';
    input.spellcheck = false;
    if (options.inputMode) {
      input.inputMode = options.inputMode;
    }
    const described: string[] = [];
    row.append(label, input);
    if (options.hint) {
      const hint = document.createElement('div');
      hint.className = 'pp-Form-fieldHint';
      hint.id = `${id}-hint`;
      hint.textContent = options.hint;
      described.push(hint.id);
      row.append(hint);
    }
    const error = document.createElement('div');
    error.className = 'pp-Form-error';
    error.id = `${id}-error`;
    error.setAttribute('role', 'alert');
    error.hidden = true;
    described.push(error.id);
    row.append(error);
    input.setAttribute('aria-describedby', described.join(' '));
    // Typing in a marked field takes its mark away; the value is rechecked on accept.
    input.addEventListener('input', () => {
      if (row.classList.contains('pp-mod-invalid')) {
        row.classList.remove('pp-mod-invalid');
        input.setAttribute('aria-invalid', 'false');
        error.textContent = '';
        error.hidden = true;
      }
    });
    this.node.append(row);
    this._fields.set(options.name, { row, input, error });
    return input;
  }

  private _setBusy(busy: boolean): void {
    this.toggleClass('pp-mod-checking', busy);
    this.node.setAttribute('aria-busy', busy ? 'true' : 'false');
  }

  private readonly _fields = new Map<
    K,
    { row: HTMLElement; input: HTMLInputElement; error: HTMLElement }
  >();
  private _value: T | null = null;
}

/**
 * A dialog that checks its form before it accepts: the accept button (or Enter) runs the form's
 * check, and only values that pass close the dialog. Cancel and Escape close it at once.
 */
export class FormDialog<T, K extends string> extends Dialog<T | null> {
  constructor(options: FormDialog.IOptions<T, K>) {
    super({ ...options, defaultButton: options.buttons.length - 1 });
    this._form = options.body;
    this._buttonList = options.buttons;
  }

  /** The form shown in the dialog. */
  get form(): FormBody<T, K> {
    return this._form;
  }

  resolve(index?: number): void {
    const button = this._buttonList[index ?? this._buttonList.length - 1];
    if (!button?.accept) {
      super.resolve(index);
      return;
    }
    if (this._checking) {
      return;
    }
    this._checking = true;
    void this._form
      .validate()
      .then(ok => {
        this._checking = false;
        if (ok && !this.isDisposed) {
          super.resolve(index);
        }
      })
      .catch(reason => {
        this._checking = false;
        console.error('Perpend: checking the dialog failed', reason);
      });
  }

  private readonly _form: FormBody<T, K>;
  private readonly _buttonList: ReadonlyArray<Dialog.IButton>;
  private _checking = false;
}

export namespace FormDialog {
  export interface IOptions<T, K extends string> extends Partial<Dialog.IOptions<T | null>> {
    body: FormBody<T, K>;
    /** Cancel first, accept last (the accept button is the default one). */
    buttons: ReadonlyArray<Dialog.IButton>;
  }
}
