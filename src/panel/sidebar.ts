import { Panel, Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { LoadedArraysModel } from '../model/loaded';
import type { SourcesModel } from '../model/sources';
import { PanelActions } from './actions';
import { perpendIcon } from './icons';
import { LoadedView } from './loaded-view';
import { SourcesView } from './sources-view';

/** The Perpend side panel: a heading and the views of the workbench, stacked. */
export class PerpendSidebar extends Panel {
  constructor(options: PerpendSidebar.IOptions) {
    super();
    this.id = 'perpend-sidebar';
    this.addClass('pp-Sidebar');
    this.title.icon = perpendIcon;
    this.title.caption = options.trans.__('Perpend: subspaces and adaptive filters');
    const heading = new Widget();
    heading.addClass('pp-Sidebar-heading');
    const h2 = document.createElement('h2');
    h2.textContent = options.trans.__('Perpend');
    heading.node.append(h2);
    const actions = new PanelActions(options.loaded, options.sources, options.trans);
    this.sources = new SourcesView({
      model: options.sources,
      trans: options.trans,
      onActivate: info => void options.loaded.loadFromKernel(info)
    });
    this.loaded = new LoadedView({
      model: options.loaded,
      trans: options.trans,
      actions: {
        save: item => void actions.save(item),
        removeHum: item => void actions.removeHum(item)
      }
    });
    this.addWidget(heading);
    this.addWidget(this.sources);
    this.addWidget(this.loaded);
  }

  readonly sources: SourcesView;
  readonly loaded: LoadedView;
}

export namespace PerpendSidebar {
  export interface IOptions {
    sources: SourcesModel;
    loaded: LoadedArraysModel;
    trans: TranslationBundle;
  }
}
