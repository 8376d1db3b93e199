/**
 * Failures of the kernel bridge. Each carries a stable `code` for the panel's logic and a
 * `message` written for the user (what happened, what was kept, what to do), in the language
 * of the bridge's translator (English by default).
 */
export type BridgeErrorCode =
  /** No reply within the timeout after the kernel started the request. */
  | 'timeout'
  /** The kernel was interrupted while it worked on the request. */
  | 'interrupted'
  /** The kernel aborted the request (a cell queued before it failed or was interrupted). */
  | 'aborted'
  /** The kernel restarted before the request finished. */
  | 'restarted'
  /** The kernel died or was shut down. */
  | 'dead'
  /** The connection to the server dropped. */
  | 'disconnected'
  /** The kernel closed Perpend's comm channel. */
  | 'comm-closed'
  /** A reply did not have the expected form. */
  | 'malformed'
  /** The kernel raised an error in Perpend's helper code. */
  | 'kernel-error'
  /** The kernel is not a Python kernel Perpend can talk to. */
  | 'unsupported-kernel'
  /** The variable does not exist. */
  | 'not-found'
  /** The execution count is not (or no longer) in IPython's output cache. */
  | 'not-in-cache'
  /** The execution count was not produced in this kernel session. */
  | 'stale-count'
  /** The value is not an array (or list of numbers). */
  | 'not-array'
  /** The value is a scalar. */
  | 'scalar'
  /** The dtype cannot be read exactly. */
  | 'unsupported-dtype'
  /** More than two dimensions. */
  | 'ndim'
  /** A zero-length array. */
  | 'empty'
  /** Over the size limit. */
  | 'too-large'
  /** int64/uint64 values beyond ±2⁵³ that float64 cannot hold exactly. */
  | 'int-precision'
  /** A name that is not a valid Python identifier. */
  | 'invalid-name'
  /** The bridge was disposed. */
  | 'disposed'
  /** The kernel ran out of memory. */
  | 'memory'
  /**
   * The value can only be had by running code of the user's classes (a property, a
   * `__getattr__`, a conversion of a subclass): Perpend does not run it.
   */
  | 'user-code'
  /** A numpy masked array with masked entries: they have no values to read. */
  | 'masked'
  /** The variable was re-bound to another shape or dtype since the list was made. */
  | 'changed'
  /** A name Perpend never writes to (Python's `__*__` names, IPython's own). */
  | 'reserved'
  /** An argument of another kind than the method takes (not a string, not an ArrayData...). */
  | 'bad-argument';

/** An error from the kernel bridge with a user-facing message. */
export class BridgeError extends Error {
  readonly code: BridgeErrorCode;

  constructor(code: BridgeErrorCode, message: string) {
    super(message);
    this.name = 'BridgeError';
    this.code = code;
  }
}

/** True when `e` is a {@link BridgeError} (optionally with one of `codes`). */
export function isBridgeError(e: unknown, ...codes: BridgeErrorCode[]): e is BridgeError {
  return e instanceof BridgeError && (codes.length === 0 || codes.includes(e.code));
}
