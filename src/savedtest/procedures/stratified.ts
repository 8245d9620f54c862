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
import type { StratifiedCounts } from '../../data/types';
import { InputError } from '../../errors';
import type { RunContext } from '../types';
import { aggregateOf, checkSourceColumns, CONFIDENCE, COUNT_ARRAY, LABELS, requireLength, requireOneOf, sourceField, VARIABLE_NAME, type SourceSpec } from './shared';
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
    source: sourceField('Three categorical columns: the strata, the rows, the columns (counted on the server for a database source).', 3, 3),
    stratumLabels: LABELS('strata (with a source: the order and full set of levels of the first column)'),
    rowLabels: LABELS('rows (the same in every stratum; with a source: the order and full set of levels of the second column)'),
    columnLabels: LABELS('columns (the same in every stratum; with a source: the order and full set of levels of the third column)'),
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
    requireOneOf(spec, path, ['strata', 'source'], problems, false, 'missing data: give "strata", an array of tables of counts, or a "source" with three columns');
    checkSourceColumns(spec, path, [3], 'three columns (strata, rows, columns)', problems);
    const strata = spec.strata;
    if (!strata) return problems;
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
  async run(spec, ctx): Promise<TestResult> {
    const columns = spec.source?.columns;
    const counted = spec.source ? await strataFromSource(spec, ctx) : undefined;
    if (counted) ctx.countsRead?.({ strata: counted.counts });
    // Scores of the wrong length and the exact method on R×C strata are refused by stratifiedTest, with their JSON paths.
    return stratifiedTest(counted?.counts ?? spec.strata!, {
      alpha: spec.alpha,
      confidence: spec.confidence,
      correction: spec.correction,
      method: spec.method as 'asymptotic' | 'exact' | undefined,
      stratumLabels: counted?.stratumLabels ?? spec.stratumLabels,
      rowLabels: counted?.rowLabels ?? spec.rowLabels,
      columnLabels: counted?.columnLabels ?? spec.columnLabels,
      rowScores: spec.rowScores,
      columnScores: spec.columnScores,
      rowVariable: spec.rowVariable ?? columns?.[1],
      columnVariable: spec.columnVariable ?? columns?.[2],
    });
  },
});

type Labelled = { readonly source?: SourceSpec; readonly stratumLabels?: readonly string[]; readonly rowLabels?: readonly string[]; readonly columnLabels?: readonly string[] };

/**
 * Counts stratum × row × column from the source (on the server for a database), placed in the order the spec
 * lists the levels (a listed level the data lacks counts 0); a level with counts that a list leaves out is an error.
 */
export async function strataFromSource(spec: Labelled, ctx: RunContext): Promise<StratifiedCounts> {
  const source = spec.source!;
  const [stratumColumn, rowColumn, columnColumn] = source.columns!;
  const { strata } = await aggregateOf(ctx, { kind: 'strata', stratumColumn, rowColumn, columnColumn, weight: source.weight }, 'strata', {
    levels: spec.stratumLabels,
    rowLevels: spec.rowLabels,
    columnLevels: spec.columnLabels,
  });
  const stratumLabels = spec.stratumLabels ?? strata.stratumLabels;
  const rowLabels = spec.rowLabels ?? strata.rowLabels;
  const columnLabels = spec.columnLabels ?? strata.columnLabels;
  const dimensions = [
    { found: strata.stratumLabels, listed: stratumLabels, column: stratumColumn, key: 'stratumLabels' },
    { found: strata.rowLabels, listed: rowLabels, column: rowColumn, key: 'rowLabels' },
    { found: strata.columnLabels, listed: columnLabels, column: columnColumn, key: 'columnLabels' },
  ];
  const places = dimensions.map((d) => d.found.map((level) => d.listed.indexOf(level)));
  const counts = stratumLabels.map(() => rowLabels.map(() => columnLabels.map(() => 0)));
  strata.counts.forEach((table, k) =>
    table.forEach((row, i) =>
      row.forEach((n, j) => {
        if (n === 0) return;
        const at = [places[0][k], places[1][i], places[2][j]];
        const unlisted = at.findIndex((x) => x < 0);
        if (unlisted >= 0) {
          const d = dimensions[unlisted];
          const level = d.found[[k, i, j][unlisted]];
          throw new InputError(`column \`${d.column}\` has the level "${level}", which "${d.key}" does not list; add it in its place or fix the data`, { jsonPath: `$.${d.key}`, column: d.column }, 'unknown-level');
        }
        counts[at[0]][at[1]][at[2]] += n;
      }),
    ),
  );
  return { stratumLabels, rowLabels, columnLabels, counts };
}
