/**
 * The one place that talks to PostgreSQL (`pg`, pure JavaScript). Every use is one connection and
 * one READ ONLY, REPEATABLE READ transaction with a statement timeout; statements go through the
 * extended protocol (one statement each, parameters bound, never interpolated). An AbortSignal
 * cancels the running statement on the server through a second connection (pg_cancel_backend).
 * The transaction is always ended and the connection always closed, whatever happens.
 */
import { readFileSync } from 'node:fs';
import type { Client, ClientConfig, FieldDef, QueryConfig } from 'pg';
import type { ConnectionOptions } from 'node:tls';
import { InputError, isInstance } from '../../errors';
import { describeConnection, type ResolvedConnection } from './connection';

export const applicationName = 'countercheck';

/** pg is loaded on first use, so that starting the editor extension does not pay for it. */
function newClient(config: ClientConfig): Client {
  const pg = require('pg') as typeof import('pg'); // eslint-disable-line @typescript-eslint/no-require-imports
  return new pg.Client(config);
}

export interface SqlRunOptions {
  readonly signal?: AbortSignal;
  /** Overrides the connection's statement timeout. */
  readonly timeoutMs?: number;
}

export interface SqlStatementResult {
  readonly rows: readonly Record<string, unknown>[];
  readonly fields: readonly FieldDef[];
}

export interface SqlSession {
  run(text: string, values?: readonly unknown[]): Promise<SqlStatementResult>;
}

export interface WireTraffic {
  /** Bytes received from the server over the connection's lifetime (startup and authentication included). */
  readonly bytesRead: number;
  readonly bytesWritten: number;
}

/** Raised when the caller cancels; the statement has been stopped on the server. */
export class SqlCancelledError extends Error {
  override readonly name = 'AbortError';
}

function tlsOptions(c: ResolvedConnection): ClientConfig['ssl'] {
  if (c.sslmode === 'disable') return false;
  const options: ConnectionOptions = { rejectUnauthorized: c.sslmode !== 'require' };
  if (c.sslrootcert && c.sslmode !== 'require') {
    try {
      options.ca = readFileSync(c.sslrootcert, 'utf8');
    } catch (e) {
      throw new InputError(`connection "${c.name}": cannot read sslrootcert ${c.sslrootcert} (${(e as Error).message})`, { jsonPath: '$.source.sql.connection' }, 'sql-connection-tls');
    }
  }
  // verify-ca: the chain must be trusted, the host name need not match.
  if (c.sslmode === 'verify-ca') options.checkServerIdentity = () => undefined;
  return options;
}

export function clientConfig(c: ResolvedConnection): ClientConfig {
  return {
    host: c.host,
    port: c.port,
    database: c.database,
    user: c.user,
    password: c.password,
    ssl: tlsOptions(c),
    application_name: applicationName,
    connectionTimeoutMillis: 15_000,
    keepAlive: true,
  };
}

/** Backend process id of a connected client (pg keeps it from BackendKeyData). */
function backendPid(client: Client): number | undefined {
  const pid = (client as unknown as { processID?: number | null }).processID;
  return typeof pid === 'number' ? pid : undefined;
}

async function cancelOnServer(c: ResolvedConnection, pid: number): Promise<void> {
  const canceller = newClient({ ...clientConfig(c), application_name: `${applicationName}-cancel` });
  canceller.on('error', () => undefined);
  try {
    await canceller.connect();
    await canceller.query({ text: 'SELECT pg_cancel_backend($1)', values: [pid] });
  } finally {
    await canceller.end().catch(() => undefined);
  }
}

async function closeQuietly(client: Client): Promise<void> {
  // end() waits for the server's goodbye; a dead socket would make it wait forever.
  const stream = (client as unknown as { connection?: { stream?: { destroy(): void } } }).connection?.stream;
  let timer: NodeJS.Timeout | undefined;
  await Promise.race([
    client.end().catch(() => undefined),
    new Promise<void>((resolve) => {
      timer = setTimeout(() => {
        stream?.destroy();
        resolve();
      }, 2_000);
    }),
  ]);
  clearTimeout(timer);
}

function traffic(client: Client): WireTraffic {
  const stream = (client as unknown as { connection?: { stream?: { bytesRead?: number; bytesWritten?: number } } }).connection?.stream;
  return { bytesRead: stream?.bytesRead ?? 0, bytesWritten: stream?.bytesWritten ?? 0 };
}

/**
 * Opens a connection, starts a read-only transaction with a statement timeout, hands a session to
 * `work`, then ends the transaction and the connection. Errors come back as InputError with a
 * message naming the connection (never its password), or SqlCancelledError after a cancel.
 */
