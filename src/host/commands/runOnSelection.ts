// "Test the Selected Table…": a CSV range, a JSON block, a markdown table or a notebook cell's text.
import * as vscode from 'vscode';
import { offerFromText, type Offer } from '../../planner/offer';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

export async function runOnSelection(services: Services, answers: Answers = {}): Promise<void> {
  const editor = vscode.window.activeTextEditor;
  if (!editor) {
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: select a table in an editor first.'));
    return;
  }
  const doc = editor.document;
  const range = editor.selection.isEmpty ? new vscode.Range(0, 0, doc.lineCount, 0) : new vscode.Range(editor.selection.start.line, 0, editor.selection.end.line, editor.selection.end.character);
  const name = vscode.workspace.asRelativePath(doc.uri);
  const firstLine = range.start.line + 1;
  const description = vscode.l10n.t('selection in {0}, lines {1}–{2}', name, firstLine, range.end.line + 1);
  let offer: Offer;
  try {
    offer = offerFromText(doc.getText(range), { file: doc.uri.scheme === 'file' ? doc.uri.fsPath : name, firstLine, description });
  } catch (e) {
    await services.reportError(e);
    return;
  }
  await runWizard(services, offer, answers, { key: description, specFolder: services.workspaceRootFor(doc.uri.scheme === 'file' ? doc.uri.fsPath : ''), label: description, documentUri: doc.uri.toString() });
}
