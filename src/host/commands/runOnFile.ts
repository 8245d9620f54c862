// "Run a test on this file": explorer or editor on a CSV/TSV/JSON file.
import { open } from 'node:fs/promises';
import * as vscode from 'vscode';
import { parseDelimited } from '../../data/delimited';
import type { Answers } from '../flow';
import { runOnTable } from '../flow';
import type { Services } from '../services';
import { sourceFromText } from '../selectionRecords';
import { isInstance } from '../../errors';

const PREVIEW_BYTES = 64 * 1024;

/** The first records of a file (up to 64 KB, cut at a line end), for column profiles and previews. */
async function preview(file: string) {
  const handle = await open(file, 'r');
  try {
    const buf = new Uint8Array(PREVIEW_BYTES);
    const { bytesRead } = await handle.read(buf, 0, PREVIEW_BYTES, 0);
    let text = new TextDecoder().decode(buf.subarray(0, bytesRead));
    const complete = bytesRead < PREVIEW_BYTES;
    if (!complete) text = text.slice(0, text.lastIndexOf('\n') + 1);
    return { records: parseDelimited(text, { file: vscode.workspace.asRelativePath(file) }), complete };
  } finally {
    await handle.close();
  }
}

export async function runOnFile(services: Services, uri?: vscode.Uri, answers: Answers = {}): Promise<void> {
  const target = isInstance(uri, vscode.Uri) ? uri : vscode.window.activeTextEditor?.document.uri;
  if (!target || target.scheme !== 'file') {
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: open or select a CSV, TSV or JSON file first.'));
    return;
  }
  try {
    if (/\.json$/i.test(target.fsPath)) {
      // A JSON data file is small by nature: read it whole and run on its records.
      const text = Buffer.from(await vscode.workspace.fs.readFile(target)).toString('utf8');
      const name = vscode.workspace.asRelativePath(target);
      await runOnTable(services, sourceFromText(text, { file: target.fsPath, description: name, documentUri: target.toString() }), answers);
      return;
    }
    const { records, complete } = await preview(target.fsPath);
    await runOnTable(services, { kind: 'file', file: target.fsPath, preview: records, complete }, answers);
  } catch (e) {
    await services.reportError(e);
  }
}
