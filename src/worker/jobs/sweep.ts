/**
 * A sweep: one parameter of an adaptive-filter spec over a list of values, expanded into one
 * spec per value (the pool runs them in parallel). Each spec gets its own copy of the source
 * arrays, so that handing one job's buffers to a worker leaves the others intact.
 */
import type { Algorithm } from '../../core/filters';
import { shapeSize, type AdaptiveFilterSpec, type ArrayData, type SweepSpec } from '../protocol';

const NUMERIC = ['taps', 'lambda', 'delta', 'mu', 'epsilon'];
const ALGORITHMS: Algorithm[] = ['qr-rls', 'inverse-qr-rls', 'rls', 'rls-textbook', 'nlms', 'lms'];

function cloneArrays<T>(v: T): T {
  if (v === null || typeof v !== 'object') {
    return v;
  }
  if (v instanceof Float64Array) {
    return Float64Array.from(v) as unknown as T;
  }
  if (Array.isArray(v)) {
    return v.map(cloneArrays) as unknown as T;
  }
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v)) {
    out[k] = cloneArrays(x);
  }
  return out as T;
}

/** The specs of a sweep, in the order of its values. */
export function expandSweep(
  sweep: SweepSpec,
  options: { copyData?: boolean } = {}
): AdaptiveFilterSpec[] {
  if (sweep === null || typeof sweep !== 'object' || sweep.base?.kind !== 'adaptive-filter') {
    throw new TypeError('a sweep needs an adaptive-filter spec as its base');
  }
  const p = sweep.parameter;
  if (!NUMERIC.includes(p) && p !== 'algorithm') {
    throw new RangeError(
      `parameter must be one of ${[...NUMERIC, 'algorithm'].join(', ')}, got ${JSON.stringify(p)}`
    );
  }
  if (!Array.isArray(sweep.values) || sweep.values.length === 0) {
    throw new RangeError('values must be a non-empty list');
  }
  sweep.values.forEach((v, k) => {
    const ok =
      p === 'algorithm'
        ? ALGORITHMS.includes(v as Algorithm)
        : typeof v === 'number' && Number.isFinite(v) && (p !== 'taps' || Number.isInteger(v));
    if (!ok) {
      throw new RangeError(
        `values[${k}] must be ${p === 'algorithm' ? `one of ${ALGORITHMS.join(', ')}` : p === 'taps' ? 'an integer' : 'a finite number'}, got ${JSON.stringify(v)}`
      );
    }
  });
  const copy = options.copyData ?? true;
  return sweep.values.map(v => {
    const base = copy ? cloneArrays(sweep.base) : { ...sweep.base };
    return { ...base, [p]: v } as AdaptiveFilterSpec;
  });
}

/**
 * Bytes of the source arrays a spec carries (a named array sent without its values, see
 * ArrayData.held, by its shape: the worker will hold them all the same).
 */
export function specDataBytes(v: unknown): number {
  if (v === null || typeof v !== 'object') {
    return 0;
  }
  if (ArrayBuffer.isView(v)) {
    return v.byteLength;
  }
  const a = v as Partial<ArrayData>;
  if (
    typeof a.held === 'string' &&
    a.data instanceof Float64Array &&
    a.data.length === 0 &&
    Array.isArray(a.shape)
  ) {
    return shapeSize(a.shape) * (a.complex ? 2 : 1) * 8;
  }
  let s = 0;
  for (const x of Object.values(v)) {
    s += specDataBytes(x);
  }
  return s;
}
