/**
 * `"test": "variance"`: the chi-square test for one variance, from raw values (inline or one numeric column
 * of a file) or from a summary (n with the standard deviation or the variance).
 */
import { varianceTestFromMoments, varianceTestFromSummary, varianceTestFromValues } from '../../stats/procedures/variance';
import type { TestResult } from '../../stats/result';
import { arr, field, num, obj, str, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { ALTERNATIVE, CONFIDENCE, VARIABLE_NAME, aggregateOf, checkSourceColumns, requireOneOf, sourceField } from './shared';
import { EQUIVALENCE_VARIANCE_FIELD } from '../evidence';

export const varianceProcedure = defineProcedure({
  test: 'variance',
  summary: 'Chi-square test for one variance: is the spread σ (or σ²) equal to a target, with its confidence interval?',
  planning: {
    label: 'Variance of one numeric variable',
    detail: 'χ² test of σ against a hypothesised σ0, with a confidence interval',
    accepts: ['values', 'numeric-column'],
    questions: [
      { field: 'sigma0', title: 'Hypothesised standard deviation σ0' },
      { field: 'alternative', title: 'Alternative hypothesis', choiceLabels: { 'two-sided': 'σ differs from σ0', greater: 'σ is larger than σ0', less: 'σ is smaller than σ0' } },
    ],
  },
  // Moments are only ever streamed from the source's column (the raw values were not kept).
  arguments: { moments: 'values' },
  fields: {
    equivalence: EQUIVALENCE_VARIANCE_FIELD,
    values: field(arr(num(), { minItems: 2 }), 'Raw measurements.', true),
    summary: field(
      obj(
        {
          n: field(num({ integer: true, min: 2 }), 'Sample size.'),
          sd: field(num({ min: 0 }), 'Sample standard deviation s (divisor n − 1).'),
          variance: field(num({ min: 0 }), 'Sample variance s² (divisor n − 1).'),
        },
        { required: ['n'] },
      ),
      'A summary instead of raw values: {"n", "sd"} or {"n", "variance"}.',
      true,
    ),
    source: sourceField('The one numeric column.', 1, 1),
    variable: VARIABLE_NAME('what was measured'),
    unit: field(str(), 'Unit of the values, e.g. "g": σ and s are written in it in the conclusion, σ² and s² in its square.'),
    sigma0: field(num({ exclusiveMin: 0 }), 'Hypothesised standard deviation σ0 (give this or "variance0").'),
    variance0: field(num({ exclusiveMin: 0 }), 'Hypothesised variance σ0² (give this or "sigma0").'),
    alternative: ALTERNATIVE,
    confidence: CONFIDENCE,
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['values', 'summary', 'source'], problems);
    requireOneOf(spec, path, ['sigma0', 'variance0'], problems, false, 'missing the hypothesised spread: give "sigma0" (σ0) or "variance0" (σ0²)');
    if (spec.summary) {
      const s = spec.summary;
      if ((s.sd === undefined) === (s.variance === undefined)) {
        problems.push({ path: childPath(path, 'summary'), message: 'give exactly one of "sd" or "variance" with "n"' });
      }
    }
    checkSourceColumns(spec, path, [1], 'one numeric column', problems);
    if (spec.source?.weight !== undefined) {
      problems.push({ path: childPath(childPath(path, 'source'), 'weight'), message: 'frequency weights are not used by the variance test; remove "weight"' });
    }
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const options = {
      sigma0: spec.sigma0,
      variance0: spec.variance0,
      alternative: spec.alternative,
      confidence: spec.confidence,
      alpha: spec.alpha,
      variable: spec.variable ?? spec.source?.columns?.[0],
      unit: spec.unit,
    };
    if (spec.values) return varianceTestFromValues(spec.values, options);
    if (spec.summary) {
      const s = spec.summary;
      return varianceTestFromSummary(s.sd !== undefined ? { n: s.n, sd: s.sd } : { n: s.n, variance: s.variance! }, options);
    }
    const aggregate = await aggregateOf(ctx, { kind: 'numeric', column: spec.source!.columns![0] }, 'moments');
    return aggregate.values ? varianceTestFromValues(aggregate.values, options) : varianceTestFromMoments(aggregate.moments, options);
  },
});
