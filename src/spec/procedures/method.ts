/**
 * `"method": "exact" | "monte-carlo"` for the goodness-of-fit and independence tests: the asymptotic result
 * is computed as usual, then the exact or Monte Carlo p-value of the same statistic becomes the main p-value
 * and the asymptotic one stays beside it.
 */
import { describeAlpha, describeP } from '../../stats/assumptions';
import { exactIndependence, exactMultinomialFit } from '../../stats/exact';
import { DEFAULT_RESAMPLES, monteCarloFit, monteCarloIndependence, type ResamplingResult, type ResamplingStatistic } from '../../stats/montecarlo';
import { DEFAULT_SEED } from '../../stats/random';
import type { StatisticLine, TestResult } from '../../stats/result';
import type { SpecV1 } from '../types';

export interface MethodControl {
  readonly signal?: AbortSignal;
  readonly onProgress?: (fraction: number) => void;
}

/** Applies the spec's "method" to an asymptotic goodness-of-fit or independence result. */
export function applyMethod(result: TestResult, spec: SpecV1, control: MethodControl = {}): TestResult {
  const method = spec.method ?? 'asymptotic';
  if (method === 'asymptotic') return result;
  const statistic: ResamplingStatistic = spec.statistic ?? 'pearson';
  const mc = {
    resamples: spec.resamples ?? DEFAULT_RESAMPLES,
    seed: spec.seed ?? DEFAULT_SEED,
    onProgress: control.onProgress,
    shouldCancel: control.signal ? () => control.signal!.aborted : undefined,
  };
  let resampled: ResamplingResult;
  if (result.grid) {
    const table = result.grid.observed;
    resampled = method === 'exact' ? exactIndependence(table, { fallback: mc }) : monteCarloIndependence(table, { ...mc, statistic, lambda: spec.lambda });
  } else if (result.categories) {
    const observed = result.categories.map((c) => c.observed);
    const probabilities = result.categories.map((c) => c.expected);
    resampled =
      method === 'exact'
        ? exactMultinomialFit(observed, probabilities, { statistic, lambda: spec.lambda, fallback: mc })
        : monteCarloFit(observed, probabilities, { ...mc, statistic, lambda: spec.lambda });
  } else {
    return result;
  }
  return merge(result, resampled, method);
}

function merge(result: TestResult, resampled: ResamplingResult, method: 'exact' | 'monte-carlo'): TestResult {
  const asymptotic: StatisticLine = {
    id: `${String(result.details?.mainStatistic ?? 'main')}-asymptotic`,
    name: `${result.procedure}, chi-square approximation`,
    symbol: result.statisticSymbol,
    statistic: result.statistic,
    df: result.df,
    pValue: result.pValue,
  };
  const line = resampled.line;
  const significant = line.pValue.value < result.alpha;
  const actual = resampled.details.method === 'exact' ? 'exact' : 'Monte Carlo';
  const conclusion =
    significant === result.significant
      ? result.conclusion.replace(describeP(result.pValue), `${actual} ${describeP(line.pValue)}`)
      : `With the ${actual} p-value the result is ${significant ? '' : 'not '}significant ${describeAlpha(result.alpha)} (${describeP(line.pValue)}), although the chi-square approximation gave ${describeP(result.pValue)}; the ${actual} p-value is the one to report here.`;
  return {
    ...result,
    procedure: `${result.procedure}, ${actual} p-value`,
    pValue: line.pValue,
    significant,
    conclusion,
    otherStatistics: [line, asymptotic, ...result.otherStatistics],
    notices: [...result.notices, ...resampled.notices],
    details: { ...result.details, method: actual === 'exact' ? 'exact' : 'monte-carlo', requestedMethod: method, resampling: resampled.details, ...(line.standardError !== undefined ? { monteCarloStandardError: line.standardError } : {}) },
  };
}
