/**
 * `"test": "post-hoc"`: after an r×c test, which pairs of rows (or columns), or which cells, differ — with the
 * p-values adjusted for the number of comparisons and each line naming its rows, columns or cell.
 */
import { postHocTest, type Adjustment, type Comparison } from '../../stats/posthoc';
import type { TestResult } from '../../stats/result';
import { field, str, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import type { SpecV1 } from '../types';
import type { ProcedureHandler } from './index';
import { COUNT_TABLE, LABELS, requireLength } from './shared';

export const postHocProcedure: ProcedureHandler = {
  test: 'post-hoc',
  summary: 'Post-hoc comparisons on an r×c table: pairs of rows or columns, or cell-wise adjusted residuals, with Bonferroni, Holm or Benjamini–Hochberg adjustment.',
  fields: {
    table: field(COUNT_TABLE, 'The table of counts: an array of rows, each an array of counts.', true),
    rowLabels: LABELS('rows'),
    columnLabels: LABELS('columns'),
    compare: field(str({ enum: ['cells', 'rows', 'columns'] }), 'What to compare: "cells" (adjusted residual per cell, default), "rows" or "columns" (each pair by a chi-square test).'),
    adjustment: field(str({ enum: ['holm', 'bonferroni', 'benjamini-hochberg'] }), 'Multiplicity adjustment of the p-values. Default "holm".'),
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
    requireLength(spec, path, 'rowLabels', spec.table.length, 'one per row', problems);
    requireLength(spec, path, 'columnLabels', width, 'one per column', problems);
    return problems;
  },
  async run(spec: SpecV1): Promise<TestResult> {
    return postHocTest(spec.table!, {
      compare: spec.compare as Comparison | undefined,
      adjustment: spec.adjustment as Adjustment | undefined,
      alpha: spec.alpha,
      rowLabels: spec.rowLabels,
      columnLabels: spec.columnLabels,
    });
  },
};
