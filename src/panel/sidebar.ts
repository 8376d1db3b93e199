import { Panel, Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import type { SourcesModel } from '../model/sources';
import { perpendIcon } from './icons';
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
    this.sources = new SourcesView({ model: options.sources, trans: options.trans });
    this.addWidget(heading);
    this.addWidget(this.sources);
  }

  readonly sources: SourcesView;
}

export namespace PerpendSidebar {
  export interface IOptions {
    sources: SourcesModel;
    trans: TranslationBundle;
  }
}
