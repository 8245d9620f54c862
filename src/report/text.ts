/**
 * The plain-text summary of a result: what the command line prints and what "copy as text" copies.
 * Layout of our own: the conclusion first, then the APA line, the effect size and intervals, what the
 * reader must know (warnings, notes, failed assumptions), and the caution that closes every report. Pure.
 */
import type { DistributionResult, Estimate, Interval, Notice, PowerResult, Result, StatisticLine, TestResult } from '../stats/result';
import {
  DEFAULT_FORMAT,
  formatApaLine,
  formatCount,
  formatDf,
  formatEstimate,
  formatEstimateInterval,
  formatEstimateWithLog,
  formatNumber,
  formatPExact,
  formatPercent,
  formatProbability,
  type FormatOptions,
} from './format';
import { alternativeText, headlineText, pLabel, presentedTest, reportedPMethod, testHeadline } from './headline';
import { evidenceLines } from './evidence';

/** Closes every report. */
export const CAUTION =
  'Statistical significance is not practical importance: weigh the size of the effect, not only the p-value. ' +
  'Check the assumptions before relying on the result, and where decisions affect safety or health, ' +
  'defer to the applicable standards and to qualified review.';

export interface ReportOptions extends FormatOptions {
  /** Shown above the result (the spec's title). */
  readonly title?: string;
  /** Where the data came from; shown before the caution. */
  readonly data?: DataDescription;
}

/**
 * Closes a power plan instead of CAUTION (no significance has been tested): a power figure holds only for
 * the effect size assumed.
 */
export const POWER_CAUTION =
  'A power or sample-size figure holds only for the effect size and the assumptions entered: it says nothing about data not yet seen. ' +
  'Choose the effect size from what matters in practice, and where decisions affect safety or health, defer to the applicable standards and to qualified review.';

/**
 * The APA line of a test: "χ²(3, N = 556) = 0.47, p = .925". When the reported p-value is exact or
 * resampled, the line says so ("χ²(4, N = 39) = 11.90, exact p = .026"), so it agrees with the headline.
 */
export function apaLine(result: TestResult, format: FormatOptions = DEFAULT_FORMAT): string {
  return formatApaLine(result.statisticSymbol, result.statistic, result.df, result.n, result.pValue, format, pLabel(reportedPMethod(result)));
}

/** The same for a secondary statistic (G², the Yates-corrected X², Fisher's exact test…). */
export function statisticLineText(line: StatisticLine, n: number | null, format: FormatOptions = DEFAULT_FORMAT): string {
  if (Number.isNaN(line.statistic)) return `${line.name}: p = ${formatProbability(line.pValue)}`;
  const pName = line.id.endsWith('-monte-carlo') ? 'Monte Carlo p' : line.id.endsWith('-exact') ? 'exact p' : line.id.endsWith('-mid-p') ? 'mid-p' : 'p';
  return `${line.name}: ${formatApaLine(line.symbol, line.statistic, line.df, n, line.pValue, format, pName)}`;
}

/**
 * "Odds ratio = 1.83, 95% CI [1.44, 2.33]". When the interval is for a population quantity the name does not
 * already say, it is named: "Sample variance s² = 0.0153, 95% CI for σ² […]".
 */
export function estimateText(e: Estimate, format: FormatOptions = DEFAULT_FORMAT): string {
  const named = e.interval !== undefined && !e.name.toLowerCase().includes(e.interval.parameter.toLowerCase());
  const interval = e.interval ? `, ${intervalText(e.interval, format, named)}` : '';
  return `${e.name} = ${formatEstimate(e.value, format)}${interval}`;
}

/**
 * The result's main interval and the estimates, arranged so the interval is written once: when an estimate
 * carries exactly the main interval (the variance test's s² and its interval for σ²), that estimate comes
 * first, and no separate interval line repeats the same numbers.
 */
export function mainIntervalAndEstimates(result: TestResult): { readonly main?: Estimate; readonly interval?: Interval; readonly rest: readonly Estimate[] } {
  const ci = result.confidenceInterval;
  if (!ci) return { rest: result.estimates };
  const main = result.estimates.find((e) => e.interval !== undefined && sameInterval(e.interval, ci));
  if (!main) return { interval: ci, rest: result.estimates };
  return { main, rest: result.estimates.filter((e) => e !== main) };
}

function sameInterval(a: Interval, b: Interval): boolean {
  return a.lower === b.lower && a.upper === b.upper && a.level === b.level && a.parameter === b.parameter && a.method === b.method;
}

/** "95% CI for σ² [0.00885, 0.0326] (equal-tail chi-square)"; one-sided bounds say so. */
export function intervalText(interval: Interval, format: FormatOptions = DEFAULT_FORMAT, withParameter = true): string {
  const oneSided = interval.lower === -Infinity || interval.upper === Infinity || (interval.lower === 0 && /bound/i.test(interval.method));
  const label = `${formatPercent(interval.level)} ${oneSided ? 'bound' : 'CI'}${withParameter ? ` for ${interval.parameter}` : ''}`;
  return `${label} ${formatEstimateInterval(interval.lower, interval.upper, format)}${interval.method ? ` (${interval.method})` : ''}`;
}

