// The demo workspace's data files (written by scripts/make-demo-data.mjs) read in every shape.
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { aggregateRecords } from '../../../src/data/aggregate';
import { aggregateFile } from '../../../src/data/file';
import { parseSelection } from '../../../src/data/selection';

const data = join(__dirname, '..', '..', '..', 'demo', 'data');

describe('data: demo files', () => {
  it('bakery-defects.csv: raw records, shift × defect, with the comment line skipped and missing labels dropped', async () => {
    const a = await aggregateFile(join(data, 'bakery-defects.csv'), { kind: 'crosstab', rowColumn: 'shift', columnColumn: 'defect' });
    assert.ok(a.kind === 'table');
    assert.equal(a.reader, 'byte-scanner');
    assert.deepEqual(a.table.rowLabels, ['late', 'early', 'night']);
    assert.equal(a.provenance.rows, 1800);
    const total = a.table.counts.flat().reduce((s, n) => s + n, 0);
    assert.equal(total + a.provenance.dropped, 1800);
    assert.ok(a.provenance.dropped > 0);
  });

  it('bike-share-survey.csv: long counts weighted by riders', async () => {
    const a = await aggregateFile(join(data, 'bike-share-survey.csv'), { kind: 'crosstab', rowColumn: 'area', columnColumn: 'purpose', weight: 'riders' });
    assert.ok(a.kind === 'table');
    assert.deepEqual(a.table.columnLabels, ['commute', 'errand', 'leisure', 'tourism']);
    assert.equal(a.table.rowLabels.length, 5);
  });

  it('bottling-fill.csv: semicolons and decimal commas detected, fill volumes as moments', async () => {
    const a = await aggregateFile(join(data, 'bottling-fill.csv'), { kind: 'numeric', column: 'fill_ml' });
    assert.ok(a.kind === 'moments');
    assert.equal(a.moments.n, 900);
    assert.ok(a.moments.mean > 499 && a.moments.mean < 502, `mean ${a.moments.mean}`);
  });

  it('germination.md: a markdown counted table with thousands separators', () => {
    const text = readFileSync(join(data, 'germination.md'), 'utf8');
    const lines = text.split('\n');
    const start = lines.findIndex((l) => l.startsWith('| tray'));
    const s = parseSelection(lines.slice(start).join('\n'), { firstLine: start + 1 });
    assert.ok(s.kind === 'records');
    const a = aggregateRecords(s.records, { kind: 'counted-table' });
    assert.ok(a.kind === 'table');
    assert.deepEqual(a.table.columnLabels, ['sprouted', 'failed']);
    assert.ok(a.table.counts.flat().some((n) => n >= 1000));
  });
});
