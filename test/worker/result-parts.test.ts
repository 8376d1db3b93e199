/**
 * Result arrays sent ahead of the result (src/worker/result-parts.ts): the worker's sender posts
 * what a job says is final, in order and in parts of at least the stated size; the page's
 * receiver rebuilds the arrays exactly and refuses parts that are out of order, malformed or of
 * an unknown array, and a result whose arrays did not all arrive. No timing is asserted.
 */
import type { AdaptiveFilterResult, JobResult, PartMessage } from '../../src/worker/protocol';
import { PART_VALUES, PartReceiver, PartSender } from '../../src/worker/result-parts';

/** A result of the shape the adaptive-filter job returns, with the given arrays. */
function result(
  output: Float64Array,
  error: Float64Array,
  curve: Float64Array
): AdaptiveFilterResult {
  const N = curve.length;
  return {
    kind: 'adaptive-filter',
    status: 'ok',
    warnings: [],
    algorithm: 'qr-rls',
    complex: false,
    K: 1,
    N,
    taps: 2,
    output: { data: output, shape: [N], complex: false },
    error: { data: error, shape: [N], complex: false },
    weights: { data: new Float64Array([0.5, -0.25]), shape: [2], complex: false },
    trajectory: null,
    trajectoryIndex: null,
    learningCurve: curve,
    learningCurveSmoothed: null,
    learningCurveLower: null,
    learningCurveUpper: null,
    figures: {
      finalMseDb: null,
      steadyStateMseDb: null,
      convergenceSamples: null,
      convergenceSeconds: null,
      misadjustment: null,
      errorReductionDb: null,
      symbolErrorRate: null,
      window: 1,
      tail: 1,
      marginDb: 1
    },
    decisions: null
  };
}

const ramp = (n: number, scale = 1) =>
  Float64Array.from({ length: n }, (_, i) => scale * (i + 0.5));

/** Fills `arrays` in chunks of `chunk`, noting each key after every chunk, as the job does. */
function fillInChunks(
  sender: PartSender,
  arrays: Record<'output' | 'error' | 'learningCurve', Float64Array>,
  sources: typeof arrays,
  chunk: number
) {
  const N = sources.output.length;
  for (let s = 0; s < N; s += chunk) {
    const n = Math.min(chunk, N - s);
    for (const key of ['output', 'error', 'learningCurve'] as const) {
      arrays[key].set(sources[key].subarray(s, s + n), s);
      sender.note(key, arrays[key], s + n);
    }
  }
}

test('parts of at least the stated size, in order, rebuild the arrays exactly; the result carries them empty', () => {
  const N = 1000;
  const sources = { output: ramp(N), error: ramp(N, -1), learningCurve: ramp(N, 0.001) };
  const arrays = {
    output: new Float64Array(N),
    error: new Float64Array(N),
    learningCurve: new Float64Array(N)
  };
  const sent: PartMessage[] = [];
  const sender = new PartSender(
    (m, transfer) => {
      // the part's buffer is its own (a copy), the one transferred
      expect(transfer).toEqual([m.data.buffer]);
      expect(m.data.buffer).not.toBe(arrays[m.key as keyof typeof arrays].buffer);
      sent.push({ ...m, data: Float64Array.from(m.data) });
    },
    7,
    300
  );
  fillInChunks(sender, arrays, sources, 128);
  const outputs = sent.filter(m => m.key === 'output');
  // 128-sample chunks, parts of ≥ 300 values: 384, 384, then the last 232 when the array is full
  expect(outputs.map(m => [m.offset, m.data.length])).toEqual([
    [0, 384],
    [384, 384],
    [768, 232]
  ]);
  expect(sent.every(m => m.id === 7 && m.type === 'part' && m.length === N)).toBe(true);

  const stripped = sender.strip(result(arrays.output, arrays.error, arrays.learningCurve));
  const r = stripped as AdaptiveFilterResult;
  expect(r.output.data.length).toBe(0);
  expect(r.error.data.length).toBe(0);
  expect(r.learningCurve.length).toBe(0);
  expect(r.output.shape).toEqual([N]);
  expect(r.weights.data).toEqual(new Float64Array([0.5, -0.25])); // not sent: untouched

  const receiver = new PartReceiver();
  for (const m of sent) {
    expect(receiver.take(m)).toBeNull();
  }
  const whole = receiver.fill(stripped);
  if ('error' in whole) {
    throw new Error(whole.error);
  }
  const back = whole.result as AdaptiveFilterResult;
  expect(back.output.data).toEqual(sources.output);
  expect(back.error.data).toEqual(sources.error);
  expect(back.learningCurve).toEqual(sources.learningCurve);
});

