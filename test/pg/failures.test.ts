// Bad input and bad luck against a live server: each gives a clear message, and afterwards no
// session of the reader is left on the server (pg_stat_activity) and no transaction is left open.
import { strict as assert } from 'node:assert';
import { createServer } from 'node:net';
import { InputError, isInstance } from '../../src/errors';
import { aggregateSql, type SqlReaderContext, type SqlSource } from '../../src/data/sql/index';
import type { AggregateRequest } from '../../src/data/types';
import { leftoverSessions, liveServer } from './server';

const server = liveServer();
const count: AggregateRequest = { kind: 'categories', column: 'line' };
const slow = (seconds: number): SqlSource => ({ sql: { connection: 'test', table: 'bottling' }, where: `pg_sleep(${seconds}) IS NOT NULL` });

async function refusal(source: SqlSource, request: AggregateRequest, context: SqlReaderContext = server.context()): Promise<Error> {
  try {
    await aggregateSql(source, request, context);
  } catch (e) {
    return e as Error;
  }
  assert.fail(`expected a refusal for ${JSON.stringify(source)}`);
}

function expectInput(e: Error, code: string, pattern: RegExp): void {
  assert.ok(isInstance(e, InputError), `expected InputError, got ${e.name}: ${e.message}`);
  assert.equal(e.code, code, e.message);
  assert.match(e.message, pattern);
  assert.doesNotMatch(e.message, new RegExp(server.env().PGPASSWORD), 'the password never appears in a message');
}

/** A port where nothing listens: a source that reached for the network would fail with "cannot reach". */
async function deadPort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

