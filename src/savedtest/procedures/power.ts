/**
 * `"test": "power"`: power for a given n, or the smallest n for a given power, for the goodness-of-fit and
 * independence tests (Cohen's w, `"df"`) and the test for one variance (`"sigmaRatio"` = σ1/σ0).
 */
import { powerAnalysis } from '../../stats/procedures/power';
import type { PowerResult } from '../../stats/result';
import { field, num, str, type SpecProblem } from '../fields';
import { childPath } from '../json-text';
import { defineProcedure } from './define';
import { ALTERNATIVE } from './shared';

export const powerProcedure = defineProcedure({
  test: 'power',
  summary: 'Power for a sample size, or the smallest sample size for a power, for chi-square goodness of fit, independence, or the test for one variance.',
  planning: {
    label: 'Power or sample size',
    detail: 'Power of a χ² test for an effect size, or the sample size for a power',
    accepts: ['anything'],
    questions: [
      { field: 'target', title: 'Which test the power is for' },
      { field: 'sigmaRatio', title: 'Ratio σ1/σ0', when: (spec) => spec.target === 'variance' },
      { field: 'effectSize', title: "Effect size (Cohen's w)", when: (spec) => spec.target !== 'variance' },
      { field: 'df', title: 'Degrees of freedom', when: (spec) => spec.target !== 'variance' },
      { field: 'n', title: 'Sample size', orElse: 'power', when: (spec) => spec.power === undefined },
      { field: 'power', title: 'Target power', when: (spec) => spec.n === undefined },
    ],
  },
  fields: {
    target: field(str({ enum: ['goodness-of-fit', 'independence', 'variance'] }), 'Which test the power is for. Default "goodness-of-fit" with "effectSize", "variance" with "sigmaRatio".'),
    effectSize: field(num({ exclusiveMin: 0 }), "Cohen's w (0.1 small, 0.3 medium, 0.5 large by Cohen's convention)."),
    sigmaRatio: field(num({ exclusiveMin: 0 }), 'σ1/σ0, the true standard deviation over the hypothesised one (variance test).'),
    df: field(num({ integer: true, min: 1 }), 'Degrees of freedom: k − 1 for goodness of fit with k categories (minus estimated parameters), (r − 1)(c − 1) for an r×c table.'),
    n: field(num({ integer: true, min: 1 }), 'Sample size: gives the power.'),
    power: field(num({ exclusiveMin: 0, exclusiveMax: 1 }), 'Target power: gives the smallest sample size that reaches it.'),
    alternative: { ...ALTERNATIVE, description: 'Alternative of the variance test. Default "two-sided".' },
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    const hasW = spec.effectSize !== undefined;
    const hasRatio = spec.sigmaRatio !== undefined;
    if (hasW === hasRatio) problems.push({ path, message: 'give exactly one of "effectSize" (Cohen\'s w) or "sigmaRatio" (variance test)' });
    if ((spec.n === undefined) === (spec.power === undefined)) problems.push({ path, message: 'give exactly one of "n" (to get the power) or "power" (to get the sample size)' });
    const target = spec.target ?? (hasRatio ? 'variance' : 'goodness-of-fit');
    if (target === 'variance' && hasW) problems.push({ path: childPath(path, 'effectSize'), message: 'the variance test takes "sigmaRatio", not "effectSize"' });
    if (target !== 'variance' && hasRatio) problems.push({ path: childPath(path, 'sigmaRatio'), message: `the ${String(target)} test takes "effectSize" (Cohen's w), not "sigmaRatio"` });
    if (target !== 'variance' && spec.df === undefined) problems.push({ path, message: `missing "df": k − 1 for goodness of fit, (r − 1)(c − 1) for independence` });
    if (target === 'variance' && spec.df !== undefined) problems.push({ path: childPath(path, 'df'), message: 'the variance test has df = n − 1; remove "df"' });
    if (target !== 'variance' && spec.alternative !== undefined) problems.push({ path: childPath(path, 'alternative'), message: 'chi-square tests of fit and independence are one-tailed by nature; "alternative" is for the variance test' });
    return problems;
  },
  async run(spec): Promise<PowerResult> {
    const target = spec.target ?? (spec.sigmaRatio !== undefined ? 'variance' : 'goodness-of-fit');
    return powerAnalysis({
      target,
      effectSize: spec.effectSize,
      sigmaRatio: spec.sigmaRatio,
      df: spec.df,
      alpha: spec.alpha,
      n: spec.n,
      power: spec.power,
      alternative: spec.alternative,
    });
  },
});
