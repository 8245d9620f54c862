/**
 * Paired categorical data: the same units classified twice (before/after, two raters, two tests).
 * Rows are the first classification, columns the second.
 *
 * - 2×2: McNemar's test (McNemar 1947) on the discordant pairs b = n₁₂ and c = n₂₁, with and without the
 *   continuity correction (|b − c| − 1)²/(b + c); the exact binomial test of b given b + c with p = ½; and
 *   its mid-p version (Lancaster 1961). The difference of paired proportions p₁₊ − p₊₁ = (b − c)/n with the
 *   Wald interval and the Agresti–Min (2005) interval (the Wald interval after adding ½ to every cell).
 * - k×k: Bowker's (1948) test of symmetry, Σ_{i<j} (n_ij − n_ji)²/(n_ij + n_ji).
 */
import { InputError } from '../../errors';
import { chiSquareCore, chiSquareLine, info, labelsOr, pLine, requireCountTable, sum, testResult, warning } from './advanced-common';
import { describeAlpha, describeP, independenceAssumption, requireLevel } from './assumptions';
import { binomialLowerTail, logBinomialPmf } from '../distributions/discrete';
import { normalUpperQuantile } from '../distributions/normal';
import { probabilityFromLog, probabilityFromValue, twoSidedFromTails } from '../distributions/probability';
import type { Estimate, Interval, Notice, StatisticLine, TestResult } from '../result';

export type PairedMethod = 'asymptotic' | 'exact' | 'mid-p';

export interface PairedOptions {
  readonly alpha?: number;
  readonly confidence?: number;
  /** Continuity correction for the McNemar chi-square. Default false. */
  readonly correction?: boolean;
  /** Which p-value is the main one for a 2×2 table. Default 'asymptotic'. */
  readonly method?: PairedMethod;
  /** Category labels (the same categories at both classifications). */
  readonly labels?: readonly string[];
}

/** McNemar (2×2) or Bowker (k×k) according to the size of the square table. */
export function pairedTest(table: readonly (readonly number[])[], options: PairedOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  const k = counts.length;
  if (k < 2 || counts.some((row) => row.length !== k)) {
    throw new InputError(`table: paired data need a square table (the same categories for both classifications), found ${k}×${counts[0].length}`, { argument: { name: 'table' } }, 'not-square');
  }
  return k === 2 ? mcnemarTest(counts, options) : bowkerTest(counts, options);
}

export interface McNemarStatistics {
  readonly discordant: readonly [number, number];
  readonly uncorrected: StatisticLine;
  readonly corrected: StatisticLine;
  readonly exact: StatisticLine;
  readonly midP: StatisticLine;
}

/** The four McNemar p-values for discordant counts b and c. */
export function mcnemarStatistics(b: number, c: number): McNemarStatistics {
  const m = b + c;
  const uncorrected = m === 0 ? NaN : ((b - c) * (b - c)) / m;
  const corrected = m === 0 ? NaN : Math.max(0, Math.abs(b - c) - 1) ** 2 / m;
  const low = Math.min(b, c);
  // One tail serves both p-values: P(X ≤ low), X ~ Bin(m, ½), summed in O(1) memory (discrete.ts).
  const lowerTail = m > 0 ? binomialLowerTail(low, m, 0.5) : probabilityFromValue(1);
  // Exact: P(X ≤ low) + P(X ≥ high) = 2·P(X ≤ low) by symmetry, capped at 1 (binom.test's two-sided p).
  const exact = twoSidedFromTails(lowerTail, lowerTail);
  let midP = probabilityFromValue(1);
  if (m > 0) {
    // mid-p = 2·P(X ≤ low) − P(X = low) = P(X ≤ low)·(2 − P(X = low)/P(X ≤ low)); the factor is in [1, 2], so
    // neither the value nor its log cancels, and the log survives where the value underflows (about 1e-308).
    const lnLower = lowerTail.log10 * Math.LN10;
    const lnMid = lnLower + Math.log(2 - Math.exp(logBinomialPmf(low, m, 0.5) - lnLower));
    midP = probabilityFromLog(Math.min(0, lnMid));
  }
  return {
    discordant: [b, c],
    uncorrected: chiSquareLine('mcnemar', 'McNemar chi-square', 'X²', uncorrected, 1),
    corrected: chiSquareLine('mcnemar-corrected', 'McNemar chi-square with continuity correction', 'X²', corrected, 1),
    exact: pLine('mcnemar-exact', 'Exact binomial test of the discordant pairs', exact, `b = ${b} of ${m} discordant pairs, tested against ½`, b, 'b'),
    midP: pLine('mcnemar-mid-p', 'Mid-p binomial test of the discordant pairs', midP, 'The exact p-value minus half the probability of the observed split; less conservative than the exact test.', b, 'b'),
  };
}

