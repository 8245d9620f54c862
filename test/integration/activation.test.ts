import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import { api } from './api';

describe('activation', () => {
  it('activates the extension from the development path and registers its commands', async () => {
    const a = await api();
    // Printed for the benchmark record (issue target: under 50 ms); never asserted as a timing.
    console.log(`      activation time: ${a.activationMs.toFixed(1)} ms`);
    const commands = await vscode.commands.getCommands(true);
    for (const id of ['countercheck.runOnFile', 'countercheck.runOnSelection', 'countercheck.runOnCellOutput', 'countercheck.distributionLookup', 'countercheck.runSavedSpec', 'countercheck.rerunAndCompare', 'countercheck.refreshAllBlocks']) {
      assert.ok(commands.includes(id), `${id} is not registered`);
    }
  });

  it('puts the commands in the explorer and editor menus where they apply, and the schema on spec files', () => {
    const pkg = vscode.extensions.getExtension('countercheck.countercheck')!.packageJSON as {
      contributes: { menus: Record<string, { command: string; when?: string }[]>; jsonValidation: { fileMatch: string; url: string }[] };
    };
    const menu = (where: string, id: string) => pkg.contributes.menus[where]?.find((m) => m.command === id);
    assert.match(menu('explorer/context', 'countercheck.runOnFile')?.when ?? '', /csv\|tsv/);
    assert.match(menu('editor/context', 'countercheck.runOnSelection')?.when ?? '', /editorHasSelection/);
    assert.ok(menu('notebook/cell/title', 'countercheck.runOnCellOutput'));
    assert.deepEqual(pkg.contributes.jsonValidation, [{ fileMatch: '*.countercheck.json', url: './schemas/countercheck.schema.json' }]);
  });

  it('activates on markdown documents, so report blocks get their lenses in a folder without saved tests', () => {
    const pkg = vscode.extensions.getExtension('countercheck.countercheck')!.packageJSON as { activationEvents: string[] };
    assert.ok(pkg.activationEvents.includes('onLanguage:markdown'), JSON.stringify(pkg.activationEvents));
  });

  it('contributes every command with the Countercheck category', () => {
    const pkg = vscode.extensions.getExtension('countercheck.countercheck')!.packageJSON as { contributes: { commands: { category: string; title: string }[] } };
    for (const c of pkg.contributes.commands) assert.equal(c.category, 'Countercheck', c.title);
  });
});
