/**
 * KernelSources: the pickers' list from the notebook's listing, reads through the bridge, and
 * the sources that changed between two listings (a cell run again, a variable re-bound).
 */
/* eslint-disable @typescript-eslint/no-explicit-any -- a stand-in listing */
import { Signal } from '@lumino/signaling';
import type { ArrayInfo, ArraySource } from '../../../src/bridge';
import { KernelSources } from '../../../src/model/workbench/kernel-sources';
import type { SourceRef } from '../../../src/model/workbench/setup';

function info(source: ArraySource, shape: number[], dtype = 'float64'): ArrayInfo {
  const label = source.kind === 'variable' ? source.name : `Out[${source.executionCount}]`;
  return { source, label, shape, dtype, bytes: 8 * shape.reduce((a, b) => a * b, 1), notes: [] };
}

class Listing {
  changed = new Signal<this, void>(this);
  variables: ArrayInfo[] = [];
  cellResults: ArrayInfo[] = [];
  status = 'idle';
  message = '';
  refreshes = 0;
  refresh = async () => void this.refreshes++;
  reads: ArraySource[] = [];
  readOptions: unknown[] = [];
  bridge: any = {
    readArray: async (s: ArraySource, o?: unknown) => {
      this.reads.push(s);
      this.readOptions.push(o);
      return { data: new Float64Array(4), shape: [4], complex: false, dtype: 'float64' };
    },
    readScalar: async () => 4000
  };
  set(v: ArrayInfo[], c: ArrayInfo[]) {
    this.variables = v;
    this.cellResults = c;
    this.changed.emit();
  }
}

function make() {
  const listing = new Listing();
  const ks = new KernelSources({
    sources: listing as any,
    notListed: id => `cell ${id} is not listed`,
    noKernel: 'no kernel'
  });
  let changes = 0;
  const seen: SourceRef[][] = [];
  ks.changed.connect(() => changes++);
  ks.sourcesChanged.connect((_, refs) => seen.push(refs));
  return { listing, ks, changes: () => changes, seen };
}

describe('KernelSources', () => {
  it('says where the listing stands, tells the pickers when that changes, and lists again', () => {
    const { listing, ks, changes } = make();
    expect(ks.state()).toEqual({ state: 'listed', message: '' });
    const before = changes();
    listing.status = 'refreshing';
    listing.message = 'Reading the list of arrays from the kernel…';
    listing.changed.emit();
    expect(ks.state()).toEqual({
      state: 'busy',
      message: 'Reading the list of arrays from the kernel…'
    });
    // The options did not change, the state did: the pickers repaint.
    expect(changes()).toBe(before + 1);
    listing.status = 'error';
    listing.message = 'Could not list the arrays: timed out';
    listing.changed.emit();
    expect(ks.state().state).toBe('error');
    listing.status = 'no-kernel';
    listing.message = '';
    listing.changed.emit();
    expect(ks.state()).toEqual({ state: 'none', message: 'no kernel' });
    ks.relist();
    expect(listing.refreshes).toBe(1);
  });

  it('offers variables and cell results, with facts for the checks', () => {
    const { listing, ks } = make();
    listing.set(
      [
        info({ kind: 'variable', name: 'primary' }, [32000]),
        info({ kind: 'variable', name: 'bb' }, [4000], 'complex128')
      ],
      [info({ kind: 'cell', cellId: 'rail', executionCount: 5 }, [4, 32000])]
    );
    expect(ks.options().map(o => o.label)).toEqual(['primary', 'bb', 'Out[5]']);
    expect(ks.facts({ kind: 'variable', name: 'bb' })).toEqual({ shape: [4000], complex: true });
    expect(ks.facts({ kind: 'cell', cellId: 'rail' })).toEqual({
      shape: [4, 32000],
      complex: false
    });
    expect(ks.facts({ kind: 'variable', name: 'gone' })).toBeNull();
  });

  it('reads a cell result by its listed execution count; refuses one not listed', async () => {
    const { listing, ks } = make();
    listing.set([], [info({ kind: 'cell', cellId: 'rail', executionCount: 7 }, [4, 8])]);
    await ks.readArray({ kind: 'cell', cellId: 'rail' });
    expect(listing.reads).toEqual([{ kind: 'cell', cellId: 'rail', executionCount: 7 }]);
    await expect(ks.readArray({ kind: 'cell', cellId: 'other' })).rejects.toThrow(
      'cell other is not listed'
    );
    // runs never write into their inputs: the bridge may hand over the copy it keeps
    await ks.readArray({ kind: 'variable', name: 'x' });
    expect(listing.readOptions).toEqual([{ shared: true }, { shared: true }]);
  });

  it('emits changed only on a real change, and names the sources that changed', () => {
    const { listing, ks, changes, seen } = make();
    const a = [info({ kind: 'variable', name: 'x' }, [10])];
    const c = (n: number) => [info({ kind: 'cell', cellId: 'c1', executionCount: n }, [10])];
    listing.set(a, c(1));
    expect(changes()).toBe(1);
    listing.set(a, c(1));
    expect(changes()).toBe(1);
    expect(seen).toEqual([]);
    listing.set([info({ kind: 'variable', name: 'x' }, [20])], c(2));
    expect(changes()).toBe(2);
    expect(seen).toEqual([
      [
        { kind: 'variable', name: 'x' },
        { kind: 'cell', cellId: 'c1' }
      ]
    ]);
    expect(ks.options()).toHaveLength(2);
  });

  it('says when there is no kernel', async () => {
    const { listing, ks } = make();
    listing.bridge = null;
    await expect(ks.readScalar('fs')).rejects.toThrow('no kernel');
  });
});
