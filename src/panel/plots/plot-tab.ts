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
import { perpendIcon } from '../icons';
import { ComparePlots } from './compare-plots';
import type { PlotPane } from './plot-pane';
import type { PlotCompute } from './compute';
import type { LoadPlotly } from './plotly';
import type { IRunSource } from './run-source';
import { RunPlots } from './run-plots';
import type { PlotSettings } from './settings';
import { targetAlive, targetLabel, type PlotTarget } from './plot-target';

export type { PlotTarget } from './plot-target';
export { plotTargetOf } from './plot-target';

/** A tab's content: the plots widget it holds. */
export type PlotTabContent = RunPlots | ComparePlots;

/** Makes the tab (the caller adds it to the shell). */
export function createPlotTab(options: PlotTab.IOptions): MainAreaWidget<PlotTabContent> {
  const { trans, model, target } = options;
  const common = {
    trans,
    model,
    loadPlotly: options.loadPlotly,
    settings: options.settings,
    themeChanged: options.themeChanged,
    writeData: options.writeData,
    compute: options.compute
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
    /** Where the long estimates run (the workbench's plot worker; default the main thread). */
    compute?: PlotCompute;
  }
}
