/**
 * SourcesModel: refreshes are deferred while the kernel is busy, merged when they pile up, and a
 * failed refresh keeps what was listed. The bridge is a stand-in here (the real one is covered by
 * the integration tests against a real kernel); the kernel is a minimal object with a status
 * and a statusChanged signal, which is all the model reads of it.
 */
import { Signal } from '@lumino/signaling';
import type { Kernel } from '@jupyterlab/services';
import type { ArrayInfo } from '../../src/bridge';
import { SourcesModel, type INotebookTarget } from '../../src/model/sources';

// The model reports background failures with console.error; keep the test output readable.
beforeEach(() => {
  jest.spyOn(console, 'error').mockImplementation(() => undefined);
});
afterEach(() => {
  jest.restoreAllMocks();
});

class FakeKernel {
  status: Kernel.Status = 'idle';
  isDisposed = false;
  readonly statusChanged = new Signal<this, Kernel.Status>(this);
  setStatus(status: Kernel.Status): void {
    this.status = status;
    this.statusChanged.emit(status);
  }
}

function info(label: string, shape: number[]): ArrayInfo {
  return {
    source: { kind: 'variable', name: label },
    label,
    shape,
    dtype: 'float64',
    bytes: 8 * shape.reduce((a, b) => a * b, 1),
    notes: []
  };
}

function setup(opts: { fail?: () => boolean } = {}) {
  const kernel = new FakeKernel();
  let calls = 0;
  let variables: ArrayInfo[] = [info('x', [10])];
  const bridge = {
    listCellResults: async () => [],
    listVariables: async () => {
      calls++;
      await new Promise(r => setTimeout(r, 5));
      if (opts.fail?.()) {
        throw new Error('kernel died');
      }
      return variables;
    },
    readArray: async () => {
      throw new Error('not used');
    },
    readScalar: async () => {
      throw new Error('not used');
    },
    writeArray: async () => {
      throw new Error('not used');
    },
    dispose: () => undefined
  };
  const model = new SourcesModel({ createBridge: () => bridge as unknown as SourcesModel.IBridge });
  const target: INotebookTarget = {
    name: 'demo.ipynb',
    cells: () => [{ cellId: 'a', executionCount: 1 }],
    kernel: kernel as unknown as Kernel.IKernelConnection
  };
  return {
    kernel,
    model,
    target,
    calls: () => calls,
    setVariables: (v: ArrayInfo[]) => (variables = v)
  };
}

test('lists the variables of the target and reports idle', async () => {
  const s = setup();
  s.model.setTarget(s.target);
  await s.model.refresh();
  expect(s.model.variables.map(v => v.label)).toEqual(['x']);
  expect(s.model.status).toBe('idle');
});

test('a refresh requested while the kernel is busy waits for idle and says so', async () => {
  const s = setup();
  s.kernel.setStatus('busy');
  s.model.setTarget(s.target);
  const pending = s.model.refresh();
  await new Promise(r => setTimeout(r, 20));
  expect(s.model.status).toBe('waiting');
  expect(s.calls()).toBe(0);
  s.kernel.setStatus('idle');
  await pending;
  expect(s.calls()).toBeGreaterThan(0);
  expect(s.model.status).toBe('idle');
});

test('a burst of refreshes is merged into at most one more run', async () => {
  const s = setup();
  s.model.setTarget(s.target);
  await s.model.refresh();
  const before = s.calls();
  await Promise.all([s.model.refresh(), s.model.refresh(), s.model.refresh(), s.model.refresh()]);
  expect(s.calls() - before).toBe(2);
});

test('a failed refresh keeps the arrays already listed and reports the error', async () => {
  let fail = false;
  const s = setup({ fail: () => fail });
  s.model.setTarget(s.target);
  await s.model.refresh();
  fail = true;
  await s.model.refresh();
  expect(s.model.status).toBe('error');
  expect(s.model.message).toContain('kernel died');
  expect(s.model.variables.map(v => v.label)).toEqual(['x']);
});

test('a refresh emits changed for its status steps and shows a changed list', async () => {
  const s = setup();
  s.model.setTarget(s.target);
  await s.model.refresh();
  let emitted = 0;
  s.model.changed.connect(() => emitted++);
  await s.model.refresh();
  // idle → refreshing → idle: exactly two emissions, none for the unchanged list
  expect(emitted).toBe(2);
  s.setVariables([info('x', [10]), info('y', [3, 4])]);
  await s.model.refresh();
  expect(emitted).toBe(4);
  expect(s.model.variables.map(v => v.label)).toEqual(['x', 'y']);
});

test('no kernel: status says so and nothing is requested', async () => {
  const s = setup();
  s.model.setTarget({ ...s.target, kernel: null });
  await s.model.refresh();
  expect(s.model.status).toBe('no-kernel');
  expect(s.calls()).toBe(0);
});
