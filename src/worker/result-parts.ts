/**
 * Result arrays sent ahead of the result, as a job computes them (protocol: `part`).
 *
 * A finished 1e6-sample filter's result holds 32 MB of arrays (output, error, learning curve and
 * its smoothed copy). Arriving all at once with the result, they set off the page's major
 * garbage collection just as the result was drawn: on two cores the collector's marking threads
 * took the cores from the draw (bench:ui's stall case, traced). Sent in parts while the job runs,
 * the page allocates each array when its first part arrives, at the start of the run, and fills
 * it while it has nothing else to do; the result brings only what is made at the end (weights,
 * figures). Traced, the result then no longer starts the collection (the draw's own allocations
 * still may). The pool asks for parts only for a job that runs alone (see pool.ts).
 *
 * The worker's side (PartSender) sends the values a job says are final, at least PART_VALUES at
 * a time, in order, and takes the arrays it sent whole out of the result (an empty data). The
 * page's side (PartReceiver) checks every part (a known key, in order, inside its length) and
 * puts the arrays back into the result; a result whose array was not sent whole is refused with
 * the reason. No DOM, no JupyterLab.
 */
import type { AdaptiveFilterResult, JobResult, PartKey, PartMessage } from './protocol';

/** Values per part at least (the last part of an array may be shorter): 512 KiB of float64. */
export const PART_VALUES = 1 << 16;

/** Where each key's array lives in a result. */
const SLOTS: Record<
  PartKey,
  {
    label: string;
    get(r: AdaptiveFilterResult): Float64Array | null;
    with(r: AdaptiveFilterResult, a: Float64Array): AdaptiveFilterResult;
  }
> = {
  output: {
    label: 'output',
    get: r => r.output?.data ?? null,
    with: (r, a) => ({ ...r, output: { ...r.output, data: a } })
  },
  error: {
    label: 'error',
    get: r => r.error?.data ?? null,
    with: (r, a) => ({ ...r, error: { ...r.error, data: a } })
  },
  learningCurve: {
    label: 'learning curve',
    get: r => r.learningCurve ?? null,
    with: (r, a) => ({ ...r, learningCurve: a })
  },
  learningCurveSmoothed: {
    label: 'smoothed learning curve',
    get: r => r.learningCurveSmoothed ?? null,
    with: (r, a) => ({ ...r, learningCurveSmoothed: a })
  }
};

function isPartKey(k: unknown): k is PartKey {
  return typeof k === 'string' && Object.prototype.hasOwnProperty.call(SLOTS, k);
}

/** The worker's side for one job. */
export class PartSender {
  constructor(
    private readonly _post: (message: PartMessage, transfer: ArrayBuffer[]) => void,
    private readonly _id: number,
    private readonly _minValues = PART_VALUES
  ) {}

  /** The leading `filled` values of `array` (the result's `key`) are final: sends what is due. */
  note(key: PartKey, array: Float64Array, filled: number): void {
    let s = this._sent.get(key);
    if (!s) {
      s = { array, sent: 0 };
      this._sent.set(key, s);
    } else if (s.array !== array) {
      throw new Error(`the job reported a second array for its ${SLOTS[key].label}`);
    }
    const end = Math.min(Math.max(0, Math.floor(filled)), array.length);
    const due = end - s.sent;
    if (due > 0 && (due >= this._minValues || end === array.length)) {
      const data = array.slice(s.sent, end);
      this._post({ type: 'part', id: this._id, key, offset: s.sent, length: array.length, data }, [
        data.buffer
      ]);
      s.sent = end;
    }
  }

  /** The result with each array that was sent whole made empty (the page has its values). */
  strip(result: JobResult): JobResult {
    if (result.kind !== 'adaptive-filter') {
      return result;
    }
    let r = result;
    for (const [key, s] of this._sent) {
      if (s.sent === s.array.length && s.sent > 0 && SLOTS[key].get(r) === s.array) {
        r = SLOTS[key].with(r, new Float64Array(0));
      }
    }
    return r;
  }

  private readonly _sent = new Map<PartKey, { array: Float64Array; sent: number }>();
}

/** The page's side for one job. */
export class PartReceiver {
  /** Takes a part; returns why it cannot be taken (null: taken). */
  take(m: PartMessage): string | null {
    if (!isPartKey(m.key)) {
      return `the worker sent part of an unknown result array ${JSON.stringify(m.key)}`;
    }
    const label = SLOTS[m.key].label;
    if (
      // by tag, not instanceof: an array from another realm (a test's vm context) is one too
      Object.prototype.toString.call(m.data) !== '[object Float64Array]' ||
      !Number.isInteger(m.length) ||
      !Number.isInteger(m.offset) ||
      m.offset < 0 ||
      m.offset + m.data.length > m.length
    ) {
      return (
        `the worker sent a malformed part of the ${label} (values from ${String(m.offset)}, ` +
        `length ${String(m.length)})`
      );
    }
    let p = this._parts.get(m.key);
    if (!p) {
      p = { data: new Float64Array(m.length), filled: 0 };
      this._parts.set(m.key, p);
    }
    if (m.length !== p.data.length || m.offset !== p.filled) {
      return (
        `the worker sent values ${m.offset}… of the ${label} (of ${m.length}) after ` +
        `${p.filled} of ${p.data.length}: out of order`
      );
    }
    p.data.set(m.data, m.offset);
    p.filled += m.data.length;
    return null;
  }

  /** The result with the arrays sent ahead put back, or why it cannot be made whole. */
  fill(result: JobResult): { result: JobResult } | { error: string } {
    if (this._parts.size === 0) {
      return { result };
    }
    if (result?.kind !== 'adaptive-filter') {
      return { error: 'the worker sent parts of arrays its result does not have' };
    }
    let r = result;
    for (const [key, p] of this._parts) {
      const own = SLOTS[key].get(r);
      if (own === null || own.length > 0) {
        // the result brought its own values, or has none (a smoothed curve is dropped when the
        // curve turns out not to be finite)
        continue;
      }
      if (p.filled !== p.data.length) {
        return {
          error: `the worker sent ${p.filled} of the ${p.data.length} values of the ${SLOTS[key].label} before its result`
        };
      }
      r = SLOTS[key].with(r, p.data);
    }
    return { result: r };
  }

  private readonly _parts = new Map<PartKey, { data: Float64Array; filled: number }>();
}
