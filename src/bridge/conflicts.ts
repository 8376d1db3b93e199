/**
 * How a write is confirmed. Before binding a name the helper reports what the name holds now
 * (a value, a module, a builtin); unless the caller said overwrite, a taken or shadowing name
 * is not written and the user is asked with the sentence made here. After a write, the
 * warnings say what was replaced or shadowed.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { isRecord, malformed } from './replies';
import { refusalOf } from './refusals';
import type { WriteConflict, WriteResult } from './types';

/** The helper's answer to one step of a write: stopped on a conflict, or done. */
export type WriteReply = { conflict: WriteConflict } | { was: WriteConflict };

/** A conflict report from the helper, its type and module names stripped to word characters. */
export function parseConflict(c: unknown): WriteConflict | null {
  if (!isRecord(c) || typeof c.exists !== 'boolean' || typeof c.builtin !== 'boolean') {
    return null;
  }
  const type = typeof c.type === 'string' ? c.type.replace(/[^\w.]/g, '').slice(0, 60) : null;
  const module =
    typeof c.module === 'string' ? c.module.replace(/[^\w.]/g, '').slice(0, 100) : null;
  return { exists: c.exists, existingType: type, module, builtin: c.builtin };
}

/**
 * One reply of a write step: `{ conflict }` (nothing written), `{ was }` (written; what the
 * name held before), or null for a step that only says ok. A refusal throws.
 */
export function parseWriteReply(
  trans: TranslationBundle,
  v: unknown,
  label: string
): WriteReply | null {
  if (!isRecord(v)) {
    throw malformed(trans, label);
  }
  if (typeof v.error === 'string') {
    throw refusalOf(trans, v.error, v.detail, label, 'maxArrayMiB');
  }
  if ('conflict' in v) {
    const c = parseConflict(v.conflict);
    if (!c) {
      throw malformed(trans, label);
    }
    return { conflict: c };
  }
  if (v.written === true) {
    const c = parseConflict(v.was);
    if (!c) {
      throw malformed(trans, label);
    }
    return { was: c };
  }
  if (v.ok === true) {
    return null;
  }
  throw malformed(trans, label);
}

/** The question for the user when `name` is taken or shadows a builtin. */
export function conflictResult(
  trans: TranslationBundle,
  name: string,
  c: WriteConflict
): WriteResult {
  if (c.exists) {
    return {
      status: 'exists',
      name,
      conflict: c,
      message: c.module
        ? trans.__(
            '"%1" already exists in the kernel (it holds the module %2). Overwrite it?',
            name,
            c.module
          )
        : trans.__(
            '"%1" already exists in the kernel (it holds a %2). Overwrite it?',
            name,
            c.existingType ?? trans.__('value')
          )
    };
  }
  return {
    status: 'shadows',
    name,
    conflict: c,
    message: trans.__(
      '"%1" is a Python builtin; writing the array would hide it in this notebook. Write anyway?',
      name
    )
  };
}

/**
 * What the user should know after a write to `name`: the NFKC form was used (`renamed`), or
 * a module, value or builtin was replaced or shadowed (`was`).
 */
export function writtenWarnings(
  trans: TranslationBundle,
  name: string,
  renamed: boolean,
  was: WriteConflict
): string[] {
  const warnings: string[] = [];
  if (renamed) {
    warnings.push(
      trans.__(
        'Written as "%1", the form Python itself uses for the name you typed (NFKC normalisation).',
        name
      )
    );
  }
  if (was.module) {
    warnings.push(trans.__('"%1" was the module %2; it is now the array.', name, was.module));
  } else if (was.exists) {
    warnings.push(
      trans.__('"%1" held a %2; it was replaced.', name, was.existingType ?? trans.__('value'))
    );
  }
  if (was.builtin) {
    warnings.push(trans.__('"%1" now shadows the Python builtin of that name.', name));
  }
  return warnings;
}
