import {
  Dialog,
  InputDialog,
  Notification,
  showDialog,
  showErrorMessage
} from '@jupyterlab/apputils';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { ILoadedArray, LoadedArraysModel } from '../model/loaded';
import type { SourcesModel } from '../model/sources';
import { HumDialogBody, type IHumDialogValue } from './hum-dialog';

/**
 * What the panel's buttons do: ask the user (dialogs), then let the model do the work. Failures
 * are shown with the model's message; nothing loaded is lost.
 */
export class PanelActions {
  constructor(
    private readonly _loaded: LoadedArraysModel,
    private readonly _sources: SourcesModel,
    private readonly _trans: TranslationBundle
  ) {}

  /** Asks for a name, confirms a replacement or a shadowed builtin, then writes. */
  async save(item: ILoadedArray): Promise<void> {
    const trans = this._trans;
    const answer = await InputDialog.getText({
      title: trans.__('Save %1 to the kernel', item.label),
      label: trans.__('Variable name (a numpy array, float64 or complex128)'),
      text: item.suggestedName,
      okLabel: trans.__('Save')
    });
    if (!answer.button.accept || answer.value === null) {
      return;
    }
    let result = await this._loaded.writeBack(item.id, answer.value);
    if (result && result.status !== 'written') {
      const confirm = await showDialog({
        title: trans.__('Replace %1?', result.name),
        body: result.message,
        buttons: [Dialog.cancelButton(), Dialog.warnButton({ label: trans.__('Save anyway') })]
      });
      if (!confirm.button.accept) {
        return;
      }
      result = await this._loaded.writeBack(item.id, result.name, true);
    }
    if (!result) {
      await showErrorMessage(trans.__('Could not save to the kernel'), this._loaded.message);
      return;
    }
    if (result.status === 'written') {
      void this._sources.refresh();
      if (result.warnings.length) {
        Notification.warning(result.warnings.join(' '), { autoClose: 8000 });
      }
    }
  }

  /** Asks for f₀, fs (prefilled from a kernel variable `fs` when there is one) and K. */
  async removeHum(item: ILoadedArray): Promise<void> {
    const trans = this._trans;
    let fs: number | null = null;
    const bridge = this._sources.bridge;
    if (bridge) {
      fs = await bridge.readScalar('fs').catch(() => null);
    }
    const answer = await showDialog<IHumDialogValue>({
      title: trans.__('Remove mains hum from %1', item.label),
      body: new HumDialogBody({ trans, fs }),
      buttons: [Dialog.cancelButton(), Dialog.okButton({ label: trans.__('Remove hum') })],
      focusNodeSelector: 'input'
    });
    if (!answer.button.accept || !answer.value) {
      return;
    }
    let rate = answer.value.fs;
    if (typeof rate === 'string') {
      // A name: read the sample rate from the kernel (validated as identifiers by the bridge).
      try {
        if (!bridge) {
          throw new Error('there is no kernel to read it from');
        }
        rate = await bridge.readScalar(rate);
      } catch (reason) {
        await showErrorMessage(
          trans.__('Hum removal failed'),
          trans.__(
            'Could not read the sample rate %1: %2',
            answer.value.fs,
            String((reason as Error).message ?? reason)
          )
        );
        return;
      }
    }
    if (!this._loaded.removeHum(item.id, { ...answer.value, fs: rate })) {
      await showErrorMessage(trans.__('Hum removal failed'), this._loaded.message);
    }
  }
}
