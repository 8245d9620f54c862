/** Notice messages by notice code, written from the arguments `stats/` gave. */
import type { PhraseArgs } from '../../stats/result';
import { flag, num, prob, str, strings } from './args';
import { describeP, sentenceNumber } from './probability';
import { atLevel } from './phrases';
import type { Translate } from './translate';

export type NoticeWriter = (args: PhraseArgs, t: Translate) => string;

/** The expected-count rule of thumb, common practice (often attributed to Cochran 1954). */
export function smallExpectedRule(t: Translate): string {
  return t('common practice: no expected count below 1, and at most 20% of them below 5');
}

/** What to use when the expected-count rule fails, by the code `checkExpectedCounts` was given. */
export function smallExpectedAlternative(code: string, t: Translate): string {
  switch (code) {
    case 'multinomial-or-monte-carlo':
      return t('an exact multinomial test or a Monte Carlo p-value, or pooling adjacent categories');
    case 'fisher':
      return t("Fisher's exact test");
    case 'exact-or-monte-carlo':
      return t('an exact test (Fisher–Freeman–Halton) or a Monte Carlo p-value');
    case 'exact-overall':
      return t('an exact test of the overall table, and caution with the cell-wise z approximations');
    default:
      throw new Error(`no wording for the alternative "${code}"`);
  }
}

/** "categories" or "cells", the things whose expected counts were checked. */
export function countedThings(what: string, t: Translate): string {
  if (what === 'categories') return t('categories');
  if (what === 'cells') return t('cells');
  throw new Error(`no wording for "${what}"`);
}

/** A share as a whole percentage: "25%". */
export function wholePercent(share: number): string {
  return `${(share * 100).toFixed(0)}%`;
}

/** The first labels of a list, then how many more ("A, B and 3 more"). */
function listed(labels: readonly string[], count: number, t: Translate): string {
  const shown = labels.join(', ');
  return count > labels.length ? t('{0} and {1} more', shown, count - labels.length) : shown;
}

function smallExpected(a: PhraseArgs, t: Translate): string {
  const what = countedThings(str(a, 'what'), t);
  const percent = wholePercent(num(a, 'share'));
  const names = listed(strings(a, 'named'), num(a, 'namedCount'), t);
  const belowOne = num(a, 'belowOne');
  const head =
    belowOne > 0
      ? t('Small expected counts: {0} of {1} {2} ({3}) are below 5, and {4} below 1 (below 1: {5}).', num(a, 'belowFive'), num(a, 'total'), what, percent, belowOne, names)
      : t('Small expected counts: {0} of {1} {2} ({3}) are below 5 (below 5: {4}).', num(a, 'belowFive'), num(a, 'total'), what, percent, names);
  return t('{0} The chi-square p-value may be inaccurate ({1}). Consider {2}.', head, smallExpectedRule(t), smallExpectedAlternative(str(a, 'alternative'), t));
}

function robustDisagrees(a: PhraseArgs, t: Translate): string {
  const bySd = flag(a, 'bySd');
  const v0 = num(a, 'variance0');
  const value = bySd ? `σ0 = ${sentenceNumber(Math.sqrt(v0))}` : `σ0² = ${sentenceNumber(v0)}`;
  const shown = (lower: number, upper: number) =>
    bySd ? t('{0} to {1}', sentenceNumber(Math.sqrt(lower)), sentenceNumber(Math.sqrt(upper))) : t('{0} to {1}', sentenceNumber(lower), sentenceNumber(upper));
  const classic = shown(num(a, 'classicLower'), num(a, 'classicUpper'));
  const robust = shown(num(a, 'robustLower'), num(a, 'robustUpper'));
  return flag(a, 'inClassic')
    ? t("The chi-square interval ({0}) contains {1}, but Bonett's robust interval ({2}) excludes it: the conclusion depends on the normality assumption.", classic, value, robust)
    : t("The chi-square interval ({0}) excludes {1}, but Bonett's robust interval ({2}) contains it: the conclusion depends on the normality assumption.", classic, value, robust);
}

/** The exact computation was left out (stratified tests) or replaced by a Monte Carlo p-value (r×c tables, multinomial fits). */
function exactTooLarge(a: PhraseArgs, t: Translate): string {
  if (a.rows !== undefined) {
    return t(
      'The exact computation for this {0}×{1} table (n = {2}) would exceed its work limit ({3} steps), so a Monte Carlo p-value of the same test was computed instead ({4} resamples).',
      num(a, 'rows'),
      num(a, 'columns'),
      num(a, 'n'),
      num(a, 'workLimit').toLocaleString('en-US'),
      num(a, 'resamples'),
    );
  }
  if (a.outcomes !== undefined) {
    return t(
      'There are about {0} possible outcomes for n = {1} in {2} categories, more than the exact enumeration handles ({3}); a Monte Carlo p-value was computed instead.',
      num(a, 'outcomes').toExponential(1),
      num(a, 'n'),
      num(a, 'categories'),
      num(a, 'outcomeLimit'),
    );
  }
  return t(
    'The exact conditional test and the conditional estimate of the common odds ratio are left out: the exact conditional distribution of Σa here has {0} values and costs {1} steps; the limits are {2} values and {3} steps.',
    num(a, 'support'),
    num(a, 'work').toPrecision(3),
    num(a, 'supportLimit'),
    num(a, 'workLimit').toPrecision(1),
  );
}

