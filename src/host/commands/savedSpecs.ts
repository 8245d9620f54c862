// Saved tests (*.countercheck.json): run one, or re-run and compare with the result recorded in it.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { Comparison } from '../../protocol';
import { compareRecorded } from '../../report/comparison';
import type { FamilyMembership } from '../../report/evidence';
import { folderMembership } from '../../savedtest/family';
import { compareWithRecord, describeReview, STATUS_LABEL, type Review } from '../../savedtest/review';
import type { SpecRun } from '../../savedtest/types';
import { loadSpecText } from '../../savedtest/validate';
import { runSpec } from '../../savedtest/run';
import { extensionReaders, settings, type Services } from '../services';
import { errorMessage, isInstance } from '../../errors';

export const SPEC_GLOB = '**/*.countercheck.json';

export function toolName(context: vscode.ExtensionContext): string {
  return `countercheck ${String((context.extension.packageJSON as { version?: string }).version ?? '0')}`;
}

async function readText(uri: vscode.Uri): Promise<string> {
  return Buffer.from(await vscode.workspace.fs.readFile(uri)).toString('utf8');
}

/** The spec's folder relative to the workspace ('' at the top). */
function folderOf(uri: vscode.Uri): string {
  const folder = path.posix.dirname(vscode.workspace.asRelativePath(uri, false));
  return folder === '.' ? '' : folder;
}

/** Lets the user pick a saved test when the command was not given one. */
async function chooseSpec(uri: vscode.Uri | undefined, title: string): Promise<vscode.Uri | undefined> {
  if (isInstance(uri, vscode.Uri)) return uri;
  const active = vscode.window.activeTextEditor?.document.uri;
  const found = await vscode.workspace.findFiles(SPEC_GLOB, '**/node_modules/**', 500);
  if (found.length === 0) {
    void vscode.window.showInformationMessage(vscode.l10n.t('Countercheck: no *.countercheck.json files in this workspace.'));
    return undefined;
  }
  found.sort((a, b) => a.fsPath.localeCompare(b.fsPath));
  const items = found.map((u) => ({ label: path.basename(u.fsPath), description: folderOf(u), uri: u, picked: u.toString() === active?.toString() }));
  const chosen = await vscode.window.showQuickPick(items, { title, placeHolder: vscode.l10n.t('Choose a saved test'), matchOnDescription: true });
  return chosen?.uri;
}

export async function runSpecFile(services: Services, uri: vscode.Uri): Promise<void> {
  const text = await readText(uri);
  const { spec } = loadSpecText(text, uri.fsPath);
  const run = await services.run(spec, uri.fsPath, path.basename(uri.fsPath));
  const title = typeof spec.title === 'string' ? spec.title : path.basename(uri.fsPath, '.countercheck.json');
  services.showResult(run.result, { spec: spec as Record<string, unknown>, specPath: uri.fsPath, saved: true }, title, `${vscode.workspace.asRelativePath(uri)} · ${run.data.description}`, undefined, await membershipOf(uri));
}

/**
 * The saved test's place among the saved tests of its own folder (the family `check <folder>` adjusts together,
 * without subfolders); a file that is not a valid saved test is left out. Never throws.
 */
async function membershipOf(uri: vscode.Uri): Promise<FamilyMembership | undefined> {
  try {
    const folder = vscode.Uri.file(path.dirname(uri.fsPath));
    const names = (await vscode.workspace.fs.readDirectory(folder)).filter(([name, type]) => type === vscode.FileType.File && name.endsWith('.countercheck.json')).map(([name]) => name);
    const specs: { name: string; test: string }[] = [];
    for (const name of names) {
      try {
        const { spec } = loadSpecText(await readText(vscode.Uri.joinPath(folder, name)), name);
        specs.push({ name, test: spec.test });
      } catch {
        // Not a valid saved test: not counted in the family.
      }
    }
    return folderMembership(specs, path.basename(uri.fsPath));
  } catch {
    return undefined;
  }
}