async function backendOfReader(): Promise<number> {
  for (let i = 0; i < 100; i++) {
    const rows = await server.query("SELECT pid FROM pg_stat_activity WHERE application_name = 'countercheck' AND state = 'active'");
    if (rows.length > 0) return Number(rows[0].pid);
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error('the reader never showed up in pg_stat_activity');
}

describe('SQL source failures against a live server', () => {
  before(async () => {
    await server.query('DROP TABLE IF EXISTS bottling');
    await server.query(`CREATE TABLE bottling AS SELECT i AS id, 'line ' || (i % 3) AS line, (i % 7) * 0.5 AS fill_ml FROM generate_series(1, 200) AS i`);
    await server.query('DROP SEQUENCE IF EXISTS crate_numbers');
    await server.query('CREATE SEQUENCE crate_numbers');
  });

  afterEach(async () => {
    const left = await leftoverSessions(server.query);
    assert.deepEqual(left, [], 'a session or transaction of the reader is still open on the server');
  });

  it('names an unknown table', async () => {
    expectInput(await refusal({ sql: { connection: 'test', table: 'public.bottlng' } }, count), 'sql-unknown-table', /relation "public.bottlng" does not exist; table names are exact/);
  });

  it('names an unknown column and lists the columns there are', async () => {
    expectInput(
      await refusal({ sql: { connection: 'test', table: 'bottling' } }, { kind: 'crosstab', rowColumn: 'line', columnColumn: 'Fill_ml' }),
      'sql-unknown-column',
      /column `Fill_ml` is not in bottling on connection "test"; did you mean `fill_ml`.*its columns are: id, line, fill_ml/,
    );
  });

  it('refuses a non-SELECT query before sending anything', async () => {
    // The connection points at a port where nothing listens: reaching for the network would say so instead.
    const context = { connections: { test: { host: '127.0.0.1', port: await deadPort() } }, env: server.env() };
    expectInput(await refusal({ sql: { connection: 'test', query: 'DELETE FROM bottling RETURNING *' } }, count, context), 'sql-not-select', /starts with `DELETE`.*not sent/);
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' }, where: "line = 'a'; DROP TABLE bottling" }, count, context), 'sql-multiple-statements', /nothing was sent/);
    const stillThere = await server.query('SELECT count(*)::int AS n FROM bottling');
    assert.equal(stillThere[0].n, 200);
  });

  it('refuses a wrong password', async () => {
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' } }, count, { ...server.context(), password: 'not-the-password' }), 'sql-auth', /refused the password for user "countercheck_test"/);
  });

  it('says when the server wants a password and none is known', async () => {
    const env: Record<string, string> = { ...server.env(), PGPASSFILE: '/nonexistent/pgpass' };
    delete env.PGPASSWORD;
    // The client also falls back to PGPASSWORD and ~/.pgpass of the process environment.
    const saved = { PGPASSFILE: process.env.PGPASSFILE, PGPASSWORD: process.env.PGPASSWORD };
    process.env.PGPASSFILE = '/nonexistent/pgpass';
    delete process.env.PGPASSWORD;
    try {
      expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' } }, count, { connections: { test: {} }, env }), 'sql-auth', /asks for a password and none is known for user "countercheck_test"/);
    } finally {
      for (const [key, value] of Object.entries(saved)) {
        if (value === undefined) delete process.env[key];
        else process.env[key] = value;
      }
    }
  });

  it('refuses a server that is not there', async () => {
    const context = { connections: { test: { host: '127.0.0.1', port: await deadPort() } }, env: server.env() };
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' } }, count, context), 'sql-unreachable', /cannot reach the server \(ECONNREFUSED\)/);
  });

  it('reports a server that goes away mid-query', async () => {
    const running = refusal(slow(20), count);
    const pid = await backendOfReader();
    await server.query('SELECT pg_terminate_backend($1)', [pid]);
    expectInput(await running, 'sql-connection-lost', /ended the connection while the query ran/);
  });

  it('stops a query at the statement timeout', async () => {
    const started = Date.now();
    expectInput(await refusal(slow(20), count, { ...server.context(), timeoutMs: 300 }), 'sql-timeout', /longer than the statement timeout of 300 ms/);
    assert.ok(Date.now() - started < 5000, 'the server stopped the statement');
  });

  it('cancels the query on the server when the caller aborts', async () => {
    const controller = new AbortController();
    const started = Date.now();
    const running = refusal(slow(20), count, { ...server.context(), signal: controller.signal });
    await backendOfReader();
    controller.abort();
    const e = await running;
    assert.equal(e.name, 'AbortError', e.message);
    assert.ok(Date.now() - started < 5000, `cancelled after ${Date.now() - started} ms`);
    const active = await server.query("SELECT count(*)::int AS n FROM pg_stat_activity WHERE query LIKE '%pg_sleep(20)%' AND state = 'active' AND application_name <> 'test-harness'");
    assert.equal(active[0].n, 0, 'the statement no longer runs on the server');
  });

  it('keeps the transaction read-only: a condition that would write is stopped by the server', async () => {
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' }, where: "nextval('crate_numbers') > 0" }, count), 'sql-read-only', /tried to write/);
    const seq = await server.query('SELECT last_value::int AS v, is_called FROM crate_numbers');
    assert.equal(seq[0].is_called, false, 'the sequence was not advanced');
  });

  it('does not let the condition switch the transaction to read-write or lift the timeout', async () => {
    expectInput(
      await refusal({ sql: { connection: 'test', table: 'bottling' }, where: "set_config('transaction_read_only', 'off', true) IS NOT NULL AND nextval('crate_numbers') > 0" }, count),
      'sql-read-only',
      /read-write mode must be set before any query/,
    );
    const started = Date.now();
    expectInput(
      await refusal({ sql: { connection: 'test', table: 'bottling' }, where: "set_config('statement_timeout', '0', true) IS NOT NULL AND pg_sleep(20) IS NOT NULL" }, count, { ...server.context(), timeoutMs: 300 }),
      'sql-timeout',
      /statement timeout of 300 ms/,
    );
    assert.ok(Date.now() - started < 5000, 'the timeout armed before the statement still applied');
  });

  it('refuses a variance test on a text column', async () => {
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' } }, { kind: 'numeric', column: 'line' }), 'sql-not-numeric', /column `line` of bottling on connection "test" has type text; expected a numeric type/);
  });

  it('reports a syntax error in the where condition', async () => {
    expectInput(await refusal({ sql: { connection: 'test', table: 'bottling' }, where: 'line = = 1' }, count), 'sql-syntax', /syntax error/);
  });

  it('transfers only aggregate rows: a few hundred bytes for a 3-level count of 200 records', async () => {
    let read = 0;
    await aggregateSql({ sql: { connection: 'test', table: 'bottling' } }, count, { ...server.context(), onTraffic: (t) => (read = t.bytesRead) });
    assert.ok(read > 0 && read < 4000, `read ${read} bytes`);
  });
});