test('the default part size is 2^16 values (512 KiB of float64); an array not sent whole stays in the result', () => {
  expect(PART_VALUES).toBe(65536);
  const sent: PartMessage[] = [];
  const sender = new PartSender(m => sent.push(m), 1);
  const y = new Float64Array(100000);
  sender.note('output', y, 70000);
  expect(sent.map(m => [m.offset, m.data.length])).toEqual([[0, 70000]]);
  sender.note('output', y, 90000); // 20000 due: fewer than a part, not at the end
  expect(sent.length).toBe(1);
  // the job stopped before the end (never, short of a bug): the result keeps its own array
  const e = new Float64Array(100000);
  const r = sender.strip(result(y, e, new Float64Array(100000))) as AdaptiveFilterResult;
  expect(r.output.data).toBe(y);
  expect(() => sender.note('output', new Float64Array(5), 5)).toThrow(
    'the job reported a second array for its output'
  );
});

test('the receiver refuses unknown, malformed and out-of-order parts, naming the array', () => {
  const part = (over: Partial<PartMessage>): PartMessage => ({
    type: 'part',
    id: 1,
    key: 'error',
    offset: 0,
    length: 10,
    data: new Float64Array(4),
    ...over
  });
  expect(new PartReceiver().take(part({ key: 'weights' as never }))).toBe(
    'the worker sent part of an unknown result array "weights"'
  );
  expect(new PartReceiver().take(part({ offset: 8 }))).toBe(
    'the worker sent a malformed part of the error (values from 8, length 10)'
  );
  expect(new PartReceiver().take(part({ data: [1, 2] as never }))).toMatch(/malformed part/);
  const r = new PartReceiver();
  expect(r.take(part({}))).toBeNull();
  expect(r.take(part({ offset: 6 }))).toBe(
    'the worker sent values 6… of the error (of 10) after 4 of 10: out of order'
  );
  expect(r.take(part({ offset: 4, length: 12 }))).toMatch(/out of order/);
  expect(new PartReceiver().take(part({ offset: 2 }))).toMatch(/after 0 of 10: out of order/);
});

test('a result whose arrays were sent in part is refused with what arrived', () => {
  const r = new PartReceiver();
  r.take({
    type: 'part',
    id: 1,
    key: 'learningCurve',
    offset: 0,
    length: 10,
    data: new Float64Array(3)
  });
  const empty = new Float64Array(0);
  const outcome = r.fill(result(new Float64Array(10), new Float64Array(10), empty));
  expect(outcome).toEqual({
    error: 'the worker sent 3 of the 10 values of the learning curve before its result'
  });
  // a result that is not an adaptive filter's cannot take them
  const other = { kind: 'csv', status: 'ok', warnings: [], bytes: new Uint8Array(0), rows: 0 };
  expect(r.fill(other as JobResult)).toEqual({
    error: 'the worker sent parts of arrays its result does not have'
  });
  // no parts: the result as it came
  const plain = result(new Float64Array(2), new Float64Array(2), new Float64Array(2));
  expect(new PartReceiver().fill(plain)).toEqual({ result: plain });
});
