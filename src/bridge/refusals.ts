/**
 * What the user reads when the kernel's helper refuses a request: one sentence per refusal
 * code (`not-found`, `too-large`, `int-precision`, ...), naming the array and what to do.
 */
import { BridgeError } from './errors';
import { CACHE_NOTES } from './notes';
import { MiB, isRecord, malformed, parseShape } from './replies';

/** A size in MiB for a sentence: three decimals below 1 MiB, one above. */
export function mib(bytes: number): string {
  return `${(bytes / MiB).toFixed(bytes < MiB ? 3 : 1)} MiB`;
}

/** A refusal or error code from the helper as a user-facing BridgeError. */
export function refusal(
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
        `There is no variable ${what} in the kernel (was it deleted, or the kernel restarted?).`
      );
    case 'not-in-cache':
      return new BridgeError(
        'not-in-cache',
        `${what} is not in IPython's output cache. ${CACHE_NOTES.notCached}`
      );
    case 'not-array':
      return new BridgeError(
        'not-array',
        `${what} is not an array or a list of numbers, so Perpend cannot read it.`
      );
    case 'scalar':
      return new BridgeError('scalar', `${what} is a single number, not an array.`);
    case 'dtype':
    case 'extended': {
      const dt =
        typeof detail.dtype === 'string'
          ? detail.dtype.replace(/[^\w]/g, '').slice(0, 40)
          : 'this dtype';
      return new BridgeError(
        'unsupported-dtype',
        code === 'extended'
          ? `${what} has dtype ${dt} (extended precision), which float64 cannot hold exactly; convert it with .astype(float) first if that is acceptable.`
          : `${what} has dtype ${dt}; Perpend reads numbers only (bool, integers, floats, complex).`
      );
    }
    case 'ndim':
      return new BridgeError(
        'ndim',
        `${what} has shape ${shapeText}: Perpend reads 1-D and 2-D arrays. Select a slice into a variable first.`
      );
    case 'empty':
      return new BridgeError(
        'empty',
        `${what} is empty (shape ${shapeText}): there is nothing to read.`
      );
    case 'too-large': {
      const b = typeof detail.bytes === 'number' ? detail.bytes : NaN;
      const m = typeof detail.max === 'number' ? detail.max : NaN;
      return new BridgeError(
        'too-large',
        `${what} is ${mib(b)} as float64, over the limit of ${mib(m)} (setting "${setting}"). A read costs several times that in browser memory; raise the setting or read a slice.`
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
        `${what}[${idx}] is ${val}, beyond ±2^53: float64 cannot hold it exactly, so the array was not read.`
      );
    }
    case 'invalid-name':
      return new BridgeError('invalid-name', `${what} is not a valid Python name.`);
    case 'interrupted':
      return new BridgeError(
        'interrupted',
        `The kernel was interrupted while working on ${what}. Nothing in the panel was changed.`
      );
    case 'memory':
      return new BridgeError('memory', `The kernel ran out of memory while working on ${what}.`);
    case 'not-scalar':
      return new BridgeError('not-array', `${what} is not a real number.`);
    case 'not-finite':
      return new BridgeError('not-array', `${what} is not finite.`);
    case 'stale':
      return new BridgeError(
        'malformed',
        `The kernel lost a staged transfer for ${what} (was the helper reset?). Try again.`
      );
    default:
      return new BridgeError(
        'kernel-error',
        `The kernel could not complete the request for ${what} (${code.replace(/[^\w-]/g, '').slice(0, 40)}).`
      );
  }
}

/** The helper's refusal `v` (`{ error, detail }`) as a BridgeError; anything else is malformed. */
export function kernelRefusal(v: unknown, what: string, setting: string): BridgeError {
  if (!isRecord(v) || typeof v.error !== 'string') {
    return malformed(`reading ${what}`);
  }
  return refusal(v.error, isRecord(v.detail) ? v.detail : {}, what, setting);
}

/** The refusal carried by a helper reply or comm message (`error` or `code`, and `detail`). */
export function refusalOf(
  code: unknown,
  detail: unknown,
  what: string,
  setting: string
): BridgeError {
  return refusal(String(code), isRecord(detail) ? detail : {}, what, setting);
}
