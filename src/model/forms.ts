/**
 * Checks of what the user types into Perpend's dialogs. Each check names the field that is wrong
 * and says why, so a dialog can mark that field and stay open with everything typed kept. Pure
 * functions: no DOM, no kernel.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { englishBundle } from './english';
import { normalizeIdentifier } from '../bridge';
import type { IHumOptions } from './loaded';

/** Field name → the reason its value is refused. Empty when every field is acceptable. */
export type FieldErrors<K extends string> = Partial<Record<K, string>>;

/** The outcome of a check: the parsed value, or the errors per field. */
export type FormCheck<T, K extends string> =
  { ok: true; value: T } | { ok: false; errors: FieldErrors<K> };

/** What the hum dialog collects; `fs` may name a kernel variable (`fs`, `rec.fs`). */
export interface IHumFormValue extends Omit<IHumOptions, 'fs'> {
  fs: number | string;
}

export type HumField = 'f0' | 'fs' | 'harmonics';

/** A dotted Python name such as `fs` or `rec.fs` (each part checked as an identifier). */
function isDottedName(text: string): boolean {
  return text.split('.').every(part => normalizeIdentifier(part).ok);
}

/** A finite decimal number as typed (no hex, no empty string, no trailing words). */
function parseNumber(text: string): number | null {
  const t = text.trim();
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) {
    return null;
  }
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

/**
 * Checks the hum dialog's text fields: f₀ > 0 Hz; fs > 0 Hz or a kernel name; K a whole number
 * ≥ 1; and, when fs is a number, K·f₀ below the Nyquist frequency fs/2 (the harmonic basis needs
 * every harmonic strictly between 0 and fs/2, as core/subspace/builders.ts checks; common
 * practice: the sampling theorem).
 */
export function checkHumForm(
  input: Record<HumField, string>,
  trans: TranslationBundle = englishBundle()
): FormCheck<IHumFormValue, HumField> {
  const errors: FieldErrors<HumField> = {};
  const f0 = parseNumber(input.f0);
  if (f0 === null) {
    errors.f0 = trans.__('Enter a frequency in Hz, such as 50 or 60.');
  } else if (f0 <= 0) {
    errors.f0 = trans.__('The fundamental must be above 0 Hz.');
  }
  const fsText = input.fs.trim();
  let fs: number | string = NaN;
  if (fsText === '') {
    errors.fs = trans.__('Enter the sample rate in Hz, or the name of a kernel variable.');
  } else if (/^[+-]?[\d.]/.test(fsText)) {
    const v = parseNumber(fsText);
    if (v === null) {
      errors.fs = trans.__('%1 is not a number.', fsText);
    } else if (v <= 0) {
      errors.fs = trans.__('The sample rate must be above 0 Hz.');
    } else {
      fs = v;
    }
  } else if (isDottedName(fsText)) {
    fs = fsText;
  } else {
    errors.fs = trans.__(
      '%1 is neither a number nor a Python name (such as fs or rec.fs).',
      fsText
    );
  }
  const kText = input.harmonics.trim();
  const k = parseNumber(kText);
  if (k === null || !Number.isInteger(k)) {
    errors.harmonics = trans.__('Enter a whole number of harmonics, such as 5.');
  } else if (k < 1) {
    errors.harmonics = trans.__('At least one harmonic is needed.');
  }
  if (f0 !== null && k !== null && typeof fs === 'number' && !errors.f0 && !errors.harmonics) {
    const nyquistError = checkNyquist(f0, fs, k, trans);
    if (nyquistError) {
      errors.harmonics = nyquistError;
    }
  }
  if (Object.keys(errors).length > 0) {
    return { ok: false, errors };
  }
  return { ok: true, value: { f0: f0 as number, fs, harmonics: k as number } };
}

/**
 * The reason K harmonics of f₀ do not fit below the Nyquist frequency fs/2, or null when they
 * do. Says how many harmonics would fit, so the user can correct K at once.
 */
export function checkNyquist(
  f0: number,
  fs: number,
  harmonics: number,
  trans: TranslationBundle = englishBundle()
): string | null {
  if (!(fs > 0) || !(f0 > 0) || harmonics * f0 < fs / 2) {
    return null;
  }
  // The largest K with K·f0 strictly below fs/2.
  const fit = Math.ceil(fs / 2 / f0) - 1;
  return fit >= 1
    ? trans.__(
        '%1 × %2 Hz = %3 Hz is not below the Nyquist frequency fs/2 = %4 Hz; at most %5 harmonics fit.',
        harmonics,
        f0,
        harmonics * f0,
        fs / 2,
        fit
      )
    : trans.__('f₀ = %1 Hz is not below the Nyquist frequency fs/2 = %2 Hz.', f0, fs / 2);
}

/** Checks a kernel variable name typed into the save dialog. */
export function checkVariableName(
  text: string,
  trans: TranslationBundle = englishBundle()
): FormCheck<string, 'name'> {
  const check = normalizeIdentifier(text.trim(), trans);
  if (!check.ok) {
    return {
      ok: false,
      errors: { name: trans.__('Not a valid Python name: %1.', check.reason) }
    };
  }
  return { ok: true, value: check.name };
}
