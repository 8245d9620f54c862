/**
 * The live PostgreSQL server the tests in test/pg run against. COUNTERCHECK_PG_ENV names a file of
 * PG* lines written by scripts/pg/start.sh (`npm run test:pg`, scripts/pg/run-tests.mjs, starts one and
 * sets it). When the variable is set, every failure to reach the server FAILS the tests; when it is
 * unset (a developer's machine without a server), the suite is skipped with a message saying how to run it; with CI=true it fails.
 * COUNTERCHECK_PG_DIST_ENV names the coordinator of the distributed setup (scripts/pg/start-distributed.sh) the same way.
 */
import { strict as assert } from 'node:assert';
import { execFile } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { Client } from 'pg';
import type { SqlReaderContext } from '../../src/data/sql/index';
import type { Aggregate } from '../../src/data/types';

export function readEnvFile(file: string): Record<string, string> {
  if (!existsSync(file)) throw new Error(`${file} does not exist: was the server started (scripts/pg/start.sh, or start-distributed.sh for COUNTERCHECK_PG_DIST_ENV)?`);
  const env: Record<string, string> = {};
  for (const line of readFileSync(file, 'utf8').split('\n')) {
    const m = /^([A-Z_][A-Z0-9_]*)=(.*)$/.exec(line.trim());
    if (m) env[m[1]] = m[2];
  }
  for (const key of ['PGHOST', 'PGPORT', 'PGUSER', 'PGPASSWORD', 'PGDATABASE']) {
    if (!env[key]) throw new Error(`${file} has no ${key}`);
  }
  return env;
}

/**
 * Registers the suite's `before` hook: skip without a server configured (fail in CI), fail with one that does not answer.
 * `variable` names the environment variable holding the env file (the single server by default).
 */
export function liveServer(variable = 'COUNTERCHECK_PG_ENV', start = 'bash scripts/pg/start.sh /tmp/cc-pg'): { env: () => Record<string, string>; context: () => SqlReaderContext; query: (text: string, values?: unknown[]) => Promise<Record<string, unknown>[]>; psql: (command: string) => Promise<string> } {
  let env: Record<string, string> | undefined;
  const envFile = process.env[variable];
  before(async function () {
    if (!envFile) {
      // In CI a missing server is a failure, never a silent pass (npm run test:pg starts one; .ci/run sets CI=true).
      if (process.env.CI === 'true') throw new Error(`${variable} is not set in CI: the PostgreSQL suite must run there (npm run test:pg starts a server)`);
      console.log(`    (skipped: ${variable} is not set; run \`${start}\` and \`${variable}=/tmp/cc-pg/env npm run test:pg\`)`);
      this.skip();
    }
    env = readEnvFile(envFile);
    try {
      await query('SELECT 1');
    } catch (e) {
      throw new Error(`the PostgreSQL server of ${variable}=${envFile} (${env.PGHOST}:${env.PGPORT}) does not answer: ${(e as Error).message}`);
    }
  });
  const need = (): Record<string, string> => {
    if (!env) throw new Error('the server environment was not read');
    return env;
  };
  async function query(text: string, values: unknown[] = []): Promise<Record<string, unknown>[]> {
    const e = need();
    const client = new Client({ host: e.PGHOST, port: Number(e.PGPORT), user: e.PGUSER, password: e.PGPASSWORD, database: e.PGDATABASE, application_name: 'test-harness' });
    await client.connect();
    try {
      return (await client.query(text, values)).rows as Record<string, unknown>[];
    } finally {
      await client.end();
    }
  }
  async function psql(command: string): Promise<string> {
    const e = need();
    const bin = e.COUNTERCHECK_PG_BIN ? join(e.COUNTERCHECK_PG_BIN, 'psql') : 'psql';
    const { stdout } = await promisify(execFile)(bin, ['-X', '-q', '-v', 'ON_ERROR_STOP=1', '-c', command], {
      env: { ...process.env, ...e, PGAPPNAME: 'test-harness' },
      maxBuffer: 1 << 20,
    });
    return stdout;
  }
  return {
    env: need,
    context: () => ({ connections: { test: {} }, env: need() }),
    query,
    psql,
  };
}

/** Sessions the SQL reader opened that are still there (waits up to `ms` for backends to exit). */
export async function leftoverSessions(query: (text: string) => Promise<Record<string, unknown>[]>, ms = 3000): Promise<Record<string, unknown>[]> {
  const until = Date.now() + ms;
  for (;;) {
    const rows = await query(
      "SELECT pid, application_name, state, backend_xid, left(query, 60) AS query FROM pg_stat_activity WHERE application_name LIKE 'countercheck%' OR (state LIKE 'idle in transaction%' AND application_name <> 'test-harness')",
    );
    if (rows.length === 0 || Date.now() > until) return rows;
    await new Promise((r) => setTimeout(r, 100));
  }
}

export function relative(a: number, b: number): number {
  return a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b));
}

/**
 * Compares what two sources give for one request: records read and dropped and the columns exactly, tables and
 * category counts exactly, n, min and max exactly, mean and variance to 1e-12 relative. The fingerprints are not
 * compared (a file's is of its bytes). `names` label the two sides in messages.
 */
export function assertSameAggregate(a: Aggregate, b: Aggregate, what: string, names: readonly [string, string] = ['PostgreSQL', 'CSV path']): void {
  assert.equal(a.kind, b.kind, what);
  assert.equal(a.provenance.rows, b.provenance.rows, `${what}: records read`);
  assert.equal(a.provenance.dropped, b.provenance.dropped, `${what}: records dropped`);
  assert.deepEqual(a.provenance.columns, b.provenance.columns, `${what}: columns`);
  if (a.kind === 'table' && b.kind === 'table') assert.deepEqual(a.table, b.table, what);
  else if (a.kind === 'categories' && b.kind === 'categories') assert.deepEqual(a.counts, b.counts, what);
  else if (a.kind === 'moments' && b.kind === 'moments') {
    const s = a.moments;
    const f = b.moments;
    assert.equal(s.n, f.n, `${what}: n`);
    assert.equal(s.min, f.min, `${what}: min`);
    assert.equal(s.max, f.max, `${what}: max`);
    const checks: [string, number, number, number][] = [
      ['variance m2/(n-1)', s.m2 / (s.n - 1), f.m2 / (f.n - 1), 1e-12],
      ['mean', s.mean, f.mean, 1e-12],
    ];
    for (const [name, got, expected, tolerance] of checks) {
      const delta = relative(got, expected);
      assert.ok(delta <= tolerance, `${what}: ${name}: ${names[0]} ${got}, ${names[1]} ${expected}, relative Δ ${delta}, tolerance ${tolerance}`);
    }
  } else assert.fail(`${what}: unexpected kinds ${a.kind} and ${b.kind}`);
}
