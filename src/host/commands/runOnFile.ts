// "Run a test on this file": explorer or editor on a CSV/TSV/JSON file, an Excel workbook or a Parquet file.
import { open } from 'node:fs/promises';
import * as vscode from 'vscode';
import { parseDelimited } from '../../data/delimited';
import { previewParquet } from '../../data/parquet';
import { previewWorkbook, workbookChoices, type WorkbookSelection } from '../../data/xlsx';
import type { Answers } from '../flow';
import { runOnTable } from '../flow';
import type { Services } from '../services';
import { sourceFromText } from '../selectionRecords';
import { isInstance } from '../../errors';

const PREVIEW_BYTES = 64 * 1024;
/** Rows of a workbook or Parquet file read for column profiles (about what 64 KB of CSV holds). */
const PREVIEW_ROWS = 2000;

/** The sheet (or defined name, or table) of a workbook to read: asked when there is more than one. */
async function pickWorkbookPart(file: string, name: string, answers: Answers): Promise<WorkbookSelection | undefined> {
  if (answers.sheet !== undefined || answers.range !== undefined)
    return { ...(answers.sheet !== undefined ? { sheet: answers.sheet } : {}), ...(answers.range !== undefined ? { range: answers.range } : {}) };
  const choices = await workbookChoices(file, name);
  if (choices.length === 1) return { sheet: choices[0].sheet };
  const kinds = { sheet: vscode.l10n.t('sheet'), name: vscode.l10n.t('defined name'), table: vscode.l10n.t('table') };
  const picked = await vscode.window.showQuickPick(
    choices.map((c) => ({ label: c.label, description: c.detail ? `${kinds[c.kind]} · ${c.detail}` : kinds[c.kind], choice: c })),
    { title: vscode.l10n.t('Countercheck: which part of {0}?', name), placeHolder: vscode.l10n.t('Pick a sheet, a defined name or a table; its first row holds the column names') },
  );
  if (!picked) return undefined;
  const { kind, sheet, range } = picked.choice;
  return kind === 'sheet' || range === undefined ? { sheet } : { sheet, range };
}

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
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: open or select a CSV, TSV, JSON, Excel (.xlsx) or Parquet file first.'));
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
    const name = vscode.workspace.asRelativePath(target);
    if (/\.xlsx$/i.test(target.fsPath)) {
      const selection = await pickWorkbookPart(target.fsPath, name, answers);
      if (!selection) return;
      const { records, complete } = await previewWorkbook(target.fsPath, selection, PREVIEW_ROWS, name);
      await runOnTable(services, { kind: 'file', file: target.fsPath, preview: records, complete, selection }, answers);
      return;
    }
    if (/\.parquet$/i.test(target.fsPath)) {
      const { records, complete } = await previewParquet(target.fsPath, PREVIEW_ROWS, name);
      await runOnTable(services, { kind: 'file', file: target.fsPath, preview: records, complete }, answers);
      return;
    }
    const { records, complete } = await preview(target.fsPath);
    await runOnTable(services, { kind: 'file', file: target.fsPath, preview: records, complete }, answers);
  } catch (e) {
    await services.reportError(e);
  }
}
