// "Test This Data File…": explorer or editor on a CSV/TSV/JSON file. The data layer reads the file's first
// records (a JSON file whole); the one wizard does the rest.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { readDelimitedPreview, readDelimitedRecords } from '../../data/preview';
import { isInstance } from '../../errors';
import { offerFromText, type Offer } from '../../planner/offer';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

async function offerForFile(file: string, name: string, documentUri: string): Promise<Offer> {
  if (/\.json$/i.test(file)) {
    // A JSON data file is small by nature: read it whole.
    const text = Buffer.from(await vscode.workspace.fs.readFile(vscode.Uri.parse(documentUri))).toString('utf8');
    return offerFromText(text, { file, description: name });
  }
  const { records, complete } = await readDelimitedPreview(file, name);
  return { kind: 'records', records, description: name, file: { path: file, complete, readAll: () => readDelimitedRecords(file, name) } };
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
    offer = await offerForFile(target.fsPath, name, target.toString());
  } catch (e) {
    await services.reportError(e);
    return;
  }
  await runWizard(services, offer, answers, { key: target.fsPath, specFolder: path.dirname(target.fsPath), label: name, documentUri: /\.json$/i.test(target.fsPath) ? target.toString() : undefined });
}
