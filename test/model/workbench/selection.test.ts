/**
 * The current set-up, the run shown and the compared runs of a workbench (what its commands act
 * on when given none), and the model's operations the commands added: duplicate, remove one
 * run, cancel one set-up, busy. On the real WorkbenchModel with stand-in reader and runner.
 */
import { WorkbenchSelection } from '../../../src/model/workbench/selection';
import { cancellation, trans } from './fixtures';
import { makeModel, tick, withArray } from './stand-ins';

function idOf(r: { id: string } | { issues: unknown }): string {
  if (!('id' in r)) {
    throw new Error('the set-up was refused');
  }
  return r.id;
}

describe('WorkbenchSelection', () => {
  it('takes the first set-up as current until one is chosen, and signals only on change', () => {
    const { model } = makeModel();
    const sel = new WorkbenchSelection(model);
    expect(sel.setupId).toBeNull();
    const a = idOf(model.add(cancellation(), 'a'));
    const b = idOf(model.add(cancellation(), 'b'));
    expect(sel.setupId).toBe(a);
    let changes = 0;
    sel.changed.connect(() => changes++);
    sel.selectSetup(b);
    sel.selectSetup(b);
    expect(sel.setupId).toBe(b);
    expect(changes).toBe(1);
    sel.selectSetup('no-such-set-up');
    expect(sel.setupId).toBe(a);
  });

  it('passes the current set-up to its neighbour when it is removed', () => {
    const { model } = makeModel();
    const sel = new WorkbenchSelection(model);
    const [a, b, c] = ['a', 'b', 'c'].map(t => idOf(model.add(cancellation(), t)));
    sel.selectSetup(b);
    model.remove(b);
    expect(sel.setupId).toBe(c);
    model.remove(c);
    expect(sel.setupId).toBe(a);
    model.remove(a);
    expect(sel.setupId).toBeNull();
  });

  it('a run shown makes its set-up current; another set-up chosen hides it', async () => {
    const { model, runner } = makeModel();
    const sel = new WorkbenchSelection(model);
    const a = idOf(model.add(cancellation(), 'a'));
    const b = idOf(model.add(cancellation(), 'b'));
    const done = model.run(b);
    await tick();
    const run = model.runsOf(b)[0];
    sel.selectRun(run.id);
    expect([sel.setupId, sel.runId]).toEqual([b, run.id]);
    sel.selectSetup(b);
    expect(sel.runId).toBe(run.id);
    sel.selectSetup(a);
    expect(sel.runId).toBeNull();
    runner.jobs[0].finish();
    await done;
  });

  it('forgets a removed run, shown or compared, and the runs of a removed set-up', async () => {
    const { model, runner } = makeModel();
    const sel = new WorkbenchSelection(model);
    const a = idOf(model.add(cancellation(), 'a'));
    const b = idOf(model.add(cancellation(), 'b'));
    const runs = [model.run(a), model.run(b)];
    await tick();
    runner.jobs.forEach(j => j.finish(withArray));
    await Promise.all(runs);
    const [ra, rb] = [model.runsOf(a)[0].id, model.runsOf(b)[0].id];
    sel.setCompared(ra, true);
    sel.setCompared(rb, true);
    sel.selectRun(ra);
    expect(sel.compared).toEqual([ra, rb]);
    model.removeRun(ra);
    expect(sel.runId).toBeNull();
    expect(sel.compared).toEqual([rb]);
    model.remove(b);
    expect(sel.compared).toEqual([]);
    // A run that is not there cannot be compared.
    sel.setCompared('r99', true);
    expect(sel.compared).toEqual([]);
  });
});

describe('WorkbenchModel operations behind the commands', () => {
  it('duplicates a set-up below it with a new id and its own copy of the parameters', () => {
    const { model, host } = makeModel();
    const a = idOf(model.add(cancellation(), 'a'));
    const b = idOf(model.add(cancellation(), 'b'));
    model.setFollow(a, true);
    const copy = model.duplicate(a, trans.__('%1 (copy)', 'a'))!;
    expect(model.setups.map(s => s.id)).toEqual([a, copy, b]);
    const s = model.setup(copy)!;
    expect(s.title).toBe('a (copy)');
    // The copy does not follow: it would re-run beside the original on every change.
    expect(s.follow).toBe(false);
    expect(s.params).toEqual(model.setup(a)!.params);
    expect(s.params).not.toBe(model.setup(a)!.params);
    expect((host.value as { setups: Array<{ id: string }> }).setups.map(x => x.id)).toEqual([
      a,
      copy,
      b
    ]);
    expect(model.duplicate('nothing', 'x')).toBeNull();
  });

  it('says when a set-up is busy, cancels its runs alone, and removes one run', async () => {
    const { model, runner } = makeModel();
    const a = idOf(model.add(cancellation(), 'a'));
    const b = idOf(model.add(cancellation(), 'b'));
    const ra = model.run(a);
    const rb = model.run(b);
    expect(model.isBusy(a)).toBe(true);
    await tick();
    expect(runner.jobs).toHaveLength(2);
    model.cancelSetup(a);
    expect(model.isBusy(a)).toBe(false);
    expect(model.isBusy(b)).toBe(true);
    expect(runner.jobs.map(j => j.cancelled)).toEqual([true, false]);
    // Removing a run in flight cancels it first; the set-up stays.
    const running = model.runsOf(b)[0].id;
    model.removeRun(running);
    expect(runner.jobs[1].cancelled).toBe(true);
    expect(model.runsOf(b)).toEqual([]);
    expect(model.setup(b)).toBeDefined();
    await Promise.all([ra, rb]);
    expect(model.runsOf(a).map(r => r.status)).toEqual(['cancelled']);
  });
});
