/**
 * The data shapes the bridge hands out and takes in: where an array lives, how it is
 * described, an array read or written, and the outcomes of a write and of a cell check.
 */

/** Where an array lives in the kernel. */
export type ArraySource =
  { kind: 'cell'; cellId: string; executionCount: number } | { kind: 'variable'; name: string };

/** What the panel lists: an array-like value in the kernel, described without moving data. */
export interface ArrayInfo {
  source: ArraySource;
  /** `x` for a variable, `Out[7]` for a cell result. */
  label: string;
  shape: number[];
  /** numpy's dtype name (`float64`, `complex64`, `int16`, `bool`, ...). */
  dtype: string;
  /** Size of the value in the kernel, in bytes (numpy's `nbytes`). */
  bytes: number;
  /**
   * False when Perpend cannot read it (more than 2-D, empty, extended precision); the bridge
   * always sets it. Absent (in objects built elsewhere) means readable.
   */
  readable?: boolean;
  /** Sentences for the user (plain text, never HTML). */
  notes: string[];
}

/** An array read from the kernel: C order, complex interleaved (re, im). */
export interface ArrayData {
  data: Float64Array;
  shape: number[];
  complex: boolean;
  /** The dtype it had in the kernel (for writes: ignored; results are float64/complex128). */
  dtype: string;
  /**
   * SHA-256 (hex) of the float64/complex128 bytes the kernel sent for it, when it was read (the
   * kernel hashes every read): equal digests mean equal values, so a job worker that already
   * holds these values can be sent their name instead of a copy.
   */
  digest?: string;
}

/** How a read's result will be used. */
export interface ReadOptions {
  /**
   * The reader never writes into the data it gets: a re-read of values the kernel still holds
   * unchanged may then hand it the copy the bridge keeps itself, and a full read is kept without
   * a second copy (default false: a fresh copy, the reader's to change).
   */
  shared?: boolean;
}

/** Why a write needs the user's confirmation. */
export interface WriteConflict {
  /** The name is already bound in the user's namespace. */
  exists: boolean;
  /** Type name of the value bound now, when it exists. */
  existingType: string | null;
  /** The module's name when the name is bound to a module (`np` → `numpy`). */
  module: string | null;
  /** The name is a Python builtin (`sum`, `input`, ...). */
  builtin: boolean;
}

/** The outcome of `KernelBridge.writeArray`. */
export type WriteResult =
  | {
      /** The name is taken: nothing was written; ask, then call again with overwrite. */
      status: 'exists';
      name: string;
      conflict: WriteConflict;
      message: string;
    }
  | {
      /** The name is free but would shadow a builtin: nothing written; ask first. */
      status: 'shadows';
      name: string;
      conflict: WriteConflict;
      message: string;
    }
  | {
      status: 'written';
      /** The name as bound in Python (NFKC form). */
      name: string;
      bytes: number;
      /** Sentences for the user, e.g. that a module or builtin is now shadowed. */
      warnings: string[];
    };

/** A code cell as the notebook shows it: its id, the count it shows, and (optionally) its text. */
export interface CellRef {
  cellId: string;
  executionCount: number | null;
  /**
   * The cell's current source (`cell.model.sharedModel.getSource()`). When given, a pair the
   * ledger has not recorded is checked against the kernel's input history first (see
   * `KernelBridge.verifyCells`). It never leaves the page: only its SHA-256 digest does.
   */
  source?: string;
}

/**
 * What `KernelBridge.verifyCells` concluded about one cell:
 * - `trusted`: the ledger already had this (cell id, count) pair; nothing was asked.
 * - `verified`: the kernel's input number `executionCount` is this cell's text; recorded.
 * - `edited`: the kernel's input with that number is other text (the cell was edited since it
 *   ran, or the count is from another kernel session).
 * - `unknown`: the kernel has no input with that number (a restarted kernel), or its history
 *   cannot be indexed by count (see the helper's `verify_cells`).
 * - `conflict`: another cell holds that count (in the ledger, or in the same call).
 * - `skipped`: no count, no source, or a source that is not well-formed text.
 */
export type CellVerdict = 'trusted' | 'verified' | 'edited' | 'unknown' | 'conflict' | 'skipped';

/**
 * The size limit and chunk sizes every transfer uses. One object owned by the bridge, so a
 * change of the limit reaches the reader at once.
 */
export interface TransferLimits {
  /** Largest array read, in bytes as float64/complex128. */
  maxBytes: number;
  /** Name of the setting that holds `maxBytes`, quoted in the refusal message. */
  maxBytesSetting: string;
  /** Bytes per binary chunk, kernel to Perpend. */
  readChunk: number;
  /** Bytes per binary chunk, Perpend to kernel. */
  writeChunk: number;
}
