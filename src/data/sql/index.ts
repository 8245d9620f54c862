/**
 * The SQL reader: a spec's `{"sql": …}` source and an AggregateRequest in, the same Aggregate the
 * file readers return out. The engine does the counting; only aggregate rows cross the network.
 */
import { createHash } from 'node:crypto';
import { InputError } from '../../errors';
import type { IntakeOptions } from '../options';
import type { Aggregate, AggregateRequest } from '../types';
import { withReadOnlySession, type SqlSession, type WireTraffic } from './client';
import { resolveConnection, type ConnectionSettings, type Environment } from './connection';
import {
  canonicalAggregate,
  checkSqlSource,
  decodeAggregate,
  describeStatement,
  parseTableName,
  planAggregate,
  queryParameters,
  sourceName,
  type SqlAggregateOptions,
  type SqlSource,
} from './query';

export { SqlCancelledError } from './client';
export type { WireTraffic } from './client';
export { connectionEnvName, resolveConnection, describeConnection } from './connection';
export type { ConnectionSettings, Environment, ResolvedConnection, TlsMode } from './connection';
export { checkSqlSource, planAggregate } from './query';
export type { SqlAggregateOptions, SqlSource, SqlSourceSpec } from './query';

export interface SqlReaderContext {
  /** The `countercheck.connections` setting (the CLI may pass it from a settings file). */
  readonly connections?: Readonly<Record<string, ConnectionSettings>>;
  /** Environment for connection strings and PG* variables (default: process.env). */
  readonly env?: Environment;
  /** Password from the host's secret storage, if it has one for this connection. */
  readonly password?: string;
  readonly signal?: AbortSignal;
  /** Overrides the connection's statement timeout (ms). */
  readonly timeoutMs?: number;
  readonly options?: SqlAggregateOptions;
  /** Receives the bytes that crossed the connection (for benchmarks and logs). */
  readonly onTraffic?: (traffic: WireTraffic) => void;
}

/** What would be sent, for a preview in an untrusted workspace or a dry run. Checks the source first. */
export function previewSql(source: SqlSource, request: AggregateRequest, options?: SqlAggregateOptions): string {
  const plan = planAggregate(source, request, options);
  const params = plan.values.length ? `\n-- parameters: ${plan.values.map((v, i) => `$${i + 1} = ${JSON.stringify(v)}`).join(', ')}` : '';
  return `-- connection "${source.sql.connection}", read-only transaction\n${describeStatement(source)};\n${plan.text};${params}`;
}

// Type OIDs of the built-in numeric types (pg_type.dat).
const numericTypes = new Map<number, string>([
  [20, 'bigint'],
  [21, 'smallint'],
  [23, 'integer'],
  [700, 'real'],
  [701, 'double precision'],
  [1700, 'numeric'],
]);
const typeNames = new Map<number, string>([...numericTypes, [16, 'boolean'], [25, 'text'], [1043, 'character varying'], [1042, 'character'], [1082, 'date'], [1114, 'timestamp'], [1184, 'timestamp with time zone'], [2950, 'uuid'], [114, 'json'], [3802, 'jsonb']]);

/** Checks the requested columns against what the server says the source has, before aggregating. */
async function checkColumns(session: SqlSession, source: SqlSource, columns: readonly string[], numericColumns: readonly string[]): Promise<void> {
  const { fields } = await session.run(describeStatement(source), queryParameters(source));
  const byName = new Map(fields.map((f) => [f.name, f.dataTypeID]));
  const where = `${sourceName(source)} on connection "${source.sql.connection}"`;
  for (const column of columns) {
    if (!byName.has(column)) {
      const names = fields.map((f) => f.name);
      const near = names.find((n) => n.toLowerCase() === column.toLowerCase());
      throw new InputError(
        `column \`${column}\` is not in ${where}${near ? `; did you mean \`${near}\` (names are case-sensitive)?` : ''}; its columns are: ${names.slice(0, 40).join(', ')}${names.length > 40 ? ', …' : ''}`,
        { column, jsonPath: '$.source.columns' },
        'sql-unknown-column',
      );
    }
  }
  for (const column of numericColumns) {
    const oid = byName.get(column) as number;
    if (!numericTypes.has(oid)) {
      throw new InputError(
        `column \`${column}\` of ${where} has type ${typeNames.get(oid) ?? `oid ${oid}`}; expected a numeric type (integer, numeric, real, double precision)`,
        { column },
        'sql-not-numeric',
      );
    }
  }
}

/**
 * Runs the aggregation for `request` on the server and returns it as the file readers would.
 * Provenance.sha256 is the hash of the canonical aggregate (labels, counts, rows, dropped).
 */
