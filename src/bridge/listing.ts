/**
 * How arrays are listed: one silent request asks the helper to describe the array-like
 * variables, or the results of given cells in IPython's output cache, without moving data;
 * each description is checked and its notes turned into sentences.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { HELPER_REF } from './helper';
import type { SessionLedger } from './ledger';
import { MAX_NAME_LENGTH, normalizeIdentifier, pyIntLiteral } from './names';
import { BridgeError } from './errors';
import { cacheNotes, maskedNote, noteTexts, unnamedNote } from './notes';
import { DTYPE, isRecord, malformed, parseShape, sourceLabel } from './replies';
import type { KernelRequests } from './requests';
import type { ArrayInfo, ArraySource, CellRef } from './types';
import type { CellVerifier } from './verify';

/**
 * The shape and dtype each source had in the latest listing, so that a read can tell the
 * kernel what the list showed and be refused (`changed`) when the name was re-bound since.
 */
export class ListedShapes {
  /** What the list showed for `source`, or undefined when it was not listed. */
  get(source: ArraySource): { shape: number[]; dtype: string } | undefined {
    return this._map.get(ListedShapes.key(source));
  }

  /** Forgets `source` (after a refusal that said it changed: the next read takes it as is). */
  forget(source: ArraySource): void {
    this._map.delete(ListedShapes.key(source));
  }

  /** Records a listing; `variables` replaces every variable recorded before. */
  record(infos: ReadonlyArray<ArrayInfo>, variables: boolean): void {
    if (variables) {
      for (const k of Array.from(this._map.keys())) {
        if (k.startsWith('v:')) {
          this._map.delete(k);
        }
      }
    }
    for (const i of infos) {
      if (i.readable !== false) {
        this._map.set(ListedShapes.key(i.source), { shape: i.shape.slice(), dtype: i.dtype });
      }
    }
  }

  private static key(s: ArraySource): string {
    return s.kind === 'variable' ? `v:${s.name}` : `c:${s.executionCount}`;
  }

  private readonly _map = new Map<string, { shape: number[]; dtype: string }>();
}

/** Lists the arrays in the user's namespace and in the output cache. */
export class ArrayLister {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _verifier: CellVerifier,
    private readonly _ledger: SessionLedger | null,
    private readonly _listed: ListedShapes = new ListedShapes()
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
    this._listed.record(out, false);
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
    this._listed.record(out, true);
    return out.concat(this._unnamed(reply as Record<string, unknown>));
  }

  /**
   * Arrays under keys Perpend cannot name (too long, not an identifier, not NFKC, not a
   * string): listed unreadable with a note saying why, never dropped without a word.
   */
  private _unnamed(reply: Record<string, unknown>): ArrayInfo[] {
    const trans = this._trans;
    const skipped = Array.isArray(reply.skipped) ? reply.skipped.slice(0, 20) : [];
    const out: ArrayInfo[] = [];
    for (const e of skipped) {
      if (!isRecord(e) || typeof e.name !== 'string' || typeof e.why !== 'string') {
        throw malformed(trans, trans.__('the variable list'));
      }
      const raw = e.name.slice(0, 40);
      const label =
        e.why === 'long'
          ? `${raw}…`
          : e.why === 'key'
            ? trans.__('(a key that is not a string)')
            : JSON.stringify(raw) + (e.name.length > 40 ? '…' : '');
      const length = typeof e.length === 'number' ? e.length : e.name.length;
      // Never read: `readable` is false, and the label is not the key.
      const info = this._parseInfo(e, { kind: 'variable', name: label });
      info.readable = false;
      info.notes.unshift(unnamedNote(trans, e.why, length, MAX_NAME_LENGTH));
      out.push(info);
    }
    const more = typeof reply.more === 'number' && reply.more > 0 ? reply.more : 0;
    if (more > 0 && out.length > 0) {
      out[out.length - 1].notes.push(
        trans.__('%1 more arrays under keys Perpend cannot name are not shown.', more)
      );
    }
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
      } else if (n === 'masked') {
        const count =
          typeof e.masked === 'number' && Number.isSafeInteger(e.masked) ? e.masked : -1;
        notes.push(
          maskedNote(
            trans,
            count,
            shape.reduce((a, b) => a * b, 1)
          )
        );
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
