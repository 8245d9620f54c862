/**
 * `"test": "paired"`: the same units classified twice. A 2×2 `"table"` gives McNemar's test (with the
 * continuity-corrected, exact binomial and mid-p versions beside it); a k×k table gives Bowker's test of symmetry.
 */
import { InputError } from '../../errors';
import { pairedTest } from '../../stats/procedures/paired';
import type { TestResult } from '../../stats/result';
import { bool, field, str, type SpecProblem } from '../fields';
import { firstGiven } from '../arguments';
import { childPath } from '../json-text';
import type { RunContext } from '../types';
import { defineProcedure } from './define';
import { CONFIDENCE, COUNT_TABLE, LABELS, type SourceSpec, aggregateOf, checkSourceColumns, placeCounts, requireLength, requireOneOf, sourceField } from './shared';
import { FRAGILITY_FIELDS } from '../evidence';

export const pairedProcedure = defineProcedure({
  test: 'paired',
  summary: "Paired classifications: McNemar's test for a 2×2 table, Bowker's test of symmetry for k×k (rows: first classification, columns: second).",
  planning: {
    label: 'Paired classifications',
    detail: "McNemar's test (2×2) or Bowker's symmetry test: the same units classified twice",
    accepts: ['square-table', 'categorical-columns'],
    roles: ['the first classification', 'the second classification'],
  },
  arguments: { labels: firstGiven('rowLabels', 'columnLabels') },
  fields: {
    ...FRAGILITY_FIELDS,
    table: field(COUNT_TABLE, 'Square table of counts: rows are the first classification, columns the second, same categories in the same order.', true),
    source: sourceField('Two categorical columns: the first classification and the second, one record per unit.', 2, 2),
    rowLabels: LABELS('categories (the same for rows and columns)'),
    columnLabels: LABELS('categories as columns (must equal "rowLabels" when both are given)'),
    correction: field(bool, "Use McNemar's continuity correction for the main chi-square (2×2). Default false; both versions are always reported."),
    method: field(str({ enum: ['asymptotic', 'exact', 'mid-p'] }), 'Main p-value for a 2×2 table: "asymptotic" chi-square (default), "exact" binomial, or "mid-p". All are reported.'),
    confidence: CONFIDENCE,
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['table', 'source'], problems, false, 'missing data: give "table", a square table of counts, or a "source" with two columns');
    checkSourceColumns(spec, path, [2], 'two columns (first classification, second classification)', problems);
    if (!spec.table) return problems;
    const k = spec.table.length;
    spec.table.forEach((row, i) => {
      if (row.length !== k) problems.push({ path: childPath(childPath(path, 'table'), i), message: `row ${i + 1} has ${row.length} counts; a paired table is square, so every row needs ${k}` });
    });
    requireLength(spec, path, 'rowLabels', k, 'one per category', problems);
    requireLength(spec, path, 'columnLabels', k, 'one per category', problems);
    const rows = spec.rowLabels;
    const cols = spec.columnLabels;
    if (rows && cols && rows.join('\u0000') !== cols.join('\u0000')) {
      problems.push({ path: childPath(path, 'columnLabels'), message: 'paired categories must be the same in rows and columns, in the same order' });
    }
    if (spec.method !== undefined && spec.method !== 'asymptotic' && k > 2) {
      problems.push({ path: childPath(path, 'method'), message: `"${String(spec.method)}" applies to 2×2 tables (McNemar); Bowker's test for ${k}×${k} is asymptotic` });
    }
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const data = spec.table ? { counts: spec.table, labels: spec.rowLabels ?? spec.columnLabels } : await squareFromSource(spec, ctx);
    return pairedTest(data.counts, {
      alpha: spec.alpha,
      confidence: spec.confidence,
      correction: spec.correction,
      method: spec.method as 'asymptotic' | 'exact' | 'mid-p' | undefined,
      labels: data.labels,
    });
  },
});

/**
 * Cross-tabulates the two classification columns into a square table whose rows and columns list the same
 * categories in the same order: the spec's labels, or the levels of the first column then any new ones of the second.
 */
async function squareFromSource(spec: { readonly source?: SourceSpec; readonly rowLabels?: readonly string[]; readonly columnLabels?: readonly string[] }, ctx: RunContext): Promise<{ counts: number[][]; labels: string[] }> {
  const [first, second] = spec.source!.columns!;
  const given = spec.rowLabels ?? spec.columnLabels;
  const { table } = await aggregateOf(ctx, { kind: 'crosstab', rowColumn: first, columnColumn: second, weight: spec.source!.weight }, 'table', given ? { rowLevels: given, columnLevels: given } : undefined);
  if (!given && !table.rowLabels.some((l) => table.columnLabels.includes(l))) {
    // Two different variables (a shift and an oven) make a table whose every count lies off the diagonal, so the
    // symmetry test would report a huge, meaningless departure. Refuse it in words.
    const list = (labels: readonly string[]) => (labels.length > 6 ? [...labels.slice(0, 5), '…'] : labels).join(', ');
    throw new InputError(
      `paired: \`${first}\` (${list(table.rowLabels)}) and \`${second}\` (${list(table.columnLabels)}) share no category. A paired test compares the same classification made twice (before and after, two raters), so both columns need the same categories; for two different variables use the test of independence.`,
      { jsonPath: '$.source.columns' },
      'paired-no-common-category',
    );
  }
  const labels = given ? [...given] : [...table.rowLabels, ...table.columnLabels.filter((l) => !table.rowLabels.includes(l))];
  return { counts: placeCounts(table, labels, labels, [first, second], given ? ['rowLabels', 'rowLabels'] : ['rowLabels', 'columnLabels']), labels };
}
