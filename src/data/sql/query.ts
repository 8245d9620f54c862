/**
 * SQL generation for sources that count on the server. Pure: a spec's SQL source and an
 * AggregateRequest in, statement text and parameter values out; aggregate rows in, Aggregate out.
 *
 * What reaches the server:
 *  - identifiers (schema, table, columns) are always double-quoted, exactly as written (no case
 *    folding), so a column name can never become SQL;
 *  - values are never interpolated: `parameters` from the spec travel as bind parameters;
 *  - the user's own SQL (a `where` condition, a saved SELECT) is checked with a lexer before
 *    anything is sent (no `;`, balanced parentheses, a SELECT and nothing else) and then wrapped,
 *    so it cannot end the statement we build around it; the client also sends every statement
 *    through the extended protocol, which the server accepts only as one single statement, inside
 *    a READ ONLY transaction with a statement timeout.
 *  - the aggregation is ours: GROUP BY with count(*) or sum(weight) for counts (one, two or three
 *    category columns: a stratified table groups by stratum, row, column); count, avg and
 *    var_samp (plus two-pass third and fourth central moments) for a numeric column. Never Σx, Σx².
 */
import { InputError, type InputLocation } from '../../errors';
import { MomentAccumulator } from '../../stats/moments';
import type { Aggregate, AggregateRequest, Provenance, StratifiedCounts } from '../types';
import { StrataCounter } from '../strata';
import { CategoryCoder, MISSING, missingTokens } from '../categories';
import type { CategoryOptions, MissingOptions } from '../options';
import { describePosition, tokenizeSql, type SqlToken } from './lexer';

/** The `"sql"` member of a spec's source. */
export interface SqlSourceSpec {
  /** Name of a configured connection (settings `countercheck.connections` or an environment variable). */
  readonly connection: string;
  /** `schema.table` or `table`; exact names (no case folding); double-quote a part that contains a dot. */
  readonly table?: string;
  /** A SELECT of the user's own, run as a subquery. */
  readonly query?: string;
}

/** A spec's SQL source with the members that shape the aggregation. */
export interface SqlSource {
  readonly sql: SqlSourceSpec;
  /** Extra filter, user SQL: an expression over the source's columns. */
  readonly where?: string;
  /** Bind parameters referenced as $1, $2, … in `where` or `query`. */
  readonly parameters?: readonly (string | number | boolean | null)[];
  /** Free note recorded with the result ("nightly snapshot of 2026-11-30"). */
  readonly asOf?: string;
}

/**
 * Missing values and category levels follow the file readers' options exactly (IntakeOptions), so
 * the same spec gives the same table from a CSV file and from a table. SQL NULL is always missing.
 * Level order: "given" as given; otherwise sorted (a server has no "first seen" order).
 */
export interface SqlAggregateOptions {
  readonly missing?: MissingOptions;
  readonly categories?: CategoryOptions;
  /** Also compute the third and fourth central moments (a second pass over the data). Default true. */
  readonly higherMoments?: boolean;
  /** For a numeric request, transfer the values themselves (a distribution fit bins them); at most MAX_SQL_VALUES rows. */
  readonly keepValues?: boolean;
}

/** The most rows a numeric column may have when its values themselves are transferred. */
export const MAX_SQL_VALUES = 1_000_000;

const sqlLocation: InputLocation = { jsonPath: '$.source.sql' };

/** `"name"` with embedded quotes doubled. */
export function quoteIdentifier(name: string, location: InputLocation = sqlLocation): string {
  if (name.length === 0) throw new InputError('an empty name cannot be a SQL identifier', location, 'sql-identifier');
  if (name.includes('\u0000')) throw new InputError(`the name ${JSON.stringify(name)} contains a NUL character`, location, 'sql-identifier');
  return `"${name.replace(/"/g, '""')}"`;
}

/**
 * Splits `schema.table` into its parts. Parts are exact names; a part written in double quotes
 * may contain dots ("sales"."q3.orders"). One or two parts.
 */
