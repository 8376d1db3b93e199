/**
 * Scan copies: a float64 array copied into a WebAssembly memory of its own, where the display
 * envelope's column scans run with SIMD (column-scan.wat: two samples per instruction and no
 * branch per sample; JavaScript has no SIMD). `m4Envelope` uses them by itself for unit-stride
 * real data and for the real or imaginary part of unit-stride complex data; strided views,
 * float32 data and the complex magnitude keep the JavaScript scan. Both give identical envelopes.
 *
 * Each copy owns its memory (one module instance per copy), so a copy is freed like any array
 * once nothing refers to it. Where WebAssembly SIMD is missing `scanCopy` returns null and
 * everything runs as before.
 */
import { COLUMN_SCAN_WASM_HEX } from './column-scan-wasm';

/** The module's exports (column-scan.wat). */
export interface ColumnScanner {
  /** Position of the earliest minimum of n float64 at byte address p (−1: all NaN). */
  scanReal(p: number, n: number): number;
  /** The same for one part (lane 0 real, 1 imaginary) of n complex samples from byte p. */
  scanPair(p: number, n: number, lane: number): number;
  /** Position of the earliest maximum found by the last scan. */
  maxK(): number;
}

// The parts of the WebAssembly global used here (the core compiles without DOM types).
interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: unknown };
  Memory: new (desc: { initial: number; maximum: number }) => { buffer: ArrayBuffer };
  validate(bytes: Uint8Array): boolean;
}

const PAGE = 65536;
/** Largest copy, in samples: 2 GiB, so that the module's 32-bit byte addresses never wrap. */
export const SCAN_COPY_MAX_LENGTH = 2 ** 28;

/** The runtime's WebAssembly and the compiled module (null: no SIMD here; undefined: not tried). */
let loaded: { api: WasmApi; module: object } | null | undefined;

function scanModule(): { api: WasmApi; module: object } | null {
  if (loaded === undefined) {
    loaded = null;
    const api = (globalThis as { WebAssembly?: WasmApi }).WebAssembly;
    const hex = COLUMN_SCAN_WASM_HEX;
    const bytes = new Uint8Array(hex.length / 2);
    for (let i = 0; i < bytes.length; i++) {
      bytes[i] = parseInt(hex.substr(2 * i, 2), 16);
    }
    try {
      if (api && api.validate(bytes)) {
        loaded = { api, module: new api.Module(bytes) };
      }
    } catch {
      loaded = null;
    }
  }
  return loaded;
}

/** Whether scan copies can be made here (WebAssembly with SIMD). */
export function scanCopiesAvailable(): boolean {
  return scanModule() !== null;
}

const scanners = new WeakMap<Float64Array, ColumnScanner>();

/** A scan copy's array (filled by the caller) and its scanner. */
interface PendingCopy {
  copy: Float64Array;
  scanner: ColumnScanner;
}

/** Memory and scanner for a copy of x, not yet filled; null as for `scanCopy`. */
function allocateCopy(x: Float64Array): PendingCopy | null {
  const w = scanModule();
  if (!w || x.length > SCAN_COPY_MAX_LENGTH) {
    return null;
  }
  try {
    const pages = Math.max(1, Math.ceil(x.byteLength / PAGE));
    const memory = new w.api.Memory({ initial: pages, maximum: pages });
    const inst = new w.api.Instance(w.module, { env: { mem: memory } });
    return {
      copy: new Float64Array(memory.buffer, 0, x.length),
      scanner: inst.exports as ColumnScanner
    };
  } catch {
    // out of memory for this copy: the JavaScript scan serves
    return null;
  }
}

/**
 * A copy of `x` with its SIMD column scanner, or null when WebAssembly SIMD is missing, `x` is
 * longer than SCAN_COPY_MAX_LENGTH or the memory cannot be had. The copy is a new Float64Array
 * holding x's elements (x.length of them, from index 0).
 */
