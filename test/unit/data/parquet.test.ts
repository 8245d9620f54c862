// Parquet files written and counted by DuckDB (scripts/fixtures/parquet_fixtures.mjs; versions in
// test/fixtures/duckdb/orders.json): snappy, gzip, zstd, plain and dictionary encodings, format v2 pages,
// nulls, several row groups. Counts must equal DuckDB's GROUP BY exactly; the variance DuckDB's var_samp
// within 1e-12 relative.
import { strict as assert } from 'node:assert';
import { readFileSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFileSource, fileReaderFor } from '../../../src/data/readers';
import { aggregateParquet, previewParquet } from '../../../src/data/parquet';
import type { Aggregate, AggregateRequest } from '../../../src/data/types';
import { sampleVariance } from '../../../src/stats/moments';
import { assertClose } from '../tolerance';
import { rejectsInput } from './expect';

const dir = join(__dirname, '..', '..', 'fixtures', 'duckdb');
const ref = JSON.parse(readFileSync(join(dir, 'orders.json'), 'utf8'));
const scratch = mkdtempSync(join(tmpdir(), 'countercheck-parquet-'));

type Row = Record<string, string | number | null>;

/** Our aggregate as {"a|b": n} for a table or {"a": n} for category counts, leaving out zero cells (DuckDB's GROUP BY has no empty groups). */
function keyed(a: Aggregate): Record<string, number> {
  const out: Record<string, number> = {};
  if (a.kind === 'table') a.table.rowLabels.forEach((r, i) => a.table.columnLabels.forEach((c, j) => { if (a.table.counts[i][j] > 0) out[`${r}|${c}`] = a.table.counts[i][j]; }));
  else if (a.kind === 'categories') a.counts.labels.forEach((l, k) => { if (a.counts.counts[k] > 0) out[l] = a.counts.counts[k]; });
  else assert.fail('expected counts');
  return out;
}

function fromSql(rows: Row[], keys: string[]): Record<string, number> {
  return Object.fromEntries(rows.map((r) => [keys.map((k) => String(r[k])).join('|'), Number(r.n)]));
}

const REQUESTS: AggregateRequest[] = [
  { kind: 'crosstab', rowColumn: 'region', columnColumn: 'channel' },
  { kind: 'categories', column: 'region' },
  { kind: 'crosstab', rowColumn: 'rush', columnColumn: 'region' },
  { kind: 'categories', column: 'ordered_on' },
  { kind: 'categories', column: 'region', weight: 'qty' },
  { kind: 'numeric', column: 'amount' },
];