export async function aggregateSql(source: SqlSource, request: AggregateRequest, context: SqlReaderContext = {}): Promise<Aggregate> {
  checkSqlSource(source);
  const plan = planAggregate(source, request, context.options);
  const connection = resolveConnection(source.sql.connection, context.connections, context.env ?? process.env, context.password);
  const { value: rows, traffic } = await withReadOnlySession(connection, { signal: context.signal, timeoutMs: context.timeoutMs }, async (session) => {
    await checkColumns(session, source, plan.columns, plan.numericColumns);
    return (await session.run(plan.text, plan.values)).rows;
  });
  context.onTraffic?.(traffic);
  const decoded = decodeAggregate(request, rows, context.options);
  const sha256 = createHash('sha256').update(canonicalAggregate(decoded)).digest('hex');
  const description = `sql:${source.sql.connection} ${sourceName(source)}${source.where !== undefined ? ' (filtered)' : ''}${source.asOf ? `, as of ${source.asOf}` : ''}`;
  const provenance = { description, sha256, ...decoded.provenance };
  switch (decoded.kind) {
    case 'table':
      return { kind: 'table', table: decoded.table, provenance };
    case 'categories':
      return { kind: 'categories', counts: decoded.counts, provenance };
    case 'strata':
      return { kind: 'strata', strata: decoded.strata, provenance };
    case 'moments':
      return { kind: 'moments', moments: decoded.moments, provenance, ...(decoded.values ? { values: decoded.values } : {}) };
  }
}

/** The members of a spec's `source` the SQL reader uses (structurally the spec's SourceSpec). */
export interface SqlSpecSource {
  readonly sql?: SqlSource['sql'];
  readonly where?: string;
  readonly parameters?: SqlSource['parameters'];
  readonly asOf?: string;
}

/**
 * The reader runSpec takes as `readers.aggregateSql`: the spec's source and the reader options it
 * derived (missing values, categories) in, the Aggregate out. `password` asks the host's secret
 * storage for a connection's password (absent on the command line: PGPASSWORD or ~/.pgpass).
 */
export function sqlSpecReader(context: Omit<SqlReaderContext, 'signal' | 'options' | 'password'> & { password?: (connection: string) => Promise<string | undefined> }) {
  return async (
    source: SqlSpecSource,
    request: AggregateRequest,
    intake: Pick<IntakeOptions, 'missing' | 'categories' | 'keepValues'>,
    control: { readonly signal?: AbortSignal; readonly onProgress?: (fraction: number) => void },
  ): Promise<Aggregate> => {
    if (!source.sql) throw new InputError('$.source.sql: expected a SQL source', { jsonPath: '$.source.sql' }, 'sql-source-shape');
    const sqlSource: SqlSource = { sql: source.sql, where: source.where, parameters: source.parameters, asOf: source.asOf };
    const password = await context.password?.(source.sql.connection);
    control.onProgress?.(0);
    const aggregate = await aggregateSql(sqlSource, request, {
      ...context,
      password,
      signal: control.signal,
      options: { missing: intake.missing, categories: intake.categories, ...(intake.keepValues ? { keepValues: true } : {}) },
    });
    control.onProgress?.(1);
    return aggregate;
  };
}

/** Tables and views the connection's user can read, for the editor's picker (information_schema). */
export async function listTables(connection: ReturnType<typeof resolveConnection>, signal?: AbortSignal): Promise<{ schema: string; name: string; type: string }[]> {
  const { value } = await withReadOnlySession(connection, { signal, timeoutMs: 30_000 }, (s) =>
    s.run(
      `SELECT table_schema, table_name, table_type FROM information_schema.tables
       WHERE table_schema NOT IN ('pg_catalog', 'information_schema') ORDER BY 1, 2`,
    ),
  );
  return value.rows.map((r) => ({ schema: String(r.table_schema), name: String(r.table_name), type: String(r.table_type) }));
}

/** Columns of a table (information_schema.columns) or of a query (described by the server without reading a row). */
export async function listColumns(
  connection: ReturnType<typeof resolveConnection>,
  source: SqlSource,
  signal?: AbortSignal,
): Promise<{ name: string; type: string; numeric: boolean }[]> {
  checkSqlSource(source);
  const { value } = await withReadOnlySession(connection, { signal, timeoutMs: 30_000 }, async (s) => {
    if (source.sql.table !== undefined) {
      const parts = parseTableName(source.sql.table);
      const { rows } = await s.run(
        `SELECT column_name, data_type, numeric_precision IS NOT NULL AS numeric FROM information_schema.columns
         WHERE table_name = $1 AND (CASE WHEN $2::text IS NULL THEN table_schema = ANY (current_schemas(false)) ELSE table_schema = $2 END)
         ORDER BY table_schema, ordinal_position`,
        [parts[parts.length - 1], parts.length === 2 ? parts[0] : null],
      );
      if (rows.length === 0) throw new InputError(`table ${parts.join('.')} was not found on connection "${connection.name}" (or has no columns you may read)`, { jsonPath: '$.source.sql.table' }, 'sql-unknown-table');
      return rows.map((r) => ({ name: String(r.column_name), type: String(r.data_type), numeric: r.numeric === true }));
    }
    const { fields } = await s.run(describeStatement(source), queryParameters(source));
    return fields.map((f) => ({ name: f.name, type: typeNames.get(f.dataTypeID) ?? `oid ${f.dataTypeID}`, numeric: numericTypes.has(f.dataTypeID) }));
  });
  return value;
}
