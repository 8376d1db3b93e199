/**
 * Every action of the workbench as a command: the tab's buttons, its context menu, the View ›
 * Perpend menu, the palette and the keyboard all go through these. A command acts on the set-up
 * or run named in its arguments, else on the workbench's current one (see WorkbenchSelection),
 * and is enabled only when that makes sense (no cancel without a run in flight, no write-back
 * without result arrays). Wiring only: the work is the model's and the panel's.
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { CommandRegistry } from '@lumino/commands';
import type { ReadonlyJSONObject, ReadonlyPartialJSONObject } from '@lumino/coreutils';
import { TOOL_LABELS } from './model/workbench/fields';
import type { Run } from './model/workbench/runs';
import type { WorkbenchSelection } from './model/workbench/selection';
import { TOOLS, type Tool } from './model/workbench/setup';
import type { WorkbenchModel } from './model/workbench/workbench';
import { WorkbenchCommandIDs as IDs } from './panel/workbench/command-ids';

/** What the commands need of one workbench (the WorkbenchPanel provides it). */
export interface IWorkbenchTarget {
  readonly model: WorkbenchModel;
  readonly selection: WorkbenchSelection;
  /** Opens a new set-up of `tool` in the editor. */
  newSetup(tool: Tool): Promise<void>;
  /** Opens a set-up in the editor. */
  editSetup(id: string): void;
  /** Asks once, then removes the set-up and its runs; true when removed. */
  removeSetup(id: string): Promise<boolean>;
  /** True while the keyboard is in the set-up editor. */
  editorHasFocus(): boolean;
  /** Saves and runs what the editor holds (its checks first). */
  saveAndRunEditor(): void;
  /** Writes a run's arrays and parameters to the kernel as one dict (asks for the name). */
  writeRun(runId: string): Promise<void>;
  /** Writes one result array (asks which when `key` is null, then for the name). */
  writeArray(runId: string, key: string | null): Promise<void>;
}

/** Every command added here, for notifying menus and palette of a change of state. */
export const WORKBENCH_COMMANDS: ReadonlyArray<string> = Object.values(IDs);

/** Arguments the palette shows: one "new set-up" item per tool, the rest without arguments. */
export function paletteItems(): Array<{ command: string; args?: ReadonlyJSONObject }> {
  return [
    ...TOOLS.map(tool => ({ command: IDs.newSetup, args: { tool } })),
    ...WORKBENCH_COMMANDS.filter(c => c !== IDs.newSetup).map(command => ({ command }))
  ];
}

/**
 * Adds the workbench's commands. `resolve` finds the workbench the arguments name (its panel's
 * id in `workbench`), or the current workbench when they name none.
 */
