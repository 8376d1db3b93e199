/**
 * Conversions between the protocol's plain arrays (C order, interleaved complex) and the core's
 * Dense arrays, and the row access the jobs need. Views, never copies, where the layout allows.
 */
import { Dense } from '../../core/dense';
import { checkArrayData, type ArrayData } from '../protocol';

/** A Dense view of an ArrayData (C order over its buffer). */
export function denseOf(name: string, a: ArrayData): Dense {
  const v = checkArrayData(name, a);
  return new Dense(v.data, v.shape, undefined, 0, v.complex);
}

/** An ArrayData holding a C-ordered copy of a Dense (a view's own buffer is never handed out). */
export function arrayOf(d: Dense): ArrayData {
  const c = d.copy('C');
  return { data: c.data, shape: c.shape.slice(), complex: c.complex };
}

/** Rows (K) and samples (N) of a 1-D [N] or 2-D [K, N] source (samples along the last axis). */
export function signalShape(name: string, a: ArrayData): { K: number; N: number } {
  const v = checkArrayData(name, a);
  if (v.shape.length === 1) {
    return { K: 1, N: v.shape[0] };
  }
  if (v.shape.length === 2) {
    return { K: v.shape[0], N: v.shape[1] };
  }
  throw new RangeError(
    `${name} must be 1-D (N samples) or 2-D (K×N, samples along the last axis), got shape [${v.shape.join(', ')}]`
  );
}

/** Row k of a K×N source as a flat view (interleaved when complex as `complex` asks). */
export function rowOf(a: ArrayData, k: number, N: number, complex: boolean): Float64Array {
  const W = a.complex ? 2 : 1;
  const row = a.data.subarray(k * N * W, (k + 1) * N * W);
  if (complex && !a.complex) {
    const out = new Float64Array(2 * N);
    for (let i = 0; i < N; i++) {
      out[2 * i] = row[i];
    }
    return out;
  }
  return row;
}
