/**
 * The worker's own copies of a run's input arrays, made a slice at a time with the event loop
 * given back between slices: a job's buffers are transferred to the worker, so each job needs
 * copies of its own (the run keeps the arrays it read for its plots), and copying 16 MB in one go
 * would freeze the page for tens of milliseconds. 2-D sources whose samples run along axis 0
 * are transposed to K×N on the way (DESIGN §3).
 */
import type { ArrayData as KernelArray } from '../../bridge';
import type { ArrayData } from '../../worker/protocol';
import type { SourcePick } from './setup';

/** Doubles copied between two pauses (2 MiB: about a millisecond of copying). */
export const SLICE_DOUBLES = 1 << 18;

/** Gives the event loop back (the page paints and answers input in between). */
export type Pause = () => Promise<void>;

/**
 * A macrotask pause: lets input, timers and paint run before the next slice. A message to
 * itself on a MessageChannel, since chained `setTimeout(0)`s are clamped to 4 ms each.
 */
export const macrotaskPause: Pause = (() => {
  let channel: MessageChannel | null = null;
  const waiting: Array<() => void> = [];
  return () =>
    new Promise<void>(resolve => {
      if (typeof MessageChannel === 'undefined') {
        setTimeout(resolve, 0);
        return;
      }
      if (!channel) {
        channel = new MessageChannel();
        channel.port1.onmessage = () => waiting.shift()?.();
        // Node: an idle port must not keep the process alive (tests, benchmarks)
        (channel.port1 as { unref?: () => void }).unref?.();
        (channel.port2 as { unref?: () => void }).unref?.();
      }
      waiting.push(resolve);
      channel.port2.postMessage(null);
    });
})();

/** Thrown out of a copy whose run was cancelled in the meantime. */
export class CopyCancelled extends Error {
  constructor() {
    super('cancelled');
    this.name = 'CopyCancelled';
  }
}

/** True when a 2-D source is laid out with its samples along axis 0 (it is transposed). */
function transposed(a: KernelArray, pick: SourcePick | null): boolean {
  return a.shape.length === 2 && !!pick?.layout && pick.layout.samplesAxis === 0;
}

/** The shape of a kernel array's job copy: K×N, transposed when the layout says so. */
export function jobShape(a: KernelArray, pick: SourcePick | null): number[] {
  return transposed(a, pick) ? [a.shape[1], a.shape[0]] : [...a.shape];
}

/**
 * The name a job worker may hold a kernel array's job copy under (protocol ArrayData.held): the
 * kernel's SHA-256 of its values, with the copy's shape, kind and layout, so that no other
 * values share it. Null when the array came without a digest.
 */
export function heldName(a: KernelArray, pick: SourcePick | null): string | null {
  if (typeof a.digest !== 'string' || a.digest.length === 0) {
    return null;
  }
  const layout = transposed(a, pick) ? ':transposed' : '';
  return `${a.digest}:${jobShape(a, pick).join('x')}:${a.complex ? 'complex' : 'real'}${layout}`;
}

/**
 * A job's copy of a kernel array, K×N with samples along the last axis, made `slice` doubles at
 * a time with `pause()` between slices; throws CopyCancelled once `cancelled()` says so.
 */
export async function jobArrayInSlices(
  a: KernelArray,
  pick: SourcePick | null,
  pause: Pause = macrotaskPause,
  cancelled: () => boolean = () => false,
  slice: number = SLICE_DOUBLES
): Promise<ArrayData> {
  const src = a.data;
  const out = new Float64Array(src.length);
  const step = Math.max(1, Math.floor(slice));
  if (!transposed(a, pick)) {
    for (let from = 0; from < src.length; from += step) {
      if (from > 0) {
        await pause();
        if (cancelled()) {
          throw new CopyCancelled();
        }
      }
      const to = Math.min(src.length, from + step);
      out.set(src.subarray(from, to), from);
    }
    return { data: out, shape: [...a.shape], complex: a.complex };
  }
  const [rows, cols] = a.shape;
  const w = a.complex ? 2 : 1;
  // out[j, i] = a[i, j], whole input rows per slice.
  const rowsPerSlice = Math.max(1, Math.floor(step / Math.max(1, cols * w)));
  for (let i0 = 0; i0 < rows; i0 += rowsPerSlice) {
    if (i0 > 0) {
      await pause();
      if (cancelled()) {
        throw new CopyCancelled();
      }
    }
    const i1 = Math.min(rows, i0 + rowsPerSlice);
    for (let i = i0; i < i1; i++) {
      for (let j = 0; j < cols; j++) {
        const s = (i * cols + j) * w;
        const d = (j * rows + i) * w;
        out[d] = src[s];
        if (w === 2) {
          out[d + 1] = src[s + 1];
        }
      }
    }
  }
  return { data: out, shape: [cols, rows], complex: a.complex };
}