export async function runSavedSpec(services: Services, uri?: vscode.Uri): Promise<void> {
  try {
    const target = await chooseSpec(uri, vscode.l10n.t('Run a saved test'));
    if (target) await runSpecFile(services, target);
  } catch (e) {
    await services.reportError(e);
  }
}

/** Re-runs a spec and compares with its recorded result. Never throws: a failure is a "cannot run" review. */
export async function reviewSpec(services: Services, uri: vscode.Uri, signal?: AbortSignal): Promise<Review> {
  return (await reviewWithRun(services, uri, signal)).review;
}

/** The review, and the run's result and spec when it ran (for the panel's before/after table). */
export async function reviewWithRun(services: Services, uri: vscode.Uri, signal?: AbortSignal): Promise<{ review: Review; run?: SpecRun; spec?: Record<string, unknown> }> {
  let spec: Record<string, unknown>;
  try {
    spec = loadSpecText(await readText(uri), vscode.workspace.asRelativePath(uri)).spec as Record<string, unknown>;
  } catch (e) {
    return { review: { status: 'cannot-run', reason: errorMessage(e), differences: [], tolerance: '' } };
  }
  try {
    const configured = settings(uri);
    const run = await runSpec(spec, { readers: extensionReaders, specPath: uri.fsPath, allowedRoot: services.workspaceRootFor(uri.fsPath), allowOutsideRoot: configured.allowPathsOutsideWorkspace, signal });
    return { review: compareWithRecord(spec.recorded, run, toolName(services.context), new Date(), configured.fragilityThreshold), run, spec };
  } catch (e) {
    return { review: { status: 'cannot-run', reason: errorMessage(e), differences: [], tolerance: '' } };
  }
}

/** The before/after table of a review that ran; undefined when there is nothing recorded to compare with. */
export function reviewComparison(review: Review, decimals: number): Comparison | undefined {
  if (!review.recorded || !review.current) return undefined;
  return compareRecorded(review.recorded, review.current, STATUS_LABEL[review.status], { decimals });
}

export async function rerunAndCompare(services: Services, uri?: vscode.Uri): Promise<Review | undefined> {
  try {
    const target = await chooseSpec(uri, vscode.l10n.t('Re-run a saved test and compare'));
    if (!target) return undefined;
    const { review, run, spec } = await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: vscode.l10n.t('Countercheck: re-running {0}', path.basename(target.fsPath)), cancellable: true }, (_p, token) => {
      const abort = new AbortController();
      token.onCancellationRequested(() => abort.abort());
      return reviewWithRun(services, target, abort.signal);
    });
    const text = describeReview(review, vscode.workspace.asRelativePath(target));
    services.output.info(text);
    // The result opens with the recorded one beside it (a before/after table, a flipped conclusion marked).
    if (run && spec) {
      const title = typeof spec.title === 'string' ? spec.title : path.basename(target.fsPath, '.countercheck.json');
      const panel = services.showResult(run.result, { spec, specPath: target.fsPath, saved: true }, title, `${vscode.workspace.asRelativePath(target)} · ${run.data.description}`, undefined, await membershipOf(target));
      const comparison = reviewComparison(review, settings(target).decimals);
      if (comparison) panel.update({ ...panel.payload, comparison });
    }
    const showDetails = vscode.l10n.t('Show details');
    const notify = review.status === 'reproduced' ? vscode.window.showInformationMessage : vscode.window.showWarningMessage;
    void notify(`Countercheck: ${text.split('\n')[0]}`, showDetails).then((choice) => {
      if (choice === showDetails) services.output.show(true);
    });
    return review;
  } catch (e) {
    await services.reportError(e);
    return undefined;
  }
}

/** Shows the panel that already holds this spec's result, or runs the spec to make one. */
export async function openSpecResult(services: Services, uri: vscode.Uri): Promise<void> {
  const open = services.panels.all.find((p) => p.payload.origin?.saved && p.payload.origin.specPath === uri.fsPath);
  if (open) open.panel.reveal(undefined, false);
  else await runSavedSpec(services, uri);
}
