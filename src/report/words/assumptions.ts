/** Assumption titles, explanations and alternatives by assumption id, written from its status and arguments. */
import type { AssumptionStatus, PhraseArgs } from '../../stats/result';
import { num, optStr, str } from './args';
import { countedThings, smallExpectedAlternative, smallExpectedRule, wholePercent } from './notices';
import { sentenceNumber } from './probability';
import type { Translate } from './translate';

export interface AssumptionWords {
  readonly title: string;
  readonly explanation: string;
  readonly alternative?: string;
  /** Place `alternative` before `status` in the published object (the order this assumption always had). */
  readonly alternativeFirst?: boolean;
}

export type AssumptionWriter = (status: AssumptionStatus, args: PhraseArgs, t: Translate) => AssumptionWords;

/** A count as sentences write it: whole numbers as they are, others to three significant digits. */
function countText(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(3);
}

function expectedCounts(status: AssumptionStatus, a: PhraseArgs, t: Translate): AssumptionWords {
  const counts = t('The smallest expected count is {0}; {1} of the {2} are below 5 ({3}).', countText(num(a, 'smallest')), wholePercent(num(a, 'share')), countedThings(str(a, 'what'), t), smallExpectedRule(t));
  const title = t('Expected counts large enough for the chi-square approximation');
  if (status !== 'failed') return { title, explanation: t('{0} The chi-square p-value should be a fair approximation.', counts) };
  const alternative = optStr(a, 'alternative');
  return {
    title,
    explanation: t('{0} With counts this small the chi-square distribution can describe the statistic poorly, so the p-value may be too small or too large.', counts),
    ...(alternative !== undefined ? { alternative: smallExpectedAlternative(alternative, t) } : {}),
  };
}

/** The unit each observation is, in the independence assumption's sentence. */
function unitText(unit: string, t: Translate): string {
  switch (unit) {
    case 'counted unit':
      return t('counted unit');
    case 'observation':
      return t('observation');
    case 'value':
      return t('value');
    case 'pair':
      return t('pair');
    default:
      throw new Error(`no wording for the unit "${unit}"`);
  }
}

function normality(status: AssumptionStatus, a: PhraseArgs, t: Translate): AssumptionWords {
  const base = { title: t('Values come from a normal distribution'), alternative: t("Bonett's (2006) interval for the standard deviation"), alternativeFirst: true };
  if (status === 'unchecked') {
    const why = str(a, 'why');
    const explanation =
      why === 'summary'
        ? t('Only n and s were given, so the shape of the data cannot be checked. This test is very sensitive to non-normality.')
        : why === 'few-values'
          ? t('Too few values to estimate skewness and kurtosis. This test is very sensitive to non-normality.')
          : t('The third and fourth moments were not available, so skewness and kurtosis cannot be estimated. This test is very sensitive to non-normality.');
    return { ...base, explanation };
  }
  const numbers = t(
    'skewness {0} ({1} standard errors), excess kurtosis {2} ({3} standard errors)',
    sentenceNumber(num(a, 'skewness')),
    sentenceNumber(num(a, 'zSkew')),
    sentenceNumber(num(a, 'kurtosis')),
    sentenceNumber(num(a, 'zKurt')),
  );
  return {
    ...base,
    explanation:
      status === 'failed'
        ? t("The sample departs from normality: {0}; more than 2 standard errors is a common-practice warning sign. The chi-square p-value and interval may be badly wrong; prefer Bonett's interval.", numbers)
        : t('No strong sign of non-normality: {0} (within 2 standard errors, common practice). Even so, this test reacts to moderate departures that a small sample cannot reveal.', numbers),
  };
}

export const ASSUMPTION_WORDS: Readonly<Record<string, AssumptionWriter>> = {
  'expected-counts': expectedCounts,
  independence: (_, a, t) => ({
    title: t('Independent observations'),
    explanation: t(
      'Each {0} must be counted once and must not influence another (no repeated measurements of the same subject, no clusters treated as separate units). This comes from how the data were collected and cannot be checked from the numbers.',
      unitText(str(a, 'unit'), t),
    ),
  }),
  'fixed-categories': (_, a, t) => {
    const m = num(a, 'estimatedParameters');
    return {
      title: t('Categories and expected proportions fixed in advance'),
      explanation:
        m > 0
          ? t('{0} parameter(s) were estimated from the data, and the degrees of freedom were reduced by {0}. The categories must still have been chosen before looking at the data.', m)
          : t('The categories and the expected proportions must be chosen before looking at the data. If parameters of the expected distribution were estimated from these data, give their number as estimatedParameters so the degrees of freedom are reduced.'),
    };
  },
  normality: normality,
  'common-odds-ratio': (_, __, t) => ({
    title: t('A common odds ratio across strata'),
    explanation: t('The CMH test is most powerful, and the pooled odds ratio meaningful, when the association has the same direction and size in every stratum. The Breslow–Day test checks this.'),
    alternative: t('Report the strata separately'),
  }),
  pairing: (_, __, t) => ({
    title: t('Each unit classified twice'),
    explanation: t(
      'Each count is one unit (a person, an item) classified on both occasions; rows are the first classification and columns the second. Counting units, not classifications, is what the test requires.',
    ),
  }),
  'sampling-design': (_, __, t) => ({
    title: t('Sampling design'),
    explanation: t(
      'The same chi-square test serves three designs: one sample cross-classified (independence), separate samples per row with fixed row totals (homogeneity), and both margins fixed in advance. The p-value is the same, but what it says depends on the design, which the counts cannot reveal. Relative risk is meaningful only when rows are groups sampled or assigned in advance, not when the columns were fixed (case–control).',
    ),
  }),
};
