/**
 * A run's progress reaches the page at most every PROGRESS_PAINT_MS per run, the latest value
 * last, and every run's later paints fall on one grid of instants, written in the animation frame
 * after it, so that the page repaints once for all of them (src/panel/workbench/progress-paint.ts).
 * Common practice (a trailing throttle aligned to a shared tick, DOM writes in a frame callback),
 * no outside source.
 */
import { PROGRESS_PAINT_MS, ProgressPainter } from '../../../src/panel/workbench/progress-paint';

beforeEach(() => {
  jest.useFakeTimers();
});
afterEach(() => {
  jest.useRealTimers();
});

const P = PROGRESS_PAINT_MS;

/** The page's clock and the timers' clock, moved together. */
function clock(start: number): { now: () => number; tick: (ms: number) => void } {
  let t = start;
  return {
    now: () => t,
    tick: ms => {
      t += ms;
      jest.advanceTimersByTime(ms);
    }
  };
}

test('the first paint at once, the next ones on the grid, the latest asked for', () => {
  const c = clock(4 * P); // an instant of the grid
  const p = new ProgressPainter(c.now);
  const painted: string[] = [];
  p.paint('r1', () => painted.push('a'));
  expect(painted).toEqual(['a']);
  c.tick(50);
  p.paint('r1', () => painted.push('b'));
  c.tick(50);
  p.paint('r1', () => painted.push('c')); // replaces b
  p.paint('r2', () => painted.push('x')); // another run: its first paint at once
  expect(painted).toEqual(['a', 'x']);
  c.tick(P - 100 - 1); // 1 ms before 5P
  expect(painted).toEqual(['a', 'x']);
  c.tick(1); // 5P
  expect(painted).toEqual(['a', 'x', 'c']);
  // r2 (last painted 100 ms after 4P) and r1 (at 5P), asked at different moments: both at 6P
  c.tick(10);
  p.paint('r2', () => painted.push('y'));
  c.tick(50);
  p.paint('r1', () => painted.push('d'));
  c.tick(P - 60 - 1);
  expect(painted).toEqual(['a', 'x', 'c']);
  c.tick(1); // 6P
  expect(painted).toEqual(['a', 'x', 'c', 'y', 'd']);
});

test('never twice within half an interval: a grid instant too close to the last paint is skipped', () => {
  const c = clock(8 * P - 10);
  const p = new ProgressPainter(c.now);
  const painted: string[] = [];
  p.paint('r1', () => painted.push('a')); // first: at once, 10 ms before 8P
  c.tick(5);
  p.paint('r1', () => painted.push('b'));
  c.tick(P); // past 8P, 10 ms after a: skipped
  expect(painted).toEqual(['a']);
  c.tick(P); // past 9P
  expect(painted).toEqual(['a', 'b']);
});

test('forget drops a pending paint; dispose drops them all', () => {
  let now = 0;
  const p = new ProgressPainter(() => now);
  const painted: string[] = [];
  p.paint('r1', () => painted.push('a'));
  now += 10;
  p.paint('r1', () => painted.push('b'));
  p.forget('r1');
  jest.advanceTimersByTime(PROGRESS_PAINT_MS);
  expect(painted).toEqual(['a']);
  // forgotten: the next paint is at once
  p.paint('r1', () => painted.push('c'));
  now += 10;
  p.paint('r1', () => painted.push('d'));
  p.dispose();
  jest.advanceTimersByTime(PROGRESS_PAINT_MS);
  expect(painted).toEqual(['a', 'c']);
});

test('on a page, the paints of every painter due at one instant are written in one frame', () => {
  const frames: Array<() => void> = [];
  const g = globalThis as { requestAnimationFrame?: unknown };
  g.requestAnimationFrame = (f: () => void): number => frames.push(f);
  try {
    const c = clock(2 * P);
    const list = new ProgressPainter(c.now); // the run list's bars
    const detail = new ProgressPainter(c.now); // the shown run's status line
    const painted: string[] = [];
    list.paint('r1', () => painted.push('r1 first'));
    list.paint('r2', () => painted.push('r2 first'));
    detail.paint('r1', () => painted.push('detail first'));
    expect(painted).toEqual(['r1 first', 'r2 first', 'detail first']); // at once, no frame
    c.tick(40);
    list.paint('r1', () => painted.push('r1'));
    c.tick(30);
    list.paint('r2', () => painted.push('r2'));
    detail.paint('r1', () => painted.push('detail'));
    c.tick(P - 70); // 3P: every timer has fired, nothing written yet
    expect(painted).toHaveLength(3);
    expect(frames).toHaveLength(1); // one frame asked for, by all three
    list.forget('r2'); // its run ended between the instant and the frame
    frames.shift()?.();
    expect(painted.slice(3)).toEqual(['r1', 'detail']);
    expect(frames).toHaveLength(0);
  } finally {
    delete g.requestAnimationFrame;
  }
});
