/**
 * Arrays on the Perpend panel's shelf as set-up sources: offered beside the kernel's listing,
 * read from the shelf (not the kernel), checked like any source, and, once the shelf no longer
 * holds them (a reload empties it), reported as gone with a sentence that says why. The shelf
 * here is the real LoadedArraysModel with arrays parsed from text and a real hum removal.
 */
import { Signal } from '@lumino/signaling';
import type { ArrayData } from '../../../src/bridge';
import { LoadedArraysModel } from '../../../src/model/loaded';
import type { ISourceCatalog, SourceOption } from '../../../src/model/workbench/catalog';
import type { IWorkbenchReader } from '../../../src/model/workbench/runs';
import type { SourceRef } from '../../../src/model/workbench/setup';
import { CombinedSources, ShelfSources } from '../../../src/model/workbench/shelf-sources';
import { checkSources } from '../../../src/model/workbench/sources-check';
import { cancellation, trans } from './fixtures';

const gone = (label: string): string => `${label} is gone`;

/** The kernel side: one listed variable, read through the same interface as KernelSources. */
class Kernel implements IWorkbenchReader, ISourceCatalog {
  readonly changed = new Signal<this, void>(this);
  reads: SourceRef[] = [];
  reference: ArrayData = {
    data: new Float64Array(64),
    shape: [64],
    complex: false,
    dtype: 'float64'
  };
  options(): ReadonlyArray<SourceOption> {
    return [
      {
        ref: { kind: 'variable', name: 'reference' },
        label: 'reference',
        shape: [64],
        dtype: 'float64',
        complex: false
      }
    ];
  }
  facts(ref: SourceRef) {
    return ref.kind === 'variable' && ref.name === 'reference'
      ? { shape: [64], complex: false }
      : null;
  }
  async readArray(ref: SourceRef): Promise<ArrayData> {
    this.reads.push(ref);
    return this.reference;
  }
  async readScalar(): Promise<number> {
    return 1000;
  }
}

function shelfWithHum(): LoadedArraysModel {
  const loaded = new LoadedArraysModel({ bridge: () => null });
  // 64 samples of a 50 Hz tone at 1000 Hz plus a slow ramp.
  const x = Array.from({ length: 64 }, (_, n) => Math.sin((2 * Math.PI * 50 * n) / 1000) + n / 64);
  const item = loaded.loadFromText('primary', JSON.stringify(x), 'application/json')!;
  loaded.removeHum(item.id, { f0: 50, fs: 1000, harmonics: 1 });
  return loaded;
}

describe('the panel’s arrays as sources of a set-up', () => {
  it('offers every shelf array after the kernel’s, by its label, with shape and dtype', () => {
    const loaded = shelfWithHum();
    const sources = new CombinedSources(
      new Kernel(),
      new ShelfSources({ shelf: loaded, gone }),
      gone
    );
    expect(sources.options().map(o => [o.ref, o.shape, o.dtype])).toEqual([
      [{ kind: 'variable', name: 'reference' }, [64], 'float64'],
      [{ kind: 'shelf', label: 'primary' }, [64], 'float64'],
      [{ kind: 'shelf', label: 'primary − hum' }, [64], 'float64']
    ]);
  });

  it('keeps labels unique on the shelf, so a label names one array', () => {
    const loaded = shelfWithHum();
    const first = loaded.items[0];
    loaded.removeHum(first.id, { f0: 50, fs: 1000, harmonics: 1 });
    expect(loaded.items.map(i => i.label)).toEqual([
      'primary',
      'primary − hum',
      'primary − hum (2)'
    ]);
  });

  it('reads a shelf array from the shelf, the kernel’s from the kernel', async () => {
    const loaded = shelfWithHum();
    const kernel = new Kernel();
    const sources = new CombinedSources(kernel, new ShelfSources({ shelf: loaded, gone }), gone);
    const a = await sources.readArray({ kind: 'shelf', label: 'primary − hum' });
    expect(a).toBe(loaded.items[1].array);
    expect(kernel.reads).toEqual([]);
    await sources.readArray({ kind: 'variable', name: 'reference' });
    expect(kernel.reads).toEqual([{ kind: 'variable', name: 'reference' }]);
  });

  it('checks a set-up on a shelf array like any source, and says clearly when it is gone', async () => {
    const loaded = shelfWithHum();
    const shelf = new ShelfSources({ shelf: loaded, gone });
    const sources = new CombinedSources(new Kernel(), shelf, gone);
    const p = cancellation({
      taps: 4,
      x: { ref: { kind: 'variable', name: 'reference' }, shape: [64], layout: null },
      d: { ref: { kind: 'shelf', label: 'primary − hum' }, shape: [64], layout: null }
    });
    expect(checkSources(trans, p, r => sources.facts(r))).toEqual([]);
    let changes = 0;
    sources.changed.connect(() => changes++);
    loaded.remove(loaded.items[1].id);
    expect(changes).toBe(1);
    const issues = checkSources(trans, p, r => sources.facts(r));
    expect(issues).toHaveLength(1);
    expect(issues[0].field).toBe('d');
    expect(issues[0].message).toMatch(
      /“primary − hum” on the Perpend panel is gone: .*reload .* Make it again on the panel/
    );
    await expect(sources.readArray({ kind: 'shelf', label: 'primary − hum' })).rejects.toThrow(
      'primary − hum is gone'
    );
  });

  it('a reopened notebook (an empty shelf) finds nothing and says so; without a shelf too', async () => {
    const p = cancellation({
      d: { ref: { kind: 'shelf', label: 'primary − hum' }, shape: [32000], layout: null }
    });
    const empty = new CombinedSources(
      new Kernel(),
      new ShelfSources({ shelf: new LoadedArraysModel({ bridge: () => null }), gone }),
      gone
    );
    const none = new CombinedSources(new Kernel(), null, gone);
    for (const sources of [empty, none]) {
      const issues = checkSources(trans, p, r => sources.facts(r));
      expect(issues.find(i => i.field === 'd')?.message).toMatch(/on the Perpend panel is gone/);
      await expect(sources.readArray(p.d!.ref)).rejects.toThrow('primary − hum is gone');
    }
  });

  it('does not signal a change when only the shelf’s status line changes', () => {
    const loaded = shelfWithHum();
    const shelf = new ShelfSources({ shelf: loaded, gone });
    let changes = 0;
    shelf.changed.connect(() => changes++);
    // A failed parse changes the shelf's status, not its arrays (its console line is muted).
    jest.spyOn(console, 'error').mockImplementation(() => undefined);
    expect(loaded.loadFromText('bad', 'not an array')).toBeNull();
    expect(changes).toBe(0);
  });
});
