/**
 * NotebookFollower (the per-notebook target map moved out of the plugin file): one target per
 * notebook for its lifetime, the sources model pointed at the active one, and refreshes only for
 * the active notebook.
 */
import { NotebookFollower } from '../../src/model/follower';
import type { INotebookTarget } from '../../src/model/sources';

interface INb {
  name: string;
  ready: Promise<void>;
  release: () => void;
}

function notebook(name: string): INb {
  let release = (): void => undefined;
  const ready = new Promise<void>(r => (release = r));
  return { name, ready, release };
}

function setup() {
  const calls: string[] = [];
  const kernelChanged = new Map<INb, () => void>();
  let adapted = 0;
  const sources = {
    setTarget: (t: INotebookTarget | null) => void calls.push(`target ${t?.name ?? 'none'}`),
    refresh: async () => void calls.push('refresh')
  };
  const follower = new NotebookFollower<INb>({
    sources,
    adapt: (nb, changed) => {
      adapted++;
      kernelChanged.set(nb, changed);
      return { name: nb.name, cells: () => [], kernel: null };
    },
    ready: nb => nb.ready
  });
  return { follower, calls, kernelChanged, adapted: () => adapted };
}

test('a notebook gets one target for its lifetime', () => {
  const s = setup();
  const a = notebook('a.ipynb');
  const t1 = s.follower.targetOf(a);
  const t2 = s.follower.targetOf(a);
  expect(t1).toBe(t2);
  expect(s.adapted()).toBe(1);
  expect(s.follower.targetOf(null)).toBeNull();
  expect(s.follower.trusts(a, 'c', 1)).toBe(false); // no ledger: nothing is trusted
});

test('following points the sources at the notebook now and lists again once it is ready', async () => {
  const s = setup();
  const a = notebook('a.ipynb');
  s.follower.follow(a);
  expect(s.calls).toEqual(['target a.ipynb']);
  a.release();
  await a.ready;
  await Promise.resolve();
  expect(s.calls).toEqual(['target a.ipynb', 'target a.ipynb', 'refresh']);
});

test('a notebook that is no longer active when it gets ready is not listed', async () => {
  const s = setup();
  const a = notebook('a.ipynb');
  const b = notebook('b.ipynb');
  s.follower.follow(a);
  s.follower.follow(b);
  a.release();
  await a.ready;
  await Promise.resolve();
  expect(s.calls).toEqual(['target a.ipynb', 'target b.ipynb']);
  s.follower.follow(null);
  expect(s.calls.at(-1)).toBe('target none');
});

test('executions and kernel changes refresh only the active notebook', () => {
  const s = setup();
  const a = notebook('a.ipynb');
  const b = notebook('b.ipynb');
  s.follower.targetOf(b);
  s.follower.follow(a);
  s.calls.length = 0;
  s.follower.executed(b);
  s.kernelChanged.get(b)!();
  expect(s.calls).toEqual([]);
  s.follower.executed(a);
  s.kernelChanged.get(a)!();
  expect(s.calls).toEqual(['refresh', 'refresh']);
  s.follower.refreshAfterExecution = false;
  s.follower.executed(a);
  expect(s.calls).toEqual(['refresh', 'refresh']);
});
