// The example specs in examples/postgresql run from the command line (the CLI's own readers, connection from
// COUNTERCHECK_CONNECTION_GREENHOUSE, password from PGPASSWORD) and give the same result as the
// same spec pointed at the same rows written to CSV.
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../src/cli';
import { liveServer } from './server';

const server = liveServer();
const demo = join(__dirname, '..', '..', 'examples', 'postgresql');

async function cli(args: string[], cwd: string): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(args, { stdout: (s) => (out += s), stderr: (s) => (err += s), readStdin: async () => '', cwd });
  return { code, out, err };
}

describe('saved specs with a SQL source, from the command line', () => {
  let folder = '';
  const saved: Record<string, string | undefined> = {};
  before(async () => {
    folder = mkdtempSync(join(tmpdir(), 'countercheck-pg-spec-'));
    await server.psql(readFileSync(join(demo, 'greenhouse.sql'), 'utf8'));
    const e = server.env();
    for (const key of ['COUNTERCHECK_CONNECTION_GREENHOUSE', 'PGPASSWORD']) saved[key] = process.env[key];
    process.env.COUNTERCHECK_CONNECTION_GREENHOUSE = `postgresql://${encodeURIComponent(e.PGUSER)}@${e.PGHOST}:${e.PGPORT}/${encodeURIComponent(e.PGDATABASE)}?sslmode=disable`;
    process.env.PGPASSWORD = e.PGPASSWORD;
  });
  after(() => {
    for (const [key, value] of Object.entries(saved)) {
      if (value === undefined) delete process.env[key];
      else process.env[key] = value;
    }
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('records a result, re-runs it as reproduced, and reports data changed after a row is added', async () => {
    const spec = join(folder, 'grade-record.countercheck.json');
    writeFileSync(spec, readFileSync(join(demo, 'harvest-grade-by-bay.countercheck.json'), 'utf8'));
    const recorded = await cli(['run', '--record', spec], folder);
    assert.equal(recorded.code, 0, recorded.err);
    const same = await cli(['check', spec], folder);
    assert.equal(same.code, 0, same.out + same.err);
    assert.match(same.out, /reproduced/);
    await server.query("INSERT INTO harvest_crates VALUES (100001, 'A vent', 'processing', 'early', 12.1)");
    try {
      const changed = await cli(['check', spec], folder);
      assert.equal(changed.code, 1, changed.out + changed.err);
      assert.match(changed.out, /data changed/);
    } finally {
      await server.query('DELETE FROM harvest_crates WHERE crate_id = 100001');
    }
  });

  for (const [name, select] of [
    ['harvest-grade-by-bay', 'SELECT * FROM harvest_crates'],
    ['crate-weight-spread', "SELECT * FROM harvest_crates WHERE shift = 'early'"],
  ] as const) {
    it(`runs examples/postgresql/${name} and matches the CSV path on the same rows`, async () => {
      const viaSql = await cli(['run', '--json', join(demo, `${name}.countercheck.json`)], demo);
      assert.equal(viaSql.code, 0, viaSql.err);
      const csv = join(folder, `${name}.csv`);
      await server.psql(`\\copy (${select}) TO '${csv}' WITH (FORMAT csv, HEADER)`);
      const spec = JSON.parse(readFileSync(join(demo, `${name}.countercheck.json`), 'utf8')) as { source: Record<string, unknown> };
      spec.source = { path: `${name}.csv`, columns: spec.source.columns, categories: 'sorted' };
      writeFileSync(join(folder, `${name}.countercheck.json`), JSON.stringify(spec));
      const viaFile = await cli(['run', '--json', join(folder, `${name}.countercheck.json`)], folder);
      assert.equal(viaFile.code, 0, viaFile.err);
      const a = JSON.parse(viaSql.out) as { statistic: number; df: number; n: number; pValue: number };
      const b = JSON.parse(viaFile.out) as typeof a;
      assert.ok(a.n > 1000, `n = ${a.n}`);
      assert.equal(a.n, b.n, 'n');
      assert.equal(a.df, b.df, 'df');
      const delta = Math.abs(a.statistic - b.statistic) / Math.abs(b.statistic);
      assert.ok(delta <= 1e-12, `statistic: SQL ${a.statistic}, CSV ${b.statistic}, relative Δ ${delta}, tolerance 1e-12`);
      assert.doesNotMatch(viaSql.out + viaSql.err, new RegExp(server.env().PGPASSWORD), 'no password in the output');
    });
  }
});
