// The CodeLens of a saved test comes from its procedure's field table: the title the editor lists it under,
// where its data lives (data fields or source), and the options it sets, named by their fields.
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { MAX_OPTIONS, savedTestLens } from '../../../src/savedtest/lens';
import { PROCEDURES } from '../../../src/savedtest/procedures/index';

const demo = join(__dirname, '..', '..', '..', 'demo');

describe('the CodeLens of a saved test', () => {
  it('names the procedure by its planning label and gives its summary', () => {
    for (const p of PROCEDURES) {
      const lens = savedTestLens({ test: p.test });
      assert.ok(lens, p.test);
      assert.equal(lens.procedure, p.planning?.label ?? p.test);
      assert.equal(lens.summary, p.summary);
    }
  });

  it('says the data is inline and lists the data fields present, in table order, and the options set', () => {
    const lens = savedTestLens({ test: 'stratified', title: 'Liner trial', strata: [[[1, 2], [3, 4]]], stratumLabels: ['a'], method: 'exact', correction: true, alpha: 0.01, recorded: {} });
    assert.deepEqual(lens, {
      test: 'stratified',
      procedure: 'Stratified tables (Cochran–Mantel–Haenszel)',
      title: 'Liner trial',
      summary: PROCEDURES.find((p) => p.test === 'stratified')!.summary,
      data: { kind: 'inline', fields: ['strata', 'stratumLabels'] },
      options: [
        { field: 'alpha', value: '0.01' },
        { field: 'correction', value: 'true' },
        { field: 'method', value: 'exact' },
      ],
      moreOptions: 0,
    });
  });

  it('names a file source with its columns, and a database source by connection and table', () => {
    assert.deepEqual(savedTestLens({ test: 'independence', source: { path: 'data/log.csv', columns: ['oven', 'defect'], weight: 'n' } })?.data, { kind: 'file', path: 'data/log.csv', columns: ['oven', 'defect'] });
    assert.deepEqual(savedTestLens({ test: 'stratified', source: { sql: { connection: 'plant', table: 'public.liners' }, columns: ['site', 'arm', 'outcome'] } })?.data, {
      kind: 'database',
      connection: 'plant',
      relation: 'public.liners',
      columns: ['site', 'arm', 'outcome'],
    });
    assert.deepEqual(savedTestLens({ test: 'variance', source: { sql: { connection: 'plant', query: 'SELECT 1 AS x' }, columns: ['x'] } })?.data, { kind: 'database', connection: 'plant', columns: ['x'] });
    assert.deepEqual(savedTestLens({ test: 'power', effectSize: 0.3 })?.data, { kind: 'none' });
    assert.deepEqual(savedTestLens({ test: 'independence' })?.data, { kind: 'inline', fields: [] }, 'a test that reads data but has none yet');
  });

  it('shortens long values and counts the options beyond the first ' + MAX_OPTIONS, () => {
    const lens = savedTestLens({ test: 'goodness-of-fit', observed: [1, 2], alpha: 0.05, statistic: 'cressie-read', lambda: 0.5, method: 'monte-carlo', resamples: 1000, seed: 7, variable: 'a very long variable name indeed' });
    assert.ok(lens);
    assert.equal(lens.options.length, MAX_OPTIONS);
    assert.equal(lens.moreOptions, 2);
    const variable = savedTestLens({ test: 'goodness-of-fit', observed: [1, 2], variable: 'a very long variable name indeed' })!.options[0];
    assert.deepEqual(variable, { field: 'variable', value: 'a very long variable na…' });
    assert.deepEqual(savedTestLens({ test: 'goodness-of-fit', observed: [1, 2], proportions: [0.5, 0.5] })!.data, { kind: 'inline', fields: ['observed', 'proportions'] }, 'proportions are data in the table');
  });

  it('is absent for JSON that names no known procedure', () => {
    for (const v of [null, [], 'x', {}, { test: 'nope' }, { test: 3 }]) assert.equal(savedTestLens(v), undefined, JSON.stringify(v));
  });

  it('describes every demo saved test', () => {
    for (const folder of [demo, join(demo, 'advanced')]) {
      for (const file of readdirSync(folder).filter((f) => f.endsWith('.countercheck.json'))) {
        const spec = JSON.parse(readFileSync(join(folder, file), 'utf8'));
        const lens = savedTestLens(spec);
        assert.ok(lens, file);
        assert.ok(!lens.options.some((o) => o.field === 'recorded' || o.field === 'source'), file);
        if (spec.source?.path) assert.equal(lens.data.kind, 'file', file);
      }
    }
  });
});
