/**
 * Field descriptions and checks that several procedure handlers share, so that an option means the
 * same thing (and is described the same way in the schema) in every test.
 */
import { InputError } from '../../errors';
import type { Aggregate, CountTable } from '../../data/types';
import { arr, bool, field, nul, num, obj, oneOf, str, withDefault, type SpecProblem, type ValueOf } from '../fields';
import { childPath } from '../json-text';
import type { RunContext } from '../types';

export const ALPHA = withDefault(field(num({ exclusiveMin: 0, exclusiveMax: 1 }), 'Significance level for the conclusion. Default 0.05.'), 0.05);
export const CONFIDENCE = withDefault(field(num({ exclusiveMin: 0, exclusiveMax: 1 }), 'Confidence level of the intervals, e.g. 0.95 (the default).'), 0.95);
export const ALTERNATIVE = withDefault(field(str({ enum: ['two-sided', 'greater', 'less'] }), 'Alternative hypothesis. Default "two-sided".'), 'two-sided');
export const STATISTIC = withDefault(
  field(str({ enum: ['pearson', 'likelihood-ratio', 'cressie-read'] }), 'Main statistic: Pearson X² (default), likelihood-ratio G², or the Cressie–Read power divergence with "lambda".'),
  'pearson',
);
export const LAMBDA = field(num(), 'λ of the Cressie–Read power divergence (with "statistic": "cressie-read"). Default 2/3.');
export const METHOD = withDefault(
  field(str({ enum: ['asymptotic', 'exact', 'monte-carlo'] }), 'How the p-value is computed: "asymptotic" (the chi-square approximation, default), "exact", or "monte-carlo" (with "resamples" and "seed").'),
  'asymptotic',
);
/**
 * Limits of inline data, each refused by validation with its JSON path: at most MAX_CATEGORIES categories (or
 * table rows, or table columns; the same as the readers' default limit of distinct levels) and MAX_RESAMPLES
 * Monte Carlo resamples (the largest the editor setting allows). A spec file is at most 16 MiB besides.
 */
export const MAX_CATEGORIES = 10_000;
export const MAX_RESAMPLES = 10_000_000;

export const RESAMPLES = field(num({ integer: true, min: 1, max: MAX_RESAMPLES }), `Number of Monte Carlo resamples (with "method": "monte-carlo"), at most ${MAX_RESAMPLES}.`);
export const SEED = field(num({ integer: true, min: 0 }), 'Seed of the Monte Carlo random stream, so that the p-value is reproducible.');
export const LABELS = (what: string) => field(arr(str()), `Labels of the ${what}, in order.`, true);
/** A variable's name for the conclusion sentence; with a source it defaults to the column's name. */
export const VARIABLE_NAME = (what: string) =>
  field(str(), `Name of ${what}, used in the conclusion (e.g. "oven"). Default: the name of the source column, if any; otherwise the wording stays generic.`);
export const COUNT_ARRAY = arr(num({ min: 0 }), { maxItems: MAX_CATEGORIES });
/** A table of counts: 2 to MAX_CATEGORIES rows of at most MAX_CATEGORIES counts. */
export const COUNT_TABLE = arr(COUNT_ARRAY, { minItems: 2, maxItems: MAX_CATEGORIES });

/** The Monte Carlo variant of a count test, as the editor offers it (10,000 resamples, seed 1: reproducible). */
export const MONTE_CARLO = { method: 'monte-carlo', resamples: 10000, seed: 1 } as const;

/** The statistic and p-value method options shared by the count tests (goodness of fit, r×c tables). */
export const COUNT_TEST_OPTIONS = { statistic: STATISTIC, lambda: LAMBDA, method: METHOD, resamples: RESAMPLES, seed: SEED } as const;

/** A saved test seen only by its field names (checks that look at presence and lengths). */
export type SpecFields = Readonly<Record<string, unknown>>;

/** "lambda" only means something for the Cressie–Read statistic. */
export function checkLambda(spec: { readonly lambda?: number; readonly statistic?: string }, path: string, problems: SpecProblem[]): void {
  if (spec.lambda !== undefined && spec.statistic !== 'cressie-read') {
    problems.push({ path: childPath(path, 'lambda'), message: '"lambda" applies only with "statistic": "cressie-read"' });
  }
}

