// What the editor's database command reads from the catalogue: tables and views, and the columns of
// a table (information_schema) or of a query (described by the server without reading a row).
import { strict as assert } from 'node:assert';
import { listColumns, listTables, resolveConnection } from '../../src/data/sql/index';
import { leftoverSessions, liveServer } from './server';

const server = liveServer();

describe('the catalogue for the editor command', () => {
  before(async () => {
    await server.query('DROP VIEW IF EXISTS "Kiln log"."firings by day"');
    await server.query('DROP TABLE IF EXISTS "Kiln log".firings');
    await server.query('CREATE SCHEMA IF NOT EXISTS "Kiln log"');
    await server.query('CREATE TABLE "Kiln log".firings (id integer, "Glaze type" text, peak_c numeric(6,1), cracked boolean)');
    await server.query('CREATE VIEW "Kiln log"."firings by day" AS SELECT "Glaze type", count(*) AS n FROM "Kiln log".firings GROUP BY 1');
  });
  afterEach(async () => {
    assert.deepEqual(await leftoverSessions(server.query), [], 'a session of the reader is still open');
  });

  const connection = () => resolveConnection('test', { test: {} }, server.env());

  it('lists tables and views with their schema', async () => {
    const tables = await listTables(connection());
    assert.deepEqual(
      tables.filter((t) => t.schema === 'Kiln log'),
      [
        { schema: 'Kiln log', name: 'firings', type: 'BASE TABLE' },
        { schema: 'Kiln log', name: 'firings by day', type: 'VIEW' },
      ],
    );
  });

  it('lists the columns of a table with names that need quoting, marking the numeric ones', async () => {
    const columns = await listColumns(connection(), { sql: { connection: 'test', table: '"Kiln log".firings' } });
    assert.deepEqual(columns, [
      { name: 'id', type: 'integer', numeric: true },
      { name: 'Glaze type', type: 'text', numeric: false },
      { name: 'peak_c', type: 'numeric', numeric: true },
      { name: 'cracked', type: 'boolean', numeric: false },
    ]);
  });

  it('describes the columns of a query without running it', async () => {
    const columns = await listColumns(connection(), { sql: { connection: 'test', query: 'SELECT "Glaze type", n, n * 1.5 AS weighted FROM "Kiln log"."firings by day" WHERE n > $1' }, parameters: [0] });
    assert.deepEqual(columns, [
      { name: 'Glaze type', type: 'text', numeric: false },
      { name: 'n', type: 'bigint', numeric: true },
      { name: 'weighted', type: 'numeric', numeric: true },
    ]);
  });

  it('names a table that is not there', async () => {
    await assert.rejects(listColumns(connection(), { sql: { connection: 'test', table: 'kiln_log.firings' } }), /table kiln_log\.firings was not found on connection "test"/);
  });
});
