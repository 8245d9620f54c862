// The planner on the rest of the demo's data: a semicolon file with decimal commas, and the notebook's cell
// outputs (an HTML data-frame table, a JSON list of values). Expected figures are read from the files by hand.
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { offerFromNotebookOutput, offerFromText } from '../../../src/planner/offer';
import { plan } from '../../../src/planner/plan';
import { runSpec } from '../../../src/savedtest/run';
import type { TestResult } from '../../../src/stats/result';
import { ScriptedQuestions } from './fakeQuestions';
import { demo, fileOffer, fileOfferAt, planAndRun, readers, settings } from './helpers';

/** The notebook's cell outputs by MIME type, as the editor hands them over. */
function cellOutput(cell: number, mime: string): string {
  const nb = JSON.parse(readFileSync(join(demo, 'weekend-loaves.ipynb'), 'utf8')) as { cells: { outputs?: { data?: Record<string, string | string[]> }[] }[] };
  const data = nb.cells[cell].outputs!.find((o) => o.data?.[mime])!.data![mime];
  return Array.isArray(data) ? data.join('') : data;
}

describe('the planner on the other demo data', () => {
  it('bottling-fill.csv: "502,61" is a number with a decimal comma, so fill_ml is offered for the variance test and all 900 values count', async () => {
    const fills = readFileSync(join(demo, 'data', 'bottling-fill.csv'), 'utf8').split('\n').slice(1).filter(Boolean).map((l) => Number(l.split(';')[3].replace(',', '.')));
    const { planned, result, questions } = await planAndRun(fileOffer('bottling-fill.csv'), { 'Which test?': 'Variance of one numeric variable', 'Choose the column': 'fill_ml', 'Hypothesised standard deviation σ0': '1.5', 'Alternative hypothesis': 'σ differs from σ0' });
    assert.equal(result.n, fills.length);
    assert.equal(fills.length, 900);
    assert.deepEqual((planned.spec.source as { columns: string[] }).columns, ['fill_ml']);
    const column = questions.asked.find((a) => a.placeholder === 'Choose the column')!;
    assert.deepEqual(column.choices, ['fill_ml'], 'time, line and nozzle are not numbers to test');
  });

  it('germination.md as a file: its reader shows the first table, a counted table read again from the file when run (N = 2,950)', async () => {
    const offer = await fileOfferAt(join(demo, 'data', 'germination.md'), 'data/germination.md');
    const { planned, result } = await planAndRun(offer, { 'Which test?': 'Independence of two categorical variables' });
    assert.deepEqual(planned.spec.source, { path: 'data/germination.md' });
    assert.equal(result.n, 2950);
  });

  it('a JSON records file: planned with its path as the source and read by the JSON reader when run', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'countercheck-planner-'));
    const records = Array.from({ length: 40 }, (_, i) => ({ shift: i % 2 ? 'early' : 'late', outcome: i % 5 < 2 ? 'fail' : 'pass' }));
    writeFileSync(join(folder, 'checks.json'), JSON.stringify(records));
    const offer = await fileOfferAt(join(folder, 'checks.json'), 'checks.json');
    const questions = new ScriptedQuestions({ 'Which test?': 'Independence of two categorical variables', 'Choose the rows': 'shift', 'Choose the columns': 'outcome' });
    const planned = await plan({ offer, questions, settings, specFolder: folder });
    assert.deepEqual(planned.spec.source, { path: 'checks.json', columns: ['shift', 'outcome'] });
    const run = await runSpec(planned.spec, { readers, specPath: join(folder, 'untitled.countercheck.json') });
    assert.equal((run.result as TestResult).n, 40);
  });

  it("weekend-loaves.ipynb, cell 2's HTML table: a counted 3×3 table, N from the cells", async () => {
    const offer = offerFromNotebookOutput('text/html', cellOutput(1, 'text/html'), { file: 'weekend-loaves.ipynb, cell 2', description: 'output of cell 2' });
    const { result, planned } = await planAndRun(offer, { 'Which test?': 'Independence of two categorical variables' });
    const table = planned.spec.table as number[][];
    assert.equal(table.length, 3);
    assert.equal((result as TestResult).n, table.flat().reduce((a, b) => a + b, 0));
    // The table as the notebook prints it (41 18 25 / 33 29 19 / 52 14 30): N = 261.
    assert.equal((result as TestResult).n, 261);
  });

  it("cell 2's 3×3 (markets × seed treatments) is not offered for the paired test; a table whose columns repeat its rows in another order is, aligned", async () => {
    const cell = offerFromNotebookOutput('text/html', cellOutput(1, 'text/html'), { file: 'weekend-loaves.ipynb, cell 2', description: 'output of cell 2' });
    const listing = new ScriptedQuestions({ 'Which test?': false });
    await assert.rejects(plan({ offer: cell, questions: listing, settings, specFolder: demo }));
    assert.ok(!listing.asked[0].choices!.includes('Paired classifications'), listing.asked[0].choices!.join(' | '));
    // Before (rows) × after (columns) of 40 invented kiln checks, the after columns written fail-first.
    const square = offerFromText('before,fail,pass\npass,5,25\nfail,6,4\n', { description: 'selection' });
    const { planned, result } = await planAndRun(square, { 'Which test?': 'Paired classifications' });
    assert.deepEqual(planned.spec.table, [[25, 5], [4, 6]], 'columns reordered to pass, fail');
    assert.deepEqual([planned.spec.rowLabels, planned.spec.columnLabels], [['pass', 'fail'], ['pass', 'fail']]);
    // McNemar's statistic from the discordant cells b = 5, c = 4: (b − c)² / (b + c) = 1/9 (closed form).
    assert.ok(Math.abs(result.statistic - 1 / 9) < 1e-12, String(result.statistic));
  });

  it("weekend-loaves.ipynb, cell 4's JSON values: the variance test on 12 values (too few for a distribution fit, which says so)", async () => {
    const offer = offerFromNotebookOutput('application/json', cellOutput(3, 'application/json'), { file: 'weekend-loaves.ipynb, cell 4', description: 'output of cell 4' });
    const { result } = await planAndRun(offer, { 'Which test?': 'Variance of one numeric variable', 'Hypothesised standard deviation σ0': '0.4', 'Alternative hypothesis': 'σ differs from σ0' });
    assert.equal(result.test, 'variance');
    assert.equal(result.n, 12);
    await assert.rejects(planAndRun(offer, { 'Which test?': 'Fit of a distribution to the values', 'Distribution family': 'normal' }), /only 2 bins remain/);
  });
});
