// "Run a test on the selection": a CSV range, a JSON block, a markdown table or a notebook cell's text.
import * as vscode from 'vscode';
import type { Answers } from '../flow';
import { runOnTable } from '../flow';
import type { Services } from '../services';
import { sourceFromText } from '../selectionRecords';

export async function runOnSelection(services: Services, answers: Answers = {}): Promise<void> {
  const editor = vscode.window.activeTextEditor;
  if (!editor) {
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: select a table in an editor first.'));
    return;
  }
  try {
    const doc = editor.document;
    const range = editor.selection.isEmpty ? new vscode.Range(0, 0, doc.lineCount, 0) : new vscode.Range(editor.selection.start.line, 0, editor.selection.end.line, editor.selection.end.character);
    const text = doc.getText(range);
    const name = vscode.workspace.asRelativePath(doc.uri);
    const firstLine = range.start.line + 1;
    const description = vscode.l10n.t('selection in {0}, lines {1}–{2}', name, firstLine, range.end.line + 1);
    const source = sourceFromText(text, { file: doc.uri.scheme === 'file' ? doc.uri.fsPath : name, firstLine, description, documentUri: doc.uri.toString() });
    await runOnTable(services, source, answers);
  } catch (e) {
    await services.reportError(e);
  }
}
