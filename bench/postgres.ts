// PostgreSQL against the streaming CSV path on the same 10,000,000 rows, in the same run: a 6×4
// cross-tabulation and the variance of a float column, with the bytes that crossed the connection.
// Uses the server named by COUNTERCHECK_PG_ENV=<file of PG* lines> (scripts/pg/start.sh writes one);
// without it, starts a throwaway cluster with scripts/pg/ensure-server.sh and stops it afterwards.
import { execFile, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { Client } from 'pg';
import { aggregateFile } from '../src/data/file';
import { aggregateSql, type SqlReaderContext } from '../src/data/sql/index';
import type { AggregateRequest } from '../src/data/types';

/**
 * A bike-share trip log, generated on the server: 6 stations × 4 bike types (related, not
 * independent), trip minutes with 4 decimals (one in a thousand missing), an id. Deterministic.
 */
export function tripsTableSql(table: string, rows: number): string {
  return `CREATE UNLOGGED TABLE ${table} AS
    ${tripsSelectSql(rows)}`;
}

/** The rows of the trip log as a SELECT (the distributed setup keeps on each shard the rows of its stations). */
export function tripsSelectSql(rows: number): string {
  return `SELECT i AS id,
      (ARRAY['Harbour', 'Old Town', 'Campus', 'Riverside', 'Station', 'Hillside'])[(1 + (i * 7 + i / 13) % 6)::int] AS station,
      (ARRAY['classic', 'electric', 'cargo', 'tandem'])[(1 + ((i * 2654435761) % 1000003) % 4)::int] AS bike,
      CASE WHEN i % 1000 = 0 THEN NULL
           ELSE round((((i * 48271) % 2147483647)::double precision / 2147483647 * 45 + (i % 6)) * 10000) / 10000 END AS minutes
    FROM generate_series(1::bigint, ${rows}) AS i`;
}

export const tripRequests: readonly AggregateRequest[] = [
  { kind: 'crosstab', rowColumn: 'station', columnColumn: 'bike' },
  { kind: 'numeric', column: 'minutes' },
];

export function envFile(file = process.env.COUNTERCHECK_PG_ENV ?? (existsSync('/tmp/countercheck-ci-pg/env') ? '/tmp/countercheck-ci-pg/env' : undefined)): Record<string, string> | undefined {
  if (!file || !existsSync(file)) return undefined;
  return Object.fromEntries(
    readFileSync(file, 'utf8')
      .split('\n')
      .map((l) => /^([A-Z_][A-Z0-9_]*)=(.*)$/.exec(l.trim()))
      .filter((m): m is RegExpExecArray => m !== null)
      .map((m) => [m[1], m[2]]),
  );
}

/** Creates the table unless it already holds `rows` rows. */
export async function ensureTrips(env: Record<string, string>, table: string, rows: number): Promise<void> {
  const client = new Client({ host: env.PGHOST, port: Number(env.PGPORT), user: env.PGUSER, password: env.PGPASSWORD, database: env.PGDATABASE });
  await client.connect();
  try {
    const exists = await client.query('SELECT to_regclass($1) IS NOT NULL AS present', [table]);
    if (exists.rows[0].present) {
      const { rows: r } = await client.query(`SELECT count(*)::bigint AS n FROM ${table}`);
      if (Number(r[0].n) === rows) return;
      await client.query(`DROP TABLE ${table}`);
    }
    await client.query(tripsTableSql(table, rows));
    await client.query(`ANALYZE ${table}`);
  } finally {
    await client.end();
  }
}

/** Writes the table to a CSV file with psql's client-side \copy: the same values, to the last bit. */
export async function exportCsv(env: Record<string, string>, select: string, file: string): Promise<void> {
  const psql = env.COUNTERCHECK_PG_BIN ? join(env.COUNTERCHECK_PG_BIN, 'psql') : 'psql';
  await promisify(execFile)(psql, ['-X', '-q', '-v', 'ON_ERROR_STOP=1', '-c', `\\copy (${select}) TO '${file}' WITH (FORMAT csv, HEADER)`], {
    env: { ...process.env, ...env },
  });
}

async function timed<T>(f: () => Promise<T>): Promise<{ value: T; seconds: number }> {
  const start = process.hrtime.bigint();
  const value = await f();
  return { value, seconds: Number(process.hrtime.bigint() - start) / 1e9 };
}

/** With no server configured, starts a throwaway one (installing PostgreSQL from Debian when missing), as the tests do. */
function startThrowawayServer(): { env: Record<string, string>; stop(): void } | undefined {
  const dir = '/tmp/countercheck-bench-pg';
  const script = (name: string) => join(process.cwd(), 'scripts', 'pg', name);
  if (spawnSync('bash', [script('ensure-server.sh'), dir], { stdio: 'inherit' }).status !== 0) return undefined;
  const env = envFile(join(dir, 'env'));
  const stop = () => void spawnSync('bash', [script('stop.sh'), dir], { stdio: 'ignore' });
  if (!env) stop();
  return env ? { env, stop } : undefined;
}

export async function run(): Promise<void> {
  const configured = envFile();
  const started = configured ? undefined : startThrowawayServer();
  const env = configured ?? started?.env;
  if (!env) {
    console.log('PostgreSQL not available (no COUNTERCHECK_PG_ENV, and scripts/pg/ensure-server.sh could not start one): part skipped.');
    return;
  }
  try {
    await measure(env);
  } finally {
    started?.stop();
  }
}

async function measure(env: Record<string, string>): Promise<void> {
  const rows = Number(process.env.COUNTERCHECK_BENCH_ROWS ?? 10_000_000);
  const table = `bench_trips_${rows}`;
  const folder = mkdtempSync(join(tmpdir(), 'countercheck-bench-pg-'));
  try {
    const made = await timed(() => ensureTrips(env, table, rows));
    console.log(`table ${table}: ${rows.toLocaleString('en')} rows ready in ${made.seconds.toFixed(1)} s (generate_series on the server)`);
    const csv = join(folder, 'trips.csv');
    const copied = await timed(() => exportCsv(env, `SELECT * FROM ${table}`, csv));
    const size = statSync(csv).size;
    console.log(`CSV written by \\copy: ${(size / 1e6).toFixed(0)} MB in ${copied.seconds.toFixed(1)} s`);
    const context: SqlReaderContext = { connections: { bench: {} }, env };
    console.log('request                      | PostgreSQL s | bytes in/out  | CSV path s | MB/s (CSV) | same result');
    for (const request of tripRequests) {
      for (const higherMoments of request.kind === 'numeric' ? [false, true] : [true]) {
        let traffic = { bytesRead: 0, bytesWritten: 0 };
        const viaSql = await timed(() =>
          aggregateSql({ sql: { connection: 'bench', table } }, request, { ...context, options: { higherMoments }, onTraffic: (t) => (traffic = t) }),
        );
        const viaFile = await timed(() => aggregateFile(csv, request, { dialect: { header: true, comment: null }, categories: { order: 'sorted' } }));
        let same = 'no';
        const a = viaSql.value;
        const b = viaFile.value;
        if (a.kind === 'table' && b.kind === 'table') same = JSON.stringify(a.table) === JSON.stringify(b.table) ? 'exact' : 'NO';
        if (a.kind === 'moments' && b.kind === 'moments') {
          const va = a.moments.m2 / (a.moments.n - 1);
          const vb = b.moments.m2 / (b.moments.n - 1);
          same = `variance Δrel ${(Math.abs(va - vb) / Math.abs(vb)).toExponential(1)}`;
        }
        const name = request.kind === 'crosstab' ? '6×4 cross-tab' : `variance (${higherMoments ? 'two scans, m3/m4' : 'one scan'})`;
        console.log(
          `${name.padEnd(28)} | ${viaSql.seconds.toFixed(2).padStart(12)} | ${`${traffic.bytesRead}/${traffic.bytesWritten}`.padStart(13)} | ${viaFile.seconds.toFixed(2).padStart(10)} | ${(size / 1e6 / viaFile.seconds).toFixed(0).padStart(10)} | ${same}`,
        );
      }
    }
    console.log('bytes: everything the socket carried (startup, authentication, catalogue check, BEGIN/COMMIT); target under 10 KB for the 6×4 table');
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

export const postgresBench = { name: 'postgres', run };
