/**
 * What the user reads when the kernel's helper refuses a request: one sentence per refusal
 * code (`not-found`, `too-large`, `int-precision`, ...), naming the array and what to do.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { BridgeError } from './errors';
import { cacheNotes } from './notes';
import { MiB, isRecord, malformed, parseShape } from './replies';

/** A size in MiB for a sentence: three decimals below 1 MiB, one above. */
export function mib(trans: TranslationBundle, bytes: number, decimals?: number): string {
  return trans.__('%1 MiB', (bytes / MiB).toFixed(decimals ?? (bytes < MiB ? 3 : 1)));
}

/**
 * Two sizes in MiB with as many decimals as it takes for them to read differently (at least
 * the usual three below 1 MiB or one above, at most nine: 8 bytes is 7.6e-6 MiB), so that
 * "over the limit" never reads "1.0 MiB, over the limit of 1.0 MiB".
 */
export function mibPair(trans: TranslationBundle, a: number, b: number): [string, string] {
  let d = a < MiB || b < MiB ? 3 : 1;
  while (d < 9 && a !== b && (a / MiB).toFixed(d) === (b / MiB).toFixed(d)) {
    d++;
  }
  return [mib(trans, a, d), mib(trans, b, d)];
}

/** A shape as Python writes a tuple: `(5,)`, `(2, 3)`. */
export function pyShape(shape: ReadonlyArray<number>): string {
  return shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
}

/** A name, dotted path or type name from a reply, kept to identifier characters. */
function word(v: unknown, fallback: string): string {
  if (typeof v !== 'string') {
    return fallback;
  }
  const w = v.replace(/[^\p{L}\p{N}_.]/gu, '').slice(0, 80);
  return w.length > 0 ? w : fallback;
}

/** The sentence for a value only code of the user's classes could give (`user-code`). */
function userCode(
  trans: TranslationBundle,
  detail: Record<string, unknown>,
  what: string
): BridgeError {
  const path = word(detail.path, what);
  const attr = word(detail.attr, '');
  const type = word(detail.type, trans.__('object'));
  const full = attr ? `${path}.${attr}` : path;
  const plain = (attr || path.split('.').pop() || 'value').replace(/^_+/, '') || 'value';
  let text: string;
  switch (detail.why) {
    case 'property':
      text = trans.__(
        '%1 is computed by a property of %2: reading it would run that code, which Perpend never does. Bind the value to a plain variable first (for example %3 = %1) and read that.',
        full,
        type,
        plain
      );
      break;
    case 'method':
      text = trans.__(
        '%1 is a method or computed attribute of %2, not a stored number: getting a value from it would run its code, which Perpend never does. Bind the value to a plain variable first (for example %3 = %1) and read that.',
        full,
        type,
        plain
      );
      break;
    case 'getattr':
      text = trans.__(
        '%1 has no stored attribute %2; its class %3 would compute one with __getattr__, code Perpend never runs. Bind the value to a plain variable first (for example %4 = %1.%2) and read that.',
        path,
        attr,
        type,
        plain
      );
      break;
    case 'getattribute':
      text = trans.__(
        '%1 is a %2, whose class decides attribute access with code of its own (__getattribute__), which Perpend never runs. Bind the value you need to a plain variable first and read that.',
        path,
        type
      );
      break;
    case 'subclass':
      text = trans.__(
        '%1 is a %2, a subclass of a Python number type: its value is had only by running its code (__float__), which Perpend never does. Bind a plain number first (for example fs = float(%1)) and read that.',
        path,
        type
      );
      break;
    default:
      text = trans.__(
        'Reading %1 would run code of its class, which Perpend never does. Bind the value to a plain variable first and read that.',
        full
      );
  }
  return new BridgeError('user-code', text);
}

/**
 * A refusal or error code from the helper as a user-facing BridgeError about `what` (a name
 * or `Out[n]`); `setting` is the name of the size-limit setting.
 */
