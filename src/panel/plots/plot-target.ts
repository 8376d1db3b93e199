/**
 * What a plot tab shows (a view of one run, or a comparison of runs), read from a command's
 * arguments, named for the tab, and whether it still has runs to show.
 */
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { COMPARE_KINDS, compareKindLabel, type CompareKind } from './compare-overlays';
import { viewLabel, type ViewKind } from './views';

/** What a plot tab shows: a view of one run, or a comparison of runs. */
export type PlotTarget =
  { runId: string; view: ViewKind } | { runIds: ReadonlyArray<string>; compare: CompareKind };

/**
 * A target from a command's arguments (`runId` and `view`, or `runIds` and `compare`), or null
 * when they name none.
 */
export function plotTargetOf(args: Readonly<Record<string, unknown>>): PlotTarget | null {
  if (typeof args.runId === 'string' && typeof args.view === 'string') {
    return { runId: args.runId, view: args.view as ViewKind };
  }
  if (
    Array.isArray(args.runIds) &&
    args.runIds.every(id => typeof id === 'string') &&
    typeof args.compare === 'string' &&
    (COMPARE_KINDS as ReadonlyArray<string>).includes(args.compare)
  ) {
    return { runIds: args.runIds as string[], compare: args.compare as CompareKind };
  }
  return null;
}

/** True when the runs a target shows are still there (one at least, for a comparison). */
export function targetAlive(target: PlotTarget, runs: ReadonlyArray<Run>): boolean {
  const ids = new Set(runs.map(r => r.id));
  return 'runId' in target ? ids.has(target.runId) : target.runIds.some(id => ids.has(id));
}

/** The tab's label: the run and the view, or what the comparison overlays. */
export function targetLabel(
  trans: Trans,
  target: PlotTarget,
  runs: ReadonlyArray<Run>
): { label: string; caption: string } {
  if ('runId' in target) {
    const run = runs.find(r => r.id === target.runId);
    const name = run?.label ?? target.runId;
    // A view named by a command that this build does not know keeps its own name.
    const view = (viewLabel(trans, target.view) as string | undefined) ?? target.view;
    return {
      label: trans.__('%1 · %2', view, name),
      caption: trans.__('%1 of the run %2', view, name)
    };
  }
  return {
    label: trans.__('Comparison · %1', compareKindLabel(trans, target.compare)),
    caption: trans.__(
      '%1 of %2 runs compared',
      compareKindLabel(trans, target.compare),
      target.runIds.length
    )
  };
}
