/**
 * Chi-square test for one variance: H0 σ² = σ0², statistic (n − 1)s²/σ0² on n − 1 degrees of freedom, with the
 * equal-tail interval for σ² and σ (and the one-sided bound that matches a one-sided alternative).
 *
 * The two-sided p-value is twice the smaller tail probability, capped at 1 (the equal-tail convention, which
 * matches the equal-tail interval: p < α exactly when σ0² is outside the 1 − α interval).
 *
 * This test depends on normality far more than tests for a mean do, and a large sample does not cure it, so on
 * raw data (or streamed moments) the result also reports skewness, excess kurtosis and Bonett's (2006)
 * kurtosis-adjusted interval as a robust alternative.
 */
import { InputError, type ArgumentLocation } from '../../errors';
import { describeAlpha, describeP, formatNumber, independenceAssumption, nameOf, requireLevel } from './assumptions';
import { chiSquareLowerProbability, chiSquareQuantile, chiSquareUpperProbability, chiSquareUpperQuantile } from '../distributions/chisquare';
import { compensatedSum, MomentAccumulator, type MomentSummary, sampleExcessKurtosis, sampleSkewness } from '../moments';
import { normalUpperQuantile } from '../distributions/normal';
import { twoSidedFromTails } from '../distributions/probability';
import type { Alternative, Assumption, Estimate, Interval, Notice, TestResult } from '../result';

export interface VarianceTestOptions {
  /** Hypothesised standard deviation σ0 (give this or variance0). */
  readonly sigma0?: number;
  /** Hypothesised variance σ0² (give this or sigma0). */
  readonly variance0?: number;
  /** Default 'two-sided'. 'greater': H1 σ > σ0. 'less': H1 σ < σ0. */
  readonly alternative?: Alternative;
  /** Confidence level of the interval. Default 0.95. */
  readonly confidence?: number;
  /** Significance level. Default 0.05. */
  readonly alpha?: number;
  /** What was measured (e.g. the column `weight_g`); named in the conclusion. */
  readonly variable?: string;
  /** Unit of the values (e.g. "g"); σ and s are written in it, σ² and s² in its square. */
  readonly unit?: string;
}

export type VarianceSummary = { readonly n: number; readonly sd: number } | { readonly n: number; readonly variance: number };

/** From raw values (every value must be a finite number). */
export function varianceTestFromValues(values: readonly number[], options: VarianceTestOptions): TestResult {
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new InputError(`value ${i + 1}: expected a finite number, found ${String(v)}`, { argument: { name: 'values', at: [i] } }, 'invalid-value');
    }
  });
  return varianceTest(twoPassMoments(values), options, 'values', values);
}

/**
 * Central moments by two passes: a compensated mean, then sums of powers of deviations with the
 * remainder of the rounded mean taken out (the corrected two-pass idea of Chan, Golub & LeVeque 1983). With all values in memory this beats the
 * one-pass update when the mean is large against the spread (values near 1e9 varying by 1e-3).
 */
function twoPassMoments(values: readonly number[]): MomentSummary {
  const n = values.length;
  if (n === 0) return MomentAccumulator.of(values).summary();
  const rough = compensatedSum(values) / n;
  // The rounded mean is off by up to half an ulp; the mean of the deviations recovers that remainder.
  const first = values.map((x) => x - rough);
  const remainder = compensatedSum(first) / n;
  const deviations = first.map((d) => d - remainder);
  const squares = deviations.map((d) => d * d);
  let min = Infinity;
  let max = -Infinity;
  for (const x of values) {
    if (x < min) min = x;
    if (x > max) max = x;
  }
  return {
    n,
    mean: rough + remainder,
    m2: compensatedSum(squares),
    m3: compensatedSum(deviations.map((d, i) => d * squares[i])),
    m4: compensatedSum(squares.map((q) => q * q)),
    min,
    max,
  };
}