export function refusal(
  trans: TranslationBundle,
  code: string,
  detail: Record<string, unknown>,
  what: string,
  setting: string
): BridgeError {
  const shape = parseShape(detail.shape);
  const shapeText = shape ? `(${shape.join(', ')})` : '';
  switch (code) {
    case 'not-found':
      if (typeof detail.attr === 'string') {
        return new BridgeError(
          'not-found',
          trans.__(
            '%1 has no attribute %2 (nothing of that name is stored in it or in its class %3).',
            word(detail.path, what),
            word(detail.attr, '?'),
            word(detail.type, trans.__('object'))
          )
        );
      }
      return new BridgeError(
        'not-found',
        trans.__(
          'There is no variable %1 in the kernel (was it deleted, or the kernel restarted?).',
          word(detail.path, what)
        )
      );
    case 'user-code':
      return userCode(trans, detail, what);
    case 'masked': {
      const count = typeof detail.count === 'number' ? detail.count : -1;
      const size = typeof detail.size === 'number' ? detail.size : NaN;
      return new BridgeError(
        'masked',
        count > 0
          ? trans.__(
              '%1 is a masked array with %2 of its %3 entries masked: they hold no values, so Perpend does not read it (the tools would run on whatever is stored under the mask). Fill or drop them into a plain variable first, for example %4_filled = %1.filled(np.nan) or %1.compressed().',
              what,
              count,
              size,
              what.replace(/[^\p{L}\p{N}_]/gu, '') || 'x'
            )
          : trans.__(
              '%1 is a masked array whose mask Perpend cannot count, so it does not read it. Fill or drop the masked entries into a plain variable first, for example %2_filled = %1.filled(np.nan).',
              what,
              what.replace(/[^\p{L}\p{N}_]/gu, '') || 'x'
            )
      );
    }
    case 'changed': {
      const was = parseShape(detail.listed_shape);
      const now = parseShape(detail.shape);
      const listed = trans.__(
        'shape %1 %2',
        was ? pyShape(was) : '?',
        word(detail.listed_dtype, '?')
      );
      const held = now
        ? trans.__('shape %1 %2', pyShape(now), word(detail.dtype, '?'))
        : trans.__('a %1', word(detail.type, trans.__('value')));
      return new BridgeError(
        'changed',
        trans.__(
          '%1 has changed since the list was made: the list showed %2, the kernel now holds %3. Nothing was read; pick it again from the refreshed list.',
          what,
          listed,
          held
        )
      );
    }
    case 'reserved':
      return reservedError(trans, what, detail.why === 'ipython' ? 'ipython' : 'dunder');
    case 'not-in-cache':
      return new BridgeError(
        'not-in-cache',
        trans.__("%1 is not in IPython's output cache. %2", what, cacheNotes(trans).notCached)
      );
    case 'not-array':
      return new BridgeError(
        'not-array',
        typeof detail.type === 'string'
          ? trans.__(
              '%1 is not an array or a list of numbers, so Perpend cannot read it (it is a %2; Perpend runs no code of it to convert it: bind the array to a plain variable first, for example %3_array = np.asarray(%1)).',
              what,
              word(detail.type, trans.__('value')),
              what.replace(/[^\p{L}\p{N}_]/gu, '') || 'x'
            )
          : trans.__('%1 is not an array or a list of numbers, so Perpend cannot read it.', what)
      );
    case 'scalar':
      return new BridgeError('scalar', trans.__('%1 is a single number, not an array.', what));
    case 'dtype':
    case 'extended': {
      // numpy's own dtype name: letters, digits and a unit in brackets (datetime64[D]).
      const dt =
        typeof detail.dtype === 'string'
          ? detail.dtype.replace(/[^\w[\]]/g, '').slice(0, 40)
          : trans.__('this dtype');
      return new BridgeError(
        'unsupported-dtype',
        code === 'extended'
          ? trans.__(
              '%1 has dtype %2 (extended precision), which float64 cannot hold exactly; convert it with .astype(float) first if that is acceptable.',
              what,
              dt
            )
          : trans.__(
              '%1 has dtype %2; Perpend reads numbers only (bool, integers, floats, complex).',
              what,
              dt
            )
      );
    }
    case 'ndim':
      return new BridgeError(
        'ndim',
        trans.__(
          '%1 has shape %2: Perpend reads 1-D and 2-D arrays. Select a slice into a variable first.',
          what,
          shapeText
        )
      );
    case 'empty':
      return new BridgeError(
        'empty',
        trans.__('%1 is empty (shape %2): there is nothing to read.', what, shapeText)
      );
    case 'too-large': {
      const b = typeof detail.bytes === 'number' ? detail.bytes : NaN;
      const m = typeof detail.max === 'number' ? detail.max : NaN;
      const [bt, mt] = mibPair(trans, b, m);
      return new BridgeError(
        'too-large',
        trans.__(
          '%1 is %2 as float64, over the limit of %3 (setting "%4"). A read costs several times that in browser memory; raise the setting or read a slice.',
          what,
          bt,
          mt,
          setting
        )
      );
    }
    case 'int-precision': {
      const idx =
        Array.isArray(detail.index) && detail.index.every(i => typeof i === 'number')
          ? detail.index.join(', ')
          : '?';
      const val =
        typeof detail.value === 'string' && /^-?\d{1,25}$/.test(detail.value) ? detail.value : '?';
      if (!Array.isArray(detail.index)) {
        // A single number (a sample rate).
        return new BridgeError(
          'int-precision',
          trans.__(
            '%1 is %2, beyond ±2^53: float64 cannot hold it exactly, so it was not read.',
            what,
            val
          )
        );
      }
      return new BridgeError(
        'int-precision',
        trans.__(
          '%1[%2] is %3, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.',
          what,
          idx,
          val
        )
      );
    }
    case 'invalid-name':
      return new BridgeError('invalid-name', trans.__('%1 is not a valid Python name.', what));
    case 'interrupted':
      return new BridgeError(
        'interrupted',
        trans.__(
          'The kernel was interrupted while working on %1. Nothing in the panel was changed.',
          what
        )
      );
    case 'memory':
      return new BridgeError(
        'memory',
        trans.__('The kernel ran out of memory while working on %1.', what)
      );
    case 'not-scalar': {
      const shape = parseShape(detail.shape);
      return new BridgeError(
        'not-array',
        typeof detail.type === 'string'
          ? trans.__(
              '%1 is not a real number (it is a %2%3).',
              what,
              word(detail.type, trans.__('value')),
              shape ? ' ' + trans.__('of shape %1', pyShape(shape)) : ''
            )
          : trans.__('%1 is not a real number.', what)
      );
    }
    case 'not-finite':
      return new BridgeError('not-array', trans.__('%1 is not finite.', what));
    case 'stale':
      return new BridgeError(
        'malformed',
        trans.__(
          'The kernel lost a staged transfer for %1 (was the helper reset?). Try again.',
          what
        )
      );
    default:
      return new BridgeError(
        'kernel-error',
        trans.__(
          'The kernel could not complete the request for %1 (%2).',
          what,
          code.replace(/[^\w-]/g, '').slice(0, 40)
        )
      );
  }
}

