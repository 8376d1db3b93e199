/**
 * Where an array shown in a cell output is read from: the kernel's output cache (full precision)
 * when this kernel session produced that output, or the output's own text otherwise. Pure logic
 * on a plain description of the output, so it runs (and is tested) without a notebook.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { cacheNotes, type ArraySource } from '../bridge';

/** A cell output as the notebook's model holds it. */
export interface IOutputSnapshot {
  cellId: string;
  /** 1-based position of the cell in the notebook, for labels. */
  cellIndex: number;
  /** 'execute_result', 'display_data', 'stream', 'error'. */
  type: string;
  executionCount: number | null;
  /** The output's MIME bundle (stream text is given as text/plain). */
  data: Record<string, unknown>;
}

/** MIME types whose content Perpend can parse into an array, in order of preference. */
export const ARRAY_MIME_TYPES: ReadonlyArray<string> = ['application/json', 'text/plain'];

/**
 * True for an output that can hold an array: a result or a display with a JSON or plain-text
 * representation. Streams (print), errors and outputs with only images or HTML cannot.
 */
export function canHoldArray(output: Pick<IOutputSnapshot, 'type' | 'data'>): boolean {
  if (output.type !== 'execute_result' && output.type !== 'display_data') {
    return false;
  }
  return ARRAY_MIME_TYPES.some(m => output.data[m] !== undefined);
}

/** Reading the array from IPython's output cache. */
export interface IKernelPlan {
  kind: 'kernel';
  source: ArraySource;
  label: string;
}

/** Parsing the array from what the output shows. */
export interface ITextPlan {
  kind: 'text';
  label: string;
  text: unknown;
  mimeType: string | undefined;
  notes: string[];
}

/**
 * The ways to read an output's array, best first: from the kernel when the output is this
 * session's result of a cell whose count the ledger trusts and a kernel is there, then from its
 * text. Empty when the output cannot hold an array.
 */
export function planOutputRead(
  output: IOutputSnapshot,
  options: {
    /** Whether this kernel session produced `count` for the cell (SessionLedger.trusts). */
    trusts: (cellId: string, count: number) => boolean;
    hasKernel: boolean;
    trans: TranslationBundle;
  }
): Array<IKernelPlan | ITextPlan> {
  if (!canHoldArray(output)) {
    return [];
  }
  const trans = options.trans;
  const count = output.executionCount;
  const plans: Array<IKernelPlan | ITextPlan> = [];
  if (
    output.type === 'execute_result' &&
    count !== null &&
    options.hasKernel &&
    options.trusts(output.cellId, count)
  ) {
    plans.push({
      kind: 'kernel',
      source: { kind: 'cell', cellId: output.cellId, executionCount: count },
      label: `Out[${count}]`
    });
  }
  const json = output.data['application/json'];
  plans.push({
    kind: 'text',
    label:
      count !== null
        ? trans.__('Out[%1] (text)', count)
        : trans.__('cell %1 output', output.cellIndex),
    text: json !== undefined ? json : (output.data['text/plain'] ?? ''),
    mimeType: json !== undefined ? 'application/json' : undefined,
    notes: output.type === 'execute_result' ? [] : [cacheNotes(trans).notCached]
  });
  return plans;
}
