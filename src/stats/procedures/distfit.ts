/**
 * Chi-square goodness of fit to a distribution family whose parameters are estimated from the same data.
 *
 * Families and estimates (maximum likelihood from the raw values):
 * - Poisson: λ = mean; bins 0, 1, …, max, the last one collecting P(X ≥ max).
 * - Binomial with a known number of trials m: p = mean/m; bins 0, …, m.
 * - Geometric, counted as failures before the first success (support 0, 1, 2, …): p = 1/(1 + mean); bins as
 *   for the Poisson.
 * - Normal: μ = mean, σ = √(Σ(x − μ)²/n); bins are equiprobable under the fitted normal, k = ⌈2·n^0.4⌉
 *   (Moore 1986; common practice), fewer when needed so that n/k ≥ the expected-count minimum; or cut points
 *   given by the user.
 * Adjacent bins are pooled, left to right, until every expected count reaches the minimum (default 5, common
 * practice); a short last group joins its neighbour. df = k − 1 − (number of estimated parameters). Because the
 * parameters come from the ungrouped data, the statistic's null distribution lies between χ²(k − 1 − m) and
 * χ²(k − 1) (Chernoff & Lehmann 1954), so the reported p-value is slightly small; this is said in a notice.
 */
import { InputError } from '../../errors';
import { chiSquareCore, chiSquareLine, sum, testResult } from './advanced-common';
import { MAX_COUNT, describeAlpha, describeP, independenceAssumption, requireLevel } from './assumptions';
import { binomialLowerTail, logBinomialPmf } from '../distributions/discrete';
import { powerDivergence } from './divergence';
import { logFactorial, regularizedGammaLower, regularizedGammaUpper } from '../distributions/gamma';
import { normalLowerTail, normalQuantile, normalUpperTail } from '../distributions/normal';
import type { CategoryRow, Notice, TestResult } from '../result';

export type FitFamily = 'poisson' | 'binomial' | 'geometric' | 'normal';

export interface DistributionFitOptions {
  readonly family: FitFamily;
  /** Number of trials of the binomial. */
  readonly trials?: number;
  /** Cut points between bins for the normal family (increasing). */
  readonly cuts?: readonly number[];
  /** Smallest expected count per pooled bin. Default 5. */
  readonly minExpected?: number;
  readonly alpha?: number;
  /**
   * Largest support (0 … top) binned value by value without gathering the tails first; default MAX_DISCRETE_BINS.
   * Tests set it to 0 to check that gathering the tails gives the same pooled groups.
   */
  readonly singleBinsUpTo?: number;
}

interface Bin {
  readonly label: string;
  readonly observed: number;
  readonly probability: number;
}

export interface PooledGroup {
  readonly label: string;
  /** Labels of the original bins pooled into this group. */
  readonly bins: readonly string[];
  readonly observed: number;
  readonly expected: number;
}

function requireValues(values: readonly number[], integer: boolean, family: FitFamily, upper?: number): void {
  if (!Array.isArray(values) || values.length < 2) throw new InputError(`values: expected at least 2 values, found ${Array.isArray(values) ? values.length : 0}`, { argument: { name: 'values' } }, 'too-few-values');
  values.forEach((x, i) => {
    const ok = typeof x === 'number' && Number.isFinite(x) && (!integer || (Number.isInteger(x) && x >= 0 && x <= (upper ?? MAX_COUNT)));
    if (!ok) {
      const want = integer ? `a whole number from 0 to ${upper ?? '2^53 − 1'} (${family} counts)` : 'a finite number';
      throw new InputError(`values[${i}]: expected ${want}, found ${JSON.stringify(x)}`, { argument: { name: 'values', at: [i] } }, 'invalid-value');
    }
  });
}

/**
 * Bins 0, 1, …, top. With `upperTail` (P(X ≥ k) of an unbounded family) the last bin is open and takes that
 * tail, computed directly rather than as 1 − P(X < top), which loses the digits of a small tail.
 */
function discreteBins(values: readonly number[], top: number, logPmf: (k: number) => number, upperTail?: (k: number) => number): Bin[] {
  const counts = new Array<number>(top + 1).fill(0);
  for (const v of values) counts[Math.min(v, top)]++;
  const probabilities = counts.map((_, k) => (k === top && upperTail ? upperTail(k) : Math.exp(logPmf(k))));
  return counts.map((o, k) => ({ label: k === top && upperTail ? `≥ ${k}` : String(k), observed: o, probability: probabilities[k] }));
}

/** Tails of a discrete family on 0, 1, 2, …: P(X ≤ k) and P(X ≥ k). */
interface DiscreteTails {
  lower(k: number): number;
  upper(k: number): number;
}

