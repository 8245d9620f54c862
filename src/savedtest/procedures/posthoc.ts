/**
 * `"test": "post-hoc"`: after an r×c test, which pairs of rows (or columns), or which cells, differ — with the
 * p-values adjusted for the number of comparisons and each line naming its rows, columns or cell.
 */
import { postHocTest } from '../../stats/procedures/posthoc';
import type { TestResult } from '../../stats/result';
import { field, str, withDefault, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { COUNT_TABLE, LABELS, checkSourceColumns, requireLength, requireOneOf, sourceField, tableFromSource } from './shared';

export const postHocProcedure = defineProcedure({
  test: 'post-hoc',
  summary: 'Post-hoc comparisons on an r×c table: pairs of rows or columns, or cell-wise adjusted residuals, with Bonferroni, Holm or Benjamini–Hochberg adjustment.',
  planning: {
    label: 'Post-hoc comparisons',
    detail: 'Which cells, rows or columns differ, with adjusted p-values',
    accepts: ['counted-table', 'categorical-columns'],
    roles: ['the rows', 'the columns'],
    questions: [
      { field: 'compare', title: 'What to compare', choiceLabels: { cells: 'Cells (adjusted residuals)', rows: 'Pairs of rows', columns: 'Pairs of columns' } },
      { field: 'adjustment', title: 'Multiplicity adjustment', choiceLabels: { holm: 'Holm', bonferroni: 'Bonferroni', 'benjamini-hochberg': 'Benjamini–Hochberg (false discovery rate)' } },
    ],
  },
  fields: {
    table: field(COUNT_TABLE, 'The table of counts: an array of rows, each an array of counts.', true),
    source: sourceField('Two categorical columns to cross-tabulate (rows, then columns); leave out for a file that already holds the table.', 0, 2),
    rowLabels: LABELS('rows (with a source: the order and full set of levels of the first column)'),
    columnLabels: LABELS('columns (with a source: the order and full set of levels of the second column)'),
    compare: withDefault(field(str({ enum: ['cells', 'rows', 'columns'] }), 'What to compare: "cells" (adjusted residual per cell, default), "rows" or "columns" (each pair by a chi-square test).'), 'cells'),
    adjustment: withDefault(field(str({ enum: ['holm', 'bonferroni', 'benjamini-hochberg'] }), 'Multiplicity adjustment of the p-values. Default "holm".'), 'holm'),
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['table', 'source'], problems);
    checkSourceColumns(spec, path, [0, 2], 'two columns (rows, columns), or none for an already-counted table', problems);
    if (!spec.table) return problems;
    const width = spec.table[0].length;
    spec.table.forEach((row, i) => {
      if (row.length !== width) problems.push({ path: childPath(childPath(path, 'table'), i), message: `row ${i + 1} has ${row.length} counts but row 1 has ${width}` });
    });
    requireLength(spec, path, 'rowLabels', spec.table.length, 'one per row', problems);
    requireLength(spec, path, 'columnLabels', width, 'one per column', problems);
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const { counts, rowLabels, columnLabels } = spec.source ? await tableFromSource(spec, ctx) : { counts: spec.table!, rowLabels: spec.rowLabels, columnLabels: spec.columnLabels };
    return postHocTest(counts, {
      compare: spec.compare,
      adjustment: spec.adjustment,
      alpha: spec.alpha,
      rowLabels,
      columnLabels,
    });
  },
});
