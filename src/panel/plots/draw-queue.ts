/**
 * One plot drawn per animation frame, each in a task of its own. Every plot of a run that just
 * finished asks to be drawn at once; drawn in the same frame, four plotly draws made one task of
 * 60–120 ms on this machine, a freeze the page's heartbeat sees. Queued, each frame gives its turn
 * to the oldest request, which then draws in a task of its own just after the frame: drawn inside
 * the frame's callbacks it shared one task with everything else the frame ran (Lumino processes
 * its widgets' update requests there, so a finished run's list repaint and its first plot made
 * one 45–60 ms task). The page answers input in between; a plot asked for again while queued
 * keeps its place.
 *
 * The draw's task is posted at background priority (`scheduler.postTask`, where the page has
 * it): a task posted with `setTimeout(…, 0)` from the frame ran ahead of timers already due
 * (the page's own, or a heartbeat's), which wait until delayed tasks are moved to the queue,
 * so a finished run's list repaint (≈ 12 ms) and its first plot (≈ 28 ms) ran back to back, a
 * 47 ms gap for a heartbeat. At background priority whatever else is waiting runs first.
 */
type Draw = () => void;

/** The page's task scheduler (Prioritized Task Scheduling), where it has one. */
interface TaskScheduler {
  postTask(callback: () => void, options?: { priority?: 'background' }): Promise<unknown>;
}

const queue: Draw[] = [];
/** The animation frame asked for (0: none). */
let frame = 0;
/** The draw whose task is set after the frame (null: none, or withdrawn). */
let due: Draw | null = null;
/** Whether the task that runs `due` is posted. */
let posted = false;

/** Posts `task` after everything else waiting on the main thread. */
function postLater(task: () => void): void {
  const scheduler = (globalThis as { scheduler?: TaskScheduler }).scheduler;
  if (scheduler && typeof scheduler.postTask === 'function') {
    void scheduler.postTask(task, { priority: 'background' });
  } else {
    setTimeout(task, 0);
  }
}

function onFrame(): void {
  frame = 0;
  due = queue.shift() ?? null;
  if (due) {
    posted = true;
    postLater(runDue);
  }
}

function runDue(): void {
  posted = false;
  const draw = due;
  due = null;
  if (queue.length > 0) {
    frame = requestAnimationFrame(onFrame);
  }
  draw?.();
}

/** Asks for `draw` on a coming frame (once, however often it is asked while queued). */
export function requestDraw(draw: Draw): void {
  if (draw === due) {
    // its task is set: it draws what is current then
    return;
  }
  if (!queue.includes(draw)) {
    queue.push(draw);
  }
  if (frame === 0 && !posted) {
    frame = requestAnimationFrame(onFrame);
  }
}

/** Withdraws a request (a plot disposed before its turn). */
export function cancelDraw(draw: Draw): void {
  if (draw === due) {
    due = null;
  }
  const i = queue.indexOf(draw);
  if (i >= 0) {
    queue.splice(i, 1);
  }
  if (queue.length === 0 && frame !== 0) {
    cancelAnimationFrame(frame);
    frame = 0;
  }
}

/** Resolves in a task posted after everything else waiting on the main thread. */
export function afterWaitingTasks(): Promise<void> {
  return new Promise(resolve => postLater(resolve));
}
