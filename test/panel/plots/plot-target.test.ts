// What a plot tab shows: read from a command's arguments, named, and alive while its runs are.
import {
  plotTargetOf,
  targetAlive,
  targetLabel,
  type PlotTarget
} from '../../../src/panel/plots/plot-target';
import { cancellationRun, trans } from './fixtures';

const a = cancellationRun(100, 1000, { id: 'a', label: 'RLS · M 4 · λ 0.99' });
const b = cancellationRun(100, 1000, { id: 'b', label: 'NLMS · M 4 · μ 0.5' });

test("a command's arguments name a run's view or a comparison, or nothing", () => {
  expect(plotTargetOf({ runId: 'a', view: 'spectrum', path: 'x.ipynb' })).toEqual({
    runId: 'a',
    view: 'spectrum'
  });
  expect(plotTargetOf({ runIds: ['a', 'b'], compare: 'response' })).toEqual({
    runIds: ['a', 'b'],
    compare: 'response'
  });
  expect(plotTargetOf({})).toBeNull();
  expect(plotTargetOf({ runIds: ['a', 3], compare: 'response' })).toBeNull();
  expect(plotTargetOf({ runIds: ['a'], compare: 'phase portrait' })).toBeNull();
  expect(plotTargetOf({ runId: 'a' })).toBeNull();
});

test('a tab lives while its run is there; a comparison while one of its runs is', () => {
  const view: PlotTarget = { runId: 'a', view: 'learning' };
  const both: PlotTarget = { runIds: ['a', 'b'], compare: 'spectrum' };
  expect(targetAlive(view, [a, b])).toBe(true);
  expect(targetAlive(view, [b])).toBe(false);
  expect(targetAlive(both, [b])).toBe(true);
  expect(targetAlive(both, [])).toBe(false);
});

test('tab labels: the view and the run, or what the comparison overlays', () => {
  expect(targetLabel(trans, { runId: 'a', view: 'spectrum' }, [a, b]).label).toBe(
    'Spectrum · RLS · M 4 · λ 0.99'
  );
  expect(targetLabel(trans, { runIds: ['a', 'b'], compare: 'response' }, [a, b])).toEqual({
    label: 'Comparison · Weights responses',
    caption: 'Weights responses of 2 runs compared'
  });
});
