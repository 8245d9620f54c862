// Living report blocks: refresh one block (CodeLens) or every block of a report, each as ONE undoable edit.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { errorMarkdown, parseReportBlocks, refreshReport, rewriteReport, type ReportBlock } from '../../report/blocks';
import { runReportBlock } from '../../savedtest/living';
import { extensionReaders, settings, type Services } from '../services';
import { errorMessage, isInstance } from '../../errors';

async function renderBlock(services: Services, doc: vscode.TextDocument, block: ReportBlock, signal: AbortSignal): Promise<string> {
  const s = settings(doc.uri);
  const outcome = await runReportBlock(block, {
    reportPath: doc.uri.fsPath,
    readers: extensionReaders,
    allowedRoot: services.workspaceRootFor(doc.uri.fsPath),
    allowOutsideRoot: s.allowPathsOutsideWorkspace,
    signal,
    format: { decimals: s.decimals },
    readText: async (file) => Buffer.from(await vscode.workspace.fs.readFile(vscode.Uri.file(file))).toString('utf8'),
  });
  await writePlotFiles(outcome.plots);
  return outcome.markdown;
}

/** Writes plot files whose drawing changed (a refresh that changes nothing writes nothing). */
export async function writePlotFiles(plots: readonly { readonly file: string; readonly svg: string }[]): Promise<void> {
  for (const plot of plots) {
    const uri = vscode.Uri.file(plot.file);
    try {
      if (Buffer.from(await vscode.workspace.fs.readFile(uri)).toString('utf8') === plot.svg) continue;
    } catch { /* not written yet */ }
    await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(plot.svg));
  }
}

/** Refreshes the blocks of a markdown document (all, or the one at `only`); returns the indexes that changed. */
export async function refreshBlocks(services: Services, uri?: vscode.Uri, only?: number): Promise<{ changed: number[]; errors: string[] } | undefined> {
  try {
    const doc = isInstance(uri, vscode.Uri) ? await vscode.workspace.openTextDocument(uri) : vscode.window.activeTextEditor?.document;
    if (!doc || doc.languageId !== 'markdown') {
      void vscode.window.showWarningMessage(vscode.l10n.t('Countercheck: open a markdown report with countercheck blocks first.'));
      return undefined;
    }
    const original = doc.getText();
    const version = doc.version;
    const outcome = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: vscode.l10n.t('Countercheck: refreshing {0}', path.basename(doc.uri.fsPath)), cancellable: true },
      async (_p, token) => {
        const abort = new AbortController();
        token.onCancellationRequested(() => abort.abort());
        if (only === undefined) return refreshReport(original, (block) => renderBlock(services, doc, block, abort.signal));
        const block = parseReportBlocks(original)[only];
        if (!block) throw new Error(vscode.l10n.t('no countercheck block number {0} in this report', only + 1));
        let markdown: string;
        let error: string | undefined;
        try {
          markdown = await renderBlock(services, doc, block, abort.signal);
        } catch (e) {
          error = errorMessage(e);
          markdown = errorMarkdown(error);
        }
        const rewritten = rewriteReport(original, [{ block, markdown }]);
        return { text: rewritten.text, blocks: [{ index: only, fenceLine: block.fenceLine, changed: rewritten.changed.includes(only), ...(error ? { error } : {}) }] };
      },
    );
    const changed = outcome.blocks.filter((b) => b.changed).map((b) => b.index);
    const errors = outcome.blocks.filter((b) => b.error).map((b) => `block at line ${b.fenceLine}: ${b.error}`);
    return await applyRefresh(services, doc, version, original, outcome.text, changed, errors);
  } catch (e) {
    await services.reportError(e);
    return undefined;
  }
}

async function applyRefresh(services: Services, doc: vscode.TextDocument, version: number, original: string, text: string, changed: number[], errors: string[]) {
  if (doc.version !== version) throw new Error(vscode.l10n.t('{0} changed while its blocks were running; nothing was written. Run the refresh again.', path.basename(doc.uri.fsPath)));
  if (text !== original) {
    const edit = new vscode.WorkspaceEdit();
    edit.replace(doc.uri, new vscode.Range(doc.positionAt(0), doc.positionAt(original.length)), text);
    await vscode.workspace.applyEdit(edit);
  }
  const blocks = parseReportBlocks(text);
  const list = changed.map((i) => vscode.l10n.t('line {0}', blocks[i]?.fenceLine ?? '?')).join(', ');
  const message = changed.length === 0 ? vscode.l10n.t('Countercheck: no result changed in {0}.', path.basename(doc.uri.fsPath)) : vscode.l10n.t('Countercheck: {0} result(s) changed in {1} (blocks at {2}).', changed.length, path.basename(doc.uri.fsPath), list);
  services.output.info(message);
  for (const e of errors) services.output.warn(e);
  if (errors.length > 0) void vscode.window.showWarningMessage(`${message} ${vscode.l10n.t('{0} block(s) could not run; see the Countercheck output.', errors.length)}`);
  else void vscode.window.showInformationMessage(message);
  return { changed, errors };
}