export function mcnemarTest(table: readonly (readonly number[])[], options: PairedOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  if (counts.length !== 2 || counts[0].length !== 2) {
    throw new InputError(`table: McNemar's test needs a 2×2 table, found ${counts.length}×${counts[0].length}`, { argument: { name: 'table' } }, 'wrong-shape');
  }
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const confidence = requireLevel(options.confidence ?? 0.95, 'confidence');
  const method = options.method ?? 'asymptotic';
  const labels = labelsOr(options.labels, 2, 'category ', 'labels');
  const [[a, b], [c, d]] = counts;
  const n = a + b + c + d;
  const s = mcnemarStatistics(b, c);
  const notices: Notice[] = [];
  if (b + c === 0) notices.push(warning('no-discordant-pairs', 'No pair changed category (b = c = 0): McNemar’s statistic is undefined and the data carry no evidence of a change; the p-value is reported as 1.'));
  else if (b + c < 25 && method === 'asymptotic') {
    notices.push(warning('few-discordant-pairs', `Only ${b + c} discordant pairs: the chi-square approximation is rough (common practice: use the exact or mid-p version below 25 discordant pairs).`));
  }

  const ordered: StatisticLine[] = [s.uncorrected, s.corrected, s.exact, s.midP];
  const main =
    method === 'exact' ? s.exact : method === 'mid-p' ? s.midP : options.correction ? s.corrected : s.uncorrected;
  const z = normalUpperQuantile((1 - confidence) / 2);
  const difference = n > 0 ? (b - c) / n : NaN;
  const wald = waldInterval(b, c, n, z, confidence, 'Wald');
  const agrestiMin = waldInterval(b + 0.5, c + 0.5, n + 2, z, confidence, 'Agresti–Min (2005): Wald after adding ½ to each cell');
  const estimates: Estimate[] = [
    { id: 'pairedDifference', name: `Difference of paired proportions, P(${labels[0]} first) − P(${labels[0]} second)`, value: difference, interval: wald },
    { id: 'pairedDifferenceAgrestiMin', name: 'Difference of paired proportions, Agresti–Min interval', value: (b - c) / (n + 2), interval: agrestiMin },
    discordantRatio(b, c, confidence),
  ];
  const pValue = main.pValue;
  const significant = pValue.value < alpha;
  const conclusion = significant
    ? `The share classified "${labels[0]}" changed between the first and second classification ${describeAlpha(alpha)} (${describeP(pValue)}); ${b} pairs moved from "${labels[0]}" to "${labels[1]}" and ${c} the other way.`
    : `The data do not show a change between the first and second classification ${describeAlpha(alpha)} (${describeP(pValue)}); ${b} pairs moved from "${labels[0]}" to "${labels[1]}" and ${c} the other way.`;
  return testResult(
    {
      test: 'paired',
      procedure: method === 'asymptotic' ? `McNemar's test${options.correction ? ' with continuity correction' : ''}` : method === 'exact' ? "McNemar's test, exact binomial version" : "McNemar's test, mid-p version",
      statisticSymbol: main.symbol,
      statistic: main.statistic,
      df: main.df,
      n,
      pValue,
      alternative: 'two-sided',
      reference: method === 'asymptotic' ? { kind: 'chi-square', df: 1 } : { kind: 'none' },
      alpha,
      conclusion,
    },
    {
      otherStatistics: ordered.filter((l) => l !== main),
      estimates,
      confidenceInterval: wald,
      notices,
      assumptions: [pairingAssumption(), independenceAssumption('pair')],
      details: { discordant: { b, c }, method, correctionApplied: method === 'asymptotic' && options.correction === true, differenceDirection: 'row-1 share minus column-1 share: (b − c)/n' },
    },
  );
}

function waldInterval(b: number, c: number, n: number, z: number, level: number, method: string): Interval {
  const diff = (b - c) / n;
  const se = Math.sqrt(Math.max(0, b + c - ((b - c) * (b - c)) / n)) / n;
  return { lower: Math.max(-1, diff - z * se), upper: Math.min(1, diff + z * se), level, parameter: 'difference of paired proportions', method };
}

function pairingAssumption(): TestResult['assumptions'][number] {
  return {
    id: 'pairing',
    title: 'Each unit classified twice',
    status: 'unchecked',
    explanation: 'Each count is one unit (a person, an item) classified on both occasions; rows are the first classification and columns the second. Counting units, not classifications, is what the test requires.',
  };
}