export const NOTICE_WORDS: Readonly<Record<string, NoticeWriter>> = {
  'small-expected': smallExpected,
  'rescaled-expected': (a, t) =>
    t('The expected counts total {0}, but the observed counts total {1}; the expected counts were rescaled to total {1} (same proportions).', String(num(a, 'expectedTotal')), String(num(a, 'observedTotal'))),
  'rescaled-proportions': (a, t) => t('The expected proportions sum to {0}, not 1; each was divided by {0} before the test.', String(num(a, 'total'))),
  'dropped-zero-expected': (a, t) =>
    t('Categories with expected 0 and observed 0 carry no information and are not counted in the degrees of freedom: {0}.', strings(a, 'labels').join(', ')),
  'infinite-statistic': (a, t) => t('With λ = {0} (≤ −1) a category observed 0 times makes the statistic infinite; choose λ > −1 or another statistic.', String(num(a, 'lambda'))),
  'dropped-empty-row': (a, t) => t('Rows with a total of 0 were left out (they carry no information): {0}.', strings(a, 'labels').join(', ')),
  'dropped-empty-column': (a, t) => t('Columns with a total of 0 were left out (they carry no information): {0}.', strings(a, 'labels').join(', ')),
  'correction-not-applied': (a, t) =>
    str(a, 'reason') === 'not-2x2'
      ? t("Yates' continuity correction is defined for 2×2 tables only; this table is {0}×{1}, so it was not applied.", num(a, 'rows'), num(a, 'columns'))
      : t("Yates' continuity correction applies to the Pearson statistic only; it was not applied to the chosen statistic."),
  'continuity-correction': (a, t) =>
    t("Yates' continuity correction was applied: X² = {0} instead of {1}. Effect sizes use the uncorrected X².", sentenceNumber(num(a, 'corrected')), sentenceNumber(num(a, 'uncorrected'))),
  'exact-ordering': (a, t) =>
    t('The exact p-value is Fisher\'s (Fisher–Freeman–Halton): tables are ordered by their probability, not by {0}. For the permutation distribution of {0} itself, use "method": "monte-carlo".', str(a, 'symbol')),
  'resampling-known-probabilities': (a, t) =>
    str(a, 'method') === 'exact'
      ? t('The exact p-value treats the expected proportions as known; it does not allow for the {0} parameter(s) estimated from these data, so it is somewhat too large. The asymptotic line with df reduced is shown beside it.', num(a, 'estimatedParameters'))
      : t('The Monte Carlo p-value treats the expected proportions as known; it does not allow for the {0} parameter(s) estimated from these data, so it is somewhat too large. The asymptotic line with df reduced is shown beside it.', num(a, 'estimatedParameters')),
  'exact-beside-skipped': (a, t) =>
    t(
      'Expected counts are small, but the exact p-value for this {0}×{1} table would exceed its work limit ({2} steps, under a second), so it is not shown; set "method": "monte-carlo" for a resampled p-value.',
      num(a, 'rows'),
      num(a, 'columns'),
      num(a, 'workLimit').toLocaleString('en-US'),
    ),
  'exact-beside': (a, t) => t('Expected counts are small, so the exact p-value ({0}) is shown beside the chi-square one; set "method": "exact" to make it the main result.', describeP(prob(a, 'p'))),
  'two-sided-convention': (_, t) =>
    t('Two-sided p-value = 2 × the smaller tail probability of the chi-square distribution, capped at 1 (the equal-tail convention, consistent with the equal-tail interval).'),
  'zero-variance': (_, t) => t('All values are equal: the sample variance is 0, and so are both ends of the interval.'),
  'normality-sensitive': (a, t) =>
    flag(a, 'fromSummary')
      ? t('This test assumes the values come from a normal distribution and is very sensitive to departures from it: heavier or lighter tails than the normal make its p-value and interval wrong, and a larger sample does not fix that. From a summary the shape cannot be checked; if you have the raw values, use them.')
      : t("This test assumes the values come from a normal distribution and is very sensitive to departures from it: heavier or lighter tails than the normal make its p-value and interval wrong, and a larger sample does not fix that. Compare with Bonett's interval below, which allows for the observed kurtosis."),
  'bonett-unavailable': (_, t) => t("Bonett's robust interval needs at least 5 values and the fourth moment; it is not shown."),
  'robust-disagrees': robustDisagrees,
  'strata-dropped': (a, t) => t('Strata with fewer than 2 units carry no information and were left out: {0}.', strings(a, 'labels').join(', ')),
  'exact-too-large': exactTooLarge,
  'odds-ratio-not-finite': (a, t) => {
    const oddsRatio = num(a, 'oddsRatio');
    if (Number.isNaN(oddsRatio)) {
      return t("The Mantel–Haenszel odds ratio is undefined (a zero in every stratum's b·c product), so it has no interval and the homogeneity test is not computed; the tests of association are unaffected.");
    }
    return oddsRatio === 0
      ? t("The Mantel–Haenszel odds ratio is 0 (a zero in every stratum's a·d product), so it has no interval and the homogeneity test is not computed; the tests of association are unaffected.")
      : t("The Mantel–Haenszel odds ratio is infinite (a zero in every stratum's b·c product), so it has no interval and the homogeneity test is not computed; the tests of association are unaffected.");
  },
  'single-stratum': (_, t) => t('Only one stratum: the homogeneity test of odds ratios needs at least two.'),
  'homogeneity-not-tested': (_, t) =>
    t('Fewer than two strata have a count that can vary given their margins (the others have a zero row or column total), so there is no Breslow–Day test of homogeneous odds ratios.'),
  'heterogeneous-odds-ratios': (a, t) =>
    t("The odds ratios differ between strata (Breslow–Day with Tarone's adjustment, {0}): a single common odds ratio summarises them poorly; look at the strata one by one.", describeP(prob(a, 'p'))),
  'no-discordant-pairs': (_, t) => t('No pair changed category (b = c = 0): McNemar’s statistic is undefined and the data carry no evidence of a change; the p-value is reported as 1.'),
  'few-discordant-pairs': (a, t) =>
    t('Only {0} discordant pairs: the chi-square approximation is rough (common practice: use the exact or mid-p version below 25 discordant pairs).', num(a, 'discordant')),
  'empty-pairs-dropped': (a, t) => {
    const pairs = strings(a, 'pairs');
    return pairs.length === 1
      ? t('No unit moved either way between {0}; this pair adds nothing to the statistic and was left out of the degrees of freedom.', pairs.join(', '))
      : t('No unit moved either way between {0}; these pairs add nothing to the statistic and were left out of the degrees of freedom.', pairs.join(', '));
  },
  'default-scores': (a, t) =>
    t('Scores not given: equally spaced scores 1 to {0} were used. The result depends on the scores; give "scores" when the groups are not evenly spaced.', num(a, 'groups')),
  'overall-not-significant': (a, t) =>
    t('The overall test is not significant {0} ({1}); post-hoc comparisons are usually read only after a significant overall test.', atLevel(num(a, 'alpha'), t), describeP(prob(a, 'p'))),
  'equiprobable-bins': (a, t) => t('{0} bins of equal probability under the fitted normal (k = ⌈2·n^0.4⌉, at most n/{1}; common practice).', num(a, 'bins'), num(a, 'minExpected')),
  'bins-pooled': (a, t) => t('Adjacent bins were pooled until every expected count reached {0} (common practice): {1}.', num(a, 'minExpected'), strings(a, 'pooled').join('; ')),
  'estimated-parameters': (a, t) => {
    const m = num(a, 'estimated');
    const [bins, df, p] = [num(a, 'bins'), num(a, 'df'), describeP(prob(a, 'p'))];
    return m > 1
      ? t('df = {0} bins − 1 − {1} estimated parameters = {2}. The parameters were estimated from the ungrouped values, so the true p-value lies between this one and the one with {3} df (Chernoff & Lehmann 1954): {4}.', bins, m, df, bins - 1, p)
      : t('df = {0} bins − 1 − {1} estimated parameter = {2}. The parameters were estimated from the ungrouped values, so the true p-value lies between this one and the one with {3} df (Chernoff & Lehmann 1954): {4}.', bins, m, df, bins - 1, p);
  },
  'monte-carlo-cancelled': (a, t) => t('The Monte Carlo run was cancelled after {0} of {1} resamples; the p-value uses those done.', num(a, 'resamples'), num(a, 'requested')),
  'ratio-against-alternative': (a, t) =>
    str(a, 'alternative') === 'greater'
      ? t('σ1/σ0 = {0} is below 1 but the alternative is "greater": the power will stay below alpha.', num(a, 'ratio'))
      : t('σ1/σ0 = {0} is above 1 but the alternative is "less": the power will stay below alpha.', num(a, 'ratio')),
  'variance-power-normality': (a, t) => t('Variance test, {0}: df = n − 1. The calculation assumes normally distributed values, as the test itself does.', str(a, 'alternative')),
  'power-df': (a, t) =>
    str(a, 'target') === 'independence'
      ? t('Independence test: df = (r − 1)(c − 1) = {0}; noncentrality λ = n·w².', num(a, 'df'))
      : t('Goodness of fit: df = k − 1 − (estimated parameters) = {0}; noncentrality λ = n·w².', num(a, 'df')),
  'sample-size-rounding': (a, t) =>
    t('n is the smallest whole number of units whose power reaches {0} (power at n − 1: {1}).', num(a, 'power'), a.powerBefore === undefined ? t('n/a') : num(a, 'powerBefore').toFixed(4)),
  'haldane-anscombe': (_, t) => t('A cell is 0, so 0.5 was added to every cell before computing the odds ratio, the relative risk and their intervals (Haldane–Anscombe correction).'),
};
