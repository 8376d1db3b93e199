/**
 * Reading the kernel's replies: every reply is checked for the form Perpend expects before
 * anything in it is used, and a reply that does not fit becomes a `malformed` BridgeError.
 * Output content is parsed (JSON of the helper's own making, or its fields), never evaluated.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { BridgeError } from './errors';
import type { ArraySource } from './types';

/** One mebibyte, the unit of the size limit and the chunk sizes. */
export const MiB = 1048576;

/** numpy dtype names the helper may report; anything else in a reply is malformed. */
export const DTYPE =
  /^(bool|u?int(8|16|32|64)|float(16|32|64|96|128)|complex(64|128|192|256)|longlong|ulonglong|longdouble|clongdouble)$/;

/** A plain object (not null, not an array). */
export function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** `x` for a variable, `Out[7]` for a cell result. */
export function sourceLabel(s: ArraySource): string {
  return s.kind === 'variable' ? s.name : `Out[${s.executionCount}]`;
}

/** The error for a reply that does not have the expected form, while `what`. */
export function malformed(trans: TranslationBundle, what: string): BridgeError {
  return new BridgeError(
    'malformed',
    trans.__(
      "The kernel's reply while %1 was not in the form Perpend expects, so it was ignored. Nothing in the panel was changed. (Was Perpend's helper in the kernel changed?)",
      what
    )
  );
}

/** The error for a request the kernel dropped (a cell queued before it failed). */
export function aborted(trans: TranslationBundle, label: string): BridgeError {
  return new BridgeError(
    'aborted',
    trans.__(
      'The kernel dropped the request (%1) because a cell queued before it failed or was interrupted. Nothing in the panel was changed; try again.',
      label
    )
  );
}

/** An exception the kernel raised (an execute reply or a user expression with `ename`). */
export function kernelException(
  trans: TranslationBundle,
  content: Record<string, unknown>,
  label: string
): BridgeError {
  const ename = typeof content.ename === 'string' ? content.ename.slice(0, 60) : 'Error';
  if (ename === 'KeyboardInterrupt') {
    return new BridgeError(
      'interrupted',
      trans.__('The kernel was interrupted while %1. Nothing in the panel was changed.', label)
    );
  }
  const evalue = typeof content.evalue === 'string' ? content.evalue.slice(0, 200) : '';
  return new BridgeError(
    'kernel-error',
    evalue
      ? trans.__(
          'The kernel raised %1 while %2: %3. Nothing in the panel was changed.',
          ename,
          label,
          evalue
        )
      : trans.__('The kernel raised %1 while %2. Nothing in the panel was changed.', ename, label)
  );
}

/** The text/plain of one user expression result, or a BridgeError. */
export function plainText(trans: TranslationBundle, entry: unknown, label: string): string {
  if (!isRecord(entry)) {
    throw malformed(trans, label);
  }
  if (entry.status === 'error') {
    throw kernelException(trans, entry, label);
  }
  const data = entry.data;
  if (entry.status !== 'ok' || !isRecord(data) || typeof data['text/plain'] !== 'string') {
    throw malformed(trans, label);
  }
  return data['text/plain'];
}

/** A user expression whose text/plain is the helper's JSON, parsed. */
export function parseJsonExpression(
  trans: TranslationBundle,
  entry: unknown,
  label: string
): unknown {
  const text = plainText(trans, entry, label);
  try {
    return JSON.parse(text);
  } catch {
    throw malformed(trans, label);
  }
}

/** A shape (1 to 32 non-negative safe integers), or null. */
export function parseShape(v: unknown): number[] | null {
  if (!Array.isArray(v) || v.length === 0 || v.length > 32) {
    return null;
  }
  for (const s of v) {
    if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 0) {
      return null;
    }
  }
  return v as number[];
}

/** The head of an array transfer, checked for consistency. */
/** A SHA-256 digest as the helper writes it: 64 lowercase hex digits. */
const SHA256_HEX = /^[0-9a-f]{64}$/;

export interface TransferHeader {
  shape: number[];
  dtype: string;
  complex: boolean;
  nbytes: number;
  chunks: number;
  chunk: number;
  /** SHA-256 (hex) of the bytes, when the kernel sent it (comm reads). */
  digest: string | null;
  /** The kernel found the copy the front end named (by digest) identical: no chunks follow. */
  same: boolean;
}

/**
 * The header of a read: 1-D or 2-D, a known dtype, byte count matching the shape (8 bytes a
 * real value, 16 a complex one), chunk count matching the chunk size, within `maxBytes`.
 */
export function parseHeader(
  trans: TranslationBundle,
  d: Record<string, unknown>,
  maxBytes: number,
  label: string
): TransferHeader {
  const shape = parseShape(d.shape);
  const { dtype, complex, nbytes, chunks, chunk } = d;
  if (
    !shape ||
    shape.length > 2 ||
    typeof dtype !== 'string' ||
    !DTYPE.test(dtype) ||
    typeof complex !== 'boolean' ||
    typeof nbytes !== 'number' ||
    typeof chunks !== 'number' ||
    typeof chunk !== 'number' ||
    !Number.isSafeInteger(nbytes) ||
    !Number.isSafeInteger(chunks) ||
    !Number.isSafeInteger(chunk) ||
    chunk <= 0
  ) {
    throw malformed(trans, label);
  }
  const elements = shape.reduce((a, b) => a * b, 1);
  if (
    elements * (complex ? 16 : 8) !== nbytes ||
    nbytes === 0 ||
    Math.ceil(nbytes / chunk) !== chunks
  ) {
    throw malformed(trans, label);
  }
  if (nbytes > maxBytes) {
    throw malformed(trans, label);
  }
  const digest = d.digest ?? null;
  const same = d.same ?? false;
  if (
    (digest !== null && (typeof digest !== 'string' || !SHA256_HEX.test(digest))) ||
    typeof same !== 'boolean' ||
    (same && digest === null)
  ) {
    throw malformed(trans, label);
  }
  return { shape: shape.slice(), dtype, complex, nbytes, chunks, chunk, digest, same };
}
