import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import { PANEL_VIEW_TYPE } from '../../src/host/panel';
import { api, closeAllEditors, dataUri, panelFrom, until, workspacePath, TOTAL_FIXED } from './api';

describe('results panel', () => {
  afterEach(closeAllEditors);

  it('copies the plain text and the markdown to the clipboard', async () => {
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
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
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
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
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
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
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
    const a = await api();
    const before = a.panels().length;
    await a.panelAction('rerun');
    assert.equal(a.panels().length, before);
    assert.equal(a.activePanel()?.headline, payload.headline);
  });

  it('one panel per source: a second lookup replaces the first; "Open in new panel" keeps a copy', async () => {
    const a = await api();
    await panelFrom(() => vscode.commands.executeCommand('countercheck.distributionLookup', { df: 3, x: 7.815 }));
    const count = a.panels().length;
    const second = await panelFrom(() => vscode.commands.executeCommand('countercheck.distributionLookup', { df: 4, x: 9.49 }));
    assert.equal(a.panels().length, count, 'the lookup replaced the earlier lookup');
    assert.match(second.headline, /4 degrees of freedom/);
    assert.ok(second.plots.some((p) => p.kind === 'density'), 'the lookup draws its density');
    await a.panelAction('open-new');
    assert.equal(a.panels().length, count + 1);
    await panelFrom(() => vscode.commands.executeCommand('countercheck.distributionLookup', { df: 5, x: 11.07 }));
    assert.equal(a.panels().length, count + 1, 'the copy stays, the source panel is replaced');
  });

  it('inserting into a saved markdown file writes its plots beside it as SVG files and links them', async () => {
    const uri = vscode.Uri.file(workspacePath('integration-data', 'notes.md'));
    await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode('# Notes\n'));
    const doc = await vscode.workspace.openTextDocument(uri);
    const editor = await vscode.window.showTextDocument(doc);
    editor.selection = new vscode.Selection(1, 0, 1, 0);
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
    await vscode.window.showTextDocument(doc, { viewColumn: editor.viewColumn });
    const a = await api();
    await a.panelAction('insert');
    const links = [...doc.getText().matchAll(/\]\((notes\.plots\/[^)]+\.svg)\)/g)].map((m) => m[1]);
    assert.equal(links.length, payload.plots.length, doc.getText());
    for (const link of links) {
      const svg = Buffer.from(await vscode.workspace.fs.readFile(vscode.Uri.file(workspacePath('integration-data', link)))).toString('utf8');
      assert.match(svg, /^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="600"/, link);
    }
    await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    await vscode.workspace.fs.delete(uri);
    await vscode.workspace.fs.delete(vscode.Uri.file(workspacePath('integration-data', 'notes.plots')), { recursive: true });
  });

  it("saves a plot as a standalone SVG, and as a PNG drawn by the panel's canvas at twice its size", async () => {
    await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence', ...TOTAL_FIXED }));
    const a = await api();
    const svgUri = vscode.Uri.file(workspacePath('integration-data', 'plot-1.svg'));
    const pngUri = vscode.Uri.file(workspacePath('integration-data', 'plot-1.png'));
    await a.savePlotOfActive(0, svgUri);
    const svg = Buffer.from(await vscode.workspace.fs.readFile(svgUri)).toString('utf8');
    assert.match(svg, /^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="600" height="(\d+)"/);
    const height = Number(/height="(\d+)"/.exec(svg)?.[1]);
    await a.savePlotOfActive(0, pngUri);
    const png = Buffer.from(await vscode.workspace.fs.readFile(pngUri));
    assert.equal(png.subarray(1, 4).toString('latin1'), 'PNG');
    assert.equal(png.readUInt32BE(16), 1200, 'PNG width: 600 px at scale 2');
    assert.equal(png.readUInt32BE(20), 2 * height, 'PNG height: the SVG height at scale 2');
    await vscode.workspace.fs.delete(svgUri);
    await vscode.workspace.fs.delete(pngUri);
  });
});