/** From streamed moments (the CSV and SQL paths). m3 and m4 are used for the shape checks when finite. */
export function varianceTestFromMoments(moments: MomentSummary, options: VarianceTestOptions): TestResult {
  if (!Number.isFinite(moments.m2) || moments.m2 < 0) {
    // Streamed moments (the file and database readers): the argument is `moments`, wherever they were read from.
    throw new InputError(`moments${options.variable ? ` of ${options.variable}` : ''}: expected a finite sum of squared deviations ≥ 0, found ${String(moments.m2)}`, { argument: { name: 'moments', at: ['m2'] } }, 'invalid-moments');
  }
  return varianceTest(moments, options, 'moments');
}

/** From a summary: n with the sample standard deviation s or the sample variance s². */
export function varianceTestFromSummary(summary: VarianceSummary, options: VarianceTestOptions): TestResult {
  const hasSd = 'sd' in summary && summary.sd !== undefined;
  const hasVariance = 'variance' in summary && summary.variance !== undefined;
  if (hasSd === hasVariance) {
    throw new InputError(`summary: give exactly one of sd or variance, found ${hasSd ? 'both' : 'neither'}`, { argument: { name: 'summary' } }, 'invalid-summary');
  }
  const key = hasSd ? 'sd' : 'variance';
  const given = hasSd ? (summary as { sd: number }).sd : (summary as { variance: number }).variance;
  if (typeof given !== 'number' || !Number.isFinite(given) || given < 0) {
    throw new InputError(`summary.${key}: expected a finite number ≥ 0, found ${String(given)}`, { argument: { name: 'summary', at: [key] } }, 'invalid-summary');
  }
  const variance = hasSd ? given * given : given;
  requireSampleSize(summary.n, { name: 'summary', at: ['n'] });
  const moments: MomentSummary = { n: summary.n, mean: NaN, m2: variance * (summary.n - 1), m3: NaN, m4: NaN, min: NaN, max: NaN };
  return varianceTest(moments, options, 'summary');
}

function requireSampleSize(n: number, argument: ArgumentLocation): void {
  if (typeof n !== 'number' || !Number.isInteger(n) || n < 2) {
    throw new InputError(`n: expected a whole number ≥ 2 (the variance needs at least two values), found ${String(n)}`, { argument }, 'too-few-values');
  }
}

interface Hypothesis {
  readonly variance0: number;
  /** Whether the user stated the hypothesis as a standard deviation (then sentences speak of σ). */
  readonly bySd: boolean;
}

function hypothesisFrom(options: VarianceTestOptions): Hypothesis {
  const { sigma0, variance0 } = options;
  if ((sigma0 === undefined) === (variance0 === undefined)) {
    throw new InputError(`give exactly one of sigma0 or variance0, found ${sigma0 === undefined ? 'neither' : 'both'}`, { argument: { name: 'sigma0' } }, 'invalid-hypothesis');
  }
  const key = sigma0 !== undefined ? 'sigma0' : 'variance0';
  const value = (sigma0 ?? variance0) as number;
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new InputError(`${key}: expected a finite number > 0, found ${String(value)}`, { argument: { name: key } }, 'invalid-hypothesis');
  }
  const squared = sigma0 !== undefined ? value * value : value;
  // σ0² must be a normal double: below about 2.2e-308 it has lost digits (1e-160² = 1e-320), above 1.8e308 it is ∞.
  if (!(squared >= MIN_NORMAL && squared < Infinity)) {
    throw new InputError(
      `${key}: ${String(value)}${sigma0 !== undefined ? ', whose square' : ''} is outside the range of double-precision numbers (about 2.2e-308 to 1.8e308); express the values and ${key} in other units`,
      { argument: { name: key } },
      'out-of-range',
    );
  }
  return { variance0: squared, bySd: sigma0 !== undefined };
}

const MIN_NORMAL = 2.2250738585072014e-308;