export function parseTableName(table: string): readonly string[] {
  const location: InputLocation = { jsonPath: '$.source.sql.table' };
  const parts: string[] = [];
  let i = 0;
  const bad = (why: string): never => {
    throw new InputError(`table ${JSON.stringify(table)}: ${why}; expected "schema.table" or "table"`, location, 'sql-table-name');
  };
  while (i <= table.length) {
    let part = '';
    if (table[i] === '"') {
      i++;
      for (;;) {
        if (i >= table.length) bad('a double quote is never closed');
        if (table[i] === '"') {
          if (table[i + 1] === '"') {
            part += '"';
            i += 2;
          } else break;
        } else part += table[i++];
      }
      i++;
      if (i < table.length && table[i] !== '.') bad(`unexpected text after a quoted name at character ${i + 1}`);
    } else {
      const dot = table.indexOf('.', i);
      const end = dot < 0 ? table.length : dot;
      part = table.slice(i, end).trim();
      if (part.includes('"')) bad('a double quote inside a name must enclose the whole part');
      i = end;
    }
    if (part.length === 0) bad('a part of the name is empty');
    parts.push(part);
    if (i >= table.length) break;
    i++; // the dot
    if (i === table.length) bad('the name ends with a dot');
  }
  if (parts.length > 2) bad(`${parts.length} dot-separated parts`);
  return parts;
}

/** Checks a `where` condition: one expression, nothing that could close the statement around it. */
export function checkWhereCondition(where: string): readonly SqlToken[] {
  const location: InputLocation = { jsonPath: '$.source.where' };
  const what = 'the `where` condition';
  const tokens = tokenizeSql(where, what, location);
  if (tokens.length === 0) throw new InputError(`${what} is empty; leave it out to use every row`, location, 'sql-where-empty');
  checkStructure(where, tokens, what, location, false);
  return tokens;
}

/** Words that make a statement write or create something; refused anywhere in a saved query. */
const writingWords = new Set(['insert', 'update', 'delete', 'merge', 'into', 'truncate', 'copy', 'create', 'drop', 'alter', 'grant', 'revoke', 'call']);
const selectStarts = new Set(['select', 'with', 'values', 'table']);

/**
 * Checks a user's query: a single SELECT (or WITH … SELECT, VALUES, TABLE). Returns the text to
 * wrap as a subquery, without a final semicolon. Refuses before anything is sent.
 */
export function checkSelectQuery(query: string): string {
  const location: InputLocation = { jsonPath: '$.source.sql.query' };
  const what = 'the query';
  let tokens = tokenizeSql(query, what, location);
  let text = query;
  const last = tokens[tokens.length - 1];
  if (last && last.text === ';') {
    text = query.slice(0, last.offset);
    tokens = tokens.slice(0, -1);
  }
  const first = tokens.find((t) => t.text !== '(');
  if (!first) throw new InputError(`${what} is empty`, location, 'sql-query-empty');
  if (first.kind !== 'word' || !selectStarts.has(first.text.toLowerCase())) {
    throw new InputError(
      `${what} must be a single SELECT; it starts with \`${first.text}\` (${describePosition(query, first.offset)}) and was not sent`,
      location,
      'sql-not-select',
    );
  }
  checkStructure(query, tokens, what, location, true);
  return text;
}

function checkStructure(text: string, tokens: readonly SqlToken[], what: string, location: InputLocation, refuseWriting: boolean): void {
  let depth = 0;
  for (const t of tokens) {
    if (t.text === ';') {
      throw new InputError(`${what} holds a \`;\` at ${describePosition(text, t.offset)}: only one statement is allowed, and nothing was sent`, location, 'sql-multiple-statements');
    }
    if (t.text === '(') depth++;
    if (t.text === ')') {
      depth--;
      if (depth < 0) {
        throw new InputError(`${what} closes a parenthesis it never opened at ${describePosition(text, t.offset)}`, location, 'sql-parentheses');
      }
    }
    if (refuseWriting && t.kind === 'word' && writingWords.has(t.text.toLowerCase())) {
      throw new InputError(
        `${what} must only read: \`${t.text}\` at ${describePosition(text, t.offset)} would write or lock, so the query was not sent (write a column of that name in double quotes)`,
        location,
        'sql-not-select',
      );
    }
  }
  if (depth > 0) throw new InputError(`${what} leaves ${depth} parenthes${depth === 1 ? 'is' : 'es'} open`, location, 'sql-parentheses');
}

