/**
 * The sections that say how sure a conclusion is, added to a test's result after its procedure ran:
 * fragility (count-based tests, on unless `"fragility": false`), the Bayes factor (independence and goodness of fit,
 * on unless `"bayesFactor": false`), and the equivalence test the spec asks for (`"equivalence"`, variance and
 * goodness of fit). Field declarations for the procedures' tables live here too, so every procedure describes them
 * the same way.
 */
import { InputError } from '../errors';
import { dropEmptyMargins } from '../stats/procedures/advanced-common';
import { contingencyBayesFactor, goodnessOfFitBayesFactor, SAMPLING_PLANS, type SamplingPlan } from '../stats/procedures/bayes-factor';
import { chiSquareUpperProbability } from '../stats/distributions/chisquare';
import { powerDivergence, resolveStatistic } from '../stats/procedures/divergence';
import { fitEquivalence, varianceEquivalence } from '../stats/procedures/equivalence';
import { categoryProblem, fragilityIndex2x2, generalizedFragility, strataProblem, tableProblem, twoByTwoPValue, type Fragility, type TwoByTwoTest } from '../stats/procedures/fragility';
import { pairedTest } from '../stats/procedures/paired';
import { stratifiedTest } from '../stats/procedures/stratified';
import type { EquivalenceSection, FragilityBasis, TestResult } from '../stats/result';
import type { ArgumentPlaces } from './arguments';
import { bool, field, num, obj, oneOf, str, type Field } from './fields';
import type { SpecV1 } from './types';

export const FRAGILITY_FIELD: Field = field(
  bool,
  'Report the fragility index: how many single-observation changes of outcome would flip the conclusion (Walsh et al. 2014 for 2×2 tables, Baer et al. 2021 otherwise). Default true.',
);
export const FRAGILITY_MIN_LIKELIHOOD_FIELD: Field = field(
  num({ min: 0, max: 1 }),
  'Fragility counts only "sufficiently likely" changes (Baer et al. 2021): a new outcome must have at least this observed proportion in its row. Default 0 (every change).',
);
const PRIOR: Field = field(num({ exclusiveMin: 0 }), 'Prior concentration a of the Dirichlet priors (Jamil et al. 2017). Default 1.');
export const BAYES_FACTOR_TABLE_FIELD: Field = field(
  oneOf(
    obj({
      samplingPlan: field(
        str({ enum: SAMPLING_PLANS }),
        'How the counts were collected: "poisson" (nothing fixed in advance), "joint-multinomial" (the total fixed; the default), "rows-fixed" or "columns-fixed" (each row or column total fixed), "hypergeometric" (both margins fixed; 2×2 only).',
      ),
      priorConcentration: PRIOR,
    }),
    bool,
  ),
  'Gunel–Dickey Bayes factor for independence beside the p-value; false turns it off. Default {"samplingPlan": "joint-multinomial", "priorConcentration": 1}.',
);
export const BAYES_FACTOR_FIT_FIELD: Field = field(
  oneOf(obj({ priorConcentration: PRIOR }), bool),
  'Dirichlet–multinomial Bayes factor against the stated proportions, beside the p-value; false turns it off. Default {"priorConcentration": 1}.',
);
export const EQUIVALENCE_VARIANCE_FIELD: Field = field(
  obj({
    lower: field(num({ exclusiveMin: 0 }), 'σL, the smallest acceptable standard deviation (σ, not σ²). Leave out for the non-inferiority form σ ≤ upper.'),
    upper: field(num({ exclusiveMin: 0 }), 'σU (or σmax), the largest acceptable standard deviation (σ, not σ²).'),
  }, { required: ['upper'] }),
  'Equivalence: show that σ lies within [lower, upper] by two one-sided chi-square tests (or σ < upper alone).',
);
export const EQUIVALENCE_FIT_FIELD: Field = field(
  obj({ margin: field(num({ exclusiveMin: 0, exclusiveMax: Math.SQRT2 }), 'ε: the largest Euclidean distance between the observed and the stated proportions that counts as equivalent.') }, { required: ['margin'] }),
  "Equivalence: show that the distribution lies within distance ε of the stated proportions (Wellek's test).",
);

/** The fields the arguments of the Bayes factor and equivalence functions come from. */
export const EVIDENCE_ARGUMENTS: ArgumentPlaces = {
  samplingPlan: 'bayesFactor.samplingPlan',
  priorConcentration: 'bayesFactor.priorConcentration',
  lower: 'equivalence.lower',
  upper: 'equivalence.upper',
  margin: 'equivalence.margin',
};

