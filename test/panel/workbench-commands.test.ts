/**
 * The workbench's commands on a real CommandRegistry, a real WorkbenchModel and its selection:
 * which are enabled in which state (no cancel without a run in flight, no write-back without
 * result arrays), what each does to the model, that a command given a set-up or run acts on it
 * and makes it current, and that the shortcuts and menus of schema/workbench.json name these
 * commands and do not take keys JupyterLab's notebook shortcuts use where the workbench is.
 * The target's dialogs (remove, write) are recorded here; the e2e journey clicks the real ones.
 */
import './lumino-node';
import fs from 'node:fs';
import path from 'node:path';
import { CommandRegistry } from '@lumino/commands';
import { WorkbenchSelection } from '../../src/model/workbench/selection';
import type { Tool } from '../../src/model/workbench/setup';
import type { WorkbenchModel } from '../../src/model/workbench/workbench';
import { WorkbenchCommandIDs as IDs } from '../../src/panel/workbench/command-ids';
import {
  addWorkbenchCommands,
  paletteItems,
  WORKBENCH_COMMANDS,
  type IWorkbenchTarget
} from '../../src/workbench-commands';
import { cancellation, trans } from '../model/workbench/fixtures';
import { makeModel, tick, withArray, type HeldRunner } from '../model/workbench/stand-ins';

const ROOT = path.resolve(__dirname, '..', '..');

/** A workbench as the commands see it, its dialogs answered by the test. */
class Target implements IWorkbenchTarget {
  constructor(
    readonly model: WorkbenchModel,
    readonly runner: HeldRunner
  ) {
    this.selection = new WorkbenchSelection(model);
  }
  readonly selection: WorkbenchSelection;
  opened: string[] = [];
  edited: string[] = [];
  written: Array<[string, string | null]> = [];
  removeAnswer = true;
  editorFocused = false;
  editorRuns = 0;
  async newSetup(tool: Tool): Promise<void> {
    this.opened.push(tool);
  }
  editSetup(id: string): void {
    this.edited.push(id);
  }
  async removeSetup(id: string): Promise<boolean> {
    if (this.removeAnswer) {
      this.model.remove(id);
    }
    return this.removeAnswer;
  }
  editorHasFocus(): boolean {
    return this.editorFocused;
  }
  saveAndRunEditor(): void {
    this.editorRuns++;
  }
  async writeRun(runId: string): Promise<void> {
    this.written.push([runId, 'whole run']);
  }
  async writeArray(runId: string, key: string | null): Promise<void> {
    this.written.push([runId, key]);
  }
}

function setupOf(model: WorkbenchModel, title: string): string {
  const r = model.add(cancellation(), title);
  if (!('id' in r)) {
    throw new Error('refused');
  }
  return r.id;
}

function make(withWorkbench = true) {
  const { model, runner } = makeModel();
  const target = new Target(model, runner);
  const commands = new CommandRegistry();
  addWorkbenchCommands(commands, trans as never, args =>
    withWorkbench && (args.workbench === undefined || args.workbench === 'w1') ? target : null
  );
  return { commands, target, model, runner };
}