/** Checks every member of a SQL source that does not need the server. */
export function checkSqlSource(source: SqlSource): void {
  const { sql } = source;
  if (typeof sql.connection !== 'string' || sql.connection.trim() === '') {
    throw new InputError('a SQL source needs "connection": the name of a configured connection', { jsonPath: '$.source.sql.connection' }, 'sql-connection-missing');
  }
  const hasTable = typeof sql.table === 'string';
  const hasQuery = typeof sql.query === 'string';
  if (hasTable === hasQuery) {
    throw new InputError('a SQL source needs exactly one of "table" (schema.table) or "query" (a SELECT)', sqlLocation, 'sql-source-shape');
  }
  if (hasTable) parseTableName(sql.table as string);
  if (hasQuery) checkSelectQuery(sql.query as string);
  if (source.where !== undefined) checkWhereCondition(source.where);
  const used = new Set<number>();
  for (const fragment of [sql.query, source.where]) {
    if (fragment === undefined) continue;
    for (const t of tokenizeSql(fragment, 'the SQL')) if (t.kind === 'parameter') used.add(Number(t.text.slice(1)));
  }
  const given = source.parameters?.length ?? 0;
  for (const k of used) {
    if (k < 1 || k > given) {
      throw new InputError(`$${k} is used but "parameters" holds ${given} value${given === 1 ? '' : 's'}`, { jsonPath: '$.source.parameters' }, 'sql-parameters');
    }
  }
  // The server needs a type for every parameter it is sent, which it infers from where the parameter is used.
  for (let k = 1; k <= given; k++) {
    if (!used.has(k)) {
      throw new InputError(`"parameters" holds a value for $${k}, which neither "where" nor "query" uses`, { jsonPath: `$.source.parameters[${k - 1}]` }, 'sql-parameters');
    }
  }
}

/** The parameters the user's query itself uses (the rest belong to the `where` condition). */
export function queryParameters(source: SqlSource): readonly (string | number | boolean | null)[] {
  if (source.sql.query === undefined || !source.parameters) return [];
  let highest = 0;
  for (const t of tokenizeSql(source.sql.query, 'the query')) if (t.kind === 'parameter') highest = Math.max(highest, Number(t.text.slice(1)));
  return source.parameters.slice(0, highest);
}

/** The FROM item for the source: a quoted table name or the user's SELECT as a subquery. */
export function relationOf(source: SqlSource): string {
  if (source.sql.table !== undefined) return parseTableName(source.sql.table).map((p) => quoteIdentifier(p)).join('.');
  return `(\n${checkSelectQuery(source.sql.query as string)}\n) AS "countercheck_source"`;
}

function whereOf(source: SqlSource): string {
  if (source.where === undefined) return '';
  checkWhereCondition(source.where);
  return `\nWHERE (\n${source.where}\n)`;
}

/** A human name for the source: "public.orders" or "query". */
export function sourceName(source: SqlSource): string {
  return source.sql.table !== undefined ? parseTableName(source.sql.table).join('.') : 'query';
}

/** Statement reading no row: the server describes the source's columns and their types. */
export function describeStatement(source: SqlSource): string {
  return `SELECT * FROM ${relationOf(source)} LIMIT 0`;
}

export interface PlannedQuery {
  readonly text: string;
  readonly values: readonly (string | number | boolean | null)[];
  /** Columns of the source this statement reads, in request order. */
  readonly columns: readonly string[];
  /** Which columns must be numeric on the server. */
  readonly numericColumns: readonly string[];
}

