/**
 * The conclusion block every report opens with, written so it cannot contradict what follows it: the
 * answer, the size of the effect, and any assumption that failed together with the alternative that was
 * (or should be) used. Also the view of a result that the reports print: which p-value is the reported
 * one (chi-square approximation, exact, Monte Carlo, mid-p), and notices and assumptions reworded when the
 * alternative they recommend is already the one reported. Pure.
 */
import type { Assumption, Estimate, Notice, TestResult } from '../stats/result';
import { DEFAULT_FORMAT, formatEstimate, formatEstimateInterval, formatPercent, type FormatOptions } from './format';
import { english, type Translate } from './words/translate';

/** How the reported p-value was computed. */
export type PMethod = 'asymptotic' | 'exact' | 'monte-carlo' | 'mid-p';

export function reportedPMethod(result: TestResult): PMethod {
  const method = result.details?.method;
  return method === 'exact' || method === 'monte-carlo' || method === 'mid-p' ? method : 'asymptotic';
}

/** "p", "exact p", "Monte Carlo p", "mid-p": the name the APA line gives the reported p-value. */
export function pLabel(method: PMethod): string {
  return method === 'exact' ? 'exact p' : method === 'monte-carlo' ? 'Monte Carlo p' : method === 'mid-p' ? 'mid-p' : 'p';
}

/** "exact p-value", "Monte Carlo p-value", "mid-p value", "chi-square p-value". */
export function pValueName(method: PMethod): string {
  return method === 'exact' ? 'exact p-value' : method === 'monte-carlo' ? 'Monte Carlo p-value' : method === 'mid-p' ? 'mid-p value' : 'chi-square p-value';
}

/** Assumptions an exact or resampling p-value does not rely on. */
const ADDRESSED_BY_EXACT = new Set(['expected-counts']);
const ADDRESSING_NOTICES = new Set(['small-expected', 'small-discordant']);

/**
 * The notices and assumptions as the reports print them. When the reported p-value is exact (or Monte
 * Carlo, or mid-p), the advice to "consider an exact test" is dropped from the small-count notice and the
 * expected-count assumption says that the alternative is the one reported.
 */
