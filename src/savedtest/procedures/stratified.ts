/**
 * `"test": "stratified"`: the same cross-classification in each of several strata. 2×2 strata give the
 * Cochran–Mantel–Haenszel test, the common odds ratio and the Breslow–Day homogeneity test; R×C strata give the
 * generalized CMH statistics.
 */
import type { TestResult } from '../../stats/result';
import { stratifiedTest } from '../../stats/procedures/stratified';
import { arr, bool, field, num, str, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { CONFIDENCE, COUNT_ARRAY, LABELS, requireLength, VARIABLE_NAME } from './shared';
import { FRAGILITY_FIELDS } from '../evidence';


export const stratifiedProcedure = defineProcedure({
  test: 'stratified',
  summary: 'Stratified tables: Cochran–Mantel–Haenszel test across strata of 2×2 tables (with the common odds ratio and Breslow–Day), or generalized CMH for R×C strata.',
  planning: {
    label: 'Stratified tables (Cochran–Mantel–Haenszel)',
    detail: 'The same cross-classification in each stratum of a third variable',
    accepts: ['categorical-columns'],
    roles: ['the strata', 'the rows', 'the columns'],
  },
  fields: {
    ...FRAGILITY_FIELDS,
    strata: field(arr(arr(COUNT_ARRAY, { minItems: 2 }), { minItems: 1 }), 'One table of counts per stratum, all of the same size (2×2 for CMH).', true),
    stratumLabels: LABELS('strata'),
    rowLabels: LABELS('rows (the same in every stratum)'),
    columnLabels: LABELS('columns (the same in every stratum)'),
    rowVariable: VARIABLE_NAME('what the rows classify'),
    columnVariable: VARIABLE_NAME('what the columns classify'),
    correction: field(bool, 'Continuity correction of the 2×2×K CMH statistic. Default false; both are reported.'),
    method: field(str({ enum: ['asymptotic', 'exact'] }), 'Main p-value for 2×2 strata: "asymptotic" CMH (default) or the "exact" conditional test. Both are reported.'),
    rowScores: field(arr(num()), 'Row scores for the generalized CMH correlation statistic (R×C strata). Default 1, 2, …'),
    columnScores: field(arr(num()), 'Column scores for the generalized CMH row-mean and correlation statistics. Default 1, 2, …'),
    confidence: CONFIDENCE,
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    const strata = spec.strata;
    if (!strata) {
      problems.push({ path, message: 'missing data: give "strata", an array of tables of counts' });
      return problems;
    }
    const r = strata[0].length;
    const c = strata[0][0]?.length ?? 0;
    strata.forEach((t, k) => {
      const shapeOk = t.length === r && t.every((row) => row.length === c);
      if (!shapeOk) problems.push({ path: childPath(childPath(path, 'strata'), k), message: `every stratum must be ${r}×${c} like the first one` });
    });
    requireLength(spec, path, 'stratumLabels', strata.length, 'one per stratum', problems);
    requireLength(spec, path, 'rowLabels', r, 'one per row', problems);
    requireLength(spec, path, 'columnLabels', c, 'one per column', problems);
    requireLength(spec, path, 'rowScores', r, 'one per row', problems);
    requireLength(spec, path, 'columnScores', c, 'one per column', problems);
    if (spec.method === 'exact' && (r !== 2 || c !== 2)) problems.push({ path: childPath(path, 'method'), message: `the exact conditional test needs 2×2 strata; these are ${r}×${c}` });
    return problems;
  },
  async run(spec): Promise<TestResult> {
    return stratifiedTest(spec.strata!, {
      alpha: spec.alpha,
      confidence: spec.confidence,
      correction: spec.correction,
      method: spec.method as 'asymptotic' | 'exact' | undefined,
      stratumLabels: spec.stratumLabels,
      rowLabels: spec.rowLabels,
      columnLabels: spec.columnLabels,
      rowScores: spec.rowScores,
      columnScores: spec.columnScores,
      rowVariable: spec.rowVariable,
      columnVariable: spec.columnVariable,
    });
  },
});
