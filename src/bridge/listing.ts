/**
 * How arrays are listed: one silent request asks the helper to describe the array-like
 * variables, or the results of given cells in IPython's output cache, without moving data;
 * each description is checked and its notes turned into sentences.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { HELPER_REF } from './helper';
import type { SessionLedger } from './ledger';
import { normalizeIdentifier, pyIntLiteral } from './names';
import { BridgeError } from './errors';
import { cacheNotes, noteTexts } from './notes';
import { DTYPE, isRecord, malformed, parseShape, sourceLabel } from './replies';
import type { KernelRequests } from './requests';
import type { ArrayInfo, ArraySource, CellRef } from './types';
import type { CellVerifier } from './verify';

/** Lists the arrays in the user's namespace and in the output cache. */
export class ArrayLister {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _verifier: CellVerifier,
    private readonly _ledger: SessionLedger | null
  ) {}

  /** The bundle every sentence goes through. */
  private get _trans(): TranslationBundle {
    return this._requests.trans;
  }

  /** See `KernelBridge.listCellResults`. */
  async listCellResults(cells: ReadonlyArray<CellRef>): Promise<ArrayInfo[]> {
    const ledger = this._ledger;
    if (ledger) {
      const unseen = cells.filter(
        c =>
          isRecord(c) &&
          typeof c.source === 'string' &&
          typeof c.executionCount === 'number' &&
          !ledger.trusts(c.cellId, c.executionCount)
      );
      if (unseen.length > 0) {
        try {
          await this._verifier.verify(unseen);
        } catch (e) {
          // A helper that answers oddly costs only the seeding; a lost kernel fails the listing.
          if (!(e instanceof BridgeError) || !['malformed', 'kernel-error'].includes(e.code)) {
            throw e;
          }
        }
      }
    }
    const wanted = new Map<number, string>();
    for (const c of cells) {
      const n = c.executionCount;
      if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 1) {
        continue;
      }
      if (typeof c.cellId !== 'string' || c.cellId.length === 0) {
        continue;
      }
      if (this._ledger && !this._ledger.trusts(c.cellId, n)) {
        continue;
      }
      wanted.set(n, c.cellId);
    }
    if (wanted.size === 0) {
      return [];
    }
    const counts = Array.from(wanted.keys()).sort((a, b) => a - b);
    const expr = `${HELPER_REF}.list_cells([${counts.map(n => pyIntLiteral('executionCount', n)).join(', ')}])`;
    const trans = this._trans;
    const reply = await this._requests.listing(
      'cells:' + counts.join(','),
      trans.__('listing cell results'),
      expr
    );
    const cellsOut = (reply as { cells?: unknown }).cells;
    if (!Array.isArray(cellsOut)) {
      throw malformed(trans, trans.__('the cell list'));
    }
    const reference = cacheNotes(trans).reference;
    const out: ArrayInfo[] = [];
    for (const e of cellsOut) {
      if (!isRecord(e) || e.found !== true || e.array !== true) {
        continue;
      }
      const n = e.n;
      if (typeof n !== 'number' || !wanted.has(n)) {
        throw malformed(trans, trans.__('the cell list'));
      }
      const info = this._parseInfo(e, { kind: 'cell', cellId: wanted.get(n)!, executionCount: n });
      info.notes.push(reference);
      const same = e.same_as;
      if (Array.isArray(same)) {
        const names = same.filter(s => typeof s === 'string' && normalizeIdentifier(s).ok);
        if (names.length > 0) {
          info.notes.push(
            trans.__(
              'It is the same object as the variable %1: reading the variable gives the same data.',
              names.join(', ')
            )
          );
        }
      }
      out.push(info);
    }
    return out;
  }

  /** See `KernelBridge.listVariables`. */
  async listVariables(): Promise<ArrayInfo[]> {
    const trans = this._trans;
    const reply = await this._requests.listing(
      'vars',
      trans.__('listing variables'),
      `${HELPER_REF}.list_vars()`
    );
    const vars = (reply as { vars?: unknown }).vars;
    if (!Array.isArray(vars)) {
      throw malformed(trans, trans.__('the variable list'));
    }
    const out: ArrayInfo[] = [];
    for (const e of vars) {
      if (!isRecord(e)) {
        throw malformed(trans, trans.__('the variable list'));
      }
      const check = normalizeIdentifier(e.name);
      if (!check.ok || check.changed) {
        continue;
      }
      out.push(this._parseInfo(e, { kind: 'variable', name: check.name }));
    }
    out.sort((a, b) => (a.label < b.label ? -1 : a.label > b.label ? 1 : 0));
    return out;
  }

  /** One described array from the helper, checked; its note codes become sentences. */
  private _parseInfo(e: Record<string, unknown>, source: ArraySource): ArrayInfo {
    const trans = this._trans;
    const shape = parseShape(e.shape);
    const dtype = e.dtype;
    const bytes = e.bytes;
    if (
      !shape ||
      typeof dtype !== 'string' ||
      !DTYPE.test(dtype) ||
      typeof bytes !== 'number' ||
      !Number.isSafeInteger(bytes) ||
      bytes < 0 ||
      typeof e.readable !== 'boolean' ||
      !Array.isArray(e.notes)
    ) {
      throw malformed(
        trans,
        source.kind === 'cell' ? trans.__('listing cell results') : trans.__('listing variables')
      );
    }
    const texts = (this._noteTexts ??= noteTexts(trans));
    const notes: string[] = [];
    for (const n of e.notes) {
      if (typeof n === 'string' && Object.prototype.hasOwnProperty.call(texts, n)) {
        notes.push(texts[n]);
      }
    }
    return {
      source,
      label: sourceLabel(source),
      shape: shape.slice(),
      dtype,
      bytes,
      readable: e.readable,
      notes
    };
  }

  private _noteTexts: Record<string, string> | null = null;
}
