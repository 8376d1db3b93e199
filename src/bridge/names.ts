/**
 * Names and literals that reach kernel code.
 *
 * Every name Perpend puts into Python is validated here as an identifier after NFKC
 * normalisation (Python normalises identifiers the same way: "Python Language Reference",
 * §2.3 "Identifiers and keywords", which applies NFKC while parsing), so a full-width "ｘ" is
 * the same name as "x". Every other string reaches kernel code only as a literal produced by
 * {@link pyStringLiteral}, which emits printable ASCII and escapes.
 *
 * The reasons a name is refused are shown to the user (a name typed for a write, a sample-rate
 * path): they go through the translation bundle given, English by default.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { BridgeError } from './errors';
import { bridgeBundle } from './i18n';

const ENGLISH = bridgeBundle();

/**
 * Python 3.11+ hard keywords ("Python Language Reference" §2.3.1). Soft keywords (match, case,
 * type, _) are valid names and are allowed.
 */
export const PYTHON_KEYWORDS: ReadonlySet<string> = new Set([
  'False',
  'None',
  'True',
  'and',
  'as',
  'assert',
  'async',
  'await',
  'break',
  'class',
  'continue',
  'def',
  'del',
  'elif',
  'else',
  'except',
  'finally',
  'for',
  'from',
  'global',
  'if',
  'import',
  'in',
  'is',
  'lambda',
  'nonlocal',
  'not',
  'or',
  'pass',
  'raise',
  'return',
  'try',
  'while',
  'with',
  'yield'
]);

// Python's identifier grammar: XID_Start (plus "_") followed by XID_Continue, checked on the
// NFKC form (PEP 3131). JavaScript's Unicode property escapes know ID_Start/ID_Continue; the
// XID variants differ from them only on a handful of characters that NFKC maps away, and the
// final check below runs on the normalised text, as Python does. Python may know an older
// Unicode than the browser: a character newer than the kernel's Python is accepted here and
// refused by the kernel's own check (the helper validates every name again).
const IDENTIFIER = /^[\p{ID_Start}_][\p{ID_Continue}\u00B7\u0387\u1369-\u1371\u19DA]*$/u;

/** Longest name accepted (a sanity bound; Python itself has none). */
export const MAX_NAME_LENGTH = 200;

/** The outcome of {@link normalizeIdentifier}. */
export type NameCheck =
  { ok: true; name: string; changed: boolean } | { ok: false; reason: string };

/**
 * Normalises `raw` with NFKC and checks it is a Python identifier and not a keyword.
 * `changed` tells when the normalised form differs from what was typed (a look-alike).
 */
export function normalizeIdentifier(raw: unknown, trans: TranslationBundle = ENGLISH): NameCheck {
  if (typeof raw !== 'string') {
    return { ok: false, reason: trans.__('a name must be a string, got %1', typeof raw) };
  }
  const name = raw.normalize('NFKC');
  if (name.length === 0) {
    return { ok: false, reason: trans.__('the name is empty') };
  }
  if (name.length > MAX_NAME_LENGTH) {
    return {
      ok: false,
      reason: trans.__('the name is longer than %1 characters', MAX_NAME_LENGTH)
    };
  }
  // Unicode 15.1 added ZWNJ/ZWJ to ID_Continue; Python (Unicode ≤ 15.0) refuses them.
  if (!IDENTIFIER.test(name) || /[\u200C\u200D]/.test(name)) {
    return {
      ok: false,
      reason: trans.__(
        '%1 is not a Python identifier (letters, digits and _ only, not starting with a digit)',
        JSON.stringify(raw.slice(0, 40))
      )
    };
  }
  if (PYTHON_KEYWORDS.has(name)) {
    return { ok: false, reason: trans.__('"%1" is a Python keyword', name) };
  }
  return { ok: true, name, changed: name !== raw };
}

/**
 * Returns the NFKC-normalised identifier or throws a TypeError naming the argument and value
 * (in the language of `trans`).
 */
