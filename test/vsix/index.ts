// Run inside a fresh browser-based VS Code in which the packaged .vsix was installed (scripts/real-host/install-check.mjs):
// the extension is the installed copy, its Getting Started walkthrough opens, and the walkthrough's sample data
// command opens the log shipped inside the package.
import * as vscode from 'vscode';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitFor<T>(what: string, probe: () => T | undefined): Promise<T> {
  for (let i = 0; i < 100; i++) {
    const value = probe();
    if (value) return value;
    await sleep(100);
  }
  throw new Error(`timed out waiting for ${what}`);
}

export async function run(): Promise<void> {
  const ext = vscode.extensions.getExtension('countercheck.countercheck');
  if (!ext) throw new Error('countercheck.countercheck is not installed');
  if (!/countercheck\.countercheck-\d+\.\d+\.\d+/.test(ext.extensionPath)) throw new Error(`the extension was loaded from ${ext.extensionPath}, not from the installed .vsix`);
  await ext.activate();
  await vscode.commands.executeCommand('workbench.action.openWalkthrough', 'countercheck.countercheck#gettingStarted', false);
  const tab = await waitFor('the walkthrough tab', () => vscode.window.tabGroups.all.flatMap((g) => g.tabs).find((t) => /welcome/i.test(t.label)));
  await vscode.commands.executeCommand('countercheck.openSampleData');
  const opened = await waitFor('the sample data', () => vscode.window.activeTextEditor?.document);
  if (!opened.uri.path.startsWith(vscode.Uri.file(ext.extensionPath).path) || opened.lineAt(1).text !== 'tray,shift,oven,defect,weight_g') {
    throw new Error(`the sample data command opened ${opened.uri.path}`);
  }
  console.log(`installed .vsix at ${ext.extensionPath}: walkthrough opened (tab "${tab.label}"), sample data opened (${opened.lineCount} lines)`);
}