describe('Parquet reader against DuckDB (test/fixtures/duckdb)', () => {
  for (const name of Object.keys(ref.files)) {
    const want = ref.files[name];
    const encodings = want.encodings.map((e: Row) => `${e.column}: ${e.encodings}`).join(', ');
    it(`${name}.parquet (${want.encodings[0].compression}; ${encodings}; ${want.rowGroups} row groups): counts and variance agree with DuckDB's SQL`, async () => {
      const aggregates = await aggregateParquet(join(dir, `${name}.parquet`), REQUESTS, { file: `${name}.parquet` });
      assert.deepEqual(keyed(aggregates[0]), fromSql(want.regionByChannel, ['region', 'channel']));
      assert.deepEqual(keyed(aggregates[1]), fromSql(want.region, ['region']));
      assert.equal(aggregates[1].provenance.rows, want.rows);
      assert.equal(aggregates[1].provenance.dropped, want.regionNulls, 'nulls are dropped under the default missing-value policy');
      assert.deepEqual(keyed(aggregates[2]), fromSql(want.rushByRegion, ['rush', 'region']));
      assert.deepEqual(keyed(aggregates[3]), fromSql(want.orderedOn, ['day']));
      assert.deepEqual(keyed(aggregates[4]), fromSql(want.qtyWeighted, ['region']), 'a BIGINT column as frequency weight');
      const m = aggregates[5];
      assert.equal(m.kind, 'moments');
      if (m.kind !== 'moments') return;
      assert.equal(m.moments.n, want.amount.n);
      assertClose(sampleVariance(m.moments), want.amount.variance, { rel: 1e-12 }, `${name}: variance of amount (DuckDB var_samp)`);
      assertClose(m.moments.mean, want.amount.mean, { rel: 1e-12 }, `${name}: mean of amount (DuckDB avg)`);
    });
  }

  it('gives nulls their own level under the category policy', async () => {
    const [a] = await aggregateParquet(join(dir, 'orders-snappy.parquet'), [{ kind: 'categories', column: 'region' }], { missing: { policy: 'category', label: '(none)' } });
    assert.equal(keyed(a)['(none)'], ref.files['orders-snappy'].regionNulls);
    assert.equal(a.provenance.dropped, 0);
  });

  it('is reached through the reader table and fingerprints the file with the columns read', async () => {
    const path = join(dir, 'orders-zstd.parquet');
    assert.equal(fileReaderFor(path).name, 'Parquet');
    const one = await aggregateFileSource(path, { kind: 'categories', column: 'region' }, {}, {});
    const two = await aggregateFileSource(path, { kind: 'categories', column: 'channel' }, {}, {});
    assert.match(one.provenance.sha256, /^[0-9a-f]{64}$/);
    assert.notEqual(one.provenance.sha256, two.provenance.sha256);
  });

  it('reports progress up to the whole file and stops when cancelled', async () => {
    const path = join(dir, 'orders-zstd.parquet');
    const seen: { bytesRead: number; totalBytes: number; rows: number }[] = [];
    await aggregateParquet(path, [{ kind: 'categories', column: 'region' }], {}, { onProgress: (p) => seen.push(p) });
    const last = seen[seen.length - 1];
    assert.equal(last.bytesRead, last.totalBytes);
    assert.equal(last.rows, ref.files['orders-zstd'].rows);
    const controller = new AbortController();
    controller.abort(new Error('stop'));
    await assert.rejects(() => aggregateParquet(path, [{ kind: 'categories', column: 'region' }], {}, { signal: controller.signal }), /stop/);
  });

  it('previews the flat columns as text records', async () => {
    const { records, complete } = await previewParquet(join(dir, 'orders-gzip.parquet'), 4);
    assert.deepEqual(records.columns, ['order_id', 'region', 'channel', 'amount', 'qty', 'rush', 'ordered_on']);
    assert.equal(records.rows.length, 4);
    assert.equal(complete, false);
    assert.match(records.rows[0][6], /^2026-\d\d-\d\d$/);
  });

  describe('refusals', () => {
    const nested = join(dir, 'nested.parquet');
    it('a list column, by name', () =>
      rejectsInput(() => aggregateParquet(nested, [{ kind: 'categories', column: 'parts' }], { file: 'nested.parquet' }), 'nested.parquet, column `parts`: column `parts` (LIST) is a list (a nested column); expected a flat column of numbers, text, booleans or dates', 'unsupported-column'));
    it('a struct column, by name', () =>
      rejectsInput(() => aggregateParquet(nested, [{ kind: 'categories', column: 'box' }], { file: 'nested.parquet' }), 'nested.parquet, column `box`: column `box` () is a struct (a nested column); expected a flat column of numbers, text, booleans or dates', 'unsupported-column'));
    it('a binary column, by name', () =>
      rejectsInput(() => aggregateParquet(nested, [{ kind: 'categories', column: 'photo' }], { file: 'nested.parquet' }), 'nested.parquet, column `photo`: column `photo` (BYTE_ARRAY) holds binary data (BYTE_ARRAY without a string type); expected numbers, text, booleans or dates', 'unsupported-column'));
    it('while a flat column of the same file reads', async () => {
      const [a] = await aggregateParquet(nested, [{ kind: 'numeric', column: 'id' }]);
      assert.equal(a.kind === 'moments' && a.moments.n, 10);
    });
    it('a file cut in the middle of a row group', () =>
      rejectsInput(
        () => aggregateParquet(join(dir, 'truncated.parquet'), [{ kind: 'categories', column: 'region' }], { file: 'truncated.parquet' }),
        'truncated.parquet: the file does not end with the Parquet footer (PAR1): it is cut short (truncated) or still being written; expected a complete Parquet file',
        'truncated-parquet',
      ));
    it('a row group whose bytes are damaged', async () => {
      // Every byte of the third row group's column chunks overwritten (page headers included), footer intact.
      const bytes = new Uint8Array(readFileSync(join(dir, 'orders-snappy.parquet')));
      const { start, stop } = ref.truncated.rowGroup3 as { start: number; stop: number };
      for (let k = start; k < stop; k++) bytes[k] = 0x2a;
      const path = join(scratch, 'damaged.parquet');
      writeFileSync(path, bytes);
      await assert.rejects(
        () => aggregateParquet(path, [{ kind: 'categories', column: 'region' }, { kind: 'numeric', column: 'amount' }], { file: 'damaged.parquet' }),
        (e: Error) => {
          assert.equal(e.name, 'InputError');
          assert.match(e.message, /^damaged\.parquet: row group 3 \(rows 4,097–5,000\), column `\w+`: cannot be decoded \(/);
          return true;
        },
      );
    });
    it('text where a number is expected, with the row and row group', () =>
      rejectsInput(() => aggregateParquet(join(dir, 'orders-snappy.parquet'), [{ kind: 'numeric', column: 'region' }], { file: 'orders.parquet' }), 'orders.parquet, row 1 (row group 1), column `region`: expected a number, found `Coastal`', 'not-a-number'));
    it('a sheet or range given for a Parquet file', () =>
      rejectsInput(() => aggregateParquet(join(dir, 'orders-snappy.parquet'), [{ kind: 'categories', column: 'region' }], { file: 'orders.parquet', sheet: 'x' }), 'orders.parquet, $.source.sheet: "sheet" and "range" apply to Excel workbooks only; a Parquet file has neither', 'not-a-workbook'));
  });
});
