// The same data in PostgreSQL and in a CSV file (written from the table by psql's \copy, so both
// hold the same values to the last bit) gives the same aggregate through both sources: counts
// exactly, variance to 1e-12 relative. The CSV side is the streaming file reader (src/data/file.ts).
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../src/data/file';
import type { IntakeOptions } from '../../src/data/options';
import { aggregateSql, type SqlAggregateOptions } from '../../src/data/sql/index';
import type { Aggregate, AggregateRequest } from '../../src/data/types';
import { assertSameAggregate as assertSame, liveServer, relative } from './server';

const server = liveServer();
let folder = '';

before(() => {
  folder = mkdtempSync(join(tmpdir(), 'countercheck-pg-'));
});
after(() => {
  if (folder) rmSync(folder, { recursive: true, force: true });
});

/** Writes `select` to a CSV file with psql's client-side \copy (NULL as an empty field, '' as ""). */
async function exportCsv(name: string, select: string): Promise<string> {
  const file = join(folder, `${name}.csv`);
  await server.psql(`\\copy (${select}) TO '${file}' WITH (FORMAT csv, HEADER)`);
  return file;
}

async function both(table: string, request: AggregateRequest, options: SqlAggregateOptions = {}): Promise<[Aggregate, Aggregate]> {
  const file = await exportCsv(table.replace(/\W/g, '_'), `SELECT * FROM ${table} ORDER BY id`);
  const intake: IntakeOptions = { dialect: { header: true, delimiter: ',', comment: null }, missing: options.missing, categories: { order: 'sorted', ...options.categories } };
  const viaFile = await aggregateFile(file, request, intake);
  const viaSql = await aggregateSql({ sql: { connection: 'test', table } }, request, { ...server.context(), options });
  return [viaSql, viaFile];
}

describe('PostgreSQL and CSV give the same aggregates', function () {
  before(async () => {
    await server.query('DROP TABLE IF EXISTS bakery_log');
    // A bakery's defect log: zeros, NULLs in every column, empty strings, Unicode and padded labels,
    // a level that only appears beside a missing value, and frequency weights including 0.
    await server.query(`CREATE TABLE bakery_log (
      id integer PRIMARY KEY, oven text, defect text, crust_g double precision, batch_size integer, proof_min numeric)`);
    await server.query(`INSERT INTO bakery_log VALUES
      (1, 'Öfen Nord', 'brûlé', 0, 3, 12.5),
      (2, 'Öfen Nord', 'crack', 1.25, 0, 13),
      (3, 'Süd 烤箱', 'brûlé', -0.5, 2, NULL),
      (4, 'Süd 烤箱', NULL, 2.75, 1, 14.25),
      (5, NULL, 'crack', 0, 5, 15),
      (6, 'Öfen Nord', '', 3.5, 4, 11),
      (7, 'west 🥖', 'brûlé', NULL, NULL, 12),
      (8, 'Süd 烤箱', 'crack', 1e-3, 2, 12.75),
      (9, 'Öfen Nord', 'NA', 0, 1, 13.5),
      (10, ' Süd 烤箱 ', 'crack', 1234.5, 6, 0),
      (11, 'nur fehlend', NULL, 0.1, 2, 0),
      (12, 'Öfen Nord', 'brûlé', 0.2, 7, 16)`);
  });

  it('cross-tabulates with NULLs, empty strings and Unicode labels dropped or kept as the file reader does', async () => {
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'crosstab', rowColumn: 'oven', columnColumn: 'defect' });
    assertSame(viaSql, viaFile, 'crosstab, drop');
    assert.equal(viaSql.provenance.dropped, 5, 'NULL, "" and NA are missing');
  });

  it('keeps missing values as their own category under that policy', async () => {
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'crosstab', rowColumn: 'oven', columnColumn: 'defect' }, { missing: { policy: 'category', label: '(fehlt)' } });
    assertSame(viaSql, viaFile, 'crosstab, missing as category');
    assert.ok(viaSql.kind === 'table' && viaSql.table.columnLabels.includes('(fehlt)'));
  });

  it('sums frequency weights, zeros included, and drops records without a weight', async () => {
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'categories', column: 'oven', weight: 'batch_size' });
    assertSame(viaSql, viaFile, 'weighted categories');
  });

  it('folds letter case the same way', async () => {
    await server.query("UPDATE bakery_log SET oven = 'öfen nord' WHERE id = 12");
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'categories', column: 'oven' }, { categories: { caseFold: true } });
    assertSame(viaSql, viaFile, 'case folding');
  });

  it('gives the same moments for a double precision column with zeros, negatives and a NULL', async () => {
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'numeric', column: 'crust_g' });
    assertSame(viaSql, viaFile, 'double precision');
  });

  it('gives the same moments for a numeric column', async () => {
    const [viaSql, viaFile] = await both('bakery_log', { kind: 'numeric', column: 'proof_min' });
    assertSame(viaSql, viaFile, 'numeric');
  });

  it('computes the variance of values far from zero to 1e-12 of the exact value', async () => {
    // Reference: exact rational arithmetic (Python fractions) in scripts/fixtures/sql_offset_variance.py.
    const reference = JSON.parse(readFileSync(join(__dirname, '..', 'fixtures', 'python-fractions', 'sql-offset-variance.json'), 'utf8')) as { n: number; variance: number };
    await server.query('DROP TABLE IF EXISTS scale_drift');
    await server.query(`CREATE TABLE scale_drift AS
      SELECT i AS id, 1e9 + ((i * 7919) % 1000) / 1000.0::double precision AS reading_g FROM generate_series(1, ${reference.n}) AS i`);
    const [viaSql, viaFile] = await both('scale_drift', { kind: 'numeric', column: 'reading_g' });
    assert.ok(viaSql.kind === 'moments' && viaFile.kind === 'moments');
    assert.equal(viaSql.moments.n, reference.n);
    const got = viaSql.moments.m2 / (viaSql.moments.n - 1);
    const delta = relative(got, reference.variance);
    assert.ok(delta <= 1e-12, `PostgreSQL two-pass variance: expected ${reference.variance}, got ${got}, relative Δ ${delta}, tolerance 1e-12`);
    // The one-pass file reader is not held to 1e-12 on data this ill-conditioned (κ ≈ 3.5e9); its error is printed for the record.
    const fileDelta = relative(viaFile.moments.m2 / (viaFile.moments.n - 1), reference.variance);
    console.log(`      (offset 1e9: relative error of the variance, PostgreSQL ${delta.toExponential(2)}, CSV one-pass ${fileDelta.toExponential(2)})`);
  });

  it('gives the same result through a query of the user\'s own with a where condition and a parameter', async () => {
    const viaFile = await aggregateFile(
      await exportCsv('filtered', "SELECT * FROM bakery_log WHERE batch_size > 1 AND defect <> 'NA' ORDER BY id"),
      { kind: 'crosstab', rowColumn: 'oven', columnColumn: 'defect' },
      { dialect: { header: true, comment: null }, categories: { order: 'sorted' } },
    );
    const viaSql = await aggregateSql(
      { sql: { connection: 'test', query: 'SELECT oven, defect, batch_size FROM bakery_log WHERE batch_size > $1' }, where: 'defect <> $2', parameters: [1, 'NA'] },
      { kind: 'crosstab', rowColumn: 'oven', columnColumn: 'defect' },
      server.context(),
    );
    assertSame(viaSql, viaFile, 'query + where');
  });
});
