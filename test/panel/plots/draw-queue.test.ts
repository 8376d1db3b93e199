/**
 * The page's plots take turns, one per animation frame, each drawn in a task of its own after its
 * frame (src/panel/plots/draw-queue.ts): a request made twice while queued is drawn once, in its
 * first place; a withdrawn one is not drawn; where the page has `scheduler.postTask` the task is
 * posted at background priority, behind whatever else waits. Common practice (a frame-paced
 * queue; deferrable work at background priority as the Prioritized Task Scheduling draft of the
 * W3C WICG describes `postTask`'s priorities, from memory), no other outside source.
 */
import { cancelDraw, requestDraw } from '../../../src/panel/plots/draw-queue';

let frames: Array<() => void> = [];
beforeEach(() => {
  jest.useFakeTimers();
  frames = [];
  (globalThis as { requestAnimationFrame?: unknown }).requestAnimationFrame = (f: () => void) =>
    frames.push(f);
  (globalThis as { cancelAnimationFrame?: unknown }).cancelAnimationFrame = (id: number) => {
    frames[id - 1] = () => undefined;
  };
});

afterEach(() => {
  jest.useRealTimers();
});

/** Runs the callbacks of one frame (those asked for before it started), then the tasks after. */
function frame(): void {
  const now = frames;
  frames = [];
  now.forEach(f => f());
  jest.runOnlyPendingTimers();
}

test('the draw runs in a task after its frame, not in the frame', () => {
  const drawn: string[] = [];
  const a = (): number => drawn.push('a');
  requestDraw(a);
  const now = frames;
  frames = [];
  now.forEach(f => f());
  expect(drawn).toEqual([]);
  requestDraw(a); // its task is set: not queued again
  jest.runOnlyPendingTimers();
  expect(drawn).toEqual(['a']);
  expect(frames).toHaveLength(0);
  // withdrawn between its frame and its task: not drawn
  requestDraw(a);
  frames.splice(0).forEach(f => f());
  cancelDraw(a);
  jest.runOnlyPendingTimers();
  expect(drawn).toEqual(['a']);
});

test('one draw per frame, in the order asked, each once', () => {
  const drawn: string[] = [];
  const a = (): number => drawn.push('a');
  const b = (): number => drawn.push('b');
  const c = (): number => drawn.push('c');
  requestDraw(a);
  requestDraw(b);
  requestDraw(a); // already queued: keeps its place
  requestDraw(c);
  expect(frames).toHaveLength(1);
  frame();
  expect(drawn).toEqual(['a']);
  frame();
  expect(drawn).toEqual(['a', 'b']);
  requestDraw(a); // asked again after its turn: queued at the end
  frame();
  frame();
  expect(drawn).toEqual(['a', 'b', 'c', 'a']);
  frame();
  expect(frames).toHaveLength(0);
});

test('a withdrawn request is not drawn; an empty queue asks for no frame', () => {
  const drawn: string[] = [];
  const a = (): number => drawn.push('a');
  const b = (): number => drawn.push('b');
  requestDraw(a);
  requestDraw(b);
  cancelDraw(a);
  frame();
  expect(drawn).toEqual(['b']);
  requestDraw(a);
  cancelDraw(a);
  frame();
  expect(drawn).toEqual(['b']);
  expect(frames).toHaveLength(0);
});

test('where the page has scheduler.postTask, the draw is posted at background priority', () => {
  const posted: Array<{ run: () => void; priority: string | undefined }> = [];
  const g = globalThis as { scheduler?: unknown };
  g.scheduler = {
    postTask: (run: () => void, options?: { priority?: string }) => {
      posted.push({ run, priority: options?.priority });
      return Promise.resolve();
    }
  };
  try {
    const drawn: string[] = [];
    const a = (): number => drawn.push('a');
    const b = (): number => drawn.push('b');
    requestDraw(a);
    requestDraw(b);
    frames.splice(0).forEach(f => f());
    jest.runOnlyPendingTimers(); // nothing through setTimeout
    expect(drawn).toEqual([]);
    expect(posted.map(p => p.priority)).toEqual(['background']);
    requestDraw(a); // its task is posted: not queued again
    expect(frames).toHaveLength(0);
    posted.shift()?.run();
    expect(drawn).toEqual(['a']);
    expect(frames).toHaveLength(1); // b's turn on the next frame
    frames.splice(0).forEach(f => f());
    cancelDraw(b); // withdrawn between its frame and its task
    posted.shift()?.run();
    expect(drawn).toEqual(['a']);
    expect(frames).toHaveLength(0);
  } finally {
    delete g.scheduler;
  }
});