function noticeLines(notices: readonly Notice[]): string[] {
  const warnings = notices.filter((n) => n.severity === 'warning');
  const notes = notices.filter((n) => n.severity !== 'warning');
  return [
    ...(warnings.length ? ['Warnings:', ...warnings.map((w) => `  ! ${w.message}`)] : []),
    ...(notes.length ? ['Notes:', ...notes.map((n) => `  - ${n.message}`)] : []),
  ];
}

export function testText(given: TestResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const result = presentedTest(given);
  const lines: string[] = [];
  if (options.title) lines.push(options.title);
  lines.push(result.procedure);
  lines.push(`Conclusion: ${headlineText(testHeadline(result, options), false)}`);
  lines.push(`Result: ${apaLine(result, options)}`);
  const exact = formatPExact(result.pValue);
  if (exact) lines.push(`        ${exact}`);
  if (result.alternative && result.alternative !== 'two-sided') lines.push(`Alternative: ${result.alternative} (one-sided)`);
  for (const e of result.effectSizes) lines.push(`Effect size: ${estimateText(e, options)}${e.note ? ` (${e.note})` : ''}`);
  const { main, interval, rest } = mainIntervalAndEstimates(result);
  if (interval) lines.push(`Interval: ${intervalText(interval, options)}`);
  if (main) lines.push(`Estimate: ${estimateText(main, options)}${main.note ? ` (${main.note})` : ''}`);
  for (const e of rest) lines.push(`Estimate: ${estimateText(e, options)}${e.note ? ` (${e.note})` : ''}`);
  for (const s of result.otherStatistics) lines.push(`Also: ${statisticLineText(s, result.n, options)}${s.note ? ` (${s.note})` : ''}`);
  lines.push(...evidenceLines(result, options));
  lines.push(...noticeLines(result.notices));
  const failed = result.assumptions.filter((a) => a.status === 'failed');
  if (failed.length) {
    lines.push('Assumptions not met:');
    for (const a of failed) lines.push(`  ! ${a.title}: ${a.explanation}${a.alternative ? ` ${alternativeText(a)}` : ''}`);
  }
  if (options.data) lines.push(dataText(options.data));
  lines.push(`Caution: ${CAUTION}`);
  return lines.join('\n') + '\n';
}

export function distributionText(result: DistributionResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const lines: string[] = [];
  if (options.title) lines.push(options.title);
  lines.push(`Chi-square distribution with ${formatDf(result.df, options.decimals)} degree${result.df === 1 ? '' : 's'} of freedom${result.noncentrality ? `, noncentrality ${formatNumber(result.noncentrality, options.decimals)}` : ''}`);
  for (const pt of result.points) {
    lines.push(
      `x = ${formatNumber(pt.x, options.decimals)}: P(X > x) = ${formatProbability(pt.upper, 3)}, P(X ≤ x) = ${formatProbability(pt.lower, 3)}, density ${formatEstimateWithLog(pt.density, pt.densityLog10, options)}`,
    );
  }
  const critical = { decimals: options.decimals + 1 };
  for (const c of result.critical) {
    const p = String(c.p);
    lines.push(
      `p = ${p}: upper critical value ${formatEstimateWithLog(c.upper, c.upperLog10, critical)} (P(X > c) = ${p}), lower ${formatEstimateWithLog(c.lower, c.lowerLog10, critical)} (P(X ≤ c) = ${p}), two-sided ${formatEstimateInterval(c.twoSided.lower, c.twoSided.upper, critical, c.twoSided)}`,
    );
  }
  lines.push(...noticeLines(result.notices));
  return lines.join('\n') + '\n';
}

export function powerText(result: PowerResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const lines: string[] = [];
  if (options.title) lines.push(options.title);
  lines.push(`Power of the chi-square ${result.target} test (${result.effectSize.name} = ${formatEstimate(result.effectSize.value, options)}, df = ${formatDf(result.df)}, α = ${formatEstimate(result.alpha, options)})`);
  lines.push(
    result.solvedFor === 'n'
      ? `Sample size: n = ${formatCount(result.n)} gives power ${formatEstimate(result.power, options)}`
      : `Power: ${formatEstimate(result.power, options)} with n = ${formatCount(result.n)}`,
  );
  lines.push(...noticeLines(result.notices));
  lines.push(`Caution: ${POWER_CAUTION}`);
  return lines.join('\n') + '\n';
}

/** Where the numbers came from, as the reader reported it (a file, a database, or inline data). */
export interface DataDescription {
  readonly description: string;
  readonly rows: number;
  readonly dropped?: number;
  readonly sha256: string;
}

/** "Data: data/bakery.csv, 1,800 records, 18 dropped for missing values (sha256 1a2b3c4d5e6f…)" */
export function dataText(data: DataDescription): string {
  if (data.description === 'inline') return `Data: inline in the spec (sha256 ${data.sha256.slice(0, 12)}…)`;
  const dropped = data.dropped ? `, ${formatCount(data.dropped)} dropped for missing values` : '';
  return `Data: ${data.description}, ${formatCount(data.rows)} record${data.rows === 1 ? '' : 's'}${dropped} (sha256 ${data.sha256.slice(0, 12)}…)`;
}

/** The plain-text summary of any result. */
export function resultText(result: Result, options: ReportOptions = DEFAULT_FORMAT): string {
  switch (result.kind) {
    case 'test':
      return testText(result, options);
    case 'distribution':
      return distributionText(result, options);
    case 'power':
      return powerText(result, options);
  }
}
