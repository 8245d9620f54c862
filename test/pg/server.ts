/**
 * The live PostgreSQL server the tests in test/pg run against. COUNTERCHECK_PG_ENV names a file of
 * PG* lines written by scripts/pg/start.sh (`npm run test:pg`, scripts/pg/run-tests.mjs, starts one and
 * sets it). When the variable is set, every failure to reach the server FAILS the tests; when it is
 * unset (a developer's machine without a server), the suite is skipped with a message saying how to run it.
 */
import { execFile } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { Client } from 'pg';
import type { SqlReaderContext } from '../../src/data/sql/index';

export const pgEnvFile = process.env.COUNTERCHECK_PG_ENV;

export function readEnvFile(file: string): Record<string, string> {
  if (!existsSync(file)) throw new Error(`COUNTERCHECK_PG_ENV=${file}, but the file does not exist: was the server started (scripts/pg/start.sh)?`);
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

/** Registers the suite's `before` hook: skip without a server configured, fail with one that does not answer. */
export function liveServer(): { env: () => Record<string, string>; context: () => SqlReaderContext; query: (text: string, values?: unknown[]) => Promise<Record<string, unknown>[]>; psql: (command: string) => Promise<string> } {
  let env: Record<string, string> | undefined;
  before(async function () {
    if (!pgEnvFile) {
      console.log('    (skipped: COUNTERCHECK_PG_ENV is not set; run `bash scripts/pg/start.sh /tmp/cc-pg` and `COUNTERCHECK_PG_ENV=/tmp/cc-pg/env npm run test:pg`)');
      this.skip();
    }
    env = readEnvFile(pgEnvFile);
    try {
      await query('SELECT 1');
    } catch (e) {
      throw new Error(`the PostgreSQL server of COUNTERCHECK_PG_ENV=${pgEnvFile} (${env.PGHOST}:${env.PGPORT}) does not answer: ${(e as Error).message}`);
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
