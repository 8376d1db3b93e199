/**
 * One plot drawn per animation frame. Every plot of a run that just finished asks to be drawn at
 * once; drawn in the same frame, four plotly draws made one task of 60–120 ms on this machine,
 * a freeze the page's heartbeat sees. Queued, each frame draws the oldest request alone and the
 * page answers input in between; a plot asked for again while queued keeps its place.
 */
type Draw = () => void;

const queue: Draw[] = [];
let frame = 0;

function next(): void {
  frame = 0;
  const draw = queue.shift();
  if (queue.length > 0) {
    frame = requestAnimationFrame(next);
  }
  draw?.();
}

/** Asks for `draw` on a coming frame (once, however often it is asked while queued). */
export function requestDraw(draw: Draw): void {
  if (!queue.includes(draw)) {
    queue.push(draw);
  }
  if (frame === 0) {
    frame = requestAnimationFrame(next);
  }
}

/** Withdraws a request (a plot disposed before its turn). */
export function cancelDraw(draw: Draw): void {
  const i = queue.indexOf(draw);
  if (i >= 0) {
    queue.splice(i, 1);
  }
  if (queue.length === 0 && frame !== 0) {
    cancelAnimationFrame(frame);
    frame = 0;
  }
}
