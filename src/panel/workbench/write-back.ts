/**
 * Writing a run's arrays into the notebook's kernel: the name asked in a dialog that checks it
 * in place, the one replacement question Perpend asks, and the outcome as a notification.
 */
import { Dialog, InputDialog, Notification } from '@jupyterlab/apputils';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { ArrayData, WriteResult } from '../../bridge';
import type { ResultArray, Run } from '../../model/workbench/runs';
import { columnKey, type PlotRecord } from '../plots/plot-record';
import { confirmReplace } from '../actions';
import { FormDialog } from '../form-dialog';
import { SaveDialogBody } from '../hum-dialog';

/** What writing needs of the kernel (the notebook's bridge). */
/** Asks the name to write under (the save dialog, its name checked in place); null: cancelled. */
async function askName(
  trans: TranslationBundle,
  title: string,
  suggested: string
): Promise<string | null> {
  const answer = await new FormDialog({
    title,
    body: new SaveDialogBody({ trans, name: suggested }),
    buttons: [Dialog.cancelButton(), Dialog.okButton({ label: trans.__('Write') })],
    focusNodeSelector: 'input'
  }).launch();
  return answer.button.accept && answer.value ? answer.value : null;
}

export interface IKernelWriter {
  writeArray(
    name: string,
    array: ArrayData,
    options?: { overwrite?: boolean }
  ): Promise<WriteResult>;
  writeRecord(
    name: string,
    arrays: Readonly<Record<string, ArrayData>>,
    params: unknown,
    options?: { overwrite?: boolean }
  ): Promise<WriteResult>;
}

/** A Python name suggested for a run's array: `error_qr_rls` style, lower case. */
export function suggestName(run: Run, key: string): string {
  const tool = run.params.tool === 'adaptive' ? run.params.algorithm : run.params.tool;
  const base = `${key}_${tool}`.replace(/[^A-Za-z0-9_]+/g, '_').toLowerCase();
  return /^[0-9]/.test(base) ? `r_${base}` : base;
}

/**
 * Asks which of a run's result arrays to write (when the command names none); the list shows
 * each key with what it is. Null when the user cancels.
 */
export async function chooseArray(trans: TranslationBundle, run: Run): Promise<string | null> {
  const keys = Object.keys(run.arrays);
  if (keys.length <= 1) {
    return keys[0] ?? null;
  }
  const items = keys.map(k => `${k} · ${trans.__(run.arrays[k].description)}`);
  const answer = await InputDialog.getItem({
    title: trans.__('Which array of %1?', run.label),
    items,
    current: 0,
    okLabel: trans.__('Next'),
    cancelLabel: trans.__('Cancel')
  });
  const i = answer.button.accept && answer.value !== null ? items.indexOf(answer.value) : -1;
  return i >= 0 ? keys[i] : null;
}

/** Asks for a name and writes one array of a run; says what happened. */
export async function writeRunArray(
  trans: TranslationBundle,
  writer: IKernelWriter | null,
  run: Run,
  key: string,
  afterWrite: () => void
): Promise<void> {
  const a: ResultArray | undefined = run.arrays[key];
  if (!a) {
    return;
  }
  if (!writer) {
    Notification.error(trans.__('The notebook has no running kernel to write to.'), {
      autoClose: false
    });
    return;
  }
  const name = await askName(
    trans,
    trans.__('Write %1 of %2 to the kernel', key, run.label),
    suggestName(run, key)
  );
  if (name === null) {
    return;
  }
  const array: ArrayData = {
    data: a.data,
    shape: a.shape,
    complex: a.complex,
    dtype: a.complex ? 'complex128' : 'float64'
  };
  try {
    let result = await writer.writeArray(name, array);
    if (result.status !== 'written') {
      if (!(await confirmReplace(trans, result.name, result.message))) {
        return;
      }
      result = await writer.writeArray(result.name, array, { overwrite: true });
    }
    if (result.status === 'written') {
      Notification.success(
        trans.__('Wrote %1 (%2) to the kernel as %3.', key, trans.__(a.description), result.name),
        {
          autoClose: 5000
        }
      );
      if (result.warnings.length) {
        Notification.warning(result.warnings.join(' '), { autoClose: 8000 });
      }
      afterWrite();
    }
  } catch (e) {
    Notification.error(
      trans.__('Writing %1 failed: %2', key, e instanceof Error ? e.message : String(e)),
      {
        autoClose: false
      }
    );
  }
}

