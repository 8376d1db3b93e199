/**
 * What the source pickers offer: the arrays the notebook's kernel lists now (variables and cell
 * results), as one list with labels the user recognises.
 */
import type { ISignal } from '@lumino/signaling';
import type { SourceRef } from './setup';

export interface SourceOption {
  ref: SourceRef;
  /** `primary`, `Out[3]`. */
  label: string;
  shape: ReadonlyArray<number>;
  /** numpy's dtype name in the kernel. */
  dtype: string;
  complex: boolean;
}

export interface ISourceCatalog {
  options(): ReadonlyArray<SourceOption>;
  readonly changed: ISignal<unknown, void>;
}

/** A stable key of a source reference (for select values and maps). */
export function refKey(ref: SourceRef): string {
  return ref.kind === 'variable' ? `v:${ref.name}` : `c:${ref.cellId}`;
}