const ALTERNATIVES: readonly Alternative[] = ['two-sided', 'greater', 'less'];

function varianceTest(moments: MomentSummary, options: VarianceTestOptions, source: 'values' | 'moments' | 'summary', values?: readonly number[]): TestResult {
  const hypothesis = hypothesisFrom(options);
  const alternative = options.alternative ?? 'two-sided';
  if (!ALTERNATIVES.includes(alternative)) {
    throw new InputError(`alternative: expected one of ${ALTERNATIVES.join(', ')}, found ${String(alternative)}`, { argument: { name: 'alternative' } }, 'invalid-alternative');
  }
  const confidence = requireLevel(options.confidence ?? 0.95, 'confidence');
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  requireSampleSize(moments.n, source === 'values' ? { name: 'values' } : { name: source, at: ['n'] });

  const n = moments.n;
  const df = n - 1;
  const sumSquares = moments.m2;
  const variance = sumSquares / df;
  const statistic = sumSquares / hypothesis.variance0;
    if (!Number.isFinite(sumSquares)) {
    throw new InputError(
      `values: the sum of squared deviations from the mean is beyond the range of double-precision numbers (about 1.8e308); express the values in smaller units (divide them and ${hypothesis.bySd ? 'sigma0' : 'variance0'} by a power of ten)`,
      { argument: { name: source } },
      'out-of-range',
    );
  }
  if (!Number.isFinite(statistic)) {
    const key = hypothesis.bySd ? 'sigma0' : 'variance0';
    throw new InputError(`${key}: the statistic Σ(x − x̄)²/σ0² = ${sumSquares.toPrecision(3)}/${hypothesis.variance0.toPrecision(3)} is beyond the range of double-precision numbers; ${key} is far smaller than the spread of the values (s = ${Math.sqrt(variance).toPrecision(3)})`, { argument: { name: key } }, 'out-of-range');
  }
  const lower = chiSquareLowerProbability(statistic, df);
  const upper = chiSquareUpperProbability(statistic, df);
  const pValue = alternative === 'greater' ? upper : alternative === 'less' ? lower : twoSidedFromTails(lower, upper);
  const significant = pValue.value < alpha;

  const varianceInterval = chiSquareInterval(sumSquares, df, confidence, alternative);
  const sdInterval = sqrtInterval(varianceInterval);
  const notices: Notice[] = [];
  if (alternative === 'two-sided') {
    notices.push({
      code: 'two-sided-convention',
      severity: 'info',
      message: 'Two-sided p-value = 2 × the smaller tail probability of the chi-square distribution, capped at 1 (the equal-tail convention, consistent with the equal-tail interval).',
    });
  }
  if (sumSquares === 0) {
    notices.push({ code: 'zero-variance', severity: 'warning', message: 'All values are equal: the sample variance is 0, and so are both ends of the interval.' });
  }
  notices.push({
    code: 'normality-sensitive',
    severity: 'warning',
    message:
      'This test assumes the values come from a normal distribution and is very sensitive to departures from it: ' +
      'heavier or lighter tails than the normal make its p-value and interval wrong, and a larger sample does not fix that. ' +
      (source === 'summary' ? 'From a summary the shape cannot be checked; if you have the raw values, use them.' : "Compare with Bonett's interval below, which allows for the observed kurtosis."),
  });

  const estimates: Estimate[] = [
    { id: 'variance', name: 'Sample variance s²', value: variance, interval: varianceInterval },
    { id: 'sd', name: 'Sample standard deviation s', value: Math.sqrt(variance), interval: sdInterval },
  ];
  const shape = shapeOf(moments);
  if (shape) {
    estimates.push({ id: 'skewness', name: 'Skewness (G1)', value: shape.skewness, note: `standard error ${shape.skewnessSe.toPrecision(3)} under normality` });
    estimates.push({ id: 'excessKurtosis', name: 'Excess kurtosis (G2)', value: shape.kurtosis, note: `standard error ${shape.kurtosisSe.toPrecision(3)} under normality; 0 for a normal distribution` });
  }
  const bonett = source === 'summary' ? null : bonettInterval(moments, confidence, alternative, values);
  if (bonett) {
    estimates.push({ id: 'varianceBonett', name: 'Sample variance s², robust interval', value: variance, interval: bonett.interval, note: bonett.note });
    estimates.push({ id: 'sdBonett', name: 'Sample standard deviation s, robust interval', value: Math.sqrt(variance), interval: sqrtInterval(bonett.interval), note: bonett.note });
    const disagreement = robustDisagreement(varianceInterval, bonett.interval, hypothesis);
    if (disagreement) notices.push(disagreement);
  } else if (source !== 'summary') {
    notices.push({ code: 'bonett-unavailable', severity: 'info', message: "Bonett's robust interval needs at least 5 values and the fourth moment; it is not shown." });
  }

  const parameter = hypothesis.bySd ? 'standard deviation' : 'variance';
  const named = nameOf(options.variable);
  const of = named ? ` of ${named}` : '';
  const inUnit = withUnit(options.unit, hypothesis.bySd);
  const null0 = hypothesis.bySd ? `σ0 = ${inUnit(Math.sqrt(hypothesis.variance0))}` : `σ0² = ${inUnit(hypothesis.variance0)}`;
  const sample = hypothesis.bySd ? `s = ${inUnit(Math.sqrt(variance))}` : `s² = ${inUnit(variance)}`;
  const direction = alternative === 'greater' ? 'is larger than' : alternative === 'less' ? 'is smaller than' : 'differs from';
  const directionNot = alternative === 'greater' ? 'exceeds' : alternative === 'less' ? 'falls below' : 'differs from';
  const conclusion = significant
    ? `The population ${parameter}${of} ${direction} ${null0} ${describeAlpha(alpha)} (${sample}, ${describeP(pValue)}).`
    : `The data do not show that the population ${parameter}${of} ${directionNot} ${null0} ${describeAlpha(alpha)} (${sample}, ${describeP(pValue)}).`;

  return {
    kind: 'test',
    test: 'variance',
    procedure: 'Chi-square test for one variance',
    statisticSymbol: 'χ²',
    statistic,
    df,
    n,
    pValue,
    alternative,
    reference: { kind: 'chi-square', df },
    alpha,
    significant,
    conclusion,
    otherStatistics: [],
    effectSizes: [
      {
        id: 'varianceRatio',
        name: 'Variance ratio s²/σ0²',
        value: variance / hypothesis.variance0,
        interval: { ...varianceInterval, lower: varianceInterval.lower / hypothesis.variance0, upper: varianceInterval.upper / hypothesis.variance0, parameter: 'σ²/σ0²' },
      },
      { id: 'sdRatio', name: 'Standard deviation ratio s/σ0', value: Math.sqrt(variance / hypothesis.variance0) },
    ],
    estimates,
    confidenceInterval: varianceInterval,
    notices,
    assumptions: [normalityAssumption(shape, source, n), independenceAssumption('value')],
    details: { variance0: hypothesis.variance0, sampleVariance: variance, source, lowerTail: lower, upperTail: upper },
  };
}