/** The fragility fields every count-based procedure declares. */
export const FRAGILITY_FIELDS = { fragility: FRAGILITY_FIELD, fragilityMinLikelihood: FRAGILITY_MIN_LIKELIHOOD_FIELD } as const;

/** Tables the exact search may examine when each p-value is a whole procedure (paired, stratified): about a second. */
const EXPENSIVE_TEST_TABLES = 2000;

/**
 * The fields these sections read, as the procedures' field tables declare and check them (runSpec validates the
 * whole spec against the table before any procedure or section runs).
 */
interface EvidenceFields {
  readonly fragility?: boolean;
  readonly fragilityMinLikelihood?: number;
  readonly bayesFactor?: boolean | { readonly samplingPlan?: SamplingPlan; readonly priorConcentration?: number };
  readonly equivalence?: { readonly lower?: number; readonly upper?: number; readonly margin?: number };
  readonly method?: 'asymptotic' | 'exact' | 'monte-carlo' | 'mid-p';
  readonly statistic?: 'pearson' | 'likelihood-ratio' | 'cressie-read';
  readonly lambda?: number;
  readonly correction?: boolean;
  readonly table?: readonly (readonly number[])[];
  readonly strata?: readonly (readonly (readonly number[])[])[];
  readonly estimatedParameters?: number;
}

/** Adds the sections the spec asks for (or that are on by default) to a test result. */
export function withEvidence(result: TestResult, validated: SpecV1): TestResult {
  const spec = validated as SpecV1 & EvidenceFields;
  let out = result;
  const fragility = spec.fragility !== false ? fragilityFor(result, spec) : undefined;
  if (fragility) out = { ...out, fragility };
  const bayesFactor = bayesFactorFor(result, spec);
  if (bayesFactor) out = { ...out, bayesFactor };
  const equivalence = equivalenceFor(result, spec);
  if (equivalence) out = { ...out, equivalence };
  return out;
}

/** log10 p of a test that may refuse a changed table (an emptied row): such a table counts as not significant. */
function guarded(f: () => number): number {
  try {
    const lp = f();
    return Number.isNaN(lp) ? 0 : lp;
  } catch {
    return 0;
  }
}

function fragilityFor(result: TestResult, spec: EvidenceFields): (Fragility & { basis: FragilityBasis }) | undefined {
  const alpha = result.alpha;
  const options = { minLikelihood: spec.fragilityMinLikelihood };
  const resampled = spec.method === 'monte-carlo' || (spec.method === 'exact' && result.test !== 'independence' && result.test !== 'paired' && result.test !== 'stratified');
  switch (result.test) {
    case 'independence': {
      if (!result.grid) return undefined;
      const observed = result.grid.observed;
      const { statistic, lambda } = resolveStatistic({ statistic: spec.statistic, lambda: spec.lambda });
      if (observed.length === 2 && observed[0].length === 2 && statistic === 'pearson' && spec.method !== 'monte-carlo' && options.minLikelihood === undefined) {
        const test: TwoByTwoTest = spec.method === 'exact' ? 'fisher' : spec.correction ? 'yates' : 'pearson';
        return { ...fragilityIndex2x2(observed, { test, alpha }), basis: test };
      }
      if (observed.length === 2 && observed[0].length === 2 && spec.method === 'exact') {
        // Sufficiently likely changes on a 2×2 with the exact method: the general search with Fisher's p.
        const f = generalizedFragility(tableProblem(observed, (t) => Math.log10(twoByTwoPValue(t[0][0], t[0][1], t[1][0], t[1][1], 'fisher')), alpha, options));
        return { ...f, basis: 'fisher' };
      }
      const lp = (t: number[][]): number => guarded(() => independenceLog10P(t, lambda));
      return { ...generalizedFragility(tableProblem(observed, lp, alpha, options)), basis: spec.method && spec.method !== 'asymptotic' ? 'asymptotic' : 'reported' };
    }
    case 'goodness-of-fit': {
      if (!result.categories || result.df === null) return undefined;
      const observed = result.categories.map((c) => c.observed);
      const n = observed.reduce((s, x) => s + x, 0);
      const proportions = result.categories.map((c) => c.expected / n);
      const { lambda } = resolveStatistic({ statistic: spec.statistic, lambda: spec.lambda });
      const df = result.df;
      const lp = (o: number[]): number => guarded(() => chiSquareUpperProbability(powerDivergence(o, proportions.map((p) => p * n), lambda).statistic, df).log10);
      const f = generalizedFragility(categoryProblem(observed, result.categories.map((c) => c.label), lp, alpha, options));
      return { ...f, basis: resampled ? 'asymptotic' : 'reported' };
    }
    case 'paired': {
      // The paired result carries no table; with a source the counts are not at hand here (fragility left out).
      if (!spec.table) return undefined;
      const opts = { alpha, correction: spec.correction, method: spec.method as 'asymptotic' | 'exact' | 'mid-p' | undefined };
      const lp = (t: number[][]): number => guarded(() => pairedTest(t, opts).pValue.log10);
      return { ...generalizedFragility(tableProblem(spec.table, lp, alpha, { ...options, maxTables: EXPENSIVE_TEST_TABLES, maxGreedyEvaluations: EXPENSIVE_TEST_TABLES })), basis: 'reported' };
    }
    case 'stratified': {
      const strata = spec.strata;
      if (!strata) return undefined;
      const opts = { alpha, correction: spec.correction, method: spec.method as 'asymptotic' | 'exact' | undefined };
      const lp = (s: number[][][]): number => guarded(() => stratifiedTest(s, opts).pValue.log10);
      return { ...generalizedFragility(strataProblem(strata, lp, alpha, { ...options, maxTables: EXPENSIVE_TEST_TABLES, maxGreedyEvaluations: EXPENSIVE_TEST_TABLES })), basis: 'reported' };
    }
    default:
      return undefined;
  }
}

