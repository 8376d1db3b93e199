import type { JupyterFrontEnd } from '@jupyterlab/application';
import type { CodeCell } from '@jupyterlab/cells';
import type { NotebookPanel } from '@jupyterlab/notebook';
import { canHoldArray, type IOutputSnapshot } from '../model/output-source';

/**
 * Finds the output under the last context-menu event: the node hit, the cell that holds it and
 * the output's model. Returns null when the menu was not opened on an output of `panel`.
 */
export function outputUnderContextMenu(
  app: JupyterFrontEnd,
  panel: NotebookPanel | null
): IOutputSnapshot | null {
  const node = app.contextMenuHitTest(n => n.classList.contains('jp-OutputArea-child'));
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
  return Private.snapshot(cell, index, children.indexOf(node));
}

/**
 * The array output of the notebook's active cell: its result when it has one, else its first
 * display that can hold an array. Null when the active cell has none.
 */
export function activeCellOutput(panel: NotebookPanel | null): IOutputSnapshot | null {
  const cell = panel?.content.activeCell;
  if (!panel || !cell || cell.model.type !== 'code') {
    return null;
  }
  const index = panel.content.widgets.indexOf(cell);
  const code = cell as CodeCell;
  let best: IOutputSnapshot | null = null;
  for (let i = 0; i < code.model.outputs.length; i++) {
    const snap = Private.snapshot(code, index, i);
    if (snap && canHoldArray(snap)) {
      if (snap.type === 'execute_result') {
        return snap;
      }
      best ??= snap;
    }
  }
  return best;
}

namespace Private {
  export function snapshot(
    cell: CodeCell,
    index: number,
    position: number
  ): IOutputSnapshot | null {
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
}