/** A number in the unit of the values ("12 g") or, for a variance, in its square ("144 g²"); bare without a unit. */
function withUnit(unit: string | undefined, bySd: boolean): (x: number) => string {
  const u = typeof unit === 'string' ? unit.trim() : '';
  if (u === '') return formatNumber;
  const shown = bySd ? u : /^\p{L}+$/u.test(u) ? `${u}²` : `(${u})²`;
  return (x) => `${formatNumber(x)} ${shown}`;
}

/** A warning when the chi-square and Bonett intervals disagree about the hypothesised value. */
function robustDisagreement(classic: Interval, robust: Interval, hypothesis: Hypothesis): Notice | null {
  const v0 = hypothesis.variance0;
  const inClassic = classic.lower <= v0 && v0 <= classic.upper;
  const inRobust = robust.lower <= v0 && v0 <= robust.upper;
  if (inClassic === inRobust) return null;
  const value = hypothesis.bySd ? `σ0 = ${formatNumber(Math.sqrt(v0))}` : `σ0² = ${formatNumber(v0)}`;
  const shown = (i: Interval) =>
    hypothesis.bySd ? `${formatNumber(Math.sqrt(i.lower))} to ${formatNumber(Math.sqrt(i.upper))}` : `${formatNumber(i.lower)} to ${formatNumber(i.upper)}`;
  return {
    code: 'robust-disagrees',
    severity: 'warning',
    message:
      `The chi-square interval (${shown(classic)}) ${inClassic ? 'contains' : 'excludes'} ${value}, but Bonett's robust interval ` +
      `(${shown(robust)}) ${inRobust ? 'contains' : 'excludes'} it: the conclusion depends on the normality assumption.`,
  };
}