/** log10 p of the power-divergence test of independence (rows and columns with total 0 left out). */
function independenceLog10P(t: number[][], lambda: number): number {
  const kept = dropEmptyMargins(t);
  if (kept.length < 2 || kept[0].length < 2) return 0;
  const rows = kept.map((r) => r.reduce((s, x) => s + x, 0));
  const cols = kept[0].map((_, j) => kept.reduce((s, r) => s + r[j], 0));
  const n = rows.reduce((s, x) => s + x, 0);
  const expected = kept.flatMap((_, i) => cols.map((c) => (rows[i] * c) / n));
  const statistic = powerDivergence(kept.flat(), expected, lambda).statistic;
  return chiSquareUpperProbability(statistic, (kept.length - 1) * (kept[0].length - 1)).log10;
}

function bayesFactorFor(result: TestResult, spec: EvidenceFields): TestResult['bayesFactor'] {
  const option = spec.bayesFactor;
  if (option === false) return undefined;
  const chosen = typeof option === 'object' ? option : {};
  const a = chosen.priorConcentration ?? 1;
  if (result.test === 'independence' && result.grid) {
    const table = dropEmptyMargins(result.grid.observed);
    if (table.length < 2 || table[0].length < 2) return undefined;
    return contingencyBayesFactor(table, chosen.samplingPlan ?? 'joint-multinomial', a);
  }
  if (result.test === 'goodness-of-fit' && result.categories) {
    if ((spec.estimatedParameters ?? 0) > 0) return undefined; // the point null would ignore the estimated parameters
    const observed = result.categories.map((c) => c.observed);
    const n = observed.reduce((s, x) => s + x, 0);
    return goodnessOfFitBayesFactor(observed, result.categories.map((c) => c.expected / n), a);
  }
  return undefined;
}

function equivalenceFor(result: TestResult, spec: EvidenceFields): EquivalenceSection | undefined {
  const option = spec.equivalence;
  if (!option) return undefined;
  const alpha = result.alpha;
  if (result.test === 'variance') {
    const variance = result.estimates.find((e) => e.id === 'variance')?.value;
    if (variance === undefined || result.n === null || option.upper === undefined) {
      throw new InputError('$.equivalence: the variance equivalence test needs "upper" (σU) and the sample variance', { jsonPath: '$.equivalence' }, 'equivalence-incomplete');
    }
    const e = varianceEquivalence(result.n, variance, option.lower, option.upper, alpha);
    return {
      pValue: e.pValue.value,
      pValueLog10: e.pValue.log10,
      equivalent: e.equivalent,
      ...(e.lower !== undefined ? { lower: e.lower } : {}),
      upper: e.upper,
      interval: e.interval,
      form: e.form,
    };
  }
  if (result.test === 'goodness-of-fit' && result.categories && option.margin !== undefined) {
    const observed = result.categories.map((c) => c.observed);
    const n = observed.reduce((s, x) => s + x, 0);
    const e = fitEquivalence(observed, result.categories.map((c) => c.expected / n), option.margin, alpha);
    return { pValue: e.pValue.value, pValueLog10: e.pValue.log10, equivalent: e.equivalent, margin: e.margin, interval: e.interval, form: 'goodness-of-fit', distance: e.distance };
  }
  return undefined;
}
