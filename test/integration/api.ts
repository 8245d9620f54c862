// Shared by the integration tests: the extension's API, the workspace, and waiting for a panel.
import { strict as assert } from 'node:assert';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { CountercheckApi } from '../../src/host/extension';
import type { PanelPayload } from '../../src/protocol';
import { assertAbsolute } from '../unit/tolerance';

export async function api(): Promise<CountercheckApi> {
  const ext = vscode.extensions.getExtension<CountercheckApi>('countercheck.countercheck');
  assert.ok(ext, 'extension countercheck.countercheck is not loaded');
  return ext.isActive ? ext.exports : ext.activate();
}

export function workspacePath(...parts: string[]): string {
  const root = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath;
  assert.ok(root, 'no workspace folder is open');
  return path.join(root, ...parts);
}

export function dataUri(name: string): vscode.Uri {
  return vscode.Uri.file(workspacePath('integration-data', name));
}

/** Runs a command and returns the payload of the panel it opened (a new one, or the re-used one updated). */
export async function panelFrom(run: () => Thenable<unknown>): Promise<PanelPayload> {
  const a = await api();
  const before = new Set(a.panels().map((p) => p.computedAt + p.id));
  a.lastError();
  await run();
  const fresh = a.panels().filter((p) => !before.has(p.computedAt + p.id));
  const err = a.lastError();
  assert.ok(fresh.length > 0, `no result panel opened${err ? `; last error: ${err.message}` : ''}`);
  return fresh[fresh.length - 1];
}

/** The unit tests' one tolerance check, with an absolute tolerance. */
export const closeTo = assertAbsolute;

export async function closeAllEditors(): Promise<void> {
  await vscode.commands.executeCommand('workbench.action.closeAllEditors');
}

/** Waits (up to `ms`) until `condition` holds; the workbench applies focus changes and edits asynchronously. */
export async function until(condition: () => boolean, ms = 5000): Promise<boolean> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) return false;
    await new Promise((r) => setTimeout(r, 50));
  }
  return true;
}

/** Pre-filled answer to the independence test's sampling-plan question (for its Bayes factor), so nothing is asked. */
export const TOTAL_FIXED = { 'bayesFactor.samplingPlan': 'joint-multinomial' } as const;