/** `source`: a delimited file (relative path) or a SQL source, with the reader's dialect options. */
export function sourceField(columnsHelp: string, minColumns: number, maxColumns: number) {
  return field(
    obj({
      path: field(str({ nonEmpty: true }), 'Data file, relative to this spec file (absolute paths and paths leading out of the workspace are refused unless allowed): delimited text, JSON, an Excel workbook (.xlsx) or a Parquet file (.parquet).'),
      sheet: field(str({ nonEmpty: true }), 'Sheet of an Excel workbook (.xlsx). May be left out when the workbook has one sheet.'),
      range: field(str({ nonEmpty: true }), 'Part of the sheet to read (.xlsx): a range such as "B2:F40", a defined name or a table name; its first row holds the column names. Default: every cell of the sheet.'),
      columns: field(arr(str({ nonEmpty: true }), { minItems: minColumns, maxItems: maxColumns }), columnsHelp),
      weight: field(str({ nonEmpty: true }), 'Frequency-weight column: each record counts as many times as this whole number says.'),
      delimiter: field(str({ enum: [',', ';', '\t', '|', 'auto'] }), 'Field delimiter. Default: detected from the first lines.'),
      decimal: field(str({ enum: ['.', ','] }), 'Decimal mark of numbers. Default ".".'),
      encoding: field(str({ enum: ['utf-8', 'utf-16', 'latin1'] }), 'Text encoding. Default UTF-8 (a byte-order mark always wins).'),
      header: field(bool, 'Whether the first line holds column names. Default: detected.'),
      comment: field(oneOf(str(), nul), 'Lines starting with this text are skipped. Default "#"; null turns it off.'),
      missing: field(
        oneOf(
          arr(str()),
          obj({
            tokens: field(arr(str()), 'Cell texts that mean "missing".'),
            policy: field(str({ enum: ['drop', 'category'] }), '"drop" (default) leaves the record out and counts it; "category" makes missing a level of its own.'),
            label: field(str(), 'Label of the missing level under the "category" policy. Default "(missing)".'),
          }),
        ),
        'Cell texts that mean "missing" (default: empty, NA, NaN, null, -), or {"tokens", "policy", "label"}.',
      ),
      categories: field(str({ enum: ['first-seen', 'sorted'] }), 'Order of the levels read from the file when the spec does not list them. Default "first-seen".'),
      caseFold: field(bool, 'Treat levels that differ only in letter case as one level. Default false.'),
      sql: field(
        obj(
          {
            connection: field(str({ nonEmpty: true }), 'Name of a connection configured in the settings.'),
            table: field(str({ nonEmpty: true }), 'Table or view, e.g. "public.orders".'),
            query: field(str({ nonEmpty: true }), 'A SELECT of your own, used as a subquery.'),
          },
          { required: ['connection'] },
        ),
        'A database source: the engine does the counting and only the aggregate rows are transferred.',
      ),
      where: field(str(), 'A filter for a SQL source: an expression over its columns; put values in "parameters" as $1, $2, ….'),
      parameters: field(arr(oneOf(str(), num(), bool, nul)), 'Bind parameters referenced as $1, $2, … in "where" or "query" (never interpolated).'),
      asOf: field(str(), 'A note recorded with the result, e.g. "nightly snapshot of 2026-11-30".'),
    }),
    'Where the data lives when it is not given inline.',
  );
}

/** The TypeScript type of a `source`, from its field table. */
export type SourceSpec = ValueOf<ReturnType<typeof sourceField>['type']>;

/** Reports a problem unless exactly one (or, with `optional`, at most one) of `keys` is present. */
export function requireOneOf(
  spec: SpecFields,
  path: string,
  keys: readonly string[],
  problems: SpecProblem[],
  optional = false,
  missing = `missing data: give one of ${list(keys)}`,
): void {
  const present = keys.filter((k) => spec[k] !== undefined);
  if (present.length > 1) {
    problems.push({ path: childPath(path, present[1]), message: `give only one of ${list(keys)}; found both "${present[0]}" and "${present[1]}"` });
  } else if (present.length === 0 && !optional) {
    problems.push({ path, message: missing });
  }
}

/** Checks that an array field has the length another one implies. */
export function requireLength(spec: SpecFields, path: string, key: string, length: number, ofWhat: string, problems: SpecProblem[]): void {
  const v = spec[key];
  if (Array.isArray(v) && v.length !== length) {
    problems.push({ path: childPath(path, key), message: `expected ${length} item${length === 1 ? '' : 's'} (${ofWhat}), found ${v.length}` });
  }
}

/** Checks the number of columns a source names for this test. */
export function checkSourceColumns(spec: { readonly source?: SourceSpec }, path: string, allowed: readonly number[], what: string, problems: SpecProblem[]): void {
  const source = spec.source;
  if (!source) return;
  const n = source.columns?.length ?? 0;
  if (!allowed.includes(n)) {
    problems.push({ path: childPath(childPath(path, 'source'), 'columns'), message: `expected ${what}, found ${n} column${n === 1 ? '' : 's'}` });
  }
  if (source.path === undefined && source.sql === undefined) {
    problems.push({ path: childPath(path, 'source'), message: 'missing "path" (a data file) or "sql" (a database source)' });
  }
  if (source.path !== undefined && source.sql !== undefined) {
    problems.push({ path: childPath(childPath(path, 'source'), 'sql'), message: 'give either "path" or "sql", not both' });
  }
  if (source.sql && (source.sql.table === undefined) === (source.sql.query === undefined)) {
    problems.push({ path: childPath(childPath(path, 'source'), 'sql'), message: 'give exactly one of "table" or "query"' });
  }
}

