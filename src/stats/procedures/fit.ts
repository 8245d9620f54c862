/**
 * Chi-square goodness of fit: observed counts in k categories against expected proportions, ratios or
 * counts (uniform when none is given). The main statistic is one member of the power-divergence family
 * (Cressie & Read 1984): Pearson X² (default), likelihood-ratio G², or Cressie–Read with a chosen λ.
 */
import { InputError } from '../../errors';
import { checkExpectedCounts, describeAlpha, describeP, independenceAssumption, nameOf, requireCount, requireCountTotal, requireLevel } from './assumptions';
import { type DivergenceSettings, divergenceLines, mainStatisticFields, resolveStatistic } from './divergence';
import { compensatedSum } from '../moments';
import type { CategoryRow, Notice, TestResult } from '../result';

export interface GoodnessOfFitOptions extends DivergenceSettings {
  /** Category labels, in the order of `observed`. Default "category 1", "category 2", … */
  readonly labels?: readonly string[];
  /** Expected counts; rescaled to the observed total when their total differs. */
  readonly expected?: readonly number[];
  /** Expected proportions; rescaled when they do not sum to 1 within 1e-9. */
  readonly proportions?: readonly number[];
  /** Expected ratios such as 9:3:3:1. */
  readonly ratios?: readonly number[];
  /** Parameters estimated from the same data (m): df = k − 1 − m. Default 0. */
  readonly estimatedParameters?: number;
  /** What the categories classify (e.g. the column `nozzle` they were counted from); named in the conclusion. */
  readonly variable?: string;
}

type ExpectedSource = 'counts' | 'proportions' | 'ratios' | 'uniform';

export function goodnessOfFit(observed: readonly number[], options: GoodnessOfFitOptions = {}): TestResult {
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const { statistic, lambda, cressieReadLambda } = resolveStatistic(options);
  const m = options.estimatedParameters ?? 0;
  if (!Number.isInteger(m) || m < 0) {
    throw new InputError(`estimatedParameters: expected a whole number ≥ 0, found ${String(m)}`, { argument: { name: 'estimatedParameters' } }, 'invalid-estimated-parameters');
  }

  const k = observed.length;
  if (k < 2) throw new InputError(`observed: expected at least 2 categories, found ${k}`, { argument: { name: 'observed' } }, 'too-few-categories');
  const labels = categoryLabels(k, options.labels);
  observed.forEach((o, i) => requireCount(o, `category \`${labels[i]}\``, { name: 'observed', at: [i] }));
  const n = compensatedSum(observed);
  requireCountTotal(n, 'observed', { name: 'observed' });
  if (n === 0) throw new InputError('observed: every count is 0, so there is nothing to test', { argument: { name: 'observed' } }, 'empty-observed');

  const notices: Notice[] = [];
  const { source, weights } = expectedWeights(k, labels, options);
  const weightTotal = compensatedSum(weights);
  const proportions = weights.map((w) => w / weightTotal);
  if (source === 'counts' && Math.abs(weightTotal - n) > 1e-9 * n) {
    notices.push({
      code: 'rescaled-expected',
      severity: 'info',
      message: `The expected counts total ${weightTotal}, but the observed counts total ${n}; the expected counts were rescaled to total ${n} (same proportions).`,
    });
  }
  if (source === 'proportions' && Math.abs(weightTotal - 1) > 1e-9) {
    notices.push({
      code: 'rescaled-proportions',
      severity: 'info',
      message: `The expected proportions sum to ${weightTotal}, not 1; each was divided by ${weightTotal} before the test.`,
    });
  }
  const expected = proportions.map((p) => n * p);

  // A category that can never occur must not have been observed; if it was not, it carries no information.
  expected.forEach((e, i) => {
    if (e === 0 && observed[i] > 0) {
      throw new InputError(
        `category \`${labels[i]}\`: expected count is 0 but ${observed[i]} observed; a category with expected 0 can never occur under the hypothesis. Give it a positive expected value or remove it.`,
        { argument: { name: source === 'uniform' ? 'observed' : source === 'counts' ? 'expected' : source, at: [i] } },
        'zero-expected',
      );
    }
  });
  const used = expected.map((e) => e > 0);
  const kUsed = used.filter(Boolean).length;
  const unused = labels.filter((_, i) => !used[i]);
  if (unused.length > 0) {
    notices.push({
      code: 'dropped-zero-expected',
      severity: 'info',
      message: `Categories with expected 0 and observed 0 carry no information and are not counted in the degrees of freedom: ${unused.join(', ')}.`,
    });
  }
  const df = kUsed - 1 - m;
  if (df < 1) {
    throw new InputError(
      `estimatedParameters: with ${kUsed} categories and ${m} estimated parameter(s) the degrees of freedom would be ${df}; they must be at least 1`,
      { argument: { name: 'estimatedParameters' } },
      'no-degrees-of-freedom',
    );
  }

  const lines = divergenceLines(observed, expected, df, cressieReadLambda);
  const main = lines.find((l) => l.id === statistic)!;
  const pearson = lines.find((l) => l.id === 'pearson')!;
  if (!Number.isFinite(main.line.statistic)) {
    notices.push({
      code: 'infinite-statistic',
      severity: 'warning',
      message: `With λ = ${lambda} (≤ −1) a category observed 0 times makes the statistic infinite; choose λ > −1 or another statistic.`,
    });
  }

  const categories: CategoryRow[] = observed.map((o, i) => {
    const e = expected[i];
    const diff = o - e;
    return {
      label: labels[i],
      observed: o,
      expected: e,
      pearsonResidual: e === 0 ? 0 : diff / Math.sqrt(e),
      standardizedResidual: e === 0 ? 0 : diff / Math.sqrt(e * (1 - proportions[i])),
      contribution: main.contributions[i],
    };
  });

  const check = checkExpectedCounts(
    expected.filter((_, i) => used[i]),
    labels.filter((_, i) => used[i]),
    'categories',
    'an exact multinomial test or a Monte Carlo p-value, or pooling adjacent categories',
  );
  if (check.notice) notices.push(check.notice);

  const pValue = main.line.pValue;
  const significant = pValue.value < alpha;
  const against = source === 'uniform' ? 'equal proportions in every category' : 'the expected proportions';
  const named = nameOf(options.variable);
  const counts = named ? `The observed counts of ${named}` : 'The observed counts';
  const conclusion = significant
    ? `${counts} differ from ${against} by more than chance would explain ${describeAlpha(alpha)} (${describeP(pValue)}).`
    : `${counts} are consistent with ${against}: the differences are within what chance would produce ${describeAlpha(alpha)} (${describeP(pValue)}).`;

  return {
    kind: 'test',
    test: 'goodness-of-fit',
    procedure: `Chi-square goodness-of-fit test (${main.line.name})`,
    ...mainStatisticFields(main.line, n, alpha),
    conclusion,
    otherStatistics: lines.filter((l) => l !== main).map((l) => l.line),
    effectSizes: [
      {
        id: 'cohensW',
        name: "Cohen's w",
        value: Math.sqrt(pearson.line.statistic / n),
        note: 'sqrt(X²/n) from the Pearson statistic; about 0.1 small, 0.3 medium, 0.5 large (Cohen 1988, common practice).',
      },
    ],
    estimates: [],
    categories,
    notices,
    assumptions: [
      check.assumption,
      independenceAssumption('observation'),
      {
        id: 'fixed-categories',
        title: 'Categories and expected proportions fixed in advance',
        // Declaring m adjusts df; whether the categories were chosen before seeing the data stays a design question.
        status: 'unchecked',
        explanation:
          m > 0
            ? `${m} parameter(s) were estimated from the data, and the degrees of freedom were reduced by ${m}. The categories must still have been chosen before looking at the data.`
            : 'The categories and the expected proportions must be chosen before looking at the data. If parameters of the expected distribution were estimated from these data, give their number as estimatedParameters so the degrees of freedom are reduced.',
      },
    ],
    details: {
      lambda,
      estimatedParameters: m,
      expectedFrom: source,
      proportions,
      contributionsTo: main.line.id,
    },
  };
}

