// Saved tests in the Testing view, grouped by folder. Running one re-runs it and compares with the
// recorded result: data changed or result differs is a failure whose message is the comparison.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { describeReview } from '../savedtest/review';
import { reviewComparison, reviewSpec, SPEC_GLOB } from './commands/savedSpecs';
import { comparisonDiffTexts } from '../report/comparison';
import { settings, type Services } from './services';

export interface SavedTests {
  readonly controller: vscode.TestController;
  readonly profile: vscode.TestRunProfile;
  /** Status of the last run of each spec, by URI (for diagnostics and tests). */
  readonly outcomes: Map<string, { status: string; message: string }>;
}

export function registerTesting(services: Services): SavedTests {
  const outcomes = new Map<string, { status: string; message: string }>();
  const controller = vscode.tests.createTestController('countercheck.savedTests', vscode.l10n.t('Countercheck saved tests'));
  const folderItem = (uri: vscode.Uri): vscode.TestItemCollection => {
    const dir = path.posix.dirname(vscode.workspace.asRelativePath(uri, false));
    const rel = dir === '.' ? vscode.workspace.getWorkspaceFolder(uri)?.name ?? '.' : dir;
    const id = `folder:${rel}`;
    let folder = controller.items.get(id);
    if (!folder) {
      folder = controller.createTestItem(id, rel);
      controller.items.add(folder);
    }
    return folder.children;
  };
  const add = (uri: vscode.Uri) => {
    const item = controller.createTestItem(uri.toString(), path.basename(uri.fsPath, '.countercheck.json'), uri);
    item.range = new vscode.Range(0, 0, 0, 0);
    folderItem(uri).add(item);
  };
  const remove = (uri: vscode.Uri) => {
    controller.items.forEach((folder) => folder.children.delete(uri.toString()));
  };
  const discover = async () => {
    const found = await vscode.workspace.findFiles(SPEC_GLOB, '**/node_modules/**', 2000);
    const keep = new Set(found.map((u) => u.toString()));
    controller.items.forEach((folder) => folder.children.forEach((item) => { if (!keep.has(item.id)) folder.children.delete(item.id); }));
    for (const uri of found) add(uri);
  };
  // Nothing is searched at activation (markdown documents activate the extension too): the workbench asks for
  // the root items through resolveHandler(undefined) when the Testing view first needs them, and from then on a
  // file watcher keeps the list current. A spec opened in an editor is listed at once for its gutter.
  let watcher: vscode.FileSystemWatcher | undefined;
  let resolved: Promise<void> | undefined;
  const watch = () => {
    if (watcher) return;
    watcher = vscode.workspace.createFileSystemWatcher(SPEC_GLOB);
    watcher.onDidCreate(add);
    watcher.onDidDelete(remove);
    services.context.subscriptions.push(watcher);
  };
  const resolveAll = () => (resolved ??= (async () => { watch(); await discover(); })().catch((e: unknown) => { resolved = undefined; throw e; }));
  controller.resolveHandler = async (item) => { if (!item) await resolveAll(); };
  controller.refreshHandler = async () => { watch(); controller.items.replace([]); await discover(); };
  const isSpec = (doc: vscode.TextDocument) => doc.uri.scheme === 'file' && doc.uri.path.endsWith('.countercheck.json');
  const listOpened = (doc: vscode.TextDocument) => { if (isSpec(doc)) add(doc.uri); };
  vscode.workspace.textDocuments.forEach(listOpened);
  services.context.subscriptions.push(vscode.workspace.onDidOpenTextDocument(listOpened));

  const leaves = (items: readonly vscode.TestItem[]): vscode.TestItem[] =>
    items.flatMap((i) => (i.uri ? [i] : (() => { const kids: vscode.TestItem[] = []; i.children.forEach((c) => kids.push(c)); return leaves(kids); })()));

  const profile = controller.createRunProfile(vscode.l10n.t('Re-run and compare'), vscode.TestRunProfileKind.Run, async (request, token) => {
    // Run-all re-discovers, so specs created or deleted since the last look are included.
    if (!request.include) { watch(); await discover(); }
    const all: vscode.TestItem[] = [];
    controller.items.forEach((i) => all.push(i));
    const queue = leaves(request.include ? [...request.include] : all).filter((i) => !request.exclude?.includes(i));
    const run = controller.createTestRun(request);
    const abort = new AbortController();
    token.onCancellationRequested(() => abort.abort());
    for (const item of queue) {
      if (token.isCancellationRequested) { run.skipped(item); continue; }
      run.started(item);
      const started = Date.now();
      const review = await reviewSpec(services, item.uri!, abort.signal);
      const text = describeReview(review, vscode.workspace.asRelativePath(item.uri!));
      run.appendOutput(`${text.replace(/\n/g, '\r\n')}\r\n`, undefined, item);
      const duration = Date.now() - started;
      outcomes.set(item.uri!.toString(), { status: review.status, message: text });
      if (review.status === 'reproduced') run.passed(item, duration);
      else if (review.status === 'cannot-run') run.errored(item, new vscode.TestMessage(text), duration);
      else {
        // A diff of recorded against current (before/after rows), with the review's text as the message.
        const comparison = reviewComparison(review, settings(item.uri!).decimals);
        const diff = comparison ? comparisonDiffTexts(comparison) : undefined;
        const message = diff ? vscode.TestMessage.diff(`${comparison!.flipped ? vscode.l10n.t('Conclusion flipped. ') : ''}${text}`, diff.expected, diff.actual) : new vscode.TestMessage(text);
        message.location = new vscode.Location(item.uri!, new vscode.Position(0, 0));
        run.failed(item, message, duration);
      }
    }
    run.end();
  }, true);

  services.context.subscriptions.push(controller);
  return { controller, profile, outcomes };
}
