import { CommandToolbarButton, SidePanel } from '@jupyterlab/ui-components';
import type { ITranslator, TranslationBundle } from '@jupyterlab/translation';
import type { CommandRegistry } from '@lumino/commands';
import { Panel, Widget } from '@lumino/widgets';
import type { LoadedArraysModel } from '../model/loaded';
import type { SourcesModel } from '../model/sources';
import { PanelActions } from './actions';
import { perpendIcon } from './icons';
import { LoadedView } from './loaded-view';
import { SourcesView } from './sources-view';

/**
 * The Perpend side panel, a JupyterLab SidePanel: its title in the header, the commands that act
 * on the whole panel in its toolbar (bound to the same commands as the palette and menus), and
 * the views of the workbench stacked in its content.
 */
export class PerpendSidebar extends SidePanel {
  constructor(options: PerpendSidebar.IOptions) {
    super({ content: new Panel(), translator: options.translator });
    const trans = options.trans;
    this.id = 'perpend-sidebar';
    this.addClass('pp-Sidebar');
    this.title.icon = perpendIcon;
    this.title.caption = trans.__('Perpend: subspaces and adaptive filters');

    const heading = new Widget({ node: document.createElement('h2') });
    heading.addClass('pp-Sidebar-title');
    heading.node.textContent = trans.__('Perpend');
    this.header.addWidget(heading);
    for (const id of options.toolbarCommands ?? []) {
      this.toolbar.addItem(
        id,
        new CommandToolbarButton({ commands: options.commands, id, label: '' })
      );
    }

    this.actions = new PanelActions(options.loaded, options.sources, trans);
    this.sources = new SourcesView({
      model: options.sources,
      trans,
      onActivate: info => void this.actions.load(info)
    });
    this.loaded = new LoadedView({
      model: options.loaded,
      trans,
      actions: {
        save: item => void this.actions.save(item),
        removeHum: item => void this.actions.removeHum(item)
      }
    });
    this.content.addWidget(this.sources);
    this.content.addWidget(this.loaded);
  }

  readonly actions: PanelActions;
  readonly sources: SourcesView;
  readonly loaded: LoadedView;
}

export namespace PerpendSidebar {
  export interface IOptions {
    sources: SourcesModel;
    loaded: LoadedArraysModel;
    trans: TranslationBundle;
    translator?: ITranslator;
    commands: CommandRegistry;
    /** Commands shown as buttons in the panel's toolbar (icon and caption from the command). */
    toolbarCommands?: ReadonlyArray<string>;
  }
}
