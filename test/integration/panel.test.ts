import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import { PANEL_VIEW_TYPE } from '../../src/host/panel';
import { api, closeAllEditors, dataUri, panelFrom, until } from './api';

describe('results panel', () => {
  afterEach(closeAllEditors);

  it('copies the plain text and the markdown to the clipboard', async () => {
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence' }));
    const a = await api();
    await a.panelAction('copy-text');
    assert.equal(await vscode.env.clipboard.readText(), payload.text);
    await a.panelAction('copy-markdown');
    const md = await vscode.env.clipboard.readText();
    assert.equal(md, payload.markdown);
    assert.match(md, /\|/);
  });

  it('inserts the markdown at the cursor of the markdown editor as one undoable edit', async () => {
    const doc = await vscode.workspace.openTextDocument({ language: 'markdown', content: '# Notes\n\nEnd.\n' });
    const editor = await vscode.window.showTextDocument(doc);
    editor.selection = new vscode.Selection(1, 0, 1, 0);
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence' }));
    await vscode.window.showTextDocument(doc, { viewColumn: editor.viewColumn });
    const a = await api();
    await a.panelAction('insert');
    assert.ok(doc.getText().includes(payload.markdown.trim()), 'markdown inserted');
    assert.ok(doc.getText().startsWith('# Notes\n'), 'text before the cursor kept');
    // 'undo' acts on whatever has keyboard focus, which the workbench moves asynchronously (the panel may still
    // hold it). An undo that changed nothing is repeated; the first undo that changes the text must restore it
    // whole, or the insert was more than one edit.
    const inserted = doc.getText();
    for (let attempt = 0; attempt < 5 && doc.getText() === inserted; attempt++) {
      await vscode.window.showTextDocument(doc, { viewColumn: editor.viewColumn, preserveFocus: false });
      await vscode.commands.executeCommand('workbench.action.focusActiveEditorGroup');
      assert.ok(await until(() => vscode.window.activeTextEditor?.document === doc), 'markdown editor focused');
      await vscode.commands.executeCommand('undo');
      await until(() => doc.getText() !== inserted, 1000);
    }
    assert.equal(doc.getText(), '# Notes\n\nEnd.\n');
    await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
  });

  it('restores a panel from its serialized state', async () => {
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence' }));
    const a = await api();
    const panel = vscode.window.createWebviewPanel(PANEL_VIEW_TYPE, 'restored', vscode.ViewColumn.One, {});
    const count = a.panels().length;
    await a.restorePanel(panel, { payload });
    assert.equal(a.panels().length, count + 1);
    assert.equal(a.panels().at(-1)?.headline, payload.headline);
    assert.match(panel.webview.html, /data-initial="\{&quot;payload&quot;/);
    assert.match(panel.webview.html, /default-src 'none'/);
  });

  it('re-runs the result in the same panel', async () => {
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence' }));
    const a = await api();
    const before = a.panels().length;
    await a.panelAction('rerun');
    assert.equal(a.panels().length, before);
    assert.equal(a.activePanel()?.headline, payload.headline);
  });
});
