/**
 * WorkbenchModel: set-ups kept in the notebook's metadata, runs through a reader and a runner.
 * The reader and runner here are stand-ins with the real interfaces (the bridge is covered by
 * the integration tests, the worker pool by test/worker); what is tested is the model's own
 * logic: validation before running, signals only on real change, cancelling, failures that
 * lose nothing, sweeps, following sources and the stored form.
 */
/* eslint-disable @typescript-eslint/no-explicit-any -- stand-ins read untyped job parameters */
import type { ArrayData } from '../../../src/bridge';
import type {
  IRunner,
  IWorkbenchReader,
  RunHandle,
  RunOutcome
} from '../../../src/model/workbench/runs';
import type { SourceRef } from '../../../src/model/workbench/setup';
import { SETUP_SCHEMA_VERSION } from '../../../src/model/workbench/setup';
import type { StoredWorkbench } from '../../../src/model/workbench/metadata';
import { serializeWorkbench } from '../../../src/model/workbench/metadata';
import {
  FOLLOW_DEBOUNCE_MS,
  WorkbenchModel,
  type IMetadataHost
} from '../../../src/model/workbench/workbench';
import { cancellation, setup, trans } from './fixtures';

function array(n: number, complex = false): ArrayData {
  return { data: new Float64Array(complex ? 2 * n : n), shape: [n], complex, dtype: 'float64' };
}

class Host implements IMetadataHost {
  constructor(public value: unknown = undefined) {}
  writes = 0;
  read(): unknown {
    return this.value;
  }
  write(v: StoredWorkbench): void {
    this.writes++;
    this.value = JSON.parse(JSON.stringify(v));
  }
}

class Reader implements IWorkbenchReader {
  table: Record<string, ArrayData> = {
    reference: array(32000),
    primary: array(32000),
    short: array(16000)
  };
  fs = 4000;
  reads: string[] = [];
  fail: Error | null = null;
  facts(ref: SourceRef) {
    const a = ref.kind === 'variable' ? this.table[ref.name] : undefined;
    return a ? { shape: a.shape, complex: a.complex } : null;
  }
  async readArray(ref: SourceRef): Promise<ArrayData> {
    await Promise.resolve();
    const name = ref.kind === 'variable' ? ref.name : ref.kind === 'cell' ? ref.cellId : ref.label;
    this.reads.push(name);
    if (this.fail) {
      throw this.fail;
    }
    const a = this.table[name];
    if (!a) {
      throw new Error(`There is no variable ${name} in the kernel`);
    }
    return a;
  }
  async readScalar(): Promise<number> {
    return this.fs;
  }
}

/** A runner whose jobs finish when the test says so. */
class Runner implements IRunner {
  jobs: Array<{
    params: unknown;
    progress: (f: number) => void;
    finish: (o: Partial<RunOutcome>) => void;
    fail: (e: Error) => void;
    cancelled: boolean;
  }> = [];
  start(params: any, _inputs: any, onProgress: (f: number) => void): RunHandle {
    let finish!: (o: RunOutcome) => void;
    let fail!: (e: Error) => void;
    const result = new Promise<RunOutcome>((res, rej) => {
      finish = res;
      fail = rej;
    });
    const job = {
      params,
      progress: onProgress,
      finish: (o: Partial<RunOutcome>) =>
        finish({ status: 'ok', messages: [], figures: [], arrays: {}, computeMs: 5, ...o }),
      fail,
      cancelled: false
    };
    this.jobs.push(job);
    return {
      result,
      cancel: () => {
        job.cancelled = true;
        job.finish({ status: 'cancelled' });
      }
    };
  }
}

const tick = () => new Promise(r => setTimeout(r, 0));

function make(host = new Host()) {
  const reader = new Reader();
  const runner = new Runner();
  const model = new WorkbenchModel({ trans, host, reader, runner });
  let setupSignals = 0;
  model.setupsChanged.connect(() => setupSignals++);
  return { model, host, reader, runner, signals: () => setupSignals };
}

const outcome: Partial<RunOutcome> = {
  figures: [{ key: 'mseFinalDb', label: 'final MSE', value: -40, unit: 'dB' }],
  arrays: { e: { data: new Float64Array(64), shape: [64], complex: false, description: 'error' } }
};

