/**
 * `"method": "exact" | "monte-carlo"` for the goodness-of-fit and independence tests: the asymptotic result
 * is computed as usual, then the exact or Monte Carlo p-value of the same statistic becomes the main p-value
 * and the asymptotic one stays beside it.
 */
import { describeAlpha, describeP } from '../../stats/procedures/assumptions';
import { exactIndependence, exactMultinomialFit, outcomeCount, tryExactIndependence } from '../../stats/procedures/exact';
import { DEFAULT_RESAMPLES, monteCarloFitInSlices, monteCarloIndependenceInSlices, type ResamplingResult, type ResamplingStatistic } from '../../stats/procedures/montecarlo';
import { DEFAULT_SEED } from '../../stats/random';
import type { StatisticLine, TestResult } from '../../stats/result';
import { isInputError } from '../../errors';
import { relocated } from '../arguments';
/** The fields of a count test that choose and tune its p-value method. */
export interface MethodFields {
  readonly method?: 'asymptotic' | 'exact' | 'monte-carlo';
  readonly statistic?: ResamplingStatistic;
  readonly lambda?: number;
  readonly resamples?: number;
  readonly seed?: number;
  readonly estimatedParameters?: number;
}

/** Lets the event loop run between Monte Carlo slices, so progress is shown and a cancel is seen. */
const pause = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

export interface MethodControl {
  readonly signal?: AbortSignal;
  readonly onProgress?: (fraction: number) => void;
}

/** Applies the spec's "method" to an asymptotic goodness-of-fit or independence result. */
export async function applyMethod(result: TestResult, spec: MethodFields, control: MethodControl = {}): Promise<TestResult> {
  const method = spec.method ?? 'asymptotic';
  if (method === 'asymptotic') return spec.method === undefined ? withExactBeside(result, spec) : result;
  const statistic: ResamplingStatistic = spec.statistic ?? 'pearson';
  const mc = {
    resamples: spec.resamples ?? DEFAULT_RESAMPLES,
    seed: spec.seed ?? DEFAULT_SEED,
    onProgress: control.onProgress,
    shouldCancel: control.signal ? () => control.signal!.aborted : undefined,
  };
  let resampled: ResamplingResult;
  try {
    if (result.grid) {
      const table = result.grid.observed;
      resampled = method === 'exact' ? exactIndependence(table, { fallback: mc }) : await monteCarloIndependenceInSlices(table, { ...mc, statistic, lambda: spec.lambda }, pause);
    } else if (result.categories) {
      const observed = result.categories.map((c) => c.observed);
      const probabilities = result.categories.map((c) => c.expected);
      resampled =
        method === 'exact'
          ? exactMultinomialFit(observed, probabilities, { statistic, lambda: spec.lambda, fallback: mc })
          : await monteCarloFitInSlices(observed, probabilities, { ...mc, statistic, lambda: spec.lambda }, pause);
    } else {
      return result;
    }
  } catch (e) {
    // Counts too large to resample: what the user changes is the method the spec chose, not the data.
    throw isInputError(e) && e.code === 'too-large-for-resampling' ? relocated(e, '$.method') : e;
  }
  const merged = merge(result, resampled, method);
  if (result.grid && resampled.details.method === 'exact') {
    const note = { code: 'exact-ordering', severity: 'info' as const, message: `The exact p-value is Fisher's (Fisher–Freeman–Halton): tables are ordered by their probability, not by ${result.statisticSymbol}. For the permutation distribution of ${result.statisticSymbol} itself, use "method": "monte-carlo".` };
    return { ...merged, notices: [...merged.notices, note] };
  }
  if (result.categories && (spec.estimatedParameters ?? 0) > 0) {
    const notice = {
      code: 'resampling-known-probabilities',
      severity: 'warning' as const,
      message: `The ${method === 'exact' ? 'exact' : 'Monte Carlo'} p-value treats the expected proportions as known; it does not allow for the ${spec.estimatedParameters} parameter(s) estimated from these data, so it is somewhat too large. The asymptotic line with df reduced is shown beside it.`,
    };
    return { ...merged, notices: [...merged.notices, notice] };
  }
  return merged;
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

/** Work allowed for the exact p-value shown unasked beside the chi-square one (well under a second). */
const BESIDE_WORK = 1e6;
const BESIDE_OUTCOMES = 2e5;

/**
 * When the expected-count rule fails and no method was chosen, the exact p-value is added beside the
 * asymptotic one (if it is quick to compute), so the reader sees both without asking.
 */
function withExactBeside(result: TestResult, spec: MethodFields): TestResult {
  if (!result.notices.some((n) => n.code === 'small-expected')) return result;
  let exact: ResamplingResult | null = null;
  if (result.grid && !(result.grid.observed.length === 2 && result.grid.observed[0].length === 2)) {
    exact = tryExactIndependence(result.grid.observed, BESIDE_WORK);
    if (exact === null) {
      const notice = {
        code: 'exact-beside-skipped',
        severity: 'info' as const,
        message: `Expected counts are small, but the exact p-value for this ${result.grid.observed.length}×${result.grid.observed[0].length} table would exceed its work limit (${BESIDE_WORK.toLocaleString('en-US')} steps, under a second), so it is not shown; set "method": "monte-carlo" for a resampled p-value.`,
      };
      return { ...result, notices: [...result.notices, notice] };
    }
  } else if (result.categories) {
    const observed = result.categories.map((c) => c.observed);
    const n = observed.reduce((a, b) => a + b, 0);
    if (outcomeCount(n, observed.length) <= BESIDE_OUTCOMES) {
      exact = exactMultinomialFit(observed, result.categories.map((c) => c.expected), { statistic: spec.statistic ?? 'pearson', lambda: spec.lambda });
    }
  }
  if (exact === null) return result;
  return {
    ...result,
    otherStatistics: [...result.otherStatistics, exact.line],
    notices: [
      ...result.notices,
      { code: 'exact-beside', severity: 'info', message: `Expected counts are small, so the exact p-value (${describeP(exact.line.pValue)}) is shown beside the chi-square one; set "method": "exact" to make it the main result.` },
    ],
    details: { ...result.details, exactBeside: exact.details },
  };
}
