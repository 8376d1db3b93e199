/**
 * What the user reads when the kernel's helper refuses a request: one sentence per refusal
 * code (`not-found`, `too-large`, `int-precision`, ...), naming the array and what to do.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { BridgeError } from './errors';
import { cacheNotes } from './notes';
import { MiB, isRecord, malformed, parseShape } from './replies';

/** A size in MiB for a sentence: three decimals below 1 MiB, one above. */
export function mib(trans: TranslationBundle, bytes: number): string {
  return trans.__('%1 MiB', (bytes / MiB).toFixed(bytes < MiB ? 3 : 1));
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
      return new BridgeError(
        'not-found',
        trans.__(
          'There is no variable %1 in the kernel (was it deleted, or the kernel restarted?).',
          what
        )
      );
    case 'not-in-cache':
      return new BridgeError(
        'not-in-cache',
        trans.__("%1 is not in IPython's output cache. %2", what, cacheNotes(trans).notCached)
      );
    case 'not-array':
      return new BridgeError(
        'not-array',
        trans.__('%1 is not an array or a list of numbers, so Perpend cannot read it.', what)
      );
    case 'scalar':
      return new BridgeError('scalar', trans.__('%1 is a single number, not an array.', what));
    case 'dtype':
    case 'extended': {
      const dt =
        typeof detail.dtype === 'string'
          ? detail.dtype.replace(/[^\w]/g, '').slice(0, 40)
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
      return new BridgeError(
        'too-large',
        trans.__(
          '%1 is %2 as float64, over the limit of %3 (setting "%4"). A read costs several times that in browser memory; raise the setting or read a slice.',
          what,
          mib(trans, b),
          mib(trans, m),
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
    case 'not-scalar':
      return new BridgeError('not-array', trans.__('%1 is not a real number.', what));
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
