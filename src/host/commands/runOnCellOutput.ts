// "Run a test on this cell's table output": a notebook cell whose output is a table (CSV text, JSON records or HTML-free text).
import * as vscode from 'vscode';
import { InputError } from '../../errors';
import type { Answers } from '../flow';
import { runOnTable } from '../flow';
import type { Services } from '../services';
import { selectionRecords } from '../selectionRecords';

const MIMES = ['application/json', 'text/csv', 'text/markdown', 'text/plain'];

export function tableTextOf(cell: vscode.NotebookCell): string | undefined {
  for (const mime of MIMES) {
    for (const output of cell.outputs) {
      const item = output.items.find((i) => i.mime === mime);
      if (item) return Buffer.from(item.data).toString('utf8');
    }
  }
  return undefined;
}

export async function runOnCellOutput(services: Services, cell?: vscode.NotebookCell | { index?: number }, answers: Answers = {}): Promise<void> {
  try {
    const editor = vscode.window.activeNotebookEditor;
    const target = cell && 'outputs' in cell ? cell : editor?.notebook.cellAt(cell && typeof cell.index === 'number' ? cell.index : editor.selection.start);
    if (!target) throw new InputError(vscode.l10n.t('select a notebook cell with a table output first'), {}, 'no-cell');
    const text = tableTextOf(target);
    const name = `${vscode.workspace.asRelativePath(target.notebook.uri)}, cell ${target.index + 1}`;
    if (text === undefined) throw new InputError(vscode.l10n.t('cell {0} has no table output (expected JSON records, CSV or a markdown table)', target.index + 1), {}, 'no-table-output');
    const records = selectionRecords(text, { file: name });
    await runOnTable(services, { kind: 'records', records, description: vscode.l10n.t('output of {0}', name), documentUri: target.notebook.uri.toString() }, answers);
  } catch (e) {
    await services.reportError(e);
  }
}