/** Reads the aggregate a test expects, with a clear error when the reader returns another shape. */
export async function aggregateOf<K extends Aggregate['kind']>(
  ctx: RunContext,
  request: Parameters<RunContext['aggregate']>[0],
  kind: K,
  levels?: Parameters<RunContext['aggregate']>[1],
  needs?: Parameters<RunContext['aggregate']>[2],
): Promise<Extract<Aggregate, { kind: K }>> {
  const aggregate = await ctx.aggregate(request, levels, needs);
  if (aggregate.kind !== kind) {
    throw new InputError(`$.source: expected the reader to produce ${kind}, got ${aggregate.kind}`, { jsonPath: '$.source' }, 'unexpected-aggregate');
  }
  // Nothing to test: refused here, at the source the spec names, rather than later at a field ("$.table") it lacks.
  if (isEmptyAggregate(aggregate)) {
    const dropped = aggregate.provenance.dropped > 0 ? ` (${aggregate.provenance.dropped} dropped for missing values)` : '';
    throw new InputError(`$.source: ${aggregate.provenance.description} gave no records to test${dropped}; expected at least one (a query or "where" that matches nothing?)`, { jsonPath: '$.source' }, 'no-rows');
  }
  return aggregate as Extract<Aggregate, { kind: K }>;
}

function isEmptyAggregate(aggregate: Aggregate): boolean {
  const total = (counts: readonly number[]): number => counts.reduce((a, b) => a + b, 0);
  if (aggregate.kind === 'table') return total(aggregate.table.counts.flat()) === 0;
  if (aggregate.kind === 'categories') return total(aggregate.counts.counts) === 0;
  if (aggregate.kind === 'strata') return total(aggregate.strata.counts.flat(2)) === 0;
  return aggregate.moments.n === 0;
}

function list(keys: readonly string[]): string {
  return keys.map((k) => `"${k}"`).join(', ');
}

/**
 * The counts of a cross-tabulation placed in the row and column order given; a level with counts that the order
 * does not list is an error naming the column and the spec field.
 */
export function placeCounts(
  table: CountTable,
  rows: readonly string[],
  columns: readonly string[],
  names: readonly [string, string],
  fields: readonly [string, string],
): number[][] {
  const counts = rows.map(() => columns.map(() => 0));
  table.rowLabels.forEach((r, i) =>
    table.columnLabels.forEach((c, j) => {
      const n = table.counts[i][j];
      if (n === 0) return;
      const ri = rows.indexOf(r);
      const ci = columns.indexOf(c);
      if (ri < 0 || ci < 0) {
        const [column, level, key] = ri < 0 ? [names[0], r, fields[0]] : [names[1], c, fields[1]];
        throw new InputError(`column \`${column}\` has the level "${level}", which "${key}" does not list; add it in its place or fix the data`, { jsonPath: `$.${key}`, column }, 'unknown-level');
      }
      counts[ri][ci] += n;
    }),
  );
  return counts;
}

/**
 * The table of counts a spec's `source` gives: two columns cross-tabulated in the order of "rowLabels" and
 * "columnLabels" (a listed level the data lacks counts 0), or no columns for a file that is already a counted table.
 */
export async function tableFromSource(spec: { readonly source?: SourceSpec; readonly rowLabels?: readonly string[]; readonly columnLabels?: readonly string[] }, ctx: RunContext): Promise<{ counts: readonly (readonly number[])[]; rowLabels?: readonly string[]; columnLabels?: readonly string[] }> {
  const source = spec.source!;
  const columns = source.columns ?? [];
  const request = columns.length === 2 ? ({ kind: 'crosstab', rowColumn: columns[0], columnColumn: columns[1], weight: source.weight } as const) : ({ kind: 'counted-table' } as const);
  const { table } = await aggregateOf(ctx, request, 'table', { rowLevels: spec.rowLabels, columnLevels: spec.columnLabels });
  if (columns.length !== 2) return { counts: table.counts, rowLabels: table.rowLabels, columnLabels: table.columnLabels };
  const rowLabels = spec.rowLabels ?? table.rowLabels;
  const columnLabels = spec.columnLabels ?? table.columnLabels;
  return { counts: placeCounts(table, rowLabels, columnLabels, [columns[0], columns[1]], ['rowLabels', 'columnLabels']), rowLabels, columnLabels };
}
