/**
 * Stand-ins with the workbench model's real interfaces, for tests of what sits on the model
 * (selection, commands): metadata kept in memory, a kernel of named arrays, and a runner whose
 * jobs end when the test says so. The bridge and the worker pool have their own tests
 * (test/integration, test/worker).
 */
/* eslint-disable @typescript-eslint/no-explicit-any -- stand-ins read untyped job parameters */
import type { ArrayData } from '../../../src/bridge';
import type { StoredWorkbench } from '../../../src/model/workbench/metadata';
import type {
  IRunner,
  IWorkbenchReader,
  RunHandle,
  RunOutcome
} from '../../../src/model/workbench/runs';
import type { SourceRef } from '../../../src/model/workbench/setup';
import { WorkbenchModel, type IMetadataHost } from '../../../src/model/workbench/workbench';
import { trans } from './fixtures';

export function array(n: number): ArrayData {
  return { data: new Float64Array(n), shape: [n], complex: false, dtype: 'float64' };
}

export class MemoryHost implements IMetadataHost {
  value: unknown = undefined;
  read(): unknown {
    return this.value;
  }
  write(v: StoredWorkbench): void {
    this.value = JSON.parse(JSON.stringify(v));
  }
}

export class TableReader implements IWorkbenchReader {
  table: Record<string, ArrayData> = { reference: array(32000), primary: array(32000) };
  facts(ref: SourceRef) {
    const a = ref.kind === 'variable' ? this.table[ref.name] : undefined;
    return a ? { shape: a.shape, complex: a.complex } : null;
  }
  async readArray(ref: SourceRef): Promise<ArrayData> {
    await Promise.resolve();
    const a = ref.kind === 'variable' ? this.table[ref.name] : undefined;
    if (!a) {
      throw new Error('not in the kernel');
    }
    return a;
  }
  async readScalar(): Promise<number> {
    return 4000;
  }
}

export interface IJob {
  params: any;
  finish: (o?: Partial<RunOutcome>) => void;
  cancelled: boolean;
}

export class HeldRunner implements IRunner {
  jobs: IJob[] = [];
  start(params: any): RunHandle {
    let done!: (o: RunOutcome) => void;
    const result = new Promise<RunOutcome>(res => (done = res));
    const job: IJob = {
      params,
      finish: o =>
        done({ status: 'ok', messages: [], figures: [], arrays: {}, computeMs: 1, ...o }),
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

/** A finished run's outcome with one result array. */
export const withArray: Partial<RunOutcome> = {
  figures: [{ key: 'mseFinalDb', label: 'final MSE', value: -40, unit: 'dB' }],
  arrays: {
    error: { data: new Float64Array(8), shape: [8], complex: false, description: 'error' }
  }
};

export const tick = (): Promise<void> => new Promise(r => setTimeout(r, 0));

export function makeModel(): { model: WorkbenchModel; runner: HeldRunner; host: MemoryHost } {
  const host = new MemoryHost();
  const runner = new HeldRunner();
  const model = new WorkbenchModel({ trans, host, reader: new TableReader(), runner });
  return { model, runner, host };
}
