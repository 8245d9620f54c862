/**
 * `"test": "distribution-fit"`: chi-square goodness of fit of raw values (inline or one numeric column) to a
 * Poisson, binomial, geometric or normal distribution whose parameters are estimated from the same values.
 */
import { InputError } from '../../errors';
import { distributionFitTest } from '../../stats/procedures/distfit';
import type { TestResult } from '../../stats/result';
import { arr, field, num, str, withDefault, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { aggregateOf, checkSourceColumns, requireOneOf, sourceField } from './shared';

export const distributionFitProcedure = defineProcedure({
  test: 'distribution-fit',
  summary: 'Goodness of fit of raw values to a Poisson, binomial, geometric or normal distribution with parameters estimated from the data (df reduced, sparse bins pooled).',
  planning: {
    label: 'Fit of a distribution to the values',
    detail: 'Poisson, binomial, geometric or normal, parameters estimated from the values',
    accepts: ['values', 'numeric-column'],
    questions: [
      { field: 'family', title: 'Distribution family' },
      { field: 'trials', title: 'Number of trials of the binomial', when: (spec) => spec.family === 'binomial' },
    ],
  },
  fields: {
    values: field(arr(num(), { minItems: 2 }), 'Raw values: counts (whole numbers ≥ 0) for the discrete families, measurements for the normal.', true),
    source: sourceField('The one numeric column.', 1, 1),
    family: field(str({ enum: ['poisson', 'binomial', 'geometric', 'normal'] }), 'Distribution family. The geometric counts failures before the first success (0, 1, 2, …).'),
    trials: field(num({ integer: true, min: 1 }), 'Number of trials of the binomial (required for "binomial").'),
    cuts: field(arr(num(), { minItems: 1 }), 'Cut points between bins for the normal (increasing). Default: equiprobable bins under the fitted normal.'),
    minExpected: withDefault(field(num({ exclusiveMin: 0 }), 'Adjacent bins are pooled until each expected count reaches this. Default 5 (common practice).'), 5),
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['values', 'source'], problems);
    checkSourceColumns(spec, path, [1], 'one numeric column', problems);
    if (spec.family === undefined) problems.push({ path, message: 'missing required field "family" (poisson, binomial, geometric or normal)' });
    if (spec.family === 'binomial' && spec.trials === undefined) problems.push({ path, message: 'the binomial fit needs "trials", the number of trials' });
    if (spec.family !== 'binomial' && spec.trials !== undefined) problems.push({ path: childPath(path, 'trials'), message: '"trials" applies only to "family": "binomial"' });
    if (spec.family !== 'normal' && spec.cuts !== undefined) problems.push({ path: childPath(path, 'cuts'), message: '"cuts" applies only to "family": "normal"; discrete families are binned by value' });
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    let values = spec.values;
    if (!values) {
      const aggregate = await aggregateOf(ctx, { kind: 'numeric', column: spec.source!.columns![0] }, 'moments', undefined, { values: true });
      if (!aggregate.values) throw new InputError('$.source: this reader summarised the column without keeping the values, which a distribution fit needs', { jsonPath: '$.source' }, 'values-unavailable');
      values = aggregate.values;
    }
    return distributionFitTest(values, {
      family: spec.family!,
      trials: spec.trials,
      cuts: spec.cuts,
      minExpected: spec.minExpected,
      alpha: spec.alpha,
    });
  },
});