describe('the workbench commands', () => {
  it('have a label each, one palette item per tool, and are all disabled without a workbench', () => {
    const { commands } = make(false);
    for (const id of WORKBENCH_COMMANDS) {
      expect(commands.label(id)).not.toBe('');
      expect(commands.isEnabled(id, { tool: 'adaptive' })).toBe(false);
    }
    const items = paletteItems().filter(i => i.command === IDs.newSetup);
    expect(items.map(i => commands.label(i.command, i.args))).toEqual([
      'New Set-up: Adaptive filter',
      'New Set-up: Interference removal',
      'New Set-up: Basis and null space',
      'New Set-up: Least squares',
      'New Set-up: Principal angles',
      'New Set-up: Parameter sweep'
    ]);
  });

  it('open a new set-up of the tool named, and none of a tool that does not exist', async () => {
    const { commands, target } = make();
    await commands.execute(IDs.newSetup, { tool: 'sweep' });
    expect(target.opened).toEqual(['sweep']);
    expect(commands.isEnabled(IDs.newSetup, { tool: 'rm -rf' })).toBe(false);
    expect(commands.isEnabled(IDs.newSetup, { tool: 'removal', workbench: 'other' })).toBe(false);
  });

  it('run the current set-up, show its run, and allow cancel only while it runs', async () => {
    const { commands, target, model, runner } = make();
    expect(commands.isEnabled(IDs.runSetup)).toBe(false);
    const a = setupOf(model, 'a');
    const b = setupOf(model, 'b');
    expect(commands.isEnabled(IDs.runSetup)).toBe(true);
    expect(commands.isEnabled(IDs.cancelSetup)).toBe(false);
    target.selection.selectSetup(b);
    const done = commands.execute(IDs.runSetup);
    expect(model.runsOf(a)).toEqual([]);
    const run = model.runsOf(b)[0];
    expect(target.selection.runId).toBe(run.id);
    expect(commands.isEnabled(IDs.cancelSetup)).toBe(true);
    await tick();
    await commands.execute(IDs.cancelSetup);
    expect(runner.jobs[0].cancelled).toBe(true);
    expect(model.runsOf(b)[0].status).toBe('cancelled');
    expect(commands.isEnabled(IDs.cancelSetup)).toBe(false);
    await done;
  });

  it('act on the set-up a button names and make it current', async () => {
    const { commands, target, model, runner } = make();
    const a = setupOf(model, 'a');
    const b = setupOf(model, 'b');
    target.selection.selectSetup(a);
    const done = commands.execute(IDs.runSetup, { setup: b, workbench: 'w1' });
    expect(target.selection.setupId).toBe(b);
    expect(model.runsOf(b)).toHaveLength(1);
    expect(model.runsOf(a)).toHaveLength(0);
    await tick();
    runner.jobs[0].finish(withArray);
    await done;
    // A button of another workbench acts on nothing here.
    expect(commands.isEnabled(IDs.runSetup, { setup: b, workbench: 'w2' })).toBe(false);
  });

  it('in the editor, the run shortcut saves and runs the form instead', async () => {
    const { commands, target, model } = make();
    target.editorFocused = true;
    expect(commands.isEnabled(IDs.runSetup)).toBe(true);
    await commands.execute(IDs.runSetup);
    expect(target.editorRuns).toBe(1);
    expect(model.runs).toEqual([]);
  });

  it('edit, duplicate (opened in the editor) and remove only after the user agrees', async () => {
    const { commands, target, model } = make();
    const a = setupOf(model, 'motor noise');
    await commands.execute(IDs.editSetup);
    expect(target.edited).toEqual([a]);
    const copy = (await commands.execute(IDs.duplicateSetup)) as string;
    expect(model.setup(copy)?.title).toBe('motor noise (copy)');
    expect(target.selection.setupId).toBe(copy);
    expect(target.edited).toEqual([a, copy]);
    target.removeAnswer = false;
    await commands.execute(IDs.removeSetup, { setup: a });
    expect(model.setup(a)).toBeDefined();
    target.removeAnswer = true;
    await commands.execute(IDs.removeSetup, { setup: a });
    expect(model.setup(a)).toBeUndefined();
    expect(target.selection.setupId).toBe(copy);
  });

  it('switch following over, or to the state a checkbox gives', async () => {
    const { commands, model } = make();
    const a = setupOf(model, 'a');
    expect(commands.isToggled(IDs.toggleFollow)).toBe(false);
    await commands.execute(IDs.toggleFollow);
    expect(model.setup(a)?.follow).toBe(true);
    expect(commands.isToggled(IDs.toggleFollow)).toBe(true);
    await commands.execute(IDs.toggleFollow, { setup: a, on: true });
    expect(model.setup(a)?.follow).toBe(true);
    await commands.execute(IDs.toggleFollow, { setup: a, on: false });
    expect(model.setup(a)?.follow).toBe(false);
  });

  it('write back and compare only a finished run with arrays; remove a run', async () => {
    const { commands, target, model, runner } = make();
    const a = setupOf(model, 'a');
    const done = commands.execute(IDs.runSetup);
    const run = model.runsOf(a)[0].id;
    for (const id of [IDs.writeRun, IDs.writeArray, IDs.toggleCompare, IDs.compareSetupRuns]) {
      expect(commands.isEnabled(id)).toBe(false);
    }
    await tick();
    runner.jobs[0].finish(withArray);
    await done;
    expect(commands.isEnabled(IDs.writeRun)).toBe(true);
    expect(commands.isEnabled(IDs.writeArray, { key: 'error' })).toBe(true);
    expect(commands.isEnabled(IDs.writeArray, { key: 'weights' })).toBe(false);
    await commands.execute(IDs.writeArray);
    await commands.execute(IDs.writeArray, { run, key: 'error' });
    await commands.execute(IDs.writeRun);
    expect(target.written).toEqual([
      [run, null],
      [run, 'error'],
      [run, 'whole run']
    ]);
    await commands.execute(IDs.toggleCompare);
    expect(target.selection.compared).toEqual([run]);
    expect(commands.isToggled(IDs.toggleCompare)).toBe(true);
    await commands.execute(IDs.clearComparison);
    expect(target.selection.compared).toEqual([]);
    expect(commands.isEnabled(IDs.clearComparison)).toBe(false);
    await commands.execute(IDs.compareSetupRuns);
    expect(target.selection.compared).toEqual([run]);
    await commands.execute(IDs.removeRun);
    expect(model.runs).toEqual([]);
    expect(target.selection.compared).toEqual([]);
    expect(commands.isEnabled(IDs.removeRun)).toBe(false);
  });
});