/**
 * Equal-tail interval for σ² ((n−1)s²/χ²_upper, (n−1)s²/χ²_lower) or the one-sided bound matching the
 * alternative: a lower bound for 'greater', an upper bound for 'less'.
 */
function chiSquareInterval(sumSquares: number, df: number, confidence: number, alternative: Alternative): Interval {
  const common = { level: confidence, parameter: 'σ²' };
  const tail = 1 - confidence;
  if (alternative === 'greater') {
    return { ...common, lower: sumSquares / chiSquareUpperQuantile(tail, df), upper: Infinity, method: 'one-sided lower bound, chi-square' };
  }
  if (alternative === 'less') {
    return { ...common, lower: 0, upper: sumSquares / chiSquareQuantile(tail, df), method: 'one-sided upper bound, chi-square' };
  }
  return {
    ...common,
    lower: sumSquares / chiSquareUpperQuantile(tail / 2, df),
    upper: sumSquares / chiSquareQuantile(tail / 2, df),
    method: 'equal-tail chi-square',
  };
}

function sqrtInterval(interval: Interval): Interval {
  return { ...interval, lower: Math.sqrt(interval.lower), upper: Math.sqrt(interval.upper), parameter: interval.parameter === 'σ²' ? 'σ' : interval.parameter };
}

interface Shape {
  readonly skewness: number;
  readonly kurtosis: number;
  readonly skewnessSe: number;
  readonly kurtosisSe: number;
}

function shapeOf(moments: MomentSummary): Shape | null {
  const { n } = moments;
  if (n < 4 || !Number.isFinite(moments.m3) || !Number.isFinite(moments.m4) || moments.m2 === 0) return null;
  // Standard errors of G1 and G2 under normality (e.g. Joanes & Gill 1998).
  const skewnessSe = Math.sqrt((6 * n * (n - 1)) / ((n - 2) * (n + 1) * (n + 3)));
  const kurtosisSe = 2 * skewnessSe * Math.sqrt((n * n - 1) / ((n - 3) * (n + 5)));
  return { skewness: sampleSkewness(moments), kurtosis: sampleExcessKurtosis(moments), skewnessSe, kurtosisSe };
}