export function checkIdentifier(
  argName: string,
  raw: unknown,
  trans: TranslationBundle = ENGLISH
): string {
  const r = normalizeIdentifier(raw, trans);
  if (!r.ok) {
    throw new TypeError(trans.__('%1 is not a valid Python name: %2', argName, r.reason));
  }
  return r.name;
}

/**
 * Returns the NFKC-normalised identifier, or throws a {@link BridgeError} `invalid-name` that
 * quotes what was given (spaces and newlines included: nothing is trimmed) and says why: the
 * bridge's own check of a name it was asked to read or write.
 */
export function requireName(raw: unknown, trans: TranslationBundle = ENGLISH): string {
  const r = normalizeIdentifier(raw, trans);
  if (!r.ok) {
    throw new BridgeError(
      'invalid-name',
      trans.__(
        '%1 is not a name Perpend can read: %2.',
        typeof raw === 'string' ? JSON.stringify(raw.slice(0, 40)) : String(typeof raw),
        r.reason
      )
    );
  }
  return r.name;
}

/** A {@link BridgeError} `bad-argument`: the caller passed something of another kind. */
export function badArgument(message: string): BridgeError {
  return new BridgeError('bad-argument', message);
}

/**
 * A Python string literal for `s`: double-quoted, printable ASCII only, everything else
 * escaped (\\xNN, \\uNNNN, \\UNNNNNNNN by code point), so no character of `s` can end the
 * literal or start a new statement ("Python Language Reference" §2.4.1, escape sequences).
 */
export function pyStringLiteral(s: string): string {
  let out = '"';
  for (const ch of s) {
    const cp = ch.codePointAt(0)!;
    if (cp === 0x22) {
      out += '\\"';
    } else if (cp === 0x5c) {
      out += '\\\\';
    } else if (cp >= 0x20 && cp < 0x7f) {
      out += ch;
    } else if (cp < 0x100) {
      out += '\\x' + cp.toString(16).padStart(2, '0');
    } else if (cp < 0x10000) {
      out += '\\u' + cp.toString(16).padStart(4, '0');
    } else {
      out += '\\U' + cp.toString(16).padStart(8, '0');
    }
  }
  return out + '"';
}

/** A Python int literal for a safe integer, or a TypeError naming the argument. */
export function pyIntLiteral(argName: string, n: unknown): string {
  if (typeof n !== 'number' || !Number.isSafeInteger(n)) {
    throw new TypeError(`${argName} must be a safe integer, got ${String(n)}`);
  }
  return String(n);
}

/** Names IPython keeps its histories and its own functions in (`InteractiveShell.init_user_ns`). */
export const IPYTHON_NAMES: ReadonlySet<string> = new Set([
  'In',
  'Out',
  'get_ipython',
  'exit',
  'quit',
  '_ih',
  '_oh',
  '_dh',
  '_',
  '__',
  '___',
  '_i',
  '_ii',
  '_iii'
]);

/**
 * Why Perpend never writes to `name`, or null. Writing replaces the name rather than
 * shadowing something, and the replacement breaks the interpreter or IPython:
 * - `'dunder'`: Python's own `__*__` names ("Python Language Reference" §2.3.2, reserved
 *   classes of identifiers): `__builtins__` is every builtin of the notebook, `__name__`,
 *   `__spec__`, `__loader__` and `__package__` drive imports and pickling, `__import__`...
 * - `'ipython'`: where IPython keeps its output and input history (`Out`, `_`, `_7`, `In`,
 *   `_i`, `_i7`, ...) and the functions its magics call (`get_ipython`).
 * The kernel's helper applies the same rule (helper.ts `reserved`).
 */
export function reservedName(name: string): 'dunder' | 'ipython' | null {
  if (name.length > 4 && name.startsWith('__') && name.endsWith('__')) {
    return 'dunder';
  }
  if (IPYTHON_NAMES.has(name) || /^_i?\d+$/.test(name)) {
    return 'ipython';
  }
  return null;
}
