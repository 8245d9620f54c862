// Ten million rows generated on the server and written to CSV by \copy: the 6×4 cross-tabulation
// agrees exactly and the variance to 1e-12 relative between PostgreSQL and the streaming CSV path.
// About a minute on a two-core machine (most of it creating the table and writing 315 MB of CSV).
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureTrips, exportCsv, tripRequests } from '../../bench/postgres';
import { aggregateFile } from '../../src/data/file';
import { aggregateSql } from '../../src/data/sql/index';
import { liveServer } from './server';

const server = liveServer();
const rows = 10_000_000;
const table = 'trips_ten_million';

describe('ten million rows through PostgreSQL and through the CSV path', () => {
  let folder = '';
  let csv = '';
  before(async () => {
    folder = mkdtempSync(join(tmpdir(), 'countercheck-pg-10m-'));
    csv = join(folder, 'trips.csv');
    await ensureTrips(server.env(), table, rows);
    await exportCsv(server.env(), `SELECT * FROM ${table}`, csv);
  });
  after(async () => {
    if (folder) rmSync(folder, { recursive: true, force: true });
    await server.query(`DROP TABLE IF EXISTS ${table}`);
  });

  for (const request of tripRequests) {
    it(`gives the same ${request.kind === 'crosstab' ? '6×4 table' : 'moments'}`, async () => {
      let bytes = 0;
      const viaSql = await aggregateSql({ sql: { connection: 'test', table } }, request, { ...server.context(), onTraffic: (t) => (bytes = t.bytesRead + t.bytesWritten) });
      const viaFile = await aggregateFile(csv, request, { dialect: { header: true, comment: null }, categories: { order: 'sorted' } });
      assert.equal(viaSql.provenance.rows, rows);
      assert.equal(viaSql.provenance.dropped, viaFile.provenance.dropped);
      if (viaSql.kind === 'table' && viaFile.kind === 'table') {
        assert.deepEqual(viaSql.table, viaFile.table);
        assert.deepEqual([viaSql.table.rowLabels.length, viaSql.table.columnLabels.length], [6, 4]);
        assert.ok(bytes < 10_000, `the 6×4 table took ${bytes} bytes on the wire; target under 10 KB`);
      } else if (viaSql.kind === 'moments' && viaFile.kind === 'moments') {
        assert.equal(viaSql.moments.n, viaFile.moments.n);
        assert.equal(viaSql.moments.n, rows - rows / 1000, 'one value in a thousand is NULL');
        const got = viaSql.moments.m2 / (viaSql.moments.n - 1);
        const expected = viaFile.moments.m2 / (viaFile.moments.n - 1);
        const delta = Math.abs(got - expected) / Math.abs(expected);
        assert.ok(delta <= 1e-12, `variance: PostgreSQL ${got}, CSV path ${expected}, relative Δ ${delta}, tolerance 1e-12`);
        assert.equal(viaSql.moments.min, viaFile.moments.min);
        assert.equal(viaSql.moments.max, viaFile.moments.max);
      } else {
        assert.fail(`kinds differ: ${viaSql.kind} vs ${viaFile.kind}`);
      }
    });
  }
});