export async function withReadOnlySession<T>(
  connection: ResolvedConnection,
  options: SqlRunOptions,
  work: (session: SqlSession) => Promise<T>,
): Promise<{ value: T; traffic: WireTraffic }> {
  const { signal } = options;
  const cancelled = (): SqlCancelledError => new SqlCancelledError(`the query on connection "${connection.name}" was cancelled`);
  if (signal?.aborted) throw cancelled();
  const timeoutMs = options.timeoutMs ?? connection.statementTimeoutMs;
  const client = newClient({ ...clientConfig(connection), query_timeout: timeoutMs + 15_000 });
  // Without a listener, a connection that the server ends between statements would crash the process.
  let lostConnection: Error | undefined;
  client.on('error', (e: Error) => {
    lostConnection = e;
  });
  let running = false;
  let cancelRequested = false;
  let cancelling: Promise<void> | undefined;
  const onAbort = (): void => {
    cancelRequested = true;
    const pid = backendPid(client);
    if (running && pid !== undefined) cancelling = cancelOnServer(connection, pid).catch(() => undefined);
  };
  signal?.addEventListener('abort', onAbort, { once: true });
  let inTransaction = false;
  const translate = (e: unknown): Error => {
    if (cancelRequested) return cancelled();
    return explainError(e, connection, timeoutMs, lostConnection);
  };
  try {
    try {
      await client.connect();
    } catch (e) {
      throw translate(e);
    }
    const exec = async (text: string, values: readonly unknown[] = []): Promise<SqlStatementResult> => {
      if (cancelRequested) throw cancelled();
      running = true;
      try {
        // queryMode "extended": Parse/Bind/Execute, which the server accepts only for a single statement.
        const config: QueryConfig & { queryMode: 'extended' } = { text, values: [...values], queryMode: 'extended' };
        const result = await client.query(config);
        return { rows: result.rows as Record<string, unknown>[], fields: result.fields };
      } catch (e) {
        throw translate(e);
      } finally {
        running = false;
      }
    };
    await exec('BEGIN ISOLATION LEVEL REPEATABLE READ, READ ONLY');
    inTransaction = true;
    await exec("SELECT set_config('statement_timeout', $1, true), set_config('idle_in_transaction_session_timeout', $2, true)", [
      String(timeoutMs),
      String(timeoutMs + 60_000),
    ]);
    const value = await work({ run: exec });
    await exec('COMMIT');
    inTransaction = false;
    return { value, traffic: traffic(client) };
  } finally {
    signal?.removeEventListener('abort', onAbort);
    if (cancelling) await cancelling;
    if (inTransaction && !lostConnection) {
      await client.query('ROLLBACK').catch(() => undefined);
    }
    await closeQuietly(client);
  }
}

interface PgErrorLike {
  code?: string;
  message?: string;
  position?: string;
  hint?: string;
}

/** Turns what pg or the server reports into one clear sentence naming the connection. */
export function explainError(e: unknown, c: ResolvedConnection, timeoutMs: number, lostConnection?: Error): Error {
  if (isInstance(e, InputError) || isInstance(e, SqlCancelledError)) return e;
  const err = (e ?? {}) as PgErrorLike;
  const code = err.code ?? '';
  const server = err.message ?? String(e);
  const on = `connection ${describeConnection(c)}`;
  const make = (message: string, code: string): InputError => new InputError(message, { jsonPath: '$.source.sql' }, code);
  switch (code) {
    case '28P01':
      return make(`${on}: the server refused the password for user "${c.user}"; set it again (secret storage, PGPASSWORD or ~/.pgpass)`, 'sql-auth');
    case '28000':
      return make(`${on}: the server does not allow this user or host to connect (${server})`, 'sql-auth');
    case '3D000':
      return make(`${on}: database "${c.database}" does not exist on the server`, 'sql-unknown-database');
    case '42P01':
      return make(`${on}: ${server}; table names are exact (case-sensitive), written schema.table`, 'sql-unknown-table');
    case '3F000':
      return make(`${on}: ${server}`, 'sql-unknown-table');
    case '42703':
      return make(`${on}: ${server} (in the \`where\` condition or the query)`, 'sql-unknown-column');
    case '42601':
      return make(`${on}: the server found a syntax error in the \`where\` condition or the query: ${server}`, 'sql-syntax');
    case '42883':
    case '42804':
    case '22P02':
      return make(`${on}: ${server}${err.hint ? ` (${err.hint})` : ''}`, 'sql-type');
    case '42501':
      return make(`${on}: ${server}; the user "${c.user}" needs SELECT on the source`, 'sql-permission');
    case '25006':
    case '25001':
      return make(`${on}: the SQL tried to write (${server}); Countercheck only reads, inside a read-only transaction`, 'sql-read-only');
    case '57014':
      return make(`${on}: the query ran longer than the statement timeout of ${timeoutMs} ms and the server stopped it; raise statementTimeoutMs for this connection or narrow the source`, 'sql-timeout');
    case '57P01':
    case '57P02':
    case '57P03':
      return make(`${on}: the server ended the connection while the query ran (${server}); nothing was left open on the client, try again when the server is back`, 'sql-connection-lost');
  }
  if (/client password must be a string|no password supplied|password must be/i.test(server)) {
    return make(`${on}: the server asks for a password and none is known for user "${c.user}"; give it when asked, or set PGPASSWORD or ~/.pgpass`, 'sql-auth');
  }
  const sysCode = (e as { code?: string }).code;
  if (sysCode === 'ECONNREFUSED' || sysCode === 'ENOTFOUND' || sysCode === 'EAI_AGAIN' || sysCode === 'EHOSTUNREACH' || sysCode === 'ENETUNREACH' || sysCode === 'ETIMEDOUT') {
    return make(`${on}: cannot reach the server (${sysCode}); is it running and listening on ${c.host}:${c.port}?`, 'sql-unreachable');
  }
  if (/timeout expired|Connection terminated due to connection timeout/i.test(server)) {
    return make(`${on}: the server did not answer within 15 s`, 'sql-unreachable');
  }
  if (lostConnection || /Connection terminated|ECONNRESET|server closed the connection/i.test(server)) {
    return make(`${on}: the server closed the connection while the query ran (${lostConnection?.message ?? server}); try again when the server is back`, 'sql-connection-lost');
  }
  if (/Query read timeout/i.test(server)) {
    return make(`${on}: no answer from the server within the statement timeout of ${timeoutMs} ms`, 'sql-timeout');
  }
  if (/self[- ]signed|certificate|SSL|TLS/i.test(server)) {
    return make(`${on}: TLS failed (${server}); check sslmode and sslrootcert for this connection`, 'sql-tls');
  }
  return make(`${on}: ${server}${code ? ` (SQLSTATE ${code})` : ''}`, 'sql-error');
}
