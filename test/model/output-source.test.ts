/**
 * Which outputs can hold an array and where their array is read from (moved out of the plugin
 * file): the kernel's output cache only for this session's trusted results, the output's text
 * otherwise; streams, errors and image-only outputs are refused. The MIME types and output
 * types are nbformat's (nbformat 4 schema, "output" definitions).
 */
import { CACHE_NOTES } from '../../src/bridge';
import { canHoldArray, planOutputRead, type IOutputSnapshot } from '../../src/model/output-source';
import { englishBundle } from '../../src/model/english';

const trans = englishBundle();

function output(over: Partial<IOutputSnapshot>): IOutputSnapshot {
  return {
    cellId: 'c1',
    cellIndex: 4,
    type: 'execute_result',
    executionCount: 7,
    data: { 'text/plain': 'array([1., 2.])' },
    ...over
  };
}

test('results and displays with text or JSON can hold an array; streams, errors, images cannot', () => {
  expect(canHoldArray(output({}))).toBe(true);
  expect(canHoldArray(output({ type: 'display_data', data: { 'application/json': [1, 2] } }))).toBe(
    true
  );
  expect(canHoldArray(output({ type: 'stream', data: { 'text/plain': '[1, 2]' } }))).toBe(false);
  expect(canHoldArray(output({ type: 'error', data: {} }))).toBe(false);
  expect(canHoldArray(output({ type: 'display_data', data: { 'image/png': 'iVBOR' } }))).toBe(
    false
  );
});

test('a trusted result of this session is read from the kernel first, its text second', () => {
  const seen: Array<[string, number]> = [];
  const plans = planOutputRead(output({}), {
    trusts: (id, n) => (seen.push([id, n]), true),
    hasKernel: true,
    trans
  });
  expect(seen).toEqual([['c1', 7]]);
  expect(plans.map(p => p.kind)).toEqual(['kernel', 'text']);
  expect(plans[0]).toEqual({
    kind: 'kernel',
    source: { kind: 'cell', cellId: 'c1', executionCount: 7 },
    label: 'Out[7]'
  });
  expect(plans[1]).toMatchObject({ label: 'Out[7] (text)', text: 'array([1., 2.])', notes: [] });
});

test('an untrusted count, or no kernel, goes straight to the text', () => {
  for (const options of [
    { trusts: () => false, hasKernel: true },
    { trusts: () => true, hasKernel: false }
  ]) {
    const plans = planOutputRead(output({}), { ...options, trans });
    expect(plans.map(p => p.kind)).toEqual(['text']);
  }
});

test('a display is parsed from its JSON when it has one, with the note that it is not cached', () => {
  const plans = planOutputRead(
    output({
      type: 'display_data',
      executionCount: null,
      data: { 'text/plain': '<list>', 'application/json': [[1, 2]] }
    }),
    { trusts: () => true, hasKernel: true, trans }
  );
  expect(plans).toEqual([
    {
      kind: 'text',
      label: 'cell 4 output',
      text: [[1, 2]],
      mimeType: 'application/json',
      notes: [CACHE_NOTES.notCached]
    }
  ]);
});

test('an output that cannot hold an array gets no plan at all', () => {
  expect(
    planOutputRead(output({ type: 'stream' }), { trusts: () => true, hasKernel: true, trans })
  ).toEqual([]);
});
