/**
 * The ids of the workbench's commands, shared by the plugin that registers them
 * (`src/workbench-commands.ts`), the workbench's buttons that execute them, and the menus and
 * shortcuts of `schema/workbench.json`. Each command takes optional arguments: `workbench` (the
 * workbench panel's id; the current workbench otherwise), `setup` or `run` (the current set-up
 * or the run shown otherwise), and its own (`tool`, `key`, `on`).
 */
export namespace WorkbenchCommandIDs {
  /** A new set-up of `tool` in the editor. */
  export const newSetup = 'perpend:workbench-new-setup';
  export const editSetup = 'perpend:workbench-edit-setup';
  export const duplicateSetup = 'perpend:workbench-duplicate-setup';
  /** Asks once, then removes the set-up and its runs. */
  export const removeSetup = 'perpend:workbench-remove-setup';
  export const runSetup = 'perpend:workbench-run-setup';
  export const cancelSetup = 'perpend:workbench-cancel-setup';
  /** Following of its sources on or off (`on`), or switched over. */
  export const toggleFollow = 'perpend:workbench-toggle-follow';
  export const writeRun = 'perpend:workbench-write-run';
  /** One result array (`key`; asked for when absent). */
  export const writeArray = 'perpend:workbench-write-array';
  /** A run in or out of the comparison (`on`), or switched over. */
  export const toggleCompare = 'perpend:workbench-toggle-compare';
  /** Every finished run of the set-up into the comparison. */
  export const compareSetupRuns = 'perpend:workbench-compare-setup-runs';
  export const clearComparison = 'perpend:workbench-clear-comparison';
  export const removeRun = 'perpend:workbench-remove-run';
}