export function presentedTest(result: TestResult): TestResult {
  const method = reportedPMethod(result);
  if (method === 'asymptotic') return result;
  const used = pValueName(method);
  const notices: Notice[] = result.notices.map((n) =>
    ADDRESSING_NOTICES.has(n.code)
      ? { ...n, severity: 'info', message: `${n.message.replace(/\s*Consider [^.]*\.\s*$/, '').replace(/\s*Use [^.]*exact[^.]*\.\s*$/i, '')} The ${used} is the one reported, so this does not affect it.` }
      : n,
  );
  const assumptions: Assumption[] = result.assumptions.map((a) =>
    ADDRESSED_BY_EXACT.has(a.id) && a.status === 'failed'
      ? { ...a, explanation: `${a.explanation} The ${used} reported here does not rely on this approximation.`, alternative: `used here: the ${used}` }
      : a,
  );
  // The conclusion names the reported p-value as the APA line does ("exact p = 0.031", "mid-p = 0.029").
  const label = pLabel(method);
  const conclusion = result.conclusion.includes(label) ? result.conclusion : result.conclusion.replace(/(^|[\s(])p ([=<≈])/g, `$1${label} $2`);
  return { ...result, conclusion, notices, assumptions };
}

/** "Consider: Fisher's exact test." or, when the alternative is the one reported, "Used here: the exact p-value." */
export function alternativeText(a: Assumption): string {
  if (!a.alternative) return '';
  return a.alternative.startsWith('used here: ') ? `Used here: ${a.alternative.slice('used here: '.length)}.` : `Consider: ${a.alternative}.`;
}

/** Writes names given as markdown code spans (`fill_ml`) as quoted names for plain text and the panel. */
export function namesAsQuoted(text: string): string {
  return text.replace(/`([^`]+)`/g, '“$1”');
}

/** Preferred key estimates, most specific first; otherwise the first effect size. */
const KEY_ESTIMATES = ['mantelHaenszelOddsRatio', 'oddsRatio', 'pairedDifference', 'sd', 'cohensW', 'cramersV', 'phi'];

/** The procedure's key estimate, shown beside the headline. */
export function keyEstimate(result: TestResult): Estimate | undefined {
  const all = [...result.estimates, ...result.effectSizes];
  for (const id of KEY_ESTIMATES) {
    const e = all.find((x) => x.id === id && Number.isFinite(x.value));
    if (e) return e;
  }
  return result.effectSizes[0];
}

export interface Headline {
  /** The answer to the question, in plain words (names quoted). */
  readonly answer: string;
  /** The size of the effect, one sentence; absent when the procedure reports none. */
  readonly effect?: string;
  /** The assumption that failed and what to use instead (or what was used); absent when none failed. */
  readonly assumption?: string;
}

function estimateSentence(e: Estimate, f: FormatOptions, t: Translate = english): string {
  const value = formatEstimate(e.value, f);
  if (!e.interval) return t('{0} = {1}', e.name, value);
  const level = formatPercent(e.interval.level);
  const interval = formatEstimateInterval(e.interval.lower, e.interval.upper, f);
  return isBound(e.interval.lower, e.interval.upper) ? t('{0} = {1}, {2} bound {3}', e.name, value, level, interval) : t('{0} = {1}, {2} CI {3}', e.name, value, level, interval);
}

function isBound(lower: number, upper: number): boolean {
  return lower === -Infinity || upper === Infinity;
}

/** Decimals enough that `a` and `b` print differently (up to 6), so "[1.254, ∞)" is never shown as "[1.25, ∞)" beside σ0 = 1.25. */
function distinguishingDecimals(a: number, b: number, from: number): number {
  for (let d = from; d <= 6; d++) if (formatEstimate(a, { decimals: d }) !== formatEstimate(b, { decimals: d })) return d;
  return 6;
}

/** The variance test's failed normality, read against Bonett's robust interval for σ. */
function varianceNormalitySentence(result: TestResult, f: FormatOptions, t: Translate): string | undefined {
  const robust = result.estimates.find((e) => e.id === 'sdBonett')?.interval;
  const variance0 = Number(result.details?.variance0);
  if (!robust || !(variance0 > 0)) return undefined;
  const sigma0 = Math.sqrt(variance0);
  const near = Number.isFinite(robust.lower) && Math.abs(robust.lower - sigma0) < Math.abs(robust.upper - sigma0) ? robust.lower : robust.upper;
  const decimals = Number.isFinite(near) ? distinguishingDecimals(near, sigma0, f.decimals) : f.decimals;
  const level = formatPercent(robust.level);
  const bounds = formatEstimateInterval(robust.lower, robust.upper, { decimals });
  const shown = isBound(robust.lower, robust.upper) ? t('{0} bound {1}', level, bounds) : t('{0} interval {1}', level, bounds);
  const s0 = formatEstimate(sigma0, { decimals });
  const inside = robust.lower <= sigma0 && sigma0 <= robust.upper;
  if (result.significant) {
    if (inside) return t("Normality is doubtful here, and this test depends on it; Bonett's robust {0} for σ includes σ0 = {1}, so the evidence is weaker than the p-value suggests and the conclusion rests on normality.", shown, s0);
    const margin = Math.abs(near - sigma0) / sigma0;
    if (margin < 0.02) return t("Normality is doubtful here, and this test depends on it; Bonett's robust {0} for σ only just excludes σ0 = {1}, so the evidence is weaker than the p-value suggests.", shown, s0);
    return t("Normality is doubtful here, and this test depends on it; Bonett's robust {0} for σ also excludes σ0 = {1}, so the conclusion does not rest on normality.", shown, s0);
  }
  if (!inside) return t("Normality is doubtful here, and this test depends on it; Bonett's robust {0} for σ excludes σ0 = {1}: the test may have missed a real difference.", shown, s0);
  return t("Normality is doubtful here, and this test depends on it; Bonett's robust {0} for σ also includes σ0 = {1}, so the robust reading agrees.", shown, s0);
}

function assumptionSentence(result: TestResult, f: FormatOptions, t: Translate): string | undefined {
  const failed = result.assumptions.filter((a) => a.status === 'failed');
  if (failed.length === 0) return undefined;
  const method = reportedPMethod(result);
  const sentences = failed.map((a) => {
    if (a.id === 'normality' && result.test === 'variance') {
      const robust = varianceNormalitySentence(result, f, t);
      if (robust) return robust;
    }
    if (ADDRESSED_BY_EXACT.has(a.id) && method !== 'asymptotic') {
      return t('Not met: {0}; the {1} reported here does not rely on it.', lowerFirst(a.title), pValueName(method));
    }
    return a.alternative ? t('Not met: {0}; use {1} instead.', lowerFirst(a.title), a.alternative) : t('Not met: {0}.', lowerFirst(a.title));
  });
  return sentences.join(' ');
}

function lowerFirst(text: string): string {
  return text.length > 1 && /^[A-Z][a-z]/.test(text) ? text[0].toLowerCase() + text.slice(1) : text;
}

/** The conclusion block: answer, effect size, failed assumption with its alternative. */
export function testHeadline(result: TestResult, format: FormatOptions = DEFAULT_FORMAT, t: Translate = english): Headline {
  const key = result.effectSizes[0];
  const assumption = assumptionSentence(result, format, t);
  return {
    answer: namesAsQuoted(result.conclusion),
    ...(key && Number.isFinite(key.value) ? { effect: t('Size of the effect: {0}.', estimateSentence(key, format, t)) } : {}),
    ...(assumption ? { assumption } : {}),
  };
}

/**
 * The headline as one paragraph of plain text. The text and markdown reports write the effect size on the
 * line right below, so they leave it out here (`withEffect` false).
 */
export function headlineText(h: Headline, withEffect = true): string {
  return [h.answer, withEffect ? h.effect : undefined, h.assumption].filter((x): x is string => x !== undefined).join(' ');
}

export { estimateSentence as keyEstimateText };
