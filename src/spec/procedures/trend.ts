/**
 * `"test": "trend"`: ordered categories. A 2×k `"table"` (first row: events) gives the Cochran–Armitage test
 * with `"scores"`; an r×c table of two ordinal variables gives the linear-by-linear association test with
 * `"rowScores"` and `"columnScores"`.
 */
import type { TestResult } from '../../stats/result';
import { cochranArmitageTest, linearByLinearTest } from '../../stats/trend';
import { arr, field, num, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import type { SpecV1 } from '../types';
import type { ProcedureHandler } from './index';
import { ALTERNATIVE, COUNT_ARRAY, LABELS, requireLength } from './shared';

export const trendProcedure: ProcedureHandler = {
  test: 'trend',
  summary: 'Trend across ordered groups: Cochran–Armitage for a 2×k table (first row: events), or linear-by-linear association for two ordinal variables.',
  fields: {
    table: field(arr(COUNT_ARRAY, { minItems: 2 }), 'Counts: 2 rows (events, non-events) by ordered groups, or an r×c table of two ordinal variables.', true),
    scores: field(arr(num()), 'Scores of the ordered groups (columns) for Cochran–Armitage. Default 1, 2, …, k (equally spaced).'),
    rowScores: field(arr(num()), 'Row scores for the linear-by-linear test. Giving them (or a table with more than 2 rows) selects that test.'),
    columnScores: field(arr(num()), 'Column scores for the linear-by-linear test. Default 1, 2, …'),
    rowLabels: LABELS('rows'),
    columnLabels: LABELS('ordered groups (columns)'),
    alternative: { ...ALTERNATIVE, description: 'Two-sided (default); "greater": the first row’s proportion (or the column score) rises with the score; "less": it falls.' },
  },
  validate(spec: SpecV1, path: string): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    if (!spec.table) {
      problems.push({ path, message: 'missing data: give "table"' });
      return problems;
    }
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
  async run(spec: SpecV1): Promise<TestResult> {
    const table = spec.table!;
    if (table.length > 2 || spec.rowScores !== undefined) {
      return linearByLinearTest(table, {
        alpha: spec.alpha,
        alternative: spec.alternative,
        rowScores: spec.rowScores as readonly number[] | undefined,
        columnScores: spec.columnScores as readonly number[] | undefined,
      });
    }
    return cochranArmitageTest(table, {
      alpha: spec.alpha,
      alternative: spec.alternative,
      scores: (spec.scores ?? spec.columnScores) as readonly number[] | undefined,
      rowLabels: spec.rowLabels,
      columnLabels: spec.columnLabels,
    });
  },
};
