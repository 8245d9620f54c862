// "Test This Data File…": explorer or editor on a data file. The file's reader in the reader table
// (src/data/readers.ts) shows it to the planner (a delimited file's first records, a JSON file whole); the
// one wizard does the rest.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { fileReaderFor, type FilePart, type FileReaderEntry } from '../../data/readers';
import { isInstance } from '../../errors';
import type { Offer } from '../../planner/offer';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

/** A file of several tables (a workbook): which one, from the answers or a QuickPick. Undefined: cancelled. */
async function pickPart(reader: FileReaderEntry, file: string, name: string, answers: Answers): Promise<FilePart['source'] | undefined | null> {
  if (!reader.parts) return null;
  if (typeof answers.sheet === 'string' || typeof answers.range === 'string')
    return { ...(typeof answers.sheet === 'string' ? { sheet: answers.sheet } : {}), ...(typeof answers.range === 'string' ? { range: answers.range } : {}) };
  const parts = await reader.parts(file, name);
  if (parts.length === 1) return parts[0].source;
  const picked = await vscode.window.showQuickPick(
    parts.map((p) => ({ label: p.label, description: p.detail, part: p })),
    { title: vscode.l10n.t('Countercheck: which part of {0}?', name), placeHolder: vscode.l10n.t('Pick a sheet, a defined name or a table; its first row holds the column names') },
  );
  return picked?.part.source;
}

/** The file as its reader in the reader table shows it to the planner. */
async function offerForFile(file: string, name: string, answers: Answers): Promise<Offer | undefined> {
  const reader = fileReaderFor(file);
  const part = await pickPart(reader, file, name, answers);
  if (part === undefined) return undefined;
  const source = part ?? undefined;
  const { data, complete } = await reader.view(file, name, false, source);
  if (data.kind !== 'records') return { kind: 'counted', data, description: name };
  const readAll = async () => {
    const all = await reader.view(file, name, true, source);
    return all.data.kind === 'records' ? all.data.records : data.records;
  };
  return { kind: 'records', records: data.records, description: name, file: { path: file, complete, readAll, ...(source ? { source } : {}) } };
}

export async function runOnFile(services: Services, uri?: vscode.Uri, answers: Answers = {}): Promise<void> {
  const target = isInstance(uri, vscode.Uri) ? uri : vscode.window.activeTextEditor?.document.uri;
  if (!target || target.scheme !== 'file') {
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: open or select a data file (CSV, TSV, JSON, markdown, Excel workbook or Parquet) first.'));
    return;
  }
  const name = vscode.workspace.asRelativePath(target);
  let offer: Offer | undefined;
  try {
    offer = await offerForFile(target.fsPath, name, answers);
  } catch (e) {
    await services.reportError(e);
    return;
  }
  if (!offer) return;
  await runWizard(services, offer, answers, { key: target.fsPath, specFolder: path.dirname(target.fsPath), label: name, documentUri: /\.json$/i.test(target.fsPath) ? target.toString() : undefined });
}
