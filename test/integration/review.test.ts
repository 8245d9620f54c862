import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import { RESULT_START } from '../../src/report/blocks';
import { api, closeAllEditors, dataUri, panelFrom, workspacePath } from './api';

async function runProfile(include?: readonly vscode.TestItem[]): Promise<void> {
  const a = await api();
  const source = new vscode.CancellationTokenSource();
  await a.savedTests.profile.runHandler(new vscode.TestRunRequest(include), source.token);
}

describe('saved tests and living reports', () => {
  afterEach(closeAllEditors);

  it('saves a result as a spec, runs it from the palette command and re-runs it as reproduced', async () => {
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('bike-trips.csv'), { test: 'independence', columns: ['rider', 'dock'] }));
    const target = vscode.Uri.file(workspacePath('integration-data', 'rider-dock.countercheck.json'));
    assert.ok(payload.origin);
    const a = await api();
    await a.saveActive(target);
    const text = Buffer.from(await vscode.workspace.fs.readFile(target)).toString('utf8');
    const spec = JSON.parse(text) as { source: { path: string }; recorded: { data: { sha256: string } } };
    assert.equal(spec.source.path, 'bike-trips.csv');
    assert.match(spec.recorded.data.sha256, /^[0-9a-f]{64}$/);
    const review = await vscode.commands.executeCommand<{ status: string }>('countercheck.rerunAndCompare', target);
    assert.equal(review?.status, 'reproduced');
    const compared = a.panels().find((p) => p.comparison && p.origin?.specPath === target.fsPath);
    assert.ok(compared, 'the re-run opens its result with the recorded one beside it');
    assert.equal(compared.comparison?.flipped, false);
    assert.ok(compared.comparison?.rows.every((r) => !r.changed), JSON.stringify(compared.comparison));
    const shown = await panelFrom(() => vscode.commands.executeCommand('countercheck.runSavedSpec', target));
    assert.equal(shown.origin?.saved, true);
  });

  it('runs saved specs in the Testing view: reproduced passes, a changed file fails with the comparison', async () => {
    const a = await api();
    const spec = vscode.Uri.file(workspacePath('integration-data', 'ovens.countercheck.json'));
    await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', dataUri('oven-defects.csv'), { test: 'independence' }));
    await a.saveActive(spec);
    await runProfile();
    assert.equal(a.savedTests.outcomes.get(spec.toString())?.status, 'reproduced', `outcomes for ${spec.toString()}: ${JSON.stringify([...a.savedTests.outcomes])}`);
    // One row more in the data: the fingerprint changes.
    await vscode.workspace.fs.writeFile(dataUri('oven-defects.csv'), new TextEncoder().encode('oven,cracked,burnt,misshapen\nOven A,12,5,9\nOven B,7,14,6\nOven C,9,8,21\nOven D,30,2,1\n'));
    await runProfile();
    const outcome = a.savedTests.outcomes.get(spec.toString());
    assert.equal(outcome?.status, 'data-changed');
    assert.match(outcome?.message ?? '', /data fingerprint differs/);
    await vscode.workspace.fs.writeFile(dataUri('oven-defects.csv'), new TextEncoder().encode('oven,cracked,burnt,misshapen\nOven A,12,5,9\nOven B,7,14,6\nOven C,9,8,21\n'));
  });

  it('lists the saved tests when the Testing view first asks for its root items', async () => {
    const a = await api();
    const [spec] = await vscode.workspace.findFiles('*.countercheck.json', undefined, 1);
    assert.ok(spec, 'a spec at the top of the demo workspace');
    const started = performance.now();
    await a.savedTests.controller.resolveHandler?.(undefined);
    // Printed for the record (the workspace search that activation no longer does); never asserted as a timing.
    console.log(`      first listing of saved tests: ${(performance.now() - started).toFixed(1)} ms`);
    const ids: string[] = [];
    a.savedTests.controller.items.forEach((folder) => folder.children.forEach((item) => ids.push(item.id)));
    assert.ok(ids.includes(spec.toString()), `${spec.toString()} not among ${JSON.stringify(ids)}`);
  });

  it('every saved test of the demo workspace reproduces', async () => {
    const a = await api();
    const specs = (await vscode.workspace.findFiles('**/*.countercheck.json', '{**/node_modules/**,integration-data/**}')).filter((u) => !u.fsPath.includes('integration-data'));
    assert.ok(specs.length >= 1, 'the demo workspace holds saved tests');
    await runProfile();
    const notReproduced = specs
      .map((u) => ({ spec: vscode.workspace.asRelativePath(u), outcome: a.savedTests.outcomes.get(u.toString()) }))
      .filter((x) => x.outcome?.status !== 'reproduced')
      .map((x) => `${x.spec}: ${x.outcome?.message ?? 'not run'}`);
    assert.deepEqual(notReproduced, [], `${notReproduced.length} of ${specs.length} demo specs did not reproduce`);
  });

  it('refreshes a living block through its CodeLens as one undoable edit, and all blocks idempotently', async () => {
    const doc = await vscode.workspace.openTextDocument(dataUri('report.md'));
    await vscode.window.showTextDocument(doc);
    const original = doc.getText();
    const lenses = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', doc.uri);
    const lens = lenses.find((l) => l.command?.command === 'countercheck.refreshBlock');
    assert.ok(lens?.command, 'a refresh lens on the block');
    await vscode.commands.executeCommand(lens.command.command, ...(lens.command.arguments ?? []));
    assert.ok(doc.getText().includes(RESULT_START), 'result written below the block');
    assert.equal(doc.getText().split(RESULT_START).length - 1, 1, 'only the first block was refreshed');
    await vscode.commands.executeCommand('undo');
    assert.equal(doc.getText(), original, 'one undo restores the report');
    const first = await vscode.commands.executeCommand<{ changed: number[] }>('countercheck.refreshAllBlocks', doc.uri);
    assert.deepEqual(first?.changed, [0, 1]);
    const afterFirst = doc.getText();
    const second = await vscode.commands.executeCommand<{ changed: number[] }>('countercheck.refreshAllBlocks', doc.uri);
    assert.deepEqual(second?.changed, []);
    assert.equal(doc.getText(), afterFirst, 'second refresh gives identical text');
    assert.ok(afterFirst.startsWith(original.slice(0, original.indexOf('```countercheck'))), 'text before the first block kept byte for byte');

    // Each block's plots: SVG files beside the report, linked, rendered as images by the markdown preview's
    // renderer, and rewritten when a refresh finds them stale.
    const links = [...afterFirst.matchAll(/\]\((report\.plots\/[^)]+\.svg)\)/g)].map((m) => m[1]);
    assert.ok(links.length >= 2, `plot links in the report: ${links.join(', ')}`);
    const fileOf = (link: string) => vscode.Uri.file(workspacePath('integration-data', link));
    const drawn = Buffer.from(await vscode.workspace.fs.readFile(fileOf(links[0]))).toString('utf8');
    assert.match(drawn, /^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="600"/);
    const html = await vscode.commands.executeCommand<string>('markdown.api.render', afterFirst);
    for (const link of links) assert.match(html, new RegExp(`<img [^>]*src="[^"]*${link.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}"`), `the preview renders ${link}`);
    await vscode.workspace.fs.writeFile(fileOf(links[0]), new TextEncoder().encode('stale'));
    await vscode.commands.executeCommand('countercheck.refreshAllBlocks', doc.uri);
    assert.equal(Buffer.from(await vscode.workspace.fs.readFile(fileOf(links[0]))).toString('utf8'), drawn, 'a stale plot is rewritten with its block');

    // The same explanations as the panel, as a hover over a term in a result block.
    const resultLine = doc.getText().split('\n').findIndex((l) => /^χ²\(/.test(l));
    assert.ok(resultLine >= 0, 'an APA line in a result block');
    const hovers = await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', doc.uri, new vscode.Position(resultLine, 1));
    const texts = hovers.flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : 'value' in c ? c.value : '')));
    assert.ok(texts.some((t) => /χ² statistic|Pearson X²/.test(t)), JSON.stringify(texts));
  });

  it('offers run / re-run and compare / open result lenses and field hovers on a spec file', async () => {
    const [spec] = await vscode.workspace.findFiles('*.countercheck.json', undefined, 1);
    assert.ok(spec, 'a spec at the top of the demo workspace');
    const doc = await vscode.workspace.openTextDocument(spec);
    await vscode.window.showTextDocument(doc);
    const lenses = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', spec);
    const commands = lenses.map((l) => l.command?.command);
    assert.ok(commands.includes('countercheck.runSavedSpec') && commands.includes('countercheck.rerunAndCompare'), JSON.stringify(commands));
    // Above them, the procedure and what the test reads and sets, from its field table (src/savedtest/lens.ts).
    const titles = lenses.map((l) => l.command?.title ?? '');
    assert.ok(titles.some((t) => t.startsWith('$(beaker) ')) && titles.some((t) => /^(file |data in the test|database |no data)/.test(t)), JSON.stringify(titles));
    const line = doc.getText().split('\n').findIndex((l) => l.includes('"test"'));
    const character = doc.lineAt(line).text.indexOf('"test"') + 2;
    const hovers = await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', spec, new vscode.Position(line, character));
    const text = hovers.flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : c.value))).join('\n');
    assert.match(text, /Which procedure to run/);
    const open = lenses.find((l) => l.command?.command === 'countercheck.openSpecResult');
    assert.ok(open?.command, 'an open-result lens');
    const a = await api();
    await vscode.commands.executeCommand(open.command.command, ...(open.command.arguments ?? []));
    const count = a.panels().length;
    await vscode.commands.executeCommand(open.command.command, ...(open.command.arguments ?? []));
    assert.equal(a.panels().length, count, 'the second time reveals the panel already open');
  });
});
