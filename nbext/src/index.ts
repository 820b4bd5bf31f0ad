/**
 * freeladder-cells: the browser half of freeladder's cell export.
 *
 * The kernel (freeladder_lab.export) opens a comm on the target named below and sends the cells
 * of a worked calculation together with a marker: the model id of the widget that asked.  This
 * plugin inserts the cells directly below the notebook cell whose output holds that widget (or,
 * when no output holds it, below the active cell), in one transaction of the notebook's shared
 * model, so that one undo removes them all.  Existing cells are never replaced or reordered.  It
 * answers on the same comm with what it inserted, or with why it inserted nothing.
 *
 * A message ``{ask: "path", marker}`` instead asks where the notebook showing the widget is
 * now (its path changes when the notebook is renamed; the kernel only knows the name it was
 * started with): the answer is ``{status: "path", path}``.
 */
import {
  JupyterFrontEnd,
  JupyterFrontEndPlugin
} from '@jupyterlab/application';
import { INotebookTracker, NotebookPanel } from '@jupyterlab/notebook';
import { Kernel, KernelMessage } from '@jupyterlab/services';

/** The comm target the kernel side opens; a name of our own. */
export const COMM_TARGET = 'freeladder.cells.v1';

/** The output MIME type under which a displayed widget names its model. */
const WIDGET_MIME = 'application/vnd.jupyter.widget-view+json';

/** The CSS class prefix the kernel side gives its panel, for widgets nested in others. */
const MARKER_CLASS = 'freeladder-export-';

/** One cell as the kernel sends it. */
interface IOutgoingCell {
  kind: 'markdown' | 'code';
  source: string;
}

/** Comm ids already handled: two views of one notebook share a kernel and see one comm. */
const handled = new Set<string>();

/** Read and check the cells of a comm-open message; throws with a reason when malformed. */
function readCells(data: unknown): IOutgoingCell[] {
  const cells = (data as { cells?: unknown }).cells;
  if (!Array.isArray(cells) || cells.length === 0) {
    throw new Error('the message holds no list of cells');
  }
  return cells.map((cell: unknown, i: number) => {
    const { kind, source } = cell as { kind?: unknown; source?: unknown };
    if ((kind !== 'markdown' && kind !== 'code') || typeof source !== 'string') {
      throw new Error(`cell ${i}: needs kind "markdown" or "code" and a text source`);
    }
    return { kind, source };
  });
}

/** Index of the cell whose outputs show the widget ``marker``, or -1. */
function findAnchor(panel: NotebookPanel, marker: string): number {
  const model = panel.content.model;
  if (!model || !marker) {
    return -1;
  }
  const cells = model.sharedModel.cells;
  for (let i = 0; i < cells.length; i++) {
    const json = cells[i].toJSON() as { outputs?: unknown };
    const outputs = Array.isArray(json.outputs) ? json.outputs : [];
    for (const output of outputs) {
      const data = (output as { data?: Record<string, unknown> }).data;
      const view = data?.[WIDGET_MIME] as { model_id?: unknown } | undefined;
      if (view?.model_id === marker) {
        return i;
      }
    }
  }
  // The panel may be nested inside another widget: look for its marker class in the views.
  const widgets = panel.content.widgets;
  for (let i = 0; i < widgets.length; i++) {
    if (widgets[i].node.querySelector(`.${CSS.escape(MARKER_CLASS + marker)}`)) {
      return i;
    }
  }
  return -1;
}

/** Insert ``cells`` below the anchor cell of ``panel`` in one undoable transaction. */
function insertBelow(
  panel: NotebookPanel,
  marker: string,
  cells: IOutgoingCell[],
  mayUseActiveCell: boolean
): { index: number; anchor: string } | null {
  const model = panel.content.model;
  if (!model) {
    return null;
  }
  let anchor = 'widget';
  let at = findAnchor(panel, marker);
  if (at < 0) {
    if (!mayUseActiveCell) {
      return null;
    }
    anchor = 'active cell';
    at = panel.content.activeCellIndex;
  }
  const index = Math.min(at + 1, model.sharedModel.cells.length);
  const shared = model.sharedModel;
  const undo = (shared as { undoManager?: { stopCapturing(): void } | null })
    .undoManager;
  undo?.stopCapturing();
  shared.transact(() => {
    shared.insertCells(
      index,
      cells.map(cell =>
        cell.kind === 'code'
          ? {
              cell_type: 'code' as const,
              source: cell.source,
              metadata: {},
              outputs: [],
              execution_count: null
            }
          : { cell_type: 'markdown' as const, source: cell.source, metadata: {} }
      )
    );
  });
  undo?.stopCapturing();
  return { index, anchor };
}

/** Register the comm target on ``kernel`` for the notebook shown in ``panel``. */
function listen(
  panel: NotebookPanel,
  kernel: Kernel.IKernelConnection | null,
  tracker: INotebookTracker
): void {
  if (!kernel) {
    return;
  }
  kernel.registerCommTarget(
    COMM_TARGET,
    (comm: Kernel.IComm, msg: KernelMessage.ICommOpenMsg) => {
      if (handled.has(comm.commId) || panel.isDisposed) {
        return;
      }
      const data = msg.content.data as { marker?: unknown; ask?: unknown };
      const marker = typeof data.marker === 'string' ? data.marker : '';
      if (data.ask === 'path') {
        // the notebook that shows the widget answers (or the one in front, when none does)
        if (findAnchor(panel, marker) < 0 && tracker.currentWidget !== panel) {
          return;
        }
        handled.add(comm.commId);
        comm.send({ status: 'path', path: panel.context.path });
        comm.close();
        return;
      }
      let cells: IOutgoingCell[];
      try {
        cells = readCells(msg.content.data);
      } catch (err) {
        handled.add(comm.commId);
        comm.send({ status: 'refused', reason: String((err as Error).message) });
        comm.close();
        return;
      }
      // Only the notebook in front may fall back to its active cell when no output holds the
      // widget; another notebook on the same kernel stays silent.
      const inFront = tracker.currentWidget === panel;
      const done = insertBelow(panel, marker, cells, inFront);
      if (!done) {
        return;
      }
      handled.add(comm.commId);
      comm.send({
        status: 'inserted',
        count: cells.length,
        index: done.index,
        anchor: done.anchor,
        path: panel.context.path
      });
      comm.close();
    }
  );
}

/** Follow one notebook panel: its current kernel and every later one. */
function follow(panel: NotebookPanel, tracker: INotebookTracker): void {
  const context = panel.sessionContext;
  context.kernelChanged.connect((_, change) => listen(panel, change.newValue, tracker));
  listen(panel, context.session?.kernel ?? null, tracker);
}

const plugin: JupyterFrontEndPlugin<void> = {
  id: 'freeladder-cells:insert',
  description: 'Inserts the cells a freeladder kernel sends below the widget that sent them.',
  autoStart: true,
  optional: [INotebookTracker],
  activate: (_app: JupyterFrontEnd, tracker: INotebookTracker | null) => {
    if (!tracker) {
      return; // a page without notebooks (the file browser of Notebook 7)
    }
    tracker.forEach(panel => follow(panel, tracker));
    tracker.widgetAdded.connect((_, panel) => follow(panel, tracker));
  }
};

export default plugin;