/** Builds the aggregation statement for a request. */
export function planAggregate(source: SqlSource, request: AggregateRequest, options: SqlAggregateOptions = {}): PlannedQuery {
  checkSqlSource(source);
  const from = `FROM ${relationOf(source)}${whereOf(source)}`;
  const values = source.parameters ?? [];
  if (request.kind === 'counted-table') {
    throw new InputError(
      'a SQL source counts raw records on the server; for counts already stored in a table give two category columns and "weight"',
      { jsonPath: '$.source' },
      'sql-counted-table',
    );
  }
  if (request.kind === 'numeric') {
    const x = quoteIdentifier(request.column, { column: request.column });
    // NaN is a missing value, as in the file readers; casting to double precision makes integer,
    // numeric and real columns behave alike (PostgreSQL's float8 var_samp uses Youngs–Cramer updates).
    const inner = `SELECT NULLIF((${x})::double precision, 'NaN'::double precision) AS x ${from}`;
    if (options.keepValues) {
      // One row per record (NULL for a missing value), one more than the limit so that going over it is seen.
      return { text: `${inner}\nLIMIT ${MAX_SQL_VALUES + 1}`, values, columns: [request.column], numericColumns: [request.column] };
    }
    const first = `SELECT count(*) AS records, count(x) AS n, avg(x) AS mean, var_samp(x) AS variance, min(x) AS min, max(x) AS max FROM (\n${inner}\n) AS v`;
    // Second pass (default): deviations from the first pass's mean, summed on the server — the
    // corrected two-pass m2 = Σd² − (Σd)²/n (Chan, Golub & LeVeque 1983) stays accurate when the
    // values sit far from zero, where the one-pass var_samp loses digits; m3 and m4 come with it.
    const text =
      options.higherMoments === false
        ? first
        : // The mean reaches the second scan as a one-row CTE read by an InitPlan, which keeps both scans parallel.
          `WITH m AS (${first})\n` +
          `SELECT m.records, m.n, m.mean, m.variance, m.min, m.max, c.d1, c.d2, c.d3 AS m3, c.d4 AS m4\n` +
          `FROM m CROSS JOIN (SELECT sum(d) AS d1, sum(d * d) AS d2, sum(d * d * d) AS d3, sum(d * d * d * d) AS d4\n` +
          `  FROM (SELECT v.x - (SELECT mean FROM m) AS d FROM (\n${inner}\n) AS v) AS dv) AS c`;
    return { text, values, columns: [request.column], numericColumns: [request.column] };
  }
  const keys = groupKeys(request);
  const keySql = keys.map((k, i) => `(${quoteIdentifier(k, { column: k })})::text AS k${i}`);
  const groupBy = `GROUP BY ${keys.map((_, i) => String(i + 1)).join(', ')}`;
  if (request.weight === undefined) {
    return { text: `SELECT ${keySql.join(', ')}, count(*) AS records\n${from}\n${groupBy}`, values, columns: keys, numericColumns: [] };
  }
  // NaN is a missing weight, as in the file readers. Frequency weights must be non-negative whole
  // numbers; those that are not are counted, so the message can say how many.
  const w = `NULLIF((${quoteIdentifier(request.weight, { column: request.weight })})::numeric, 'NaN'::numeric) AS w`;
  const text =
    `SELECT ${keys.map((_, i) => `k${i}`).join(', ')}, count(*) AS records, count(w) AS weighted, sum(w) AS weight,\n` +
    `  sum(CASE WHEN w >= 0 AND w = trunc(w) THEN 0 WHEN w IS NULL THEN 0 ELSE 1 END) AS invalid_weights\n` +
    `FROM (SELECT ${keySql.join(', ')}, ${w}\n${from}\n) AS g\n${groupBy}`;
  return { text, values, columns: [...keys, request.weight], numericColumns: [request.weight] };
}

type CountRequest = Extract<AggregateRequest, { kind: 'crosstab' | 'strata' | 'categories' }>;

/** The columns a count groups by, in GROUP BY order: the stratum first for three-way counts. */
function groupKeys(request: CountRequest): string[] {
  if (request.kind === 'strata') return [request.stratumColumn, request.rowColumn, request.columnColumn];
  return request.kind === 'crosstab' ? [request.rowColumn, request.columnColumn] : [request.column];
}

/** A row as the pg client returns it: bigint and numeric arrive as strings, double precision as numbers. */
export type AggregateRow = Readonly<Record<string, unknown>>;

function toCount(value: unknown, what: string): number {
  if (value === null || value === undefined) return 0;
  const n = typeof value === 'number' ? value : Number(value);
  if (!Number.isSafeInteger(n) || n < 0) {
    throw new InputError(`the server returned ${String(value)} for ${what}; expected a non-negative integer below 2^53`, sqlLocation, 'sql-bad-count');
  }
  return n;
}

function toReal(value: unknown): number {
  if (value === null || value === undefined) return NaN;
  return typeof value === 'number' ? value : Number(value);
}

type Described = Omit<Provenance, 'sha256' | 'description'>;