/**
 * Largest number of single-value bins a discrete fit builds. With more values in the support (binomial trials
 * or counts in the millions), the values whose expected counts would all be pooled anyway are gathered first:
 * one bin "≤ low" for the lower tail and one "≥ high" for the upper tail, each with expected count below the
 * pooling minimum, which left-to-right pooling would have merged into the same groups. If the bins between
 * still number more than this, the fit is refused.
 */
export const MAX_DISCRETE_BINS = 100_000;

/** The bins of a discrete family with a wide support: a lower-tail bin, single values, an upper-tail bin. */
function cappedDiscreteBins(values: readonly number[], top: number, logPmf: (k: number) => number, tails: DiscreteTails, minimum: number, family: FitFamily): Bin[] {
  const n = values.length;
  // Smallest k in [0, top] with n·P(X ≥ k) < minimum (top when none), and largest k with n·P(X ≤ k) < minimum (−1 when none).
  let a = 0;
  let b = top;
  while (a < b) {
    const mid = Math.floor((a + b) / 2);
    if (n * tails.upper(mid) < minimum) b = mid;
    else a = mid + 1;
  }
  const high = Math.max(a, 1);
  a = -1;
  b = high - 1;
  while (a < b) {
    const mid = Math.ceil((a + b) / 2);
    if (n * tails.lower(mid) < minimum) a = mid;
    else b = mid - 1;
  }
  const low = a;
  const single = high - low - 1;
  if (single > MAX_DISCRETE_BINS) {
    throw new InputError(
      `values: the fitted ${FAMILY_NAMES[family]} distribution spreads over ${single} values with expected counts that matter, more than the ${MAX_DISCRETE_BINS} bins a fit builds; group the values into classes and test the class counts with "goodness-of-fit"`,
      { argument: { name: 'values' } },
      'too-many-bins',
    );
  }
  const counts = new Map<number, number>();
  for (const v of values) {
    const k = v <= low ? low : v >= high ? high : v;
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  const bins: Bin[] = [];
  if (low >= 0) bins.push({ label: `≤ ${low}`, observed: counts.get(low) ?? 0, probability: tails.lower(low) });
  for (let k = low + 1; k < high; k++) bins.push({ label: String(k), observed: counts.get(k) ?? 0, probability: Math.exp(logPmf(k)) });
  bins.push({ label: `≥ ${high}`, observed: counts.get(high) ?? 0, probability: tails.upper(high) });
  return bins;
}

/** Pools adjacent bins left to right until every group's expected count reaches `minimum`. */
export function poolAdjacent(bins: readonly { label: string; observed: number; expected: number }[], minimum: number): PooledGroup[] {
  const groups: { bins: string[]; observed: number; expected: number }[] = [];
  let current: { bins: string[]; observed: number; expected: number } | null = null;
  for (const b of bins) {
    if (current === null) current = { bins: [], observed: 0, expected: 0 };
    current.bins.push(b.label);
    current.observed += b.observed;
    current.expected += b.expected;
    if (current.expected >= minimum) {
      groups.push(current);
      current = null;
    }
  }
  if (current !== null) {
    if (groups.length === 0) groups.push(current);
    else {
      const last = groups[groups.length - 1];
      last.bins.push(...current.bins);
      last.observed += current.observed;
      last.expected += current.expected;
    }
  }
  return groups.map((g) => ({ ...g, label: g.bins.length === 1 ? g.bins[0] : joinLabels(g.bins[0], g.bins[g.bins.length - 1]) }));
}

function joinLabels(first: string, last: string): string {
  if (first.startsWith('≤') && last.startsWith('≥')) return 'all values';
  if (first.startsWith('≤')) return `≤ ${last}`;
  if (last.startsWith('≥')) return `≥ ${first.replace(/^≥ /, '')}`;
  if (first.startsWith('(')) return `${first.split(',')[0]}, ${last.split(', ')[1]}`;
  return `${first}–${last}`;
}

function normalBins(values: readonly number[], mu: number, sigma: number, cuts: readonly number[]): Bin[] {
  const edges = [-Infinity, ...cuts, Infinity];
  const bins: Bin[] = [];
  for (let i = 0; i < edges.length - 1; i++) {
    const lo = edges[i];
    const hi = edges[i + 1];
    const observed = values.filter((x) => x > lo && x <= hi).length;
    const zl = (lo - mu) / sigma;
    const zh = (hi - mu) / sigma;
    // Difference of the tail on the side that keeps precision.
    const probability = zh <= 0 ? normalLowerTail(zh) - normalLowerTail(zl) : normalUpperTail(zl) - normalUpperTail(zh);
    bins.push({ label: `(${formatEdge(lo)}, ${formatEdge(hi)}]`, observed, probability });
  }
  return bins;
}

function formatEdge(x: number): string {
  if (x === -Infinity) return '−∞';
  if (x === Infinity) return '∞';
  return Number(x.toPrecision(5)).toString();
}

const FAMILY_NAMES: Record<FitFamily, string> = { poisson: 'Poisson', binomial: 'binomial', geometric: 'geometric', normal: 'normal' };

export function distributionFitTest(values: readonly number[], options: DistributionFitOptions): TestResult {
  const family = options.family;
  if (!(family in FAMILY_NAMES)) throw new InputError(`family: expected one of poisson, binomial, geometric, normal, found ${String(family)}`, { argument: { name: 'family' } }, 'invalid-family');
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const minimum = options.minExpected ?? 5;
  if (!(minimum > 0 && Number.isFinite(minimum))) throw new InputError(`minExpected: expected a positive number, found ${String(options.minExpected)}`, { argument: { name: 'minExpected' } }, 'invalid-min-expected');
  const n = values.length;
  const uncapped = options.singleBinsUpTo ?? MAX_DISCRETE_BINS;
  let bins: Bin[];
  let estimated: { id: string; name: string; value: number }[];
  const notices: Notice[] = [];
  if (family === 'normal') {
    requireValues(values, false, family);
    const mu = sum(values) / n;
    const sigma = Math.sqrt(sum(values.map((x) => (x - mu) * (x - mu))) / n);
    if (!(sigma > 0)) throw new InputError('values: all values are equal, so a normal distribution cannot be fitted', { argument: { name: 'values' } }, 'constant-values');
    let cuts: number[];
    if (options.cuts) {
      cuts = options.cuts.slice();
      cuts.forEach((c, i) => {
        if (!Number.isFinite(c) || (i > 0 && c <= cuts[i - 1])) throw new InputError(`cuts[${i}]: expected finite, strictly increasing cut points, found ${JSON.stringify(options.cuts)}`, { argument: { name: 'cuts', at: [i] } }, 'invalid-cuts');
      });
    } else {
      const k = Math.max(4, Math.min(Math.ceil(2 * Math.pow(n, 0.4)), Math.floor(n / minimum)));
      cuts = Array.from({ length: k - 1 }, (_, i) => mu + sigma * normalQuantile((i + 1) / k));
      notices.push({ code: 'equiprobable-bins', severity: 'info', message: `${k} bins of equal probability under the fitted normal (k = ⌈2·n^0.4⌉, at most n/${minimum}; common practice).` });
    }
    bins = normalBins(values, mu, sigma, cuts);
    estimated = [
      { id: 'mean', name: 'μ (mean)', value: mu },
      { id: 'sd', name: 'σ (maximum likelihood, divisor n)', value: sigma },
    ];
  } else if (family === 'binomial') {
    const m = options.trials;
    if (m === undefined || !Number.isInteger(m) || m < 1) throw new InputError(`trials: the binomial fit needs the number of trials, a whole number ≥ 1, found ${String(m)}`, { argument: { name: 'trials' } }, 'invalid-trials');
    if (m > MAX_COUNT) throw new InputError(`trials: expected at most 2^53 − 1 trials, found ${m}`, { argument: { name: 'trials' } }, 'invalid-trials');
    requireValues(values, true, family, m);
    const p = sum(values) / (n * m);
    const logPmf = (k: number): number => logBinomialPmf(k, m, p);
    bins =
      m + 1 <= uncapped
        ? discreteBins(values, m, logPmf)
        : cappedDiscreteBins(values, m, logPmf, { lower: (k) => binomialLowerTail(k, m, p).value, upper: (k) => (k <= 0 ? 1 : binomialLowerTail(m - k, m, 1 - p).value) }, minimum, family);
    estimated = [{ id: 'p', name: `p (success probability, ${m} trials)`, value: p }];
  } else {
    requireValues(values, true, family);
    const mean = sum(values) / n;
    const top = Math.max(...values);
    if (family === 'poisson') {
      if (mean === 0) throw new InputError('values: all values are 0, so a Poisson distribution cannot be fitted', { argument: { name: 'values' } }, 'constant-values');
      // P(X ≥ k) for the Poisson is the regularised lower incomplete gamma P(k, λ).
      const logPmf = (k: number): number => k * Math.log(mean) - mean - logFactorial(k);
      const upper = (k: number): number => (k <= 0 ? 1 : regularizedGammaLower(k, mean));
      bins =
        top + 1 <= uncapped
          ? discreteBins(values, Math.max(top, 1), logPmf, upper)
          : cappedDiscreteBins(values, top, logPmf, { lower: (k) => regularizedGammaUpper(k + 1, mean), upper }, minimum, family);
      estimated = [{ id: 'lambda', name: 'λ (mean)', value: mean }];
    } else {
      const p = 1 / (1 + mean);
      if (p === 1) throw new InputError('values: all values are 0, so a geometric distribution cannot be fitted', { argument: { name: 'values' } }, 'constant-values');
      const logPmf = (k: number): number => Math.log(p) + k * Math.log1p(-p);
      const upper = (k: number): number => Math.exp(k * Math.log1p(-p));
      bins =
        top + 1 <= uncapped
          ? discreteBins(values, Math.max(top, 1), logPmf, upper)
          : cappedDiscreteBins(values, top, logPmf, { lower: (k) => -Math.expm1((k + 1) * Math.log1p(-p)), upper }, minimum, family);
      estimated = [{ id: 'p', name: 'p (success probability; support 0, 1, 2, … failures before the first success)', value: p }];
    }
  }

  const groups = poolAdjacent(bins.map((b) => ({ label: b.label, observed: b.observed, expected: b.probability * n })), minimum);
  const m = estimated.length;
  const df = groups.length - 1 - m;
  if (df < 1) {
    throw new InputError(`values: after pooling bins to expected counts of at least ${minimum}, only ${groups.length} bin${groups.length === 1 ? ' remains' : 's remain'}, leaving ${Math.max(df, 0)} degrees of freedom for ${m} estimated parameter${m > 1 ? 's' : ''}; more data are needed`, { argument: { name: 'values' } }, 'too-few-bins');
  }
  const pooled = groups.filter((g) => g.bins.length > 1);
  if (pooled.length > 0) {
    notices.push({ code: 'bins-pooled', severity: 'info', message: `Adjacent bins were pooled until every expected count reached ${minimum} (common practice): ${pooled.map((g) => `${g.bins.join(' + ')} → ${g.label}`).join('; ')}.` });
  }
  // Pearson X² is the power divergence with λ = 1 (Cressie & Read 1984); one implementation serves fit, table and here.
  const pearson = powerDivergence(groups.map((g) => g.observed), groups.map((g) => g.expected), 1);
  // Chernoff & Lehmann (1954): with the parameters estimated from the ungrouped values, the statistic's null
  // distribution lies between χ²(k − 1 − m) and χ²(k − 1), so the p-value on k − 1 df bounds the true one from above.
  const bound = chiSquareLine('pearson-chernoff-lehmann', `Pearson chi-square on ${groups.length - 1} df (Chernoff–Lehmann upper bound of p)`, 'X²', pearson.statistic, groups.length - 1);
  notices.push({ code: 'estimated-parameters', severity: 'info', message: `df = ${groups.length} bins − 1 − ${m} estimated parameter${m > 1 ? 's' : ''} = ${df}. The parameters were estimated from the ungrouped values, so the true p-value lies between this one and the one with ${groups.length - 1} df (Chernoff & Lehmann 1954): ${describeP(bound.pValue)}.` });
  const categories: CategoryRow[] = groups.map((g, k) => {
    const share = g.expected / n;
    return {
      label: g.label,
      observed: g.observed,
      expected: g.expected,
      pearsonResidual: (g.observed - g.expected) / Math.sqrt(g.expected),
      standardizedResidual: (g.observed - g.expected) / Math.sqrt(g.expected * (1 - share)),
      contribution: pearson.contributions[k],
    };
  });
  const line = chiSquareLine('pearson', 'Pearson chi-square', 'X²', pearson.statistic, df);
  const significant = line.pValue.value < alpha;
  const name = FAMILY_NAMES[family];
  return testResult(
    {
      ...chiSquareCore('distribution-fit', `Chi-square goodness of fit to a ${name} distribution (parameters estimated)`, line, n, alpha),
      conclusion: significant
        ? `The values do not follow a ${name} distribution ${describeAlpha(alpha)} (${describeP(line.pValue)}): the observed counts per bin depart from the fitted ones by more than chance would explain.`
        : `The data are consistent with a ${name} distribution ${describeAlpha(alpha)} (${describeP(line.pValue)}); this does not prove the values are ${name}, only that the departure is within chance.`,
    },
    {
      otherStatistics: [bound],
      estimates: estimated,
      categories,
      notices,
      assumptions: [independenceAssumption('value')],
      details: { family, estimatedParameters: m, minExpected: minimum, bins: bins.map((b) => ({ label: b.label, observed: b.observed, expected: b.probability * n })), pooled: groups },
    },
  );
}