function categoryLabels(k: number, labels: readonly string[] | undefined): string[] {
  if (labels === undefined) return Array.from({ length: k }, (_, i) => `category ${i + 1}`);
  if (labels.length !== k) {
    throw new InputError(`labels: expected ${k} labels (one per observed count), found ${labels.length}`, { argument: { name: 'labels' } }, 'length-mismatch');
  }
  return labels.map(String);
}

function expectedWeights(k: number, labels: readonly string[], options: GoodnessOfFitOptions): { source: ExpectedSource; weights: readonly number[] } {
  const given = (['expected', 'proportions', 'ratios'] as const).filter((key) => options[key] !== undefined);
  if (given.length > 1) {
    throw new InputError(`give only one of expected, proportions or ratios; found ${given.join(' and ')}`, { argument: { name: given[1] } }, 'conflicting-expected');
  }
  if (given.length === 0) return { source: 'uniform', weights: new Array<number>(k).fill(1) };
  const key = given[0];
  const weights = options[key]!;
  if (weights.length !== k) {
    throw new InputError(`${key}: expected ${k} values (one per observed count), found ${weights.length}`, { argument: { name: key } }, 'length-mismatch');
  }
  weights.forEach((w, i) => {
    if (typeof w !== 'number' || !Number.isFinite(w) || w < 0) {
      throw new InputError(`category \`${labels[i]}\`: ${key} must be a finite number ≥ 0, found ${String(w)}`, { argument: { name: key, at: [i] } }, 'invalid-expected');
    }
  });
  if (!(compensatedSum(weights) > 0)) {
    throw new InputError(`${key}: every value is 0; at least one category must be expected`, { argument: { name: key } }, 'invalid-expected');
  }
  return { source: key === 'expected' ? 'counts' : key, weights };
}