export function bowkerTest(table: readonly (readonly number[])[], options: PairedOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  const k = counts.length;
  if (counts.some((row) => row.length !== k)) {
    throw new InputError(`table: Bowker's test of symmetry needs a square table, found ${k}×${counts[0].length}`, { argument: { name: 'table' } }, 'not-square');
  }
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const labels = labelsOr(options.labels, k, 'category ', 'labels');
  const terms: number[] = [];
  const skipped: string[] = [];
  const pairs: { first: string; second: string; forward: number; backward: number; contribution: number }[] = [];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const m = counts[i][j] + counts[j][i];
      if (m === 0) {
        skipped.push(`${labels[i]} ↔ ${labels[j]}`);
        continue;
      }
      const contribution = (counts[i][j] - counts[j][i]) ** 2 / m;
      terms.push(contribution);
      pairs.push({ first: labels[i], second: labels[j], forward: counts[i][j], backward: counts[j][i], contribution });
    }
  }
  const notices: Notice[] = [];
  if (skipped.length > 0) {
    notices.push(info('empty-pairs-dropped', `No unit moved either way between ${skipped.join(', ')}; ${skipped.length === 1 ? 'this pair adds' : 'these pairs add'} nothing to the statistic and ${skipped.length === 1 ? 'was' : 'were'} left out of the degrees of freedom.`));
  }
  const df = terms.length;
  if (df === 0) throw new InputError('table: every unit kept its category (all off-diagonal counts are 0), so symmetry cannot be tested.', { argument: { name: 'table' } }, 'no-discordant-pairs');
  const line = chiSquareLine('bowker', "Bowker's test of symmetry", 'X²', sum(terms), df);
  const n = sum(counts.flat());
  const significant = line.pValue.value < alpha;
  return testResult(
    {
      ...chiSquareCore('paired', "Bowker's test of symmetry", line, n, alpha),
      conclusion: significant
        ? `Moves between categories are not symmetric ${describeAlpha(alpha)} (${describeP(line.pValue)}): for some pairs of categories, more units moved one way than the other.`
        : `The data do not show asymmetric moves between categories ${describeAlpha(alpha)} (${describeP(line.pValue)}).`,
    },
    { notices, assumptions: [pairingAssumption(), independenceAssumption('pair')], details: { pairs } },
  );
}

/** Largest b + c for the exact interval of b/c (each end costs about 100 binomial tails of ≈ 9·√(b + c) terms). */
const RATIO_INTERVAL_LIMIT = 1e7;

/**
 * b/c, the conditional odds ratio of the paired table, with its exact conditional interval: the Clopper–Pearson
 * interval [πL, πU] for π = b/(b + c) (inverting the two one-sided binomial tests), mapped by π/(1 − π).
 */
function discordantRatio(b: number, c: number, confidence: number): Estimate {
  const value = c === 0 ? (b === 0 ? NaN : Infinity) : b / c;
  const base = { id: 'discordantOddsRatio', name: 'Ratio of discordant pairs b/c (conditional odds ratio)', value };
  const m = b + c;
  if (m === 0 || m > RATIO_INTERVAL_LIMIT) return base;
  const [lower, upper] = clopperPearson(b, m, confidence);
  return {
    ...base,
    interval: { lower: lower / (1 - lower), upper: upper >= 1 ? Infinity : upper / (1 - upper), level: confidence, parameter: 'b/c', method: 'exact conditional (Clopper–Pearson interval for b/(b + c), mapped by π/(1 − π))' },
  };
}

/** Clopper–Pearson interval for a binomial proportion: P_πL(X ≥ k) = P_πU(X ≤ k) = (1 − level)/2, by bisection. */
function clopperPearson(k: number, n: number, level: number): [number, number] {
  const tail = (1 - level) / 2;
  const solve = (tooLow: (p: number) => boolean): number => {
    let lo = 0;
    let hi = 1;
    for (let i = 0; i < 200 && hi - lo > 1e-15 * Math.max(hi, 1e-300); i++) {
      const mid = lo > 0 ? (hi / lo > 16 ? Math.sqrt(lo * hi) : (lo + hi) / 2) : hi / 16;
      if (tooLow(mid)) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
  // P_π(X ≥ k) = P(n − X ≤ n − k) with n − X ~ Bin(n, 1 − π); increasing in π.
  const lower = k === 0 ? 0 : solve((p) => binomialLowerTail(n - k, n, 1 - p).value < tail);
  // P_π(X ≤ k) decreases in π.
  const upper = k === n ? 1 : solve((p) => binomialLowerTail(k, n, p).value > tail);
  return [lower, upper];
}
