/**
 * Signals as the display and spectral routines take them: a typed array, or a strided view of one
 * (DESIGN §3): element k of a real signal is `data[offset + k*stride]`; of a complex signal
 * (interleaved re, im, as numpy stores complex128), `data[2*(offset + k*stride)]` (re) and the
 * next index (im). A numpy slice such as `x[a:b:s]` or a row or column of a 2-D array is used
 * without a copy.
 */
import { checkInteger, describe } from '../errors';

/** A strided view of a real or complex (interleaved) signal, as the envelope and spectra take it. */
export interface SignalView {
  /** Storage: float64 or float32; interleaved (re, im) when `complex`. */
  data: Float64Array | Float32Array;
  /** Interleaved complex samples (default false). */
  complex?: boolean;
  /** Number of samples (complex elements when complex); default: as many as fit. */
  n?: number;
  /** Step between samples, in samples (complex elements); default 1. May be negative. */
  stride?: number;
  /** Index of sample 0, in samples (complex elements); default 0. */
  offset?: number;
}

/** A signal checked once: storage, sample count, stride and offset in samples. */
export interface CheckedSignal {
  data: Float64Array | Float32Array;
  complex: boolean;
  n: number;
  stride: number;
  offset: number;
}

/**
 * Checks a signal given as a typed array (contiguous; complex when `complex`) or a `SignalView`,
 * so that every sample it names lies inside its storage. Errors name `name`.
 */
export function checkSignal(name: string, input: unknown, complex = false): CheckedSignal {
  let view: SignalView;
  if (input instanceof Float64Array || input instanceof Float32Array) {
    view = { data: input, complex };
  } else if (
    input !== null &&
    typeof input === 'object' &&
    ((input as SignalView).data instanceof Float64Array ||
      (input as SignalView).data instanceof Float32Array)
  ) {
    view = input as SignalView;
  } else {
    throw new TypeError(
      `${name} must be a Float64Array, a Float32Array or { data, complex?, n?, stride?, offset? }, got ${describe(input)}`
    );
  }
  const cx = view.complex ?? complex;
  if (typeof cx !== 'boolean') {
    throw new TypeError(`${name}.complex must be a boolean, got ${describe(cx)}`);
  }
  const W = cx ? 2 : 1;
  if (cx && view.data.length % 2 !== 0) {
    throw new RangeError(
      `${name}.data must hold (re, im) pairs when complex, got length ${view.data.length}`
    );
  }
  const len = view.data.length / W;
  const stride = checkInteger(
    `${name}.stride`,
    view.stride ?? 1,
    -Number.MAX_SAFE_INTEGER,
    Number.MAX_SAFE_INTEGER
  );
  if (stride === 0) {
    throw new RangeError(`${name}.stride must not be 0`);
  }
  const offset = checkInteger(`${name}.offset`, view.offset ?? 0, 0, Math.max(0, len - 1));
  const fit = stride > 0 ? Math.ceil((len - offset) / stride) : Math.floor(offset / -stride) + 1;
  const n = checkInteger(`${name}.n`, view.n ?? Math.max(0, fit), 0);
  if (n > 0) {
    const lastIndex = offset + (n - 1) * stride;
    if (lastIndex < 0 || lastIndex >= len) {
      throw new RangeError(
        `${name}: sample ${n - 1} would be at element ${lastIndex}, outside the ${len} ` +
          `${cx ? 'complex elements' : 'elements'} of ${name}.data (n ${n}, stride ${stride}, offset ${offset})`
      );
    }
  }
  return { data: view.data, complex: cx, n, stride, offset };
}