export type DecodedAggregate =
  | { readonly kind: 'table'; readonly table: Extract<Aggregate, { kind: 'table' }>['table']; readonly provenance: Described }
  | { readonly kind: 'categories'; readonly counts: Extract<Aggregate, { kind: 'categories' }>['counts']; readonly provenance: Described }
  | { readonly kind: 'strata'; readonly strata: StratifiedCounts; readonly provenance: Described }
  | { readonly kind: 'moments'; readonly moments: Extract<Aggregate, { kind: 'moments' }>['moments']; readonly provenance: Described; readonly values?: readonly number[] };

/** The rows of a values query: the column's values, NULL for missing; their moments computed here, in double precision as on the server. */
function decodeValues(column: string, rows: readonly AggregateRow[]): DecodedAggregate {
  if (rows.length > MAX_SQL_VALUES) {
    throw new InputError(
      `the source has more than ${MAX_SQL_VALUES.toLocaleString('en-US')} rows; a test on the values themselves (a distribution fit) transfers every value, so narrow it with "where"`,
      { jsonPath: '$.source.where' },
      'sql-too-many-values',
    );
  }
  const values: number[] = [];
  for (const r of rows) {
    const x = toReal(r.x);
    if (!Number.isNaN(x)) values.push(x);
  }
  return { kind: 'moments', moments: MomentAccumulator.of(values).summary(), values, provenance: { rows: rows.length, dropped: rows.length - values.length, columns: [column] } };
}

// PostgreSQL text never holds U+0000, so this stands for SQL NULL among the missing-value tokens.
const NULL_TOKEN = '\u0000';
const byCodeUnits = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Turns the aggregate rows of `planAggregate` into the reader's Aggregate with the file readers'
 * category coding (trimming, case folding, missing tokens, given levels, order), applied to each
 * group as the file reader applies it to each record; a level seen only in dropped records is left
 * out, as the file readers leave it out, so the levels are the same as from the same data in a file.
 */
