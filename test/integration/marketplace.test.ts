// What the marketplace and the platform expect, checked inside the real host: the Getting Started walkthrough
// opens, its sample data command opens the bundled log, contributed strings are resolved from
// package.nls.json, and the keybinding for "Test the Selected Table…" is not one of the editor's defaults.
import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import { parse } from 'jsonc-parser';
import { api } from './api';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('marketplace and platform conventions', () => {
  before(async () => {
    await api();
  });

  it('resolves contributed strings from package.nls.json', () => {
    const pkg = vscode.extensions.getExtension('countercheck.countercheck')!.packageJSON as { displayName: string; contributes: { commands: { title: string }[]; walkthroughs: { title: string }[] } };
    assert.equal(pkg.displayName, 'Countercheck');
    for (const c of pkg.contributes.commands) assert.doesNotMatch(c.title, /^%.*%$/, 'an unresolved %key%');
    assert.equal(pkg.contributes.walkthroughs[0].title, 'Get Started with Countercheck');
  });

  it('opens the Getting Started walkthrough, and its sample data', async () => {
    await vscode.commands.executeCommand('workbench.action.openWalkthrough', 'countercheck.countercheck#gettingStarted', false);
    let label = '';
    for (let i = 0; i < 40 && !label; i++) {
      label = vscode.window.tabGroups.all.flatMap((g) => g.tabs).map((t) => t.label).find((l) => /welcome|walkthrough|get started/i.test(l)) ?? '';
      if (!label) await sleep(100);
    }
    console.log(`      walkthrough tab: ${label || '(none)'}`);
    assert.ok(label, `no walkthrough tab; tabs: ${vscode.window.tabGroups.all.flatMap((g) => g.tabs).map((t) => t.label).join(', ')}`);
    await vscode.commands.executeCommand('countercheck.openSampleData');
    assert.match(vscode.window.activeTextEditor?.document.uri.path ?? '', /media\/walkthrough\/bakery-defects\.csv$/);
    assert.match(vscode.window.activeTextEditor!.document.lineAt(1).text, /^tray,shift,oven,defect,weight_g$/);
    await vscode.commands.executeCommand('workbench.action.closeAllEditors');
  });

  it("binds Test the Selected Table… to a key the editor's defaults leave free", async () => {
    const pkg = vscode.extensions.getExtension('countercheck.countercheck')!.packageJSON as { contributes: { keybindings: { command: string; key: string; mac: string }[] } };
    const ours = pkg.contributes.keybindings.find((k) => k.command === 'countercheck.runOnSelection');
    assert.ok(ours, 'no keybinding for countercheck.runOnSelection');
    await vscode.commands.executeCommand('workbench.action.openDefaultKeybindingsFile');
    let text = '';
    for (let i = 0; i < 40 && !text.includes('"key"'); i++) {
      text = vscode.window.activeTextEditor?.document.getText() ?? '';
      if (!text.includes('"key"')) await sleep(100);
    }
    const defaults = parse(text) as { key: string; command: string }[];
    assert.ok(Array.isArray(defaults) && defaults.length > 300, `read ${Array.isArray(defaults) ? defaults.length : 0} default keybindings`);
    // This host is Linux: the defaults listed are the Linux ones (the macOS key is not checked here).
    const clashes = defaults.filter((d) => d.key === ours.key && !d.command.startsWith('countercheck.') && !d.command.startsWith('-'));
    console.log(`      ${defaults.length} default keybindings read; ${ours.key} is bound by: ${clashes.map((c) => c.command).join(', ') || 'nothing'}`);
    assert.deepEqual(clashes, []);
    await vscode.commands.executeCommand('workbench.action.closeAllEditors');
  });
});
