// "Run a test on this cell's table output": a notebook cell whose output is a table (CSV text, JSON records or HTML-free text).
import * as vscode from 'vscode';
import { InputError } from '../../errors';
import type { Answers } from '../flow';
import { runOnTable } from '../flow';
import type { Services } from '../services';
import { sourceFromNotebookOutput } from '../selectionRecords';

// In order of preference: the most structured form a cell offers.
const MIMES = ['application/json', 'text/csv', 'text/tab-separated-values', 'text/html', 'text/markdown', 'text/plain'];

export function tableOutputOf(cell: vscode.NotebookCell): { mime: string; text: string } | undefined {
  for (const mime of MIMES) {
    for (const output of cell.outputs) {
      const item = output.items.find((i) => i.mime === mime);
      if (item) return { mime, text: new TextDecoder().decode(item.data) };
    }
  }
  return undefined;
}

export async function runOnCellOutput(services: Services, cell?: vscode.NotebookCell | { index?: number }, answers: Answers = {}): Promise<void> {
  try {
    const editor = vscode.window.activeNotebookEditor;
    const target = cell && 'outputs' in cell ? cell : editor?.notebook.cellAt(cell && typeof cell.index === 'number' ? cell.index : editor.selection.start);
    if (!target) throw new InputError(vscode.l10n.t('select a notebook cell with a table output first'), {}, 'no-cell');
    const output = tableOutputOf(target);
    const name = `${vscode.workspace.asRelativePath(target.notebook.uri)}, cell ${target.index + 1}`;
    if (output === undefined) throw new InputError(vscode.l10n.t('cell {0} has no table output (expected JSON, CSV, an HTML or markdown table)', target.index + 1), { file: target.notebook.uri.fsPath }, 'no-table-output');
    const source = sourceFromNotebookOutput(output.mime, output.text, { file: name, description: vscode.l10n.t('output of {0}', name), documentUri: target.notebook.uri.toString() });
    await runOnTable(services, source, answers);
  } catch (e) {
    await services.reportError(e);
  }
}
