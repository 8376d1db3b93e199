/**
 * What the source pickers offer: the arrays the notebook's kernel lists now (variables and cell
 * results), as one list with labels the user recognises.
 */
import type { ISignal } from '@lumino/signaling';
import type { SourceRef } from './setup';

export interface SourceOption {
  ref: SourceRef;
  /** `primary`, `Out[3]`, `primary − hum` (a shelf array). */
  label: string;
  shape: ReadonlyArray<number>;
  /** numpy's dtype name in the kernel. */
  dtype: string;
  complex: boolean;
}

/** Where the listing behind the pickers stands, in a sentence for the user. */
export interface CatalogState {
  /** 'listed': the options are the kernel's arrays now; 'busy': a listing is under way or waits
   * for the kernel; 'error': the last listing failed; 'none': no kernel to list. */
  state: 'listed' | 'busy' | 'error' | 'none';
  message: string;
}

export interface ISourceCatalog {
  options(): ReadonlyArray<SourceOption>;
  /** Fires when the options or the state change. */
  readonly changed: ISignal<unknown, void>;
  /** Where the listing stands (absent: always listed). */
  state?(): CatalogState;
  /** Lists the kernel's arrays again (the user asked). */
  relist?(): void;
}

/** A stable key of a source reference (for select values and maps). */
export function refKey(ref: SourceRef): string {
  switch (ref.kind) {
    case 'variable':
      return `v:${ref.name}`;
    case 'cell':
      return `c:${ref.cellId}`;
    case 'shelf':
      return `s:${ref.label}`;
  }
}
