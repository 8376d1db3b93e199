/**
 * How a cell's execution count is confirmed after a page reload: the cell's text, as a SHA-256
 * digest, is checked against the kernel's input history for that count, and the pairs that
 * match are recorded in the ledger (see `verify` below for the rule).
 */
import { DIGEST_PATTERN, isWellFormed, sourceDigest } from './digest';
import { HELPER_REF } from './helper';
import type { SessionLedger } from './ledger';
import { badArgument, pyIntLiteral, pyStringLiteral } from './names';
import { isRecord, malformed } from './replies';
import type { KernelRequests, KernelReset } from './requests';
import type { CellRef, CellVerdict } from './types';

/** One cell's verdict, as {@link CellVerifier.verify} returns it. */
export interface CellCheck {
  cellId: string;
  executionCount: number | null;
  verdict: CellVerdict;
}

/** Checks cells against the kernel's input history and seeds the ledger. */
export class CellVerifier {
  constructor(
    private readonly _requests: KernelRequests,
    private readonly _ledger: SessionLedger | null
  ) {
    _requests.reset.connect(this._onReset, this);
  }

  /**
   * Checks cells that show an execution count the ledger has not recorded against IPython's
   * input history (`history_manager.input_hist_raw[n]`, the text exactly as the cell sent it),
   * and records into the ledger the pairs whose text matches: after a page reload the kernel
   * keeps running but the ledger starts empty. In ONE silent request (no history, no count)
   * that carries only integers and SHA-256 hex digests, never the source itself.
   *
   * The rule: cell (id, n, source) is verified when the kernel's history is indexable by count
   * (its length is the next execution count) and SHA-256(UTF-8(input n without trailing "\n"))
   * equals SHA-256(UTF-8(source without trailing "\n")) (see `digest.ts`), no other cell holds
   * n (in the ledger or in this call), and the cell was not recorded meanwhile. A cell edited
   * since it ran fails; after a restart the history restarts, so old counts fail too. It
   * proves that execution n ran this text in this kernel, not that this very cell sent it (an
   * identical copy of the cell would pass as well).
   *
   * A digest found different is remembered for this kernel session (the history does not
   * change), so later calls do not ask again for it.
   */
  async verify(cells: ReadonlyArray<CellRef>): Promise<CellCheck[]> {
    if (!Array.isArray(cells)) {
      throw badArgument(`cells must be an array, got ${typeof cells}`);
    }
    const ledger = this._ledger;
    const generation = ledger?.generation ?? 0;
    if (this._editedGeneration !== generation) {
      this._edited.clear();
      this._editedGeneration = generation;
    }
    const results: CellCheck[] = [];
    const candidates: Array<{ index: number; cellId: string; n: number; source: string }> = [];
    for (const c of cells) {
      const cellId = isRecord(c) && typeof c.cellId === 'string' ? c.cellId : '';
      const n = isRecord(c) ? c.executionCount : null;
      const count = typeof n === 'number' ? n : null;
      const index = results.push({ cellId, executionCount: count, verdict: 'skipped' }) - 1;
      if (cellId.length === 0 || cellId.length > 256) {
        continue;
      }
      if (count === null || !Number.isSafeInteger(count) || count < 1) {
        continue;
      }
      if (ledger && ledger.trusts(cellId, count)) {
        results[index].verdict = 'trusted';
        continue;
      }
      const source = (c as CellRef).source;
      if (typeof source !== 'string' || !isWellFormed(source)) {
        continue;
      }
      if (
        ledger &&
        (ledger.cellFor(count) !== undefined || ledger.countFor(cellId) !== undefined)
      ) {
        // Another cell was seen to run as this count, or this cell was seen to run again.
        results[index].verdict = 'conflict';
        continue;
      }
      candidates.push({ index, cellId, n: count, source });
    }
    const claimants = new Map<number, number>();
    for (const c of candidates) {
      claimants.set(c.n, (claimants.get(c.n) ?? 0) + 1);
    }
    const digests = await Promise.all(candidates.map(c => sourceDigest(c.source)));
    const ask: Array<{ index: number; cellId: string; n: number; digest: string }> = [];
    candidates.forEach((c, i) => {
      const digest = digests[i];
      if (claimants.get(c.n)! > 1) {
        results[c.index].verdict = 'conflict';
      } else if (!DIGEST_PATTERN.test(digest)) {
        results[c.index].verdict = 'skipped';
      } else if (this._edited.has(editedKey(c.cellId, c.n, digest))) {
        results[c.index].verdict = 'edited';
      } else {
        ask.push({ index: c.index, cellId: c.cellId, n: c.n, digest });
      }
    });
    if (ask.length === 0) {
      return results;
    }
    ask.sort((a, b) => a.n - b.n);
    const claims = ask.map(
      a => `[${pyIntLiteral('executionCount', a.n)}, ${pyStringLiteral(a.digest)}]`
    );
    const trans = this._requests.trans;
    const label = trans.__('checking cells against the kernel history');
    const reply = await this._requests.listing(
      'verify:' + ask.map(a => `${a.n}:${a.digest}`).join(','),
      label,
      `${HELPER_REF}.verify_cells([${claims.join(', ')}])`
    );
    const aligned = (reply as { aligned?: unknown }).aligned;
    const entries = (reply as { cells?: unknown }).cells;
    if (typeof aligned !== 'boolean' || !Array.isArray(entries)) {
      throw malformed(trans, label);
    }
    const answers = new Map<string, boolean | null>();
    for (const e of entries) {
      if (
        !isRecord(e) ||
        typeof e.n !== 'number' ||
        typeof e.d !== 'string' ||
        !(e.match === true || e.match === false || e.match === null)
      ) {
        throw malformed(trans, label);
      }
      answers.set(`${e.n}:${e.d}`, e.match);
    }
    const stale = ledger !== null && ledger.generation !== generation;
    for (const a of ask) {
      const match = stale ? null : answers.get(`${a.n}:${a.digest}`);
      const r = results[a.index];
      if (match === false) {
        r.verdict = 'edited';
        if (this._edited.size >= 10000) {
          this._edited.clear();
        }
        this._edited.add(editedKey(a.cellId, a.n, a.digest));
      } else if (match !== true) {
        r.verdict = 'unknown';
      } else if (!ledger) {
        r.verdict = 'verified';
      } else if (ledger.trusts(a.cellId, a.n)) {
        r.verdict = 'trusted';
      } else if (ledger.countFor(a.cellId) !== undefined || ledger.cellFor(a.n) !== undefined) {
        // The cell ran again, or another cell was seen to run as n, while the kernel answered.
        r.verdict = 'conflict';
      } else {
        ledger.record(a.cellId, a.n);
        r.verdict = 'verified';
      }
    }
    return results;
  }

  private _onReset(_: KernelRequests, kind: KernelReset): void {
    if (kind === 'restart') {
      // A new kernel process has a new history.
      this._edited.clear();
    }
  }

  private _edited = new Set<string>();
  private _editedGeneration = 0;
}

function editedKey(cellId: string, n: number, digest: string): string {
  return `${n}\u0000${digest}\u0000${cellId}`;
}
