/**
 * A running run's progress written into the page at most every PROGRESS_PAINT_MS per run. Each
 * write changes a bar and a line of text, and the page then restyles, lays out and repaints
 * (and hit-tests under a resting pointer): with two runs on a pool of two workers, 20 such
 * rounds a second took the page's thread, and so part of a core, from the workers. Four a second
 * per run still shows the bar moving.
 *
 * Every painter paints on one grid of instants (the multiples of PROGRESS_PAINT_MS on the page's
 * clock), so the bars of all running runs, in the list and in the run's detail, change in the
 * same frame: a trace of a sweep on two workers showed 25 frames in 1.75 s, each ≈ 6 ms of
 * style, layout, paint and hit-testing, for bars that changed at unrelated moments.
 */
export const PROGRESS_PAINT_MS = 250;

/**
 * The paints of every painter waiting for the next animation frame. Timers due at the same
 * instant still ran as separate tasks with a frame between them (three frames for one instant in
 * a trace); written in one frame's callbacks, they are laid out and painted once.
 */
const inFrame = new Set<() => void>();
let frameAsked = false;

function paintInFrame(paint: () => void): void {
  if (typeof requestAnimationFrame !== 'function') {
    paint();
    return;
  }
  inFrame.add(paint);
  if (!frameAsked) {
    frameAsked = true;
    requestAnimationFrame(() => {
      frameAsked = false;
      const paints = [...inFrame];
      inFrame.clear();
      paints.forEach(p => p());
    });
  }
}

export class ProgressPainter {
  constructor(now: () => number = () => performance.now()) {
    this._now = now;
  }

  /**
   * Runs `paint` for `key` now when the key has not painted yet, else in the first animation
   * frame after the next instant of the grid at least half an interval after its last paint
   * (the latest `paint` asked for by then is the one run).
   */
  paint(key: string, paint: () => void): void {
    const pending = this._pending.get(key);
    if (pending) {
      pending.paint = paint;
      return;
    }
    const t = this._now();
    const last = this._last.get(key);
    if (last === undefined) {
      this._last.set(key, t);
      paint();
      return;
    }
    let at = Math.ceil(t / PROGRESS_PAINT_MS) * PROGRESS_PAINT_MS;
    if (at - last < PROGRESS_PAINT_MS / 2) {
      at += PROGRESS_PAINT_MS;
    }
    const entry = {
      paint,
      timer: setTimeout(() => {
        this._pending.delete(key);
        this._last.set(key, this._now());
        const framed = (): void => {
          this._framed.delete(key);
          entry.paint();
        };
        this._framed.set(key, framed);
        paintInFrame(framed);
      }, at - t)
    };
    this._pending.set(key, entry);
  }

  /** Forgets `key` and drops its pending paint (its run ended: the view repaints in full). */
  forget(key: string): void {
    const p = this._pending.get(key);
    if (p) {
      clearTimeout(p.timer);
      this._pending.delete(key);
    }
    const framed = this._framed.get(key);
    if (framed) {
      inFrame.delete(framed);
      this._framed.delete(key);
    }
    this._last.delete(key);
  }

  dispose(): void {
    for (const p of this._pending.values()) {
      clearTimeout(p.timer);
    }
    for (const f of this._framed.values()) {
      inFrame.delete(f);
    }
    this._pending.clear();
    this._framed.clear();
    this._last.clear();
  }

  private readonly _now: () => number;
  private readonly _last = new Map<string, number>();
  /** Paints whose instant has come, waiting for the next frame. */
  private readonly _framed = new Map<string, () => void>();
  private readonly _pending = new Map<
    string,
    { paint: () => void; timer: ReturnType<typeof setTimeout> }
  >();
}