function normalityAssumption(shape: Shape | null, source: 'values' | 'moments' | 'summary', n: number): Assumption {
  const base = {
    id: 'normality',
    title: 'Values come from a normal distribution',
    alternative: "Bonett's (2006) interval for the standard deviation",
  };
  if (!shape) {
    return {
      ...base,
      status: 'unchecked',
      explanation:
        source === 'summary'
          ? 'Only n and s were given, so the shape of the data cannot be checked. This test is very sensitive to non-normality.'
          : `${n < 4 ? 'Too few values to estimate skewness and kurtosis' : 'The third and fourth moments were not available, so skewness and kurtosis cannot be estimated'}. This test is very sensitive to non-normality.`,
    };
  }
  const zSkew = shape.skewness / shape.skewnessSe;
  const zKurt = shape.kurtosis / shape.kurtosisSe;
  const numbers = `skewness ${formatNumber(shape.skewness)} (${formatNumber(zSkew)} standard errors), excess kurtosis ${formatNumber(shape.kurtosis)} (${formatNumber(zKurt)} standard errors)`;
  // Screening at two standard errors is common practice, not a formal test.
  const failed = Math.abs(zSkew) > 2 || Math.abs(zKurt) > 2;
  return {
    ...base,
    status: failed ? 'failed' : 'met',
    explanation: failed
      ? `The sample departs from normality: ${numbers}; more than 2 standard errors is a common-practice warning sign. The chi-square p-value and interval may be badly wrong; prefer Bonett's interval.`
      : `No strong sign of non-normality: ${numbers} (within 2 standard errors, common practice). Even so, this test reacts to moderate departures that a small sample cannot reveal.`,
  };
}

/**
 * Bonett (2006), "Approximate confidence interval for standard deviation of nonnormal distributions",
 * Comput. Stat. Data Anal. 50, 775–782: exp(ln(c·s²) ± z·se), se = c·sqrt((γ4 − (n−3)/n)/(n−1)),
 * c = n/(n − z), γ4 = n·Σ(x − m)⁴/(Σ(x − x̄)²)² with m the mean trimmed by 1/(2·sqrt(n − 4)) in each tail.
 * From moments only the untrimmed mean is available (noted). One-sided bounds use the one-sided z.
 */
function bonettInterval(
  moments: MomentSummary,
  confidence: number,
  alternative: Alternative,
  values?: readonly number[],
): { interval: Interval; note: string } | null {
  const { n } = moments;
  if (n < 5 || !Number.isFinite(moments.m4) || moments.m2 === 0) return null;
  let fourth = moments.m4;
  let note = 'Kurtosis estimated around the trimmed mean, as Bonett proposes.';
  if (values) {
    const m = trimmedMean(values, 1 / (2 * Math.sqrt(n - 4)));
    fourth = compensatedSum(values.map((x) => (x - m.rough - m.remainder) ** 4));
  } else {
    note = 'Computed from streamed moments: kurtosis estimated around the mean rather than the trimmed mean Bonett proposes.';
  }
  const gamma4 = (n * fourth) / (moments.m2 * moments.m2);
  const variance = moments.m2 / (n - 1);
  const z = normalUpperQuantile(alternative === 'two-sided' ? (1 - confidence) / 2 : 1 - confidence);
  const c = n / (n - z);
  const se = c * Math.sqrt((gamma4 - (n - 3) / n) / (n - 1));
  const centre = Math.log(c * variance);
  const lower = alternative === 'less' ? 0 : Math.exp(centre - z * se);
  const upper = alternative === 'greater' ? Infinity : Math.exp(centre + z * se);
  const method = alternative === 'two-sided' ? 'Bonett (2006)' : `Bonett (2006), one-sided ${alternative === 'greater' ? 'lower' : 'upper'} bound`;
  return { interval: { lower, upper, level: confidence, parameter: 'σ²', method }, note };
}

/**
 * Mean after removing floor(n·proportion) values from each end, as a rounded value plus the remainder
 * (so deviations from it keep their precision when the values are large against their spread).
 */
function trimmedMean(values: readonly number[], proportion: number): { rough: number; remainder: number } {
  const sorted = [...values].sort((a, b) => a - b);
  const cut = Math.floor(sorted.length * proportion);
  const kept = sorted.slice(cut, sorted.length - cut);
  const rough = compensatedSum(kept) / kept.length;
  return { rough, remainder: compensatedSum(kept.map((x) => x - rough)) / kept.length };
}