export function addWorkbenchCommands(
  commands: CommandRegistry,
  trans: TranslationBundle,
  resolve: (args: ReadonlyPartialJSONObject) => IWorkbenchTarget | null
): void {
  const setupOf = (t: IWorkbenchTarget, args: ReadonlyPartialJSONObject): string | null => {
    const id = typeof args.setup === 'string' ? args.setup : t.selection.setupId;
    return id !== null && t.model.setup(id) ? id : null;
  };
  const runOf = (t: IWorkbenchTarget, args: ReadonlyPartialJSONObject): Run | null => {
    const id = typeof args.run === 'string' ? args.run : t.selection.runId;
    return t.model.runs.find(r => r.id === id) ?? null;
  };
  /** The set-up the command acts on, made current (a button of another card says which). */
  const onSetup = (
    args: ReadonlyPartialJSONObject,
    fn: (t: IWorkbenchTarget, id: string) => unknown
  ) => {
    const t = resolve(args);
    const id = t ? setupOf(t, args) : null;
    if (!t || id === null) {
      return undefined;
    }
    t.selection.selectSetup(id);
    return fn(t, id);
  };
  const onRun = (args: ReadonlyPartialJSONObject, fn: (t: IWorkbenchTarget, r: Run) => unknown) => {
    const t = resolve(args);
    const r = t ? runOf(t, args) : null;
    return t && r ? fn(t, r) : undefined;
  };
  const hasSetup = (args: ReadonlyPartialJSONObject): boolean => {
    const t = resolve(args);
    return !!t && setupOf(t, args) !== null;
  };
  const finished = (r: Run | null): r is Run =>
    !!r && (r.status === 'ok' || r.status === 'warning');
  const withArrays = (r: Run | null): r is Run => finished(r) && Object.keys(r.arrays).length > 0;

  commands.addCommand(IDs.newSetup, {
    label: args =>
      typeof args.tool === 'string' && args.tool in TOOL_LABELS
        ? trans.__('New Set-up: %1', trans.__(TOOL_LABELS[args.tool as Tool]))
        : trans.__('New Set-up'),
    caption: trans.__('Open a new set-up of this tool in the workbench, defaults filled in'),
    isEnabled: args => resolve(args) !== null && TOOLS.includes(args.tool as Tool),
    execute: args => {
      const t = resolve(args);
      return t && TOOLS.includes(args.tool as Tool) ? t.newSetup(args.tool as Tool) : undefined;
    }
  });
  commands.addCommand(IDs.editSetup, {
    label: trans.__('Edit Set-up'),
    caption: trans.__('Open the current set-up in the editor'),
    isEnabled: hasSetup,
    execute: args => onSetup(args, (t, id) => t.editSetup(id))
  });
  commands.addCommand(IDs.duplicateSetup, {
    label: trans.__('Duplicate Set-up'),
    caption: trans.__('Add a copy of the current set-up below it and open the copy in the editor'),
    isEnabled: hasSetup,
    execute: args =>
      onSetup(args, (t, id) => {
        const s = t.model.setup(id)!;
        const copy = t.model.duplicate(id, trans.__('%1 (copy)', s.title || s.id));
        if (copy) {
          t.selection.selectSetup(copy);
          t.editSetup(copy);
        }
        return copy;
      })
  });
  commands.addCommand(IDs.removeSetup, {
    label: trans.__('Remove Set-up…'),
    caption: trans.__('Remove the current set-up and its runs (asks first)'),
    isEnabled: hasSetup,
    execute: args => onSetup(args, (t, id) => t.removeSetup(id))
  });
  commands.addCommand(IDs.runSetup, {
    label: trans.__('Run Set-up'),
    caption: trans.__(
      'Read the current set-up’s sources and compute it in a worker; in the editor, save and run the form'
    ),
    isEnabled: args => {
      const t = resolve(args);
      return !!t && (setupOf(t, args) !== null || (args.setup === undefined && t.editorHasFocus()));
    },
    execute: args => {
      const t = resolve(args);
      if (t && args.setup === undefined && t.editorHasFocus()) {
        // The keyboard is in the form: run what it holds, checked, not the stored set-up.
        t.saveAndRunEditor();
        return undefined;
      }
      return onSetup(args, (tt, id) => {
        const done = tt.model.run(id);
        // The run exists as soon as it starts reading: show it.
        const newest = tt.model.runsOf(id).slice(-1)[0];
        if (newest) {
          tt.selection.selectRun(newest.id);
        }
        return done;
      });
    }
  });
  commands.addCommand(IDs.cancelSetup, {
    label: trans.__('Cancel Set-up’s Run'),
    caption: trans.__('Stop the current set-up’s run at its next chunk'),
    isEnabled: args => {
      const t = resolve(args);
      const id = t ? setupOf(t, args) : null;
      return !!t && id !== null && t.model.isBusy(id);
    },
    execute: args => onSetup(args, (t, id) => t.model.cancelSetup(id))
  });
  commands.addCommand(IDs.toggleFollow, {
    label: trans.__('Re-run Set-up When Its Sources Change'),
    caption: trans.__(
      'When a cell that makes a source is run again, or a source variable changes, the set-up re-reads it and runs again. It never runs a cell.'
    ),
    isEnabled: hasSetup,
    isToggled: args => {
      const t = resolve(args);
      const id = t ? setupOf(t, args) : null;
      return !!t && id !== null && t.model.setup(id)!.follow;
    },
    execute: args =>
      onSetup(args, (t, id) =>
        t.model.setFollow(id, typeof args.on === 'boolean' ? args.on : !t.model.setup(id)!.follow)
      )
  });
  commands.addCommand(IDs.writeRun, {
    label: trans.__('Write Whole Run to Kernel…'),
    caption: trans.__('One dict in the kernel: every result array of the run plus its parameters'),
    isEnabled: args => {
      const t = resolve(args);
      return !!t && withArrays(runOf(t, args));
    },
    execute: args => onRun(args, (t, r) => (withArrays(r) ? t.writeRun(r.id) : undefined))
  });
  commands.addCommand(IDs.writeArray, {
    label: trans.__('Write Result Array to Kernel…'),
    caption: trans.__('Write one result array of the run to a kernel variable'),
    isEnabled: args => {
      const t = resolve(args);
      const r = t ? runOf(t, args) : null;
      return withArrays(r) && (typeof args.key !== 'string' || args.key in r.arrays);
    },
    execute: args =>
      onRun(args, (t, r) => {
        const key = typeof args.key === 'string' ? args.key : null;
        return withArrays(r) && (key === null || key in r.arrays)
          ? t.writeArray(r.id, key)
          : undefined;
      })
  });
  commands.addCommand(IDs.toggleCompare, {
    label: trans.__('Compare Run'),
    caption: trans.__('Overlay this run’s learning curve with the other compared runs'),
    isEnabled: args => {
      const t = resolve(args);
      return !!t && finished(runOf(t, args));
    },
    isToggled: args => {
      const t = resolve(args);
      const r = t ? runOf(t, args) : null;
      return !!t && !!r && t.selection.isCompared(r.id);
    },
    execute: args =>
      onRun(args, (t, r) =>
        t.selection.setCompared(
          r.id,
          typeof args.on === 'boolean' ? args.on : !t.selection.isCompared(r.id)
        )
      )
  });
  commands.addCommand(IDs.compareSetupRuns, {
    label: trans.__('Compare the Runs of Set-up'),
    caption: trans.__('Compare every finished run of the current set-up (a sweep’s values, say)'),
    isEnabled: args => {
      const t = resolve(args);
      const id = t ? setupOf(t, args) : null;
      return !!t && id !== null && t.model.runsOf(id).some(finished);
    },
    execute: args =>
      onSetup(args, (t, id) =>
        t.selection.compareOnly(
          t.model
            .runsOf(id)
            .filter(finished)
            .map(r => r.id)
        )
      )
  });
  commands.addCommand(IDs.clearComparison, {
    label: trans.__('Clear Comparison'),
    caption: trans.__('Take every run out of the comparison'),
    isEnabled: args => (resolve(args)?.selection.compared.length ?? 0) > 0,
    execute: args => resolve(args)?.selection.compareOnly([])
  });
  commands.addCommand(IDs.removeRun, {
    label: trans.__('Remove Run'),
    caption: trans.__(
      'Drop the run shown (cancelled first if it is still going); its set-up stays and can run again'
    ),
    isEnabled: args => {
      const t = resolve(args);
      return !!t && runOf(t, args) !== null;
    },
    execute: args => onRun(args, (t, r) => t.model.removeRun(r.id))
  });
}
