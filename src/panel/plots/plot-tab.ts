/**
 * A view of a run, or a comparison, in a main-area tab of its own for a full-size look. The tab
 * holds a RunPlots or ComparePlots of its own on the same runs (so it follows the theme, its own
 * size, and draws nothing while hidden), and closes itself when what it shows goes away: the
 * run (or every compared run) removed, or the workbench it came from closed.
 */
import { MainAreaWidget } from '@jupyterlab/apputils';
import type { ISignal } from '@lumino/signaling';
import type { Widget } from '@lumino/widgets';
import type { Trans } from '../../model/workbench/rules';
import type { Run } from '../../model/workbench/runs';
import { perpendIcon } from '../icons';
import { ComparePlots } from './compare-plots';
import { COMPARE_KINDS, compareKindLabel, type CompareKind } from './compare-overlays';
import type { PlotPane } from './plot-pane';
import type { LoadPlotly } from './plotly';
import type { IRunSource } from './run-source';
import { RunPlots } from './run-plots';
import type { PlotSettings } from './settings';
import { viewLabel, type ViewKind } from './views';

/** What a plot tab shows: a view of one run, or a comparison of runs. */
export type PlotTarget =
  { runId: string; view: ViewKind } | { runIds: ReadonlyArray<string>; compare: CompareKind };

/** A tab's content: the plots widget it holds. */
export type PlotTabContent = RunPlots | ComparePlots;

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
    return {
      label: trans.__('%1 · %2', viewLabel(trans, target.view), name),
      caption: trans.__('%1 of the run %2', viewLabel(trans, target.view), name)
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

/** Makes the tab (the caller adds it to the shell). */
export function createPlotTab(options: PlotTab.IOptions): MainAreaWidget<PlotTabContent> {
  const { trans, model, target } = options;
  const common = {
    trans,
    model,
    loadPlotly: options.loadPlotly,
    settings: options.settings,
    themeChanged: options.themeChanged,
    writeData: options.writeData
  };
  let content: PlotTabContent;
  if ('runId' in target) {
    const plots = new RunPlots(common);
    plots.view = target.view;
    plots.runId = target.runId;
    content = plots;
  } else {
    const plots = new ComparePlots(common);
    plots.kind = target.compare;
    plots.runIds = target.runIds;
    content = plots;
  }
  const widget = new MainAreaWidget({ content });
  widget.addClass('pp-PlotTab');
  widget.content.addClass('pp-PlotTab-content');
  const { label, caption } = targetLabel(trans, target, model.runs);
  widget.title.label = label;
  widget.title.caption = caption;
  widget.title.icon = perpendIcon;
  widget.title.closable = true;
  const onRun = (): void => {
    if (!targetAlive(target, model.runs)) {
      widget.dispose();
    }
  };
  const onOwnerGone = (): void => widget.dispose();
  model.runChanged.connect(onRun);
  options.owner?.disposed.connect(onOwnerGone);
  widget.disposed.connect(() => {
    model.runChanged.disconnect(onRun);
    options.owner?.disposed.disconnect(onOwnerGone);
  });
  return widget;
}

export namespace PlotTab {
  export interface IOptions {
    trans: Trans;
    /** The runs (the workbench's model). */
    model: IRunSource;
    target: PlotTarget;
    /** The workbench the view came from: the tab closes with it. */
    owner?: Widget;
    loadPlotly?: LoadPlotly;
    settings?: Partial<PlotSettings>;
    themeChanged?: ISignal<unknown, unknown>;
    writeData?: PlotPane.WriteData;
  }
}