export function decodeAggregate(request: AggregateRequest, rows: readonly AggregateRow[], options: SqlAggregateOptions = {}): DecodedAggregate {
  if (request.kind === 'counted-table') throw new InputError('a SQL source cannot read an already counted table', sqlLocation, 'sql-counted-table');
  if (request.kind === 'numeric' && options.keepValues) return decodeValues(request.column, rows);
  if (request.kind === 'numeric') {
    const r = rows[0] ?? {};
    const records = toCount(r.records, 'the record count');
    const n = toCount(r.n, 'the count of values');
    const mean = n > 0 ? toReal(r.mean) : NaN;
    const variance = toReal(r.variance);
    return {
      kind: 'moments',
      moments: {
        n,
        mean,
        m2: n < 2 ? 0 : r.d2 !== undefined && r.d2 !== null ? toReal(r.d2) - (toReal(r.d1) * toReal(r.d1)) / n : variance * (n - 1),
        m3: n > 0 ? toReal(r.m3) : 0,
        m4: n > 0 ? toReal(r.m4) : 0,
        min: n > 0 ? toReal(r.min) : Infinity,
        max: n > 0 ? toReal(r.max) : -Infinity,
      },
      provenance: { rows: records, dropped: records - n, columns: [request.column] },
    };
  }
  const keys = groupKeys(request);
  const cats = options.categories;
  const settings = {
    missing: { ...options.missing, tokens: [...missingTokens(options.missing), NULL_TOKEN] },
    categories: { ...cats, order: cats?.order === 'given' ? ('given' as const) : ('sorted' as const) },
  };
  const given = request.kind === 'strata' ? [cats?.levels, cats?.rowLevels, cats?.columnLevels] : request.kind === 'crosstab' ? [cats?.rowLevels, cats?.columnLevels] : [cats?.levels];
  const coders = keys.map((k, i) => new CategoryCoder(k, given[i], settings));
  const weighted = request.weight !== undefined;
  const label = (raw: unknown): string => (raw === null || raw === undefined ? NULL_TOKEN : String(raw));
  // Groups in a fixed order, so that labels equal after trimming or case folding show the same way each run.
  const groups = rows
    .map((row) => ({ row, labels: keys.map((_, i) => label(row[`k${i}`])) }))
    .sort((a, b) => byCodeUnits(a.labels[0], b.labels[0]) || byCodeUnits(a.labels[1] ?? '', b.labels[1] ?? '') || byCodeUnits(a.labels[2] ?? '', b.labels[2] ?? ''));
  let records = 0;
  let dropped = 0;
  let invalidWeights = 0;
  const cells: number[][] = [];
  const strata = request.kind === 'strata' ? new StrataCounter() : undefined;
  // Levels shown, as the file readers show them: given ones, and those of a record that was kept.
  const usedRows = new Set<number>();
  const usedColumns = new Set<number>();
  for (const { row, labels } of groups) {
    const n = toCount(row.records, 'a group count');
    records += n;
    // A group has no position in a file; the coder's messages then name only the column.
    const ids = labels.map((l, i) => coders[i].code(l, undefined as unknown as number));
    let count = n;
    let withWeight = n;
    if (weighted) {
      withWeight = toCount(row.weighted, 'a count of weights');
      invalidWeights += toCount(row.invalid_weights, 'a count of invalid weights');
      count = withWeight === 0 ? 0 : toReal(row.weight);
      if (!Number.isFinite(count)) {
        throw new InputError(`column \`${request.weight}\`: the weights sum to ${String(row.weight)}; expected finite frequency weights`, { column: request.weight }, 'non-integer-weight');
      }
    }
    if (ids.some((id) => id === MISSING)) {
      dropped += n;
      continue;
    }
    dropped += n - withWeight;
    if (withWeight === 0) continue;
    if (strata) {
      strata.add(ids[0], ids[1], ids[2], count);
      continue;
    }
    const r = ids[0];
    const c = ids[1] ?? 0;
    const cellRow = (cells[r] ??= []);
    cellRow[c] = (cellRow[c] ?? 0) + count;
    usedRows.add(r);
    usedColumns.add(c);
  }
  if (invalidWeights > 0) {
    throw new InputError(
      `column \`${request.weight}\`: ${invalidWeights} record${invalidWeights === 1 ? ' has a weight that is' : 's have weights that are'} not a non-negative whole number; count tests need frequency weights (how many times each record occurred)`,
      { column: request.weight },
      'non-integer-weight',
    );
  }
  const provenance: Described = { rows: records, dropped, columns: weighted ? [...keys, request.weight as string] : keys };
  if (strata) return { kind: 'strata', strata: strata.result(coders[0], coders[1], coders[2]), provenance };
  const rowOrder = coders[0].order().filter((i) => coders[0].isGiven(i) || usedRows.has(i));
  const rowLabels = rowOrder.map((i) => coders[0].labels[i]);
  if (request.kind === 'categories') {
    return { kind: 'categories', counts: { labels: rowLabels, counts: rowOrder.map((i) => cells[i]?.[0] ?? 0) }, provenance };
  }
  const columnOrder = coders[1].order().filter((j) => coders[1].isGiven(j) || usedColumns.has(j));
  const table = {
    rowLabels,
    columnLabels: columnOrder.map((j) => coders[1].labels[j]),
    counts: rowOrder.map((i) => columnOrder.map((j) => cells[i]?.[j] ?? 0)),
  };
  return { kind: 'table', table, provenance };
}

/**
 * Canonical text of an aggregate, hashed as the SQL source's fingerprint: labels, counts, row and
 * dropped counts exactly; moments to 12 significant digits, because a parallel plan may combine
 * partial sums in a different order from one run to the next.
 */
export function canonicalAggregate(decoded: DecodedAggregate): string {
  const p = decoded.provenance;
  const head = { rows: p.rows, dropped: p.dropped, columns: p.columns };
  if (decoded.kind === 'table') return JSON.stringify({ kind: 'table', ...head, ...decoded.table });
  if (decoded.kind === 'categories') return JSON.stringify({ kind: 'categories', ...head, ...decoded.counts });
  if (decoded.kind === 'strata') return JSON.stringify({ kind: 'strata', ...head, ...decoded.strata });
  const m = decoded.moments;
  const r = (x: number): string => (Number.isFinite(x) ? x.toPrecision(12) : String(x));
  return JSON.stringify({ kind: 'moments', ...head, n: m.n, mean: r(m.mean), m2: r(m.m2), min: r(m.min), max: r(m.max), ...(decoded.values ? { values: decoded.values } : {}) });
}