/** Why Perpend never writes to `name` (see `reservedName` in names.ts), as a BridgeError. */
export function reservedError(
  trans: TranslationBundle,
  name: string,
  why: 'dunder' | 'ipython'
): BridgeError {
  return new BridgeError(
    'reserved',
    why === 'dunder'
      ? trans.__(
          'Perpend does not write to "%1": names of the form __name__ are Python\'s own, and replacing one can break imports, pickling or every builtin in this notebook. Choose another name.',
          name
        )
      : trans.__(
          'Perpend does not write to "%1": IPython keeps its history (In, Out, _, _N, _iN) or its own functions (get_ipython, exit, quit) under this name, and replacing it would break the history or the magics. Choose another name.',
          name
        )
  );
}

/** The helper's refusal `v` (`{ error, detail }`) as a BridgeError; anything else is malformed. */
export function kernelRefusal(
  trans: TranslationBundle,
  v: unknown,
  what: string,
  setting: string
): BridgeError {
  if (!isRecord(v) || typeof v.error !== 'string') {
    return malformed(trans, trans.__('reading %1', what));
  }
  return refusal(trans, v.error, isRecord(v.detail) ? v.detail : {}, what, setting);
}

/** The refusal carried by a helper reply or comm message (`error` or `code`, and `detail`). */
export function refusalOf(
  trans: TranslationBundle,
  code: unknown,
  detail: unknown,
  what: string,
  setting: string
): BridgeError {
  return refusal(trans, String(code), isRecord(detail) ? detail : {}, what, setting);
}
