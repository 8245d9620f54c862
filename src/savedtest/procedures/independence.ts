/**
 * `"test": "independence"`: independence or homogeneity on an r×c table of counts, given inline, as an
 * already-counted table in a file, or cross-tabulated from two categorical columns of a file.
 */
import { InputError } from '../../errors';
import { independenceTest } from '../../stats/procedures/table';
import type { TestResult } from '../../stats/result';
import { bool, field, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { applyMethod } from './method';
import {
  CONFIDENCE,
  COUNT_TABLE,
  LABELS,
  VARIABLE_NAME,
  COUNT_TEST_OPTIONS,
  checkLambda,
  checkSourceColumns,
  tableFromSource,
  requireLength,
  requireOneOf,
  sourceField,
  MONTE_CARLO,
} from './shared';
import { BAYES_FACTOR_TABLE_FIELD, FRAGILITY_FIELDS } from '../evidence';

export const independenceProcedure = defineProcedure({
  test: 'independence',
  summary: 'Chi-square test of independence (or homogeneity) on an r×c table of counts.',
  planning: {
    label: 'Independence of two categorical variables',
    detail: 'Pearson χ² on their cross-tabulation',
    accepts: ['counted-table', 'categorical-columns'],
    roles: ['the rows', 'the columns'],
    variants: [
      { label: 'Independence, Monte Carlo p-value', detail: 'The same test with a p-value from random tables with these margins (small expected counts)', preset: MONTE_CARLO },
      { label: 'Independence, exact p-value', detail: 'Fisher–Freeman–Halton exact conditional test (small tables)', preset: { method: 'exact' } },
    ],
  },
  fields: {
    table: field(COUNT_TABLE, 'The table of counts: an array of rows, each an array of counts.', true),
    rowLabels: LABELS('rows (with a source: the order and full set of levels of the first column)'),
    columnLabels: LABELS('columns (with a source: the order and full set of levels of the second column)'),
    rowVariable: VARIABLE_NAME('what the rows classify'),
    columnVariable: VARIABLE_NAME('what the columns classify'),
    source: sourceField(
      'Two categorical columns to cross-tabulate (rows, then columns); leave out for a file that already holds the table (first column row labels, header column labels).',
      0,
      2,
    ),
    correction: field(bool, "Apply Yates' continuity correction (2×2 tables only). Effect sizes always use the uncorrected statistic. Default false."),
    ...COUNT_TEST_OPTIONS,
    confidence: CONFIDENCE,
    ...FRAGILITY_FIELDS,
    bayesFactor: BAYES_FACTOR_TABLE_FIELD,
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['table', 'source'], problems);
    checkSourceColumns(spec, path, [0, 2], 'two columns (rows, columns), or none for an already-counted table', problems);
    if (spec.table) {
      const width = spec.table[0]?.length ?? 0;
      if (width < 2) problems.push({ path: childPath(childPath(path, 'table'), 0), message: `expected at least 2 columns, found ${width}` });
      spec.table.forEach((row, i) => {
        if (row.length !== width) {
          problems.push({ path: childPath(childPath(path, 'table'), i), message: `row ${i + 1} has ${row.length} counts but row 1 has ${width}; every row needs the same number` });
        }
      });
      requireLength(spec, path, 'rowLabels', spec.table.length, 'one per row of "table"', problems);
      requireLength(spec, path, 'columnLabels', width, 'one per column of "table"', problems);
    }
    if (spec.source && (spec.source.columns?.length ?? 0) === 0) {
      for (const key of ['rowLabels', 'columnLabels'] as const) {
        if (spec[key] !== undefined) problems.push({ path: childPath(path, key), message: `a counted table in a file carries its own labels; remove "${key}"` });
      }
    }
    checkLambda(spec, path, problems);
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const columns = spec.source?.columns ?? [];
    const { counts, rowLabels, columnLabels } = spec.source ? await tableFromSource(spec, ctx) : { counts: spec.table!, rowLabels: spec.rowLabels, columnLabels: spec.columnLabels };
    if (spec.correction && (counts.length !== 2 || counts[0].length !== 2)) {
      throw new InputError(
        `$.correction: Yates' continuity correction applies to 2×2 tables only; this table is ${counts.length}×${counts[0]?.length ?? 0}`,
        { jsonPath: '$.correction' },
        'correction-not-2x2',
      );
    }
    return applyMethod(
      independenceTest(counts, {
        rowLabels,
        columnLabels,
        correction: spec.correction,
        statistic: spec.statistic,
        lambda: spec.lambda,
        alpha: spec.alpha,
        confidence: spec.confidence,
        rowVariable: spec.rowVariable ?? columns[0],
        columnVariable: spec.columnVariable ?? columns[1],
      }),
      spec,
      { signal: ctx.signal, onProgress: ctx.onProgress },
    );
  },
});
