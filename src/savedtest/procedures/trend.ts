/**
 * `"test": "trend"`: ordered categories. A 2×k `"table"` (first row: events) gives the Cochran–Armitage test
 * with `"scores"`; an r×c table of two ordinal variables gives the linear-by-linear association test with
 * `"rowScores"` and `"columnScores"`.
 */
import type { TestResult } from '../../stats/result';
import { cochranArmitageTest, linearByLinearTest } from '../../stats/procedures/trend';
import { arr, field, num, type SpecProblem } from '../fields';
import { firstGiven } from '../arguments';
import { childPath } from '../json-text';
import type { RunContext } from '../types';
import { defineProcedure } from './define';
import { ALTERNATIVE, COUNT_TABLE, LABELS, aggregateOf, checkSourceColumns, placeCounts, requireLength, requireOneOf, sourceField, type SourceSpec } from './shared';

export const trendProcedure = defineProcedure({
  test: 'trend',
  summary: 'Trend across ordered groups: Cochran–Armitage for a 2×k table (first row: events), or linear-by-linear association for two ordinal variables.',
  planning: {
    label: 'Trend across ordered groups',
    detail: 'Cochran–Armitage (2×k) or linear-by-linear association',
    accepts: ['counted-table', 'categorical-columns'],
    roles: ['the outcome (rows)', 'the ordered groups (columns)'],
  },
  // Cochran–Armitage scores: "scores", else "columnScores" (as `run` passes them).
  arguments: { scores: firstGiven('scores', 'columnScores') },
  fields: {
    table: field(COUNT_TABLE, 'Counts: 2 rows (events, non-events) by ordered groups, or an r×c table of two ordinal variables.', true),
    scores: field(arr(num()), 'Scores of the ordered groups (columns) for Cochran–Armitage. Default 1, 2, …, k (equally spaced).'),
    rowScores: field(arr(num()), 'Row scores for the linear-by-linear test. Giving them (or a table with more than 2 rows) selects that test.'),
    columnScores: field(arr(num()), 'Column scores for the linear-by-linear test. Default 1, 2, …'),
    source: sourceField('Two categorical columns: the outcome (rows; the first of "rowLabels" is the event) and the ordered group (columns, in the order of "columnLabels").', 2, 2),
    rowLabels: LABELS('rows (with a source: the outcome levels, the event first)'),
    columnLabels: LABELS('ordered groups (columns; with a source: every group level, in order)'),
    alternative: { ...ALTERNATIVE, description: 'Two-sided (default); "greater": the first row’s proportion (or the column score) rises with the score; "less": it falls.' },
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['table', 'source'], problems);
    checkSourceColumns(spec, path, [2], 'two columns (outcome, ordered group)', problems);
    if (spec.source) {
      for (const key of ['rowLabels', 'columnLabels'] as const) {
        if (spec[key] === undefined) problems.push({ path, message: `with a "source", give "${key}": the order of the levels matters for a trend test` });
      }
    }
    if (!spec.table) return problems;
    const width = spec.table[0].length;
    spec.table.forEach((row, i) => {
      if (row.length !== width) problems.push({ path: childPath(childPath(path, 'table'), i), message: `row ${i + 1} has ${row.length} counts but row 1 has ${width}` });
    });
    const linear = spec.table.length > 2 || spec.rowScores !== undefined;
    if (linear && spec.scores !== undefined) problems.push({ path: childPath(path, 'scores'), message: '"scores" is for a 2×k table; for the linear-by-linear test give "rowScores" and "columnScores"' });
    requireLength(spec, path, 'scores', width, 'one per column', problems);
    requireLength(spec, path, 'columnScores', width, 'one per column', problems);
    requireLength(spec, path, 'rowScores', spec.table.length, 'one per row', problems);
    requireLength(spec, path, 'rowLabels', spec.table.length, 'one per row', problems);
    requireLength(spec, path, 'columnLabels', width, 'one per column', problems);
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const table = spec.table ?? (await orderedTableFromSource(spec, ctx));
    if (table.length > 2 || spec.rowScores !== undefined) {
      return linearByLinearTest(table, {
        alpha: spec.alpha,
        alternative: spec.alternative,
        rowScores: spec.rowScores,
        columnScores: spec.columnScores,
      });
    }
    return cochranArmitageTest(table, {
      alpha: spec.alpha,
      alternative: spec.alternative,
      scores: spec.scores ?? spec.columnScores,
      rowLabels: spec.rowLabels,
      columnLabels: spec.columnLabels,
    });
  },
});

/** Cross-tabulates outcome × ordered group from the source, in the order the spec gives (unlisted levels are an error). */
async function orderedTableFromSource(spec: { readonly source?: SourceSpec; readonly rowLabels?: readonly string[]; readonly columnLabels?: readonly string[] }, ctx: RunContext): Promise<number[][]> {
  const [outcome, group] = spec.source!.columns!;
  const rows = spec.rowLabels!;
  const columns = spec.columnLabels!;
  const { table } = await aggregateOf(ctx, { kind: 'crosstab', rowColumn: outcome, columnColumn: group, weight: spec.source!.weight }, 'table', { rowLevels: rows, columnLevels: columns });
  return placeCounts(table, rows, columns, [outcome, group], ['rowLabels', 'columnLabels']);
}
