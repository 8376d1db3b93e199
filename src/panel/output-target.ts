import type { JupyterFrontEnd } from '@jupyterlab/application';
import type { CodeCell } from '@jupyterlab/cells';
import type { INotebookTracker } from '@jupyterlab/notebook';

/** The cell output a context menu was opened on, as the notebook's model holds it. */
export interface IOutputTarget {
  cellId: string;
  /** 1-based position of the cell in the notebook, for labels. */
  cellIndex: number;
  /** 'execute_result', 'display_data', 'stream', 'error'. */
  type: string;
  executionCount: number | null;
  /** The output's MIME bundle (stream text is given as text/plain). */
  data: Record<string, unknown>;
}

/** CSS selector of a single output in a notebook's output area. */
export const OUTPUT_SELECTOR = '.jp-Notebook .jp-OutputArea-child';

/**
 * Finds the output under the last context-menu event: the node hit, the cell that holds it and
 * the output's model. Returns null when the menu was not opened on a notebook output.
 */
export function outputUnderContextMenu(
  app: JupyterFrontEnd,
  tracker: INotebookTracker
): IOutputTarget | null {
  const node = app.contextMenuHitTest(n => n.classList.contains('jp-OutputArea-child'));
  const panel = tracker.currentWidget;
  if (!node || !panel) {
    return null;
  }
  const widgets = panel.content.widgets;
  const index = widgets.findIndex(c => c.node.contains(node));
  if (index < 0 || widgets[index].model.type !== 'code') {
    return null;
  }
  const cell = widgets[index] as CodeCell;
  const children = Array.from(cell.outputArea.node.children).filter(c =>
    c.classList.contains('jp-OutputArea-child')
  );
  const position = children.indexOf(node);
  if (position < 0 || position >= cell.model.outputs.length) {
    return null;
  }
  const output = cell.model.outputs.get(position);
  const json = output.toJSON() as { output_type: string; text?: string | string[] };
  const data: Record<string, unknown> = { ...(output.data as Record<string, unknown>) };
  if (json.output_type === 'stream' && json.text !== undefined) {
    data['text/plain'] = Array.isArray(json.text) ? json.text.join('') : json.text;
  }
  return {
    cellId: cell.model.id,
    cellIndex: index + 1,
    type: json.output_type,
    executionCount: output.executionCount ?? null,
    data
  };
}
