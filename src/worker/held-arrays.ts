/**
 * The inputs a job worker keeps for later jobs, by name (ArrayData.held: the kernel's SHA-256
 * of the values with their shape and layout, so a name stands for one set of values only).
 * Re-running a set-up while tuning it, or a sweep's jobs, send the same x and d again and again;
 * a worker that holds them is sent their names alone, and the page copies nothing for it.
 *
 * Only inputs a job reads and never writes are named (the page names the adaptive filter's
 * sources); the buffers held are never handed back in a result's transfer list (serve.ts).
 * Entries are kept least recently used first out, within the byte budget of each run message
 * (0: nothing is kept).
 */
import { shapeSize, type ArrayData } from './protocol';

/** Longest name accepted (a 64-digit digest, a shape and a layout fit well within it). */
const MAX_NAME = 256;

/** Asks the page for the values of named arrays this worker does not hold. */
export type AskForArrays = (names: string[]) => Promise<Record<string, Float64Array>>;

export class HeldArrays {
  /** Bytes held now. */
  get bytes(): number {
    return this._bytes;
  }

  /** The names held, least recently used first. */
  names(): string[] {
    return [...this._entries.keys()];
  }

  /**
   * Gives every named array of `spec` its values: values sent with their name are kept, a name
   * sent alone takes the values held under it, or else the values `ask` brings back. Then keeps
   * at most `budgetBytes` (least recently used out). Returns the buffers held now, the spec's
   * among them when they fit (none of them may be transferred away). Throws a sentence on a name
   * or values that do not fit the array's shape.
   */
  async fill(spec: unknown, budgetBytes: number, ask: AskForArrays): Promise<Set<ArrayBuffer>> {
    const budget = Number.isFinite(budgetBytes) && budgetBytes > 0 ? budgetBytes : 0;
    const named = namedArrays(spec);
    // values sent with their name serve the same name elsewhere in the spec too
    const withValues = new Map<string, Float64Array>();
    for (const [path, a] of named) {
      if (a.data.length === valuesOf(path, a)) {
        withValues.set(a.held!, a.data);
      }
    }
    const missing = new Set<string>();
    for (const [path, a] of named) {
      const need = valuesOf(path, a);
      if (a.data.length === need) {
        continue;
      }
      if (a.data.length !== 0) {
        throw new RangeError(
          `${path} has shape [${a.shape.join(', ')}]${a.complex ? ' (complex)' : ''}, which needs ` +
            `${need} values, but its data holds ${a.data.length}`
        );
      }
      const held = withValues.get(a.held!) ?? this._entries.get(a.held!);
      if (held && held.length === need) {
        a.data = held;
      } else {
        missing.add(a.held!);
      }
    }
    if (missing.size > 0) {
      const sent = await ask([...missing]);
      for (const [path, a] of named) {
        if (a.data.length !== 0 || !missing.has(a.held!)) {
          continue;
        }
        const v = sent?.[a.held!];
        const need = valuesOf(path, a);
        if (!(v instanceof Float64Array) || v.length !== need) {
          throw new RangeError(
            `the page sent ${path} (${a.held}) with ` +
              `${v instanceof Float64Array ? `${v.length} values` : 'no values'}, its shape needs ${need}`
          );
        }
        a.data = v;
      }
    }
    // the spec's arrays become the most recently used, then the budget is applied
    for (const [, a] of named) {
      this._drop(a.held!);
      this._entries.set(a.held!, a.data);
      this._bytes += a.data.byteLength;
    }
    for (const [name, data] of this._entries) {
      if (this._bytes <= budget) {
        break;
      }
      this._entries.delete(name);
      this._bytes -= data.byteLength;
    }
    const kept = new Set<ArrayBuffer>();
    for (const data of this._entries.values()) {
      kept.add(data.buffer as ArrayBuffer);
    }
    return kept;
  }

  private _drop(name: string): void {
    const old = this._entries.get(name);
    if (old) {
      this._entries.delete(name);
      this._bytes -= old.byteLength;
    }
  }

  private readonly _entries = new Map<string, Float64Array>();
  private _bytes = 0;
}

/** The arrays of a spec that carry a name, with where they sit (for messages). */
function namedArrays(spec: unknown): Array<[string, ArrayData]> {
  const out: Array<[string, ArrayData]> = [];
  const walk = (v: unknown, path: string, depth: number): void => {
    if (v === null || typeof v !== 'object' || depth > 8 || ArrayBuffer.isView(v)) {
      return;
    }
    const a = v as Partial<ArrayData>;
    if (a.held !== undefined && a.data instanceof Float64Array) {
      if (typeof a.held !== 'string' || a.held.length === 0 || a.held.length > MAX_NAME) {
        throw new TypeError(`${path}.held must be a name of 1 to ${MAX_NAME} characters`);
      }
      out.push([path, a as ArrayData]);
      return;
    }
    for (const k of Object.keys(v)) {
      walk((v as Record<string, unknown>)[k], path ? `${path}.${k}` : k, depth + 1);
    }
  };
  walk(spec, '', 0);
  return out;
}

/** Values an array's shape asks for; throws a sentence on a shape that is not one. */
function valuesOf(path: string, a: ArrayData): number {
  if (
    !Array.isArray(a.shape) ||
    a.shape.length === 0 ||
    a.shape.some(s => !Number.isInteger(s) || s < 0) ||
    typeof a.complex !== 'boolean'
  ) {
    throw new RangeError(`${path} needs a shape (a list of sizes ≥ 0) and a complex flag`);
  }
  return shapeSize(a.shape) * (a.complex ? 2 : 1);
}