describe('schema/workbench.json', () => {
  const schema = JSON.parse(fs.readFileSync(path.join(ROOT, 'schema', 'workbench.json'), 'utf8'));
  const known = new Set([
    ...WORKBENCH_COMMANDS,
    'perpend:open-workbench',
    'perpend:workbench-run-all',
    'perpend:workbench-cancel-all'
  ]);

  it('menus and shortcuts name only commands that exist', () => {
    const named: string[] = [];
    const walk = (v: unknown): void => {
      if (Array.isArray(v)) {
        v.forEach(walk);
      } else if (v && typeof v === 'object') {
        const o = v as Record<string, unknown>;
        if (typeof o.command === 'string') {
          named.push(o.command);
        }
        Object.values(o).forEach(walk);
      }
    };
    walk(schema['jupyter.lab.menus']);
    walk(schema['jupyter.lab.shortcuts']);
    expect(named.filter(c => !known.has(c))).toEqual([]);
    expect(named).toEqual(expect.arrayContaining([IDs.runSetup, IDs.cancelSetup, IDs.removeRun]));
  });

  it('run and cancel of the current set-up are keys of the workbench that JupyterLab does not bind there', () => {
    const ours = schema['jupyter.lab.shortcuts'] as Array<{
      command: string;
      keys: string[];
      selector: string;
    }>;
    const run = ours.find(s => s.command === IDs.runSetup)!;
    const cancel = ours.find(s => s.command === IDs.cancelSetup)!;
    expect([run.selector, cancel.selector]).toEqual(['.pp-Workbench', '.pp-Workbench']);
    // JupyterLab's own shortcuts, from the schemas of the JupyterLab installed in .venv.
    const dir = path.join(ROOT, '.venv', 'share', 'jupyter', 'lab', 'schemas');
    const files: string[] = [];
    const list = (d: string): void =>
      fs.readdirSync(d, { withFileTypes: true }).forEach(e => {
        const p = path.join(d, e.name);
        if (e.isDirectory()) {
          list(p);
        } else if (p.endsWith('.json')) {
          files.push(p);
        }
      });
    list(dir);
    const theirs = files.flatMap(
      f =>
        (JSON.parse(fs.readFileSync(f, 'utf8'))['jupyter.lab.shortcuts'] ?? []) as Array<{
          keys: string[];
          selector: string;
          command: string;
        }>
    );
    expect(theirs.length).toBeGreaterThan(100);
    for (const mine of [run, cancel]) {
      const same = theirs.filter(t => t.keys.join(' ') === mine.keys.join(' '));
      // Bound elsewhere only on selectors that never match inside the workbench (the notebook,
      // the console): nothing on body, the main area or any element of ours.
      for (const t of same) {
        expect(t.selector).toMatch(/^\.jp-(Notebook|CodeConsole)\b/);
      }
    }
    // The notebook's run-cell key is among them: the workbench's run takes the same gesture.
    expect(theirs.some(t => t.keys.join(' ') === run.keys.join(' '))).toBe(true);
  });
});
