/**
 * `"test": "distribution"`: questions about the chi-square distribution itself — the tail probabilities
 * of an observed statistic, and the critical values for a given probability.
 */
import {
  chiSquareDensity,
  chiSquareLog10Density,
  chiSquareLog10Quantile,
  chiSquareLog10UpperQuantile,
  chiSquareLowerProbability,
  chiSquareQuantile,
  chiSquareUpperProbability,
  chiSquareUpperQuantile,
} from '../../stats/distributions/chisquare';
import {
  noncentralChiSquareDensity,
  noncentralChiSquareLogLowerTail,
  noncentralChiSquareLogUpperTail,
  noncentralChiSquareLowerTail,
  noncentralChiSquareQuantile,
  noncentralChiSquareUpperQuantile,
  noncentralChiSquareUpperTail,
} from '../../stats/distributions/noncentral';
import { probabilityFromBoth } from '../../stats/distributions/probability';
import type { DistributionResult } from '../../stats/result';
import { arr, field, num, oneOf, type SpecProblem } from '../fields';
import { defineProcedure } from './define';

/** `{ [key]: log10 }` when a positive value underflowed to 0 and its logarithm is finite; otherwise nothing. */
function underflowLog<K extends string>(key: K, value: number, log10: () => number): Partial<Record<K, number>> {
  if (value !== 0) return {};
  const l = log10();
  return Number.isFinite(l) ? ({ [key]: l } as Partial<Record<K, number>>) : {};
}

const asList = (v: number | readonly number[] | undefined): readonly number[] => (v === undefined ? [] : typeof v === 'number' ? [v] : v);

export const distributionProcedure = defineProcedure({
  test: 'distribution',
  summary: 'Tail probabilities of observed values and critical values of the chi-square distribution with "df" degrees of freedom.',
  planning: {
    label: 'Chi-square distribution',
    detail: 'Tail probabilities and critical values for some degrees of freedom',
    accepts: ['anything'],
    questions: [
      // What is wanted first, so a number is never read as the other kind (a statistic or an α).
      { field: 'x', title: 'Probability for a statistic', orElse: 'p', valueLater: true, when: (spec) => spec.p === undefined },
      // α = 0.05 offered: common practice, not a rule.
      { field: 'p', title: 'Critical value for α', preset: 0.05, when: (spec) => spec.x === undefined },
      { field: 'df', title: 'Degrees of freedom' },
    ],
  },
  fields: {
    df: field(num({ exclusiveMin: 0 }), 'Degrees of freedom (any real number > 0).', true),
    noncentrality: field(num({ min: 0 }), 'Noncentrality parameter λ ≥ 0 of the noncentral chi-square distribution. Default 0 (the central distribution).'),
    x: field(oneOf(num({ min: 0 }), arr(num({ min: 0 }), { minItems: 1 })), 'Observed value(s) of the statistic: gives the lower and upper tail probabilities.', true),
    p: field(
      oneOf(num({ exclusiveMin: 0, exclusiveMax: 1 }), arr(num({ exclusiveMin: 0, exclusiveMax: 1 }), { minItems: 1 })),
      'Probability (or probabilities): gives the lower, upper and two-sided critical values.',
      true,
    ),
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    if (spec.df === undefined) problems.push({ path, message: 'missing required field "df"' });
    if (spec.x === undefined && spec.p === undefined) problems.push({ path, message: 'give "x" (values of the statistic), "p" (probabilities), or both' });
    return problems;
  },
  async run(spec): Promise<DistributionResult> {
    const df = spec.df!;
    const ncp = (spec.noncentrality as number | undefined) ?? 0;
    if (ncp > 0) return noncentralLookup(spec, df, ncp);
    return {
      kind: 'distribution',
      test: 'distribution',
      df,
      noncentrality: 0,
      points: asList(spec.x).map((x) => {
        const density = chiSquareDensity(x, df);
        return {
          x,
          lower: chiSquareLowerProbability(x, df),
          upper: chiSquareUpperProbability(x, df),
          density,
          ...underflowLog('densityLog10', density, () => chiSquareLog10Density(x, df)),
        };
      }),
      critical: asList(spec.p).map((p) => {
        const quantiles = (q: number) => {
          const lower = chiSquareQuantile(q, df);
          const upper = chiSquareUpperQuantile(q, df);
          return {
            lower,
            upper,
            ...underflowLog('lowerLog10', lower, () => chiSquareLog10Quantile(q, df)),
            ...underflowLog('upperLog10', upper, () => chiSquareLog10UpperQuantile(q, df)),
          };
        };
        return { p, ...quantiles(p), twoSided: quantiles(p / 2) };
      }),
      notices: [],
    };
  },
});

/** The same questions for χ²(df, λ), λ > 0 (noncentral.ts: Poisson mixtures summed directly, checked against mpmath and R). */
function noncentralLookup(spec: { readonly x?: number | readonly number[]; readonly p?: number | readonly number[] }, df: number, ncp: number): DistributionResult {
  const quantiles = (q: number) => ({ lower: noncentralChiSquareQuantile(q, df, ncp), upper: noncentralChiSquareUpperQuantile(q, df, ncp) });
  return {
    kind: 'distribution',
    test: 'distribution',
    df,
    noncentrality: ncp,
    points: asList(spec.x).map((x) => ({
      x,
      lower: probabilityFromBoth(noncentralChiSquareLowerTail(x, df, ncp), noncentralChiSquareLogLowerTail(x, df, ncp)),
      upper: probabilityFromBoth(noncentralChiSquareUpperTail(x, df, ncp), noncentralChiSquareLogUpperTail(x, df, ncp)),
      density: noncentralChiSquareDensity(x, df, ncp),
    })),
    critical: asList(spec.p).map((p) => ({ p, ...quantiles(p), twoSided: quantiles(p / 2) })),
    notices: [],
  };
}
