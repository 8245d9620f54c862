// "Test This Cell's Table Output…": a notebook cell whose output is a table (JSON, CSV, HTML, markdown or text).
import * as vscode from 'vscode';
import { InputError } from '../../errors';
import { offerFromNotebookOutput, type Offer } from '../../planner/offer';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

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
  let offer: Offer;
  let target: vscode.NotebookCell | undefined;
  try {
    const editor = vscode.window.activeNotebookEditor;
    target = cell && 'outputs' in cell ? cell : editor?.notebook.cellAt(cell && typeof cell.index === 'number' ? cell.index : editor.selection.start);
    if (!target) throw new InputError(vscode.l10n.t('select a notebook cell with a table output first'), {}, 'no-cell');
    const output = tableOutputOf(target);
    const name = `${vscode.workspace.asRelativePath(target.notebook.uri)}, cell ${target.index + 1}`;
    if (output === undefined) throw new InputError(vscode.l10n.t('cell {0} has no table output (expected JSON, CSV, an HTML or markdown table)', target.index + 1), { file: target.notebook.uri.fsPath }, 'no-table-output');
    offer = offerFromNotebookOutput(output.mime, output.text, { file: name, description: vscode.l10n.t('output of {0}', name) });
  } catch (e) {
    await services.reportError(e);
    return;
  }
  await runWizard(services, offer, answers, { key: offer.description, specFolder: services.workspaceRootFor(target.notebook.uri.fsPath), label: offer.description, documentUri: target.notebook.uri.toString() });
}
