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
import { chiSquareCore, chiSquareLine, info, labelsOr, phrase, pLine, requireCountTable, sum, testResult, warning } from './advanced-common';
import { independenceAssumption, requireLevel } from './assumptions';
import { binomialLowerTail, logBinomialPmf } from '../distributions/discrete';
import { normalUpperQuantile } from '../distributions/normal';
import { probabilityFromLog, probabilityFromValue, twoSidedFromTails } from '../distributions/probability';
import type { FoundAssumption, FoundEstimate, FoundInterval, FoundNotice, FoundStatisticLine, ComputedTestResult, Phrase } from '../result';

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
export function pairedTest(table: readonly (readonly number[])[], options: PairedOptions = {}): ComputedTestResult {
  const counts = requireCountTable(table, { name: 'table' });
  const k = counts.length;
  if (k < 2 || counts.some((row) => row.length !== k)) {
    throw new InputError(`table: paired data need a square table (the same categories for both classifications), found ${k}×${counts[0].length}`, { argument: { name: 'table' } }, 'not-square');
  }
  return k === 2 ? mcnemarTest(counts, options) : bowkerTest(counts, options);
}

export interface McNemarStatistics {
  readonly discordant: readonly [number, number];
  readonly uncorrected: FoundStatisticLine;
  readonly corrected: FoundStatisticLine;
  readonly exact: FoundStatisticLine;
  readonly midP: FoundStatisticLine;
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
    uncorrected: chiSquareLine('mcnemar', phrase('statistic.mcnemar'), 'X²', uncorrected, 1),
    corrected: chiSquareLine('mcnemar-corrected', phrase('statistic.mcnemar-corrected'), 'X²', corrected, 1),
    exact: pLine('mcnemar-exact', phrase('statistic.mcnemar-exact'), exact, phrase('note.mcnemar-exact', { b, discordant: m }), b, 'b'),
    midP: pLine('mcnemar-mid-p', phrase('statistic.mcnemar-mid-p'), midP, phrase('note.mcnemar-mid-p'), b, 'b'),
  };
}

export function mcnemarTest(table: readonly (readonly number[])[], options: PairedOptions = {}): ComputedTestResult {
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
  const notices: FoundNotice[] = [];
  if (b + c === 0) notices.push(warning('no-discordant-pairs'));
  else if (b + c < 25 && method === 'asymptotic') {
    notices.push(warning('few-discordant-pairs', { discordant: b + c }));
  }

  const ordered: FoundStatisticLine[] = [s.uncorrected, s.corrected, s.exact, s.midP];
  const main =
    method === 'exact' ? s.exact : method === 'mid-p' ? s.midP : options.correction ? s.corrected : s.uncorrected;
  const z = normalUpperQuantile((1 - confidence) / 2);
  const difference = n > 0 ? (b - c) / n : NaN;
  const wald = waldInterval(b, c, n, z, confidence, phrase('method.wald'));
  const agrestiMin = waldInterval(b + 0.5, c + 0.5, n + 2, z, confidence, phrase('method.agresti-min'));
  const estimates: FoundEstimate[] = [
    { id: 'pairedDifference', name: phrase('estimate.paired-difference', { label: labels[0] }), value: difference, interval: wald },
    { id: 'pairedDifferenceAgrestiMin', name: phrase('estimate.paired-difference-agresti-min'), value: (b - c) / (n + 2), interval: agrestiMin },
    discordantRatio(b, c, confidence),
  ];
  const pValue = main.pValue;
  const significant = pValue.value < alpha;
  const conclusion = phrase('conclusion.mcnemar', { significant, alpha, p: pValue, first: labels[0], second: labels[1], forward: b, backward: c });
  return testResult(
    {
      test: 'paired',
      procedure: phrase('procedure.mcnemar', { method, correction: options.correction === true }),
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
      details: { discordant: { b, c }, method, correctionApplied: method === 'asymptotic' && options.correction === true, differenceDirection: phrase('detail.paired-difference-direction') },
    },
  );
}

function waldInterval(b: number, c: number, n: number, z: number, level: number, method: Phrase): FoundInterval {
  const diff = (b - c) / n;
  const se = Math.sqrt(Math.max(0, b + c - ((b - c) * (b - c)) / n)) / n;
  return { lower: Math.max(-1, diff - z * se), upper: Math.min(1, diff + z * se), level, parameter: phrase('parameter.paired-difference'), method };
}

function pairingAssumption(): FoundAssumption {
  return { id: 'pairing', status: 'unchecked' };
}

export function bowkerTest(table: readonly (readonly number[])[], options: PairedOptions = {}): ComputedTestResult {
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
        skipped.push(`${labels[i]} ↔ ${labels[j]}`); // labels from the data and a symbol: no words
        continue;
      }
      const contribution = (counts[i][j] - counts[j][i]) ** 2 / m;
      terms.push(contribution);
      pairs.push({ first: labels[i], second: labels[j], forward: counts[i][j], backward: counts[j][i], contribution });
    }
  }
  const notices: FoundNotice[] = [];
  if (skipped.length > 0) {
    notices.push(info('empty-pairs-dropped', { pairs: skipped }));
  }
  const df = terms.length;
  if (df === 0) throw new InputError('table: every unit kept its category (all off-diagonal counts are 0), so symmetry cannot be tested.', { argument: { name: 'table' } }, 'no-discordant-pairs');
  const line = chiSquareLine('bowker', phrase('statistic.bowker'), 'X²', sum(terms), df);
  const n = sum(counts.flat());
  const significant = line.pValue.value < alpha;
  return testResult(
    {
      ...chiSquareCore('paired', phrase('statistic.bowker'), line, n, alpha),
      conclusion: phrase('conclusion.bowker', { significant, alpha, p: line.pValue }),
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
function discordantRatio(b: number, c: number, confidence: number): FoundEstimate {
  const value = c === 0 ? (b === 0 ? NaN : Infinity) : b / c;
  const base = { id: 'discordantOddsRatio', name: phrase('estimate.discordant-ratio'), value };
  const m = b + c;
  if (m === 0 || m > RATIO_INTERVAL_LIMIT) return base;
  const [lower, upper] = clopperPearson(b, m, confidence);
  return {
    ...base,
    interval: { lower: lower / (1 - lower), upper: upper >= 1 ? Infinity : upper / (1 - upper), level: confidence, parameter: 'b/c', method: phrase('method.clopper-pearson-ratio') },
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
