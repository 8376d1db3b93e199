import { Dialog, Notification, showDialog } from '@jupyterlab/apputils';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { ArrayInfo } from '../bridge';
import type { ILoadedArray, LoadedArraysModel } from '../model/loaded';
import type { IOutputSnapshot } from '../model/output-source';
import type { SourcesModel } from '../model/sources';
import { FormDialog } from './form-dialog';
import { formatShape } from './format';
import { HumDialogBody, SaveDialogBody } from './hum-dialog';

/**
 * What the panel's buttons and commands do: ask the user (dialogs, only for decisions and
 * input), let the model do the work, and report the outcome as a notification. Nothing loaded
 * is lost on a failure.
 */
export class PanelActions {
  constructor(
    private readonly _loaded: LoadedArraysModel,
    private readonly _sources: SourcesModel,
    private readonly _trans: TranslationBundle
  ) {}

  /** Reads a listed array from the kernel, with a notification that follows the read. */
  load(
    info: Pick<ArrayInfo, 'source' | 'label'> & Partial<ArrayInfo>
  ): Promise<ILoadedArray | null> {
    return this._notifyLoad(info.label, this._loaded.loadFromKernel(info));
  }

  /** Brings in the array a cell output shows (kernel cache first, its text otherwise). */
  loadOutput(
    output: IOutputSnapshot,
    trusts: (cellId: string, count: number) => boolean
  ): Promise<ILoadedArray | null> {
    const what =
      output.executionCount !== null
        ? `Out[${output.executionCount}]`
        : this._trans.__('cell %1 output', output.cellIndex);
    return this._notifyLoad(what, this._loaded.loadOutput(output, trusts));
  }

  /** Asks for a name (checked in place), confirms a replacement, then writes. */
  async save(item: ILoadedArray): Promise<void> {
    const trans = this._trans;
    const body = new SaveDialogBody({ trans, name: item.suggestedName });
    const answer = await new FormDialog({
      title: trans.__('Save %1 to the kernel', item.label),
      body,
      buttons: [Dialog.cancelButton(), Dialog.okButton({ label: trans.__('Save') })],
      focusNodeSelector: 'input'
    }).launch();
    if (!answer.button.accept || !answer.value) {
      return;
    }
    let result = await this._loaded.writeBack(item.id, answer.value);
    if (result && result.status !== 'written') {
      if (!(await confirmReplace(trans, result.name, result.message))) {
        return;
      }
      result = await this._loaded.writeBack(item.id, result.name, true);
    }
    if (!result) {
      Notification.error(this._loaded.message, { autoClose: false });
      return;
    }
    if (result.status === 'written') {
      Notification.success(trans.__('Saved %1 to the kernel as %2.', item.label, result.name), {
        autoClose: Private.SUCCESS_MS
      });
      void this._sources.refresh();
      if (result.warnings.length) {
        Notification.warning(result.warnings.join(' '), { autoClose: 8000 });
      }
    }
  }

  /**
   * Asks for f₀, fs (prefilled from a kernel variable `fs` when there is one; a name typed is
   * read when the user accepts) and K; every value is checked before the dialog closes.
   */
  async removeHum(item: ILoadedArray): Promise<void> {
    const trans = this._trans;
    let fs: number | null = null;
    const bridge = this._sources.bridge;
    if (bridge) {
      fs = await bridge.readScalar('fs').catch(() => null);
    }
    const answer = await new FormDialog({
      title: trans.__('Remove mains hum from %1', item.label),
      body: new HumDialogBody({
        trans,
        fs,
        readScalar: bridge ? name => bridge.readScalar(name) : null
      }),
      buttons: [Dialog.cancelButton(), Dialog.okButton({ label: trans.__('Remove hum') })],
      focusNodeSelector: 'input'
    }).launch();
    if (!answer.button.accept || !answer.value) {
      return;
    }
    const result = this._loaded.removeHum(item.id, answer.value);
    if (!result) {
      Notification.error(this._loaded.message, { autoClose: false });
      return;
    }
    Notification.success(trans.__('Added %1: %2', result.label, result.notes[1] ?? ''), {
      autoClose: Private.SUCCESS_MS
    });
  }

  private async _notifyLoad(
    what: string,
    pending: Promise<ILoadedArray | null>
  ): Promise<ILoadedArray | null> {
    const trans = this._trans;
    const loaded = this._loaded;
    const outcome = pending.then(item => {
      if (!item) {
        throw new Error(loaded.message);
      }
      return item;
    });
    const summary = outcome.then(item =>
      trans.__('Loaded %1: %2 %3.', item.label, formatShape(item.array.shape), item.array.dtype)
    );
    Notification.promise(summary, {
      pending: { message: trans.__('Reading %1…', what), options: { autoClose: false } },
      success: { message: text => String(text), options: { autoClose: Private.SUCCESS_MS } },
      error: {
        message: reason => (reason instanceof Error ? reason.message : String(reason)),
        options: { autoClose: false }
      }
    });
    return outcome.catch(() => null);
  }
}

/**
 * The one question Perpend asks before it replaces something in the kernel: the name, why it is
 * taken (the bridge's sentence), and Replace or Cancel. Resolves true to replace.
 */
export async function confirmReplace(
  trans: TranslationBundle,
  name: string,
  reason: string
): Promise<boolean> {
  const answer = await showDialog({
    title: trans.__('Replace %1?', name),
    body: reason,
    buttons: [Dialog.cancelButton(), Dialog.warnButton({ label: trans.__('Replace') })]
  });
  return answer.button.accept;
}

namespace Private {
  /**
   * How long a success stays on screen, in ms. A notification without autoClose is silent (it
   * goes to the notification centre only), so every outcome sets one.
   */
  export const SUCCESS_MS = 5000;
}