describe('WorkbenchModel', () => {
  it('refuses a set-up with a bad value, names the field, stores nothing', () => {
    const { model, host, signals } = make();
    const r = model.add(cancellation({ lambda: 1.5 }), 'bad');
    expect('issues' in r && r.issues[0].field).toBe('lambda');
    expect(model.setups).toHaveLength(0);
    expect(host.writes).toBe(0);
    expect(signals()).toBe(0);
  });

  it('stores set-ups in the metadata with the schema version, and emits only on real change', () => {
    const { model, host, signals } = make();
    const r = model.add(cancellation(), 'motor noise');
    expect('id' in r).toBe(true);
    const id = (r as { id: string }).id;
    expect(host.value).toEqual({ version: SETUP_SCHEMA_VERSION, setups: [model.setups[0]] });
    expect(signals()).toBe(1);
    expect(model.update(id, cancellation())).toEqual([]); // the same parameters
    expect(signals()).toBe(1);
    model.setFollow(id, false); // already off
    expect(signals()).toBe(1);
    model.update(id, cancellation({ taps: 32 }));
    expect(signals()).toBe(2);
    expect((host.value as any).setups[0].params.taps).toBe(32);
  });

  it('restores set-ups from the metadata it finds, keeps invalid entries verbatim', () => {
    const stored = serializeWorkbench([setup('a', cancellation())]) as any;
    const broken = {
      ...stored.setups[0],
      id: 'b',
      params: { ...stored.setups[0].params, lambda: 3 }
    };
    stored.setups.push(broken);
    const { model, host } = make(new Host(stored));
    expect(model.setups.map(s => s.id)).toEqual(['a']);
    expect(model.problems[0]).toContain('params.lambda');
    model.add(cancellation(), 'new');
    const written = (host.value as any).setups;
    expect(written.map((s: any) => s.id)).toEqual(['a', 'adaptive-2', 'b']);
    expect(written[2]).toEqual(broken);
  });

  it('never overwrites set-ups of a newer schema', () => {
    const newer = { version: SETUP_SCHEMA_VERSION + 1, setups: [{ future: true }] };
    const { model, host } = make(new Host(newer));
    expect(model.readOnly).toBe(true);
    model.add(cancellation(), 'x');
    expect(host.writes).toBe(0);
    expect(host.value).toBe(newer);
  });

  it('runs: reading, running with progress, then ok with figures and arrays', async () => {
    const { model, runner } = make();
    const id = (model.add(cancellation({ taps: 4 }), 'nc') as { id: string }).id;
    const statuses: string[] = [];
    model.runChanged.connect((_, r) =>
      statuses.push(`${r.status}:${Math.round(r.progress * 100)}`)
    );
    const done = model.run(id);
    await tick();
    expect(runner.jobs).toHaveLength(1);
    runner.jobs[0].progress(0.004); // below a whole per cent: no signal
    runner.jobs[0].progress(0.5);
    runner.jobs[0].progress(0.505); // same per cent: no signal
    runner.jobs[0].finish(outcome);
    const [run] = await done;
    expect(statuses).toEqual(['reading:0', 'running:0', 'running:50', 'ok:100']);
    expect(run.status).toBe('ok');
    expect(run.figures[0].unit).toBe('dB');
    expect(Object.keys(run.arrays)).toEqual(['e']);
    expect(run.label).toBe('QR-RLS · M 4 · λ 0.999');
    expect(run.readMs).not.toBeNull();
  });

  it('a true response is read with the inputs and the run reports the misalignment', async () => {
    const { model, reader, runner } = make();
    reader.table.path = {
      data: Float64Array.from([1, 0.5]),
      shape: [2],
      complex: false,
      dtype: 'float64'
    };
    const pick = { ref: { kind: 'variable' as const, name: 'path' }, shape: [2], layout: null };
    const id = (model.add(cancellation({ taps: 3, truth: pick }), 'nc') as { id: string }).id;
    const done = model.run(id);
    await tick();
    expect(reader.reads).toContain('path');
    // w = (1, 0.4, 0.1) against w_o = (1, 0.5) padded: ‖(0, −0.1, 0.1)‖²/‖w_o‖² = 0.02/1.25
    const w = Float64Array.from([1, 0.4, 0.1]);
    runner.jobs[0].finish({
      arrays: { weights: { data: w, shape: [3], complex: false, description: 'final weights w' } }
    });
    const [run] = await done;
    expect(run.inputs.truth.shape).toEqual([2]);
    const f = run.figures.find(x => x.key === 'misalignmentDb')!;
    expect(f.unit).toBe('dB');
    expect(f.value).toBeCloseTo(10 * Math.log10(0.02 / 1.25), 12);
    expect(run.messages.join(' ')).toMatch(/the shorter padded with zeros/);
  });

  it('a true response of the wrong shape fails the run with a sentence naming it', async () => {
    const { model, reader, runner } = make();
    reader.table.path2 = {
      data: new Float64Array(4),
      shape: [2, 2],
      complex: false,
      dtype: 'float64'
    };
    const pick = { ref: { kind: 'variable' as const, name: 'path2' }, shape: [2, 2], layout: null };
    const id = (model.add(cancellation({ truth: pick }), 'bad truth') as { id: string }).id;
    const [run] = await model.run(id);
    expect(runner.jobs).toHaveLength(0);
    expect(run.status).toBe('failed');
    expect(run.messages).toEqual([
      'The true response path2 must be a 1-D array of taps, got shape 2×2.'
    ]);
  });

  it('cancel: status cancelled, no result arrays, parameters kept; a re-run completes', async () => {
    const { model, runner } = make();
    const id = (model.add(cancellation(), 'nc') as { id: string }).id;
    const first = model.run(id);
    await tick();
    const runId = model.runs[0].id;
    model.cancel(runId);
    const [r] = await first;
    expect(runner.jobs[0].cancelled).toBe(true);
    expect(r.status).toBe('cancelled');
    expect(r.arrays).toEqual({});
    expect(r.params).toEqual(model.setup(id)!.params);
    const second = model.run(id);
    await tick();
    runner.jobs[1].finish(outcome);
    expect((await second)[0].status).toBe('ok');
    expect(model.runsOf(id).map(x => x.status)).toEqual(['cancelled', 'ok']);
  });

  it('an edited set-up cancels its run in flight; re-running cancels the previous run', async () => {
    const { model, runner } = make();
    const id = (model.add(cancellation(), 'nc') as { id: string }).id;
    void model.run(id);
    await tick();
    model.update(id, cancellation({ taps: 8 }));
    expect(runner.jobs[0].cancelled).toBe(true);
    void model.run(id);
    await tick();
    void model.run(id);
    await tick();
    expect(runner.jobs[1].cancelled).toBe(true);
    expect(runner.jobs[2].cancelled).toBe(false);
  });

  it('a failed read fails that run with the reason and loses nothing else', async () => {
    const { model, reader, runner } = make();
    const a = (model.add(cancellation(), 'a') as { id: string }).id;
    const b = (model.add(cancellation({ taps: 2 }), 'b') as { id: string }).id;
    const ok = model.run(a);
    await tick();
    runner.jobs[0].finish(outcome);
    await ok;
    reader.fail = new Error('The kernel restarted');
    const [failed] = await model.run(b);
    expect(failed.status).toBe('failed');
    expect(failed.messages[0]).toBe('Reading reference failed: The kernel restarted');
    expect(model.setups).toHaveLength(2);
    expect(model.runsOf(a)[0].status).toBe('ok');
    expect(model.runsOf(a)[0].arrays.e).toBeDefined();
  });

  it('a source that changed shape since the set-up was made fails the run, saying so', async () => {
    const { model, reader } = make();
    const id = (model.add(cancellation(), 'nc') as { id: string }).id; // made with 32000 samples
    reader.table.reference = array(64);
    const [r] = await model.run(id);
    expect(r.status).toBe('failed');
    expect(r.messages[0]).toContain('it was 32000, it is 64 now');
  });

  it('a worker that dies fails its run with the reason', async () => {
    const { model, runner } = make();
    const id = (
      model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
    ).id;
    const p = model.run(id);
    await tick();
    runner.jobs[0].fail(new Error('The worker stopped (out of memory?)'));
    const [r] = await p;
    expect(r.status).toBe('failed');
    expect(r.messages).toEqual(['The worker stopped (out of memory?)']);
  });

  it('a sweep starts one run per value at once, labelled by the value', async () => {
    const { model, runner, reader } = make();
    const id = (
      model.add(
        {
          tool: 'sweep',
          base: cancellation({ x: vr('reference'), d: vr('primary') }),
          parameter: 'lambda',
          values: [0.99, 0.995, 0.999]
        },
        'λ sweep'
      ) as { id: string }
    ).id;
    const p = model.run(id);
    await tick();
    await tick();
    expect(runner.jobs.map(j => (j.params as any).lambda)).toEqual([0.99, 0.995, 0.999]);
    // The sources are read once for the whole sweep, and each run keeps them for the plots.
    expect(reader.reads).toEqual(['reference', 'primary']);
    expect(model.runs.every(r => r.inputs.x.description === 'reference')).toBe(true);
    runner.jobs.forEach(j => j.finish(outcome));
    const runs = await p;
    expect(runs.map(r => r.label)).toEqual([
      'QR-RLS · M 16 · λ 0.99',
      'QR-RLS · M 16 · λ 0.995',
      'QR-RLS · M 16 · λ 0.999'
    ]);
  });

  it('reads the sample rate from the kernel and refuses a non-positive one', async () => {
    const { model, reader, runner } = make();
    const id = (
      model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
    ).id;
    reader.fs = -1;
    const [r] = await model.run(id);
    expect(r.status).toBe('failed');
    expect(r.messages[0]).toContain('The sample rate fs is -1 Hz');
    expect(runner.jobs).toHaveLength(0);
  });

  it('a following set-up re-runs once after its source changes (debounced); others do not', async () => {
    jest.useFakeTimers();
    try {
      const { model, reader } = make();
      const id = (
        model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
      ).id;
      model.add(cancellation({ x: vr('short'), d: vr('short') }), 'other');
      model.setFollow(id, true);
      model.sourcesChanged([{ kind: 'variable', name: 'primary' }]);
      jest.advanceTimersByTime(FOLLOW_DEBOUNCE_MS / 2);
      model.sourcesChanged([{ kind: 'variable', name: 'primary' }]);
      jest.advanceTimersByTime(FOLLOW_DEBOUNCE_MS - 1);
      expect(model.runs).toHaveLength(0);
      jest.advanceTimersByTime(1);
      expect(model.runs.map(r => r.setupId)).toEqual([id]);
      model.setFollow(id, false);
      model.sourcesChanged([{ kind: 'variable', name: 'primary' }]);
      jest.advanceTimersByTime(FOLLOW_DEBOUNCE_MS * 2);
      expect(model.runs).toHaveLength(1);
      expect(reader.reads.length).toBeLessThanOrEqual(2);
    } finally {
      jest.useRealTimers();
    }
  });

  it('a kernel restart announced several times is said once on the running run', async () => {
    const { model, runner } = make();
    const id = (
      model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
    ).id;
    const p = model.run(id);
    await tick();
    model.kernelRestarted();
    model.kernelRestarted();
    model.kernelRestarted();
    runner.jobs[0].finish(outcome);
    const [r] = await p;
    expect(r.status).toBe('ok');
    expect(r.messages.filter(m => /kernel restarted/.test(m))).toHaveLength(1);
  });

  it('runs that read the same values (same kernel digest) share one copy of them', async () => {
    const { model, reader, runner } = make();
    // the bridge hands out a fresh copy on every read, with the kernel's digest of the values
    const table = reader.table;
    const digests: Record<string, string | undefined> = {
      reference: 'a'.repeat(64),
      primary: 'b'.repeat(64)
    };
    reader.readArray = async (ref: SourceRef) => {
      const name = (ref as { name: string }).name;
      const a = table[name];
      return { ...a, data: a.data.slice(), digest: digests[name] };
    };
    table.reference.data.fill(1);
    const id = (
      model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
    ).id;
    const runOnce = async () => {
      const done = model.run(id);
      await tick();
      runner.jobs[runner.jobs.length - 1].finish(outcome);
      return (await done)[0];
    };
    const first = await runOnce();
    const second = await runOnce();
    expect(second.inputs.x.data).toBe(first.inputs.x.data);
    expect(second.inputs.d.data).toBe(first.inputs.d.data);
    expect(second.inputs.x.digest).toBe('a'.repeat(64));
    // values changed in the kernel: another digest, another array, the new values
    table.reference = { ...table.reference, data: new Float64Array(32000).fill(2) };
    digests.reference = 'c'.repeat(64);
    const third = await runOnce();
    expect(third.inputs.x.data).not.toBe(first.inputs.x.data);
    expect(third.inputs.x.data[0]).toBe(2);
    expect(third.inputs.d.data).toBe(first.inputs.d.data);
    // a read without a digest is not shared
    digests.primary = undefined;
    const fifth = await runOnce();
    expect(fifth.inputs.d.data).not.toBe(first.inputs.d.data);
    expect(fifth.inputs.d.digest).toBeUndefined();
  });

  it('closing the notebook cancels runs in flight and writes nothing more', async () => {
    const { model, runner, host } = make();
    const id = (
      model.add(cancellation({ x: vr('reference'), d: vr('primary') }), 'nc') as { id: string }
    ).id;
    void model.run(id);
    await tick();
    const writes = host.writes;
    model.dispose();
    expect(runner.jobs[0].cancelled).toBe(true);
    expect(host.writes).toBe(writes);
    expect(model.isDisposed).toBe(true);
  });
});

function vr(name: string) {
  return { ref: { kind: 'variable' as const, name }, shape: null, layout: null };
}
