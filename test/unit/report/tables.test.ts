// Tables that travel: tab-separated cells a spreadsheet pastes as cells (numbers without thousands
// separators, exponents in E notation, the minus sign as "-"), and CSV fields quoted per RFC 4180.
import { strict as assert } from 'node:assert';
import { buildPanelPayload, categoryOrderText } from '../../../src/report/panel';
import { csvField, spreadsheetCell, tableToTsv } from '../../../src/report/tables';
import { demoResult } from './demoResults';

describe('tables that travel', () => {
  it('spreadsheet cells: numbers a spreadsheet reads as numbers', () => {
    assert.equal(spreadsheetCell('1,768'), '1768');
    assert.equal(spreadsheetCell('−2.30'), '-2.30');
    assert.equal(spreadsheetCell('5.1 × 10^-5'), '5.1E-5');
    assert.equal(spreadsheetCell('5.1 × 10⁻⁵'), '5.1E-5');
    assert.equal(spreadsheetCell('4.53 × 10⁻⁴³⁷'), '4.53E-437');
    assert.equal(spreadsheetCell('peat\ttray'), 'peat tray');
    assert.equal(spreadsheetCell('9 (5.33) +2.53'), '9 (5.33) +2.53');
  });

  it('copies the cross-tab of the exact demo as a header and one line per row, tab-separated', async () => {
    const { result } = await demoResult('advanced/seedling-blight-exact.countercheck.json');
    const payload = buildPanelPayload(result, { id: 'r', title: 't', sourceDescription: '', decimals: 2, canSave: false, canRerun: false });
    const tsv = tableToTsv(payload.tables[0]);
    const lines = tsv.trimEnd().split('\n').map((l) => l.split('\t'));
    assert.deepEqual(lines[0], ['', 'healthy', 'mild blight', 'severe blight', 'Total']);
    assert.equal(lines.length, 5, 'header, three rows, total');
    assert.ok(lines.every((l) => l.length === 5), 'every line has five cells');
    assert.deepEqual(lines[4], ['Total', '16', '13', '10', '39']);
  });

  it('the goodness-of-fit table reads deviation, z, share of χ², then the counts', async () => {
    const { result } = await demoResult('bakery-flavour-mix.countercheck.json');
    const payload = buildPanelPayload(result, { id: 'r', title: 't', sourceDescription: '', decimals: 2, canSave: false, canRerun: false });
    assert.deepEqual(payload.tables[0].header, ['Category', 'Observed − expected', 'z', 'Share of X²', 'Observed', 'Expected']);
    const shares = payload.tables[0].rows.map((r) => Number(r.cells[2].text.replace(' %', '')));
    assert.ok(Math.abs(shares.reduce((a, b) => a + b, 0) - 100) < 0.3, `shares add up to 100 %: ${shares.join(', ')}`);
    assert.equal(payload.plots.find((p) => p.kind === 'deviation')?.kind, 'deviation', 'deviation chart, not paired bars');
  });

  it('says how the categories are ordered', () => {
    assert.match(categoryOrderText({ source: { path: 'a.csv', columns: ['x', 'y'] }, rowLabels: ['b', 'a'] }) ?? '', /order the test lists them \(rowLabels\)/);
    assert.match(categoryOrderText({ source: { path: 'a.csv', columns: ['x'], categories: 'sorted' } }) ?? '', /^Categories sorted/);
    assert.match(categoryOrderText({ source: { path: 'a.csv', columns: ['x'] } }) ?? '', /first seen in the data/);
    assert.equal(categoryOrderText({ table: [[1, 2], [3, 4]] }), undefined, 'inline tables keep the order they are written in');
  });

  it('csv fields are quoted when they hold a comma, quote or line break', () => {
    assert.equal(csvField('a,b'), '"a,b"');
    assert.equal(csvField('say "x"'), '"say ""x"""');
    assert.equal(csvField(Infinity), 'Infinity');
    assert.equal(csvField(null), '');
    assert.equal(csvField(0.5), '0.5');
  });
});
