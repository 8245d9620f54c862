// "Test This Data File…": explorer or editor on a data file. The file's reader in the reader table
// (src/data/readers.ts) shows it to the planner (a delimited file's first records, a JSON file whole); the
// one wizard does the rest.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { fileReaderFor } from '../../data/readers';
import { isInstance } from '../../errors';
import type { Offer } from '../../planner/offer';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

/** The file as its reader in the reader table shows it to the planner. */
async function offerForFile(file: string, name: string): Promise<Offer> {
  const reader = fileReaderFor(file);
  const { data, complete } = await reader.view(file, name, false);
  if (data.kind !== 'records') return { kind: 'counted', data, description: name };
  const readAll = async () => {
    const all = await reader.view(file, name, true);
    return all.data.kind === 'records' ? all.data.records : data.records;
  };
  return { kind: 'records', records: data.records, description: name, file: { path: file, complete, readAll } };
}

export async function runOnFile(services: Services, uri?: vscode.Uri, answers: Answers = {}): Promise<void> {
  const target = isInstance(uri, vscode.Uri) ? uri : vscode.window.activeTextEditor?.document.uri;
  if (!target || target.scheme !== 'file') {
    void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: open or select a CSV, TSV or JSON file first.'));
    return;
  }
  const name = vscode.workspace.asRelativePath(target);
  let offer: Offer;
  try {
    offer = await offerForFile(target.fsPath, name);
  } catch (e) {
    await services.reportError(e);
    return;
  }
  await runWizard(services, offer, answers, { key: target.fsPath, specFolder: path.dirname(target.fsPath), label: name, documentUri: /\.json$/i.test(target.fsPath) ? target.toString() : undefined });
}