/**
 * Asks for a name and writes a whole run as one dict: every result array under its key, and
 * `params` (the set-up's parameters, the run's label, status, key numbers and sample rate).
 */
export async function writeWholeRun(
  trans: TranslationBundle,
  writer: IKernelWriter | null,
  run: Run,
  afterWrite: () => void
): Promise<void> {
  const keys = Object.keys(run.arrays);
  if (keys.length === 0) {
    return;
  }
  if (!writer) {
    Notification.error(trans.__('The notebook has no running kernel to write to.'), {
      autoClose: false
    });
    return;
  }
  const name = await askName(
    trans,
    trans.__('Write the whole run %1 to the kernel', run.label),
    suggestName(run, 'run')
  );
  if (name === null) {
    return;
  }
  const arrays: Record<string, ArrayData> = {};
  for (const k of keys) {
    const a = run.arrays[k];
    arrays[k] = {
      data: a.data,
      shape: a.shape,
      complex: a.complex,
      dtype: a.complex ? 'complex128' : 'float64'
    };
  }
  const params = {
    setup: run.params,
    label: run.label,
    status: run.status,
    fs: run.fs,
    figures: Object.fromEntries(
      run.figures.map(f => [f.key, { value: f.value, unit: f.unit, label: f.label }])
    ),
    messages: [...run.messages]
  };
  try {
    let result = await writer.writeRecord(name, arrays, params);
    if (result.status !== 'written') {
      if (!(await confirmReplace(trans, result.name, result.message))) {
        return;
      }
      result = await writer.writeRecord(result.name, arrays, params, { overwrite: true });
    }
    if (result.status === 'written') {
      Notification.success(
        trans.__(
          'Wrote the run to the kernel as %1: a dict of %2 and params.',
          result.name,
          keys.join(', ')
        ),
        { autoClose: 5000 }
      );
      afterWrite();
    }
  } catch (e) {
    Notification.error(
      trans.__('Writing the run failed: %1', e instanceof Error ? e.message : String(e)),
      {
        autoClose: false
      }
    );
  }
}

/**
 * Asks for a name and writes a plot's data (what its CSV export holds: every sample of the
 * visible range) as one dict of float64 arrays, with `params` naming each key's column and unit.
 */
export async function writePlotData(
  trans: TranslationBundle,
  writer: IKernelWriter | null,
  record: PlotRecord,
  stem: string,
  afterWrite: () => void
): Promise<void> {
  const keys = Object.keys(record.arrays);
  if (keys.length === 0) {
    Notification.warning(trans.__('The plot shows no numbers to write.'), { autoClose: 5000 });
    return;
  }
  if (!writer) {
    Notification.error(trans.__('The notebook has no running kernel to write to.'), {
      autoClose: false
    });
    return;
  }
  const name = await askName(
    trans,
    trans.__('Write the data of the plot %1 to the kernel', record.params.title),
    columnKey(`plot ${stem}`, new Set()).toLowerCase().slice(0, 40).replace(/_+$/, '')
  );
  if (name === null) {
    return;
  }
  try {
    let result = await writer.writeRecord(name, record.arrays, record.params);
    if (result.status !== 'written') {
      if (!(await confirmReplace(trans, result.name, result.message))) {
        return;
      }
      result = await writer.writeRecord(result.name, record.arrays, record.params, {
        overwrite: true
      });
    }
    if (result.status === 'written') {
      Notification.success(
        trans.__(
          'Wrote the plotted data to the kernel as %1: a dict of %2 and params.',
          result.name,
          keys.join(', ')
        ),
        { autoClose: 5000 }
      );
      if (result.warnings.length) {
        Notification.warning(result.warnings.join(' '), { autoClose: 8000 });
      }
      afterWrite();
    }
  } catch (e) {
    Notification.error(
      trans.__('Writing the plotted data failed: %1', e instanceof Error ? e.message : String(e)),
      { autoClose: false }
    );
  }
}
