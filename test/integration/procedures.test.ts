// Every procedure through the one wizard, in the real host: from a data file (the explorer's "Test This Data
// File…") and from a selection ("Test the Selected Table…"), each with its answers given, to the panel.
import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';
import type { TestResult } from '../../src/stats/result';
import { closeAllEditors, dataUri, panelFrom, TOTAL_FIXED } from './api';

/** 120 invented clinic visits: site, status before and after, dose group, outcome, weight (deterministic). */
function visits(): string {
  const lines = ['site,before,after,dose,outcome,weight_kg'];
  for (let i = 0; i < 120; i++) {
    const site = ['North', 'South', 'East'][i % 3];
    const before = i % 4 < 2 ? 'yes' : 'no';
    const after = (i * 7) % 5 < 2 ? 'yes' : 'no';
    const dose = String(1 + (i % 3 === 0 ? 0 : (i * 5) % 3));
    const outcome = (i * 11) % 7 < 3 ? 'event' : 'none';
    const weight = (62 + ((i * 37) % 29) + (i % 10) / 10).toFixed(1);
    lines.push([site, before, after, dose, outcome, weight].join(','));
  }
  return `${lines.join('\n')}\n`;
}

const ANSWERS: Record<string, Record<string, unknown>> = {
  independence: { test: 'independence', ...TOTAL_FIXED, columns: ['site', 'outcome'] },
  'goodness-of-fit': { test: 'goodness-of-fit', columns: ['site'], proportions: 'equal' },
  variance: { test: 'variance', columns: ['weight_kg'], sigma0: 8, alternative: 'two-sided' },
  'distribution-fit': { test: 'distribution-fit', columns: ['weight_kg'], family: 'normal' },
  'post-hoc': { test: 'post-hoc', columns: ['site', 'outcome'], compare: 'cells', adjustment: 'holm' },
  trend: { test: 'trend', columns: ['outcome', 'dose'], rowLabels: ['event', 'none'], columnLabels: ['1', '2', '3'] },
  paired: { test: 'paired', columns: ['before', 'after'] },
  stratified: { test: 'stratified', columns: ['site', 'before', 'outcome'] },
  power: { test: 'power', target: 'independence', effectSize: 0.3, df: 2, power: 0.8 },
  distribution: { test: 'distribution', df: 2, x: 5.991 },
};

function check(test: string, payload: { result: unknown }): void {
  const result = payload.result as TestResult | { kind: string };
  if (test === 'power') return assert.equal(result.kind, 'power');
  if (test === 'distribution') return assert.equal(result.kind, 'distribution');
  assert.equal(result.kind, 'test');
  assert.equal((result as TestResult).test, test);
  // Each of the 120 records counts once (no weight column here); the paired and stratified tests count units too.
  if (['independence', 'goodness-of-fit', 'post-hoc', 'trend', 'paired', 'variance', 'distribution-fit'].includes(test)) assert.equal((result as TestResult).n, 120, `${test}: N`);
}

describe('every procedure through the one wizard', () => {
  const file = () => dataUri('clinic-visits.csv');
  before(async () => {
    await vscode.workspace.fs.writeFile(file(), new TextEncoder().encode(visits()));
  });
  after(async () => {
    await closeAllEditors();
    await vscode.workspace.fs.delete(file());
  });

  for (const [test, answers] of Object.entries(ANSWERS)) {
    it(`${test} from a data file`, async () => {
      const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnFile', file(), answers));
      check(test, payload);
    });

    it(`${test} from a selection`, async () => {
      const editor = await vscode.window.showTextDocument(await vscode.workspace.openTextDocument(file()));
      editor.selection = new vscode.Selection(0, 0, editor.document.lineCount, 0);
      const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnSelection', answers));
      check(test, payload);
      assert.match(payload.sourceDescription, /selection in .*clinic-visits\.csv/);
    });
  }

  it('power and the distribution from the palette, with no data', async () => {
    for (const test of ['power', 'distribution']) {
      const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.planWithoutData', ANSWERS[test]));
      check(test, payload);
    }
  });

  it('the demo germination table, selected, gives N = 2,950 (its counts have digit grouping)', async () => {
    const md = dataUri('germination.md');
    await vscode.workspace.fs.writeFile(md, new TextEncoder().encode('| tray | sprouted | failed |\n|:--|--:|--:|\n| coated | 1,152 | 65 |\n| uncoated | 474 | 168 |\n| pelleted | 972 | 119 |\n'));
    const editor = await vscode.window.showTextDocument(await vscode.workspace.openTextDocument(md));
    editor.selection = new vscode.Selection(0, 0, 5, 0);
    const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runOnSelection', { test: 'independence', ...TOTAL_FIXED }));
    assert.equal((payload.result as TestResult).n, 2950, '1,152 + 65 + 474 + 168 + 972 + 119');
    await closeAllEditors();
    await vscode.workspace.fs.delete(md);
  });
});
