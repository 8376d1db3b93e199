/**
 * A run's progress reaches the page at most every PROGRESS_PAINT_MS per run, the latest value
 * last (src/panel/workbench/progress-paint.ts). Common practice (a trailing throttle), no outside
 * source.
 */
import { PROGRESS_PAINT_MS, ProgressPainter } from '../../../src/panel/workbench/progress-paint';

beforeEach(() => {
  jest.useFakeTimers();
});
afterEach(() => {
  jest.useRealTimers();
});

test('the first paint at once, the next ones at most every interval, the latest asked for', () => {
  let now = 1000;
  const p = new ProgressPainter(() => now);
  const painted: string[] = [];
  p.paint('r1', () => painted.push('a'));
  expect(painted).toEqual(['a']);
  now += 50;
  p.paint('r1', () => painted.push('b'));
  now += 50;
  p.paint('r1', () => painted.push('c')); // replaces b
  p.paint('r2', () => painted.push('x')); // another run: its own interval
  expect(painted).toEqual(['a', 'x']);
  // b was deferred at 50 ms after a: its paint (now c) comes at the interval's end
  jest.advanceTimersByTime(PROGRESS_PAINT_MS - 50 - 1);
  expect(painted).toEqual(['a', 'x']);
  now += PROGRESS_PAINT_MS - 100;
  jest.advanceTimersByTime(1);
  expect(painted).toEqual(['a', 'x', 'c']);
  // an interval later: at once again
  now += PROGRESS_PAINT_MS;
  p.paint('r1', () => painted.push('d'));
  expect(painted).toEqual(['a', 'x', 'c', 'd']);
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