export function scanCopy(x: Float64Array): Float64Array | null {
  const p = allocateCopy(x);
  if (!p) {
    return null;
  }
  p.copy.set(x);
  scanners.set(p.copy, p.scanner);
  return p.copy;
}

/** The SIMD scanner of a scan copy; undefined for any other array. */
export function columnScannerOf(x: Float64Array | Float32Array): ColumnScanner | undefined {
  return x instanceof Float64Array ? scanners.get(x) : undefined;
}

// FinalizationRegistry is ES2021; typed here for the ES2020 core.
interface Finalizer {
  register(target: object, held: number): void;
}
type FinalizerCtor = new (cleanup: (held: number) => void) => Finalizer;

/** Samples copied per slice when copies are filled in the background. */
export const SCAN_COPY_SLICE = 2 ** 19;

/**
 * The scan copies a display keeps. `forEnvelope(x, range)` gives the array to envelope: x's scan
 * copy once it is ready, otherwise x itself. A copy is started the first time a range of at
 * least `minLength` samples of x is enveloped (shorter ranges scan fast enough as they are), if
 * the copies alive stay within `budgetBytes`. With a `schedule` (the page passes an idle
 * callback) it is filled SCAN_COPY_SLICE samples per scheduled call, so no long task holds the
 * page; without one, at once. A copy lives as long as its original, which must not be changed
 * in place afterwards (the copy would not follow).
 */
export class ScanCopies {
  readonly budgetBytes: number;
  readonly minLength: number;
  private readonly schedule: ((work: () => void) => void) | undefined;
  private readonly copies = new WeakMap<Float64Array, Float64Array>();
  private readonly started = new WeakSet<Float64Array>();
  private live = 0;
  private readonly finalizer: Finalizer | null;

  constructor(
    options: {
      budgetBytes?: number;
      minLength?: number;
      schedule?: (work: () => void) => void;
    } = {}
  ) {
    this.budgetBytes = options.budgetBytes ?? 256 * 2 ** 20;
    this.minLength = options.minLength ?? 2 ** 20;
    this.schedule = options.schedule;
    const Ctor = (globalThis as { FinalizationRegistry?: FinalizerCtor }).FinalizationRegistry;
    this.finalizer = Ctor
      ? new Ctor(bytes => {
          this.live -= bytes;
        })
      : null;
  }

  /** Bytes held by the copies started here that are still alive (as far as the runtime has said). */
  get liveBytes(): number {
    return this.live;
  }

  /** The array to envelope for `range` samples of x: its scan copy when ready, else x. */
  forEnvelope<T extends Float64Array | Float32Array>(x: T, range: number): T | Float64Array {
    if (!(x instanceof Float64Array)) {
      return x;
    }
    const have = this.copies.get(x);
    if (have) {
      return have;
    }
    if (range >= this.minLength && !this.started.has(x)) {
      this.start(x);
      return this.copies.get(x) ?? x;
    }
    return x;
  }

  private start(x: Float64Array): void {
    this.started.add(x);
    // Without a finalizer the bytes of dropped copies are never returned: count none then,
    // rather than refuse copies forever.
    if (this.finalizer && this.live + x.byteLength > this.budgetBytes) {
      return;
    }
    const p = allocateCopy(x);
    if (!p) {
      return;
    }
    if (this.finalizer) {
      this.live += p.copy.byteLength;
      this.finalizer.register(x, p.copy.byteLength);
    }
    const done = () => {
      scanners.set(p.copy, p.scanner);
      this.copies.set(x, p.copy);
    };
    const schedule = this.schedule;
    if (!schedule) {
      p.copy.set(x);
      done();
      return;
    }
    let at = 0;
    const slice = () => {
      const end = Math.min(x.length, at + SCAN_COPY_SLICE);
      p.copy.set(x.subarray(at, end), at);
      at = end;
      if (at < x.length) {
        schedule(slice);
      } else {
        done();
      }
    };
    schedule(slice);
  }
}
