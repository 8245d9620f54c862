/**
 * Sentences and labels by phrase code: conclusions, procedure titles, names and notes of statistics and
 * estimates, interval parameters and methods. Each message passed to `t` is a whole literal template with
 * `{0}` placeholders, so the bundle lists it and a translator sees the sentence.
 */
import type { PhraseArgs } from '../../stats/result';
import { flag, inner, num, optStr, prob, str, strings } from './args';
import { capitalise, describeP, nameOf, percentOf, sentenceNumber } from './probability';
import type { Translate } from './translate';

export type PhraseWriter = (args: PhraseArgs, t: Translate) => string;

/** "at the 5% level" for α = 0.05. */
export function atLevel(alpha: number, t: Translate): string {
  return t('at the {0}% level', percentOf(alpha));
}

/**
 * The p-value of a conclusion: `p`, written with the method that gave it when it is not the chi-square
 * approximation (`pMethod`: "exact" or "Monte Carlo", set by the saved-test layer's p-value methods).
 */
export function pOf(args: PhraseArgs, t: Translate): string {
  const method = optStr(args, 'pMethod');
  const p = describeP(prob(args, 'p'));
  return method === undefined ? p : t('{0} {1}', methodText(method, t), p);
}

/** λ of the Cressie–Read statistic as a fraction where it is a familiar one. */
function lambdaText(lambda: number): string {
  if (Math.abs(lambda - 2 / 3) < 1e-15) return '2/3';
  if (Math.abs(lambda + 1 / 2) < 1e-15) return '−1/2';
  return String(lambda).replace('-', '−');
}

/** A phrase inside this phrase, in words. */
function phraseIn(args: PhraseArgs, key: string, t: Translate): string {
  const p = inner(args, key);
  const write = PHRASES[p.code];
  if (!write) throw new Error(`no wording for the phrase "${p.code}"`);
  return write(p.args ?? {}, t);
}

/** An argument that is a phrase, or a text written before it reached report/ (a procedure title of the saved-test layer). */
function phraseOrText(args: PhraseArgs, key: string, t: Translate): string {
  const v = args[key];
  return typeof v === 'string' ? v : phraseIn(args, key, t);
}

function goodnessOfFitConclusion(a: PhraseArgs, t: Translate): string {
  const named = nameOf(optStr(a, 'variable'));
  const counts = named ? t('The observed counts of {0}', named) : t('The observed counts');
  const against = flag(a, 'uniform') ? t('equal proportions in every category') : t('the expected proportions');
  const level = atLevel(num(a, 'alpha'), t);
  return flag(a, 'significant')
    ? t('{0} differ from {1} by more than chance would explain {2} ({3}).', counts, against, level, pOf(a, t))
    : t('{0} are consistent with {1}: the differences are within what chance would produce {2} ({3}).', counts, against, level, pOf(a, t));
}

/**
 * With the variables named (the columns a table was cross-tabulated from), the sentence uses their names;
 * otherwise it speaks of the row and column variables.
 */
function independenceConclusion(a: PhraseArgs, t: Translate): string {
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  const significant = flag(a, 'significant');
  const row = nameOf(optStr(a, 'rowVariable'));
  const column = nameOf(optStr(a, 'columnVariable'));
  if (row === undefined && column === undefined) {
    return significant
      ? t('The row and column variables are associated: how counts spread over the columns differs between rows by more than chance would explain {0} ({1}).', level, p)
      : t('The data do not show an association between the row and column variables {0}: the differences between rows are within what chance would produce ({1}).', level, p);
  }
  const rows = row ?? t('the row variable');
  const columns = column ?? t('the column variable');
  const mix = column ? t('the mix of {0}', column) : t('the spread over the columns');
  const groups = row ? t('the {0} groups', row) : t('the rows');
  return significant
    ? t('{0} and {1} are associated: {2} differs between {3} by more than chance would explain {4} ({5}).', capitalise(rows), columns, mix, groups, level, p)
    : t('The data do not show an association between {0} and {1} {2}: the differences in {3} between {4} are within what chance would produce ({5}).', rows, columns, level, mix, groups, p);
}

/** "exact" or "Monte Carlo": the p-value method a saved test chose. */
function methodText(method: string, t: Translate): string {
  if (method === 'exact') return t('exact');
  if (method === 'Monte Carlo') return t('Monte Carlo');
  throw new Error(`no wording for the p-value method "${method}"`);
}

function methodFlipped(a: PhraseArgs, t: Translate): string {
  const method = methodText(str(a, 'method'), t);
  const level = atLevel(num(a, 'alpha'), t);
  const p = describeP(prob(a, 'p'));
  const asymptotic = describeP(prob(a, 'asymptoticP'));
  return flag(a, 'significant')
    ? t('With the {0} p-value the result is significant {1} ({2}), although the chi-square approximation gave {3}; the {0} p-value is the one to report here.', method, level, p, asymptotic)
    : t('With the {0} p-value the result is not significant {1} ({2}), although the chi-square approximation gave {3}; the {0} p-value is the one to report here.', method, level, p, asymptotic);
}

/** A number in the unit of the values ("12 g") or, for a variance, in its square ("144 g²"); bare without a unit. */
function withUnit(unit: string | undefined, bySd: boolean): (x: number) => string {
  const u = typeof unit === 'string' ? unit.trim() : '';
  if (u === '') return sentenceNumber;
  const shown = bySd ? u : /^\p{L}+$/u.test(u) ? `${u}²` : `(${u})²`;
  return (x) => `${sentenceNumber(x)} ${shown}`;
}

function varianceConclusion(a: PhraseArgs, t: Translate): string {
  const bySd = flag(a, 'bySd');
  const variance0 = num(a, 'variance0');
  const variance = num(a, 'sampleVariance');
  const named = nameOf(optStr(a, 'variable'));
  const parameter = bySd ? (named ? t('standard deviation of {0}', named) : t('standard deviation')) : named ? t('variance of {0}', named) : t('variance');
  const inUnit = withUnit(optStr(a, 'unit'), bySd);
  const null0 = bySd ? `σ0 = ${inUnit(Math.sqrt(variance0))}` : `σ0² = ${inUnit(variance0)}`;
  const sample = bySd ? `s = ${inUnit(Math.sqrt(variance))}` : `s² = ${inUnit(variance)}`;
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  const alternative = str(a, 'alternative');
  if (flag(a, 'significant')) {
    const direction = alternative === 'greater' ? t('is larger than') : alternative === 'less' ? t('is smaller than') : t('differs from');
    return t('The population {0} {1} {2} {3} ({4}, {5}).', parameter, direction, null0, level, sample, p);
  }
  const direction = alternative === 'greater' ? t('exceeds') : alternative === 'less' ? t('falls below') : t('differs from');
  return t('The data do not show that the population {0} {1} {2} {3} ({4}, {5}).', parameter, direction, null0, level, sample, p);
}

/** Conclusion of the stratified tests: the variables by name when known, the common odds ratio when finite. */
function stratifiedConclusion(a: PhraseArgs, t: Translate): string {
  const row = nameOf(optStr(a, 'rowVariable'));
  const column = nameOf(optStr(a, 'columnVariable'));
  const pair = row === undefined && column === undefined ? t('the row and column variables') : t('{0} and {1}', row ?? t('the row variable'), column ?? t('the column variable'));
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  if (!flag(a, 'significant')) return t('The data do not show an association between {0} within strata {1} ({2}).', pair, level, p);
  const oddsRatio = a.oddsRatio === undefined ? undefined : num(a, 'oddsRatio');
  return oddsRatio === undefined
    ? t('Within strata, {0} are associated {1} ({2}).', pair, level, p)
    : t('Within strata, {0} are associated {1} ({2}); the common odds ratio is about {3}.', pair, level, p, oddsRatio.toPrecision(3));
}

function mcnemarConclusion(a: PhraseArgs, t: Translate): string {
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  const first = str(a, 'first');
  const second = str(a, 'second');
  return flag(a, 'significant')
    ? t('The share classified "{0}" changed between the first and second classification {1} ({2}); {3} pairs moved from "{0}" to "{4}" and {5} the other way.', first, level, p, num(a, 'forward'), second, num(a, 'backward'))
    : t('The data do not show a change between the first and second classification {0} ({1}); {2} pairs moved from "{3}" to "{4}" and {5} the other way.', level, p, num(a, 'forward'), first, second, num(a, 'backward'));
}

function mcnemarProcedure(a: PhraseArgs, t: Translate): string {
  const method = str(a, 'method');
  if (method === 'exact') return t("McNemar's test, exact binomial version");
  if (method === 'mid-p') return t("McNemar's test, mid-p version");
  return flag(a, 'correction') ? t("McNemar's test with continuity correction") : t("McNemar's test");
}

function cochranArmitageConclusion(a: PhraseArgs, t: Translate): string {
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  const event = str(a, 'event');
  if (flag(a, 'significant')) {
    return flag(a, 'rises')
      ? t('The proportion of "{0}" rises with the score of the ordered groups {1} ({2}).', event, level, p)
      : t('The proportion of "{0}" falls with the score of the ordered groups {1} ({2}).', event, level, p);
  }
  const alternative = str(a, 'alternative');
  if (alternative === 'greater') return t('The data do not show a rising trend in the proportion of "{0}" across the ordered groups {1} ({2}).', event, level, p);
  if (alternative === 'less') return t('The data do not show a falling trend in the proportion of "{0}" across the ordered groups {1} ({2}).', event, level, p);
  return t('The data do not show a linear trend in the proportion of "{0}" across the ordered groups {1} ({2}).', event, level, p);
}

function linearByLinearConclusion(a: PhraseArgs, t: Translate): string {
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  const correlation = num(a, 'correlation');
  const r = correlation.toFixed(3);
  if (!flag(a, 'significant')) return t('The data do not show a linear association between the ordered variables {0} (r = {1}, {2}).', level, r, p);
  return correlation > 0
    ? t('Higher row scores go with higher column scores {0} (r = {1}, {2}).', level, r, p)
    : t('Higher row scores go with lower column scores {0} (r = {1}, {2}).', level, r, p);
}

/** The name of a multiplicity adjustment, as titles and notes write it. */
function adjustmentName(adjustment: string, t: Translate): string {
  if (adjustment === 'bonferroni') return t('Bonferroni');
  if (adjustment === 'holm') return t('Holm');
  if (adjustment === 'benjamini-hochberg') return t('Benjamini–Hochberg (false discovery rate)');
  throw new Error(`no wording for the adjustment "${adjustment}"`);
}

function postHocConclusion(a: PhraseArgs, t: Translate): string {
  const adjustment = adjustmentName(str(a, 'adjustment'), t);
  const level = atLevel(num(a, 'alpha'), t);
  const compare = str(a, 'compare');
  const count = num(a, 'flaggedCount');
  if (count === 0) {
    if (compare === 'cells') return t('After {0} adjustment, no cell departs from independence {1}.', adjustment, level);
    return compare === 'rows'
      ? t('After {0} adjustment, no pair of rows differs from independence {1}.', adjustment, level)
      : t('After {0} adjustment, no pair of columns differs from independence {1}.', adjustment, level);
  }
  const flagged = strings(a, 'flagged');
  const list = `${flagged.join('; ')}${count > flagged.length ? '; …' : ''}`;
  if (count === 1) {
    if (compare === 'cells') return t('After {0} adjustment, 1 cell differs {1}: {2}.', adjustment, level, list);
    return compare === 'rows'
      ? t('After {0} adjustment, 1 pair of rows differs {1}: {2}.', adjustment, level, list)
      : t('After {0} adjustment, 1 pair of columns differs {1}: {2}.', adjustment, level, list);
  }
  if (compare === 'cells') return t('After {0} adjustment, {1} cells differ {2}: {3}.', adjustment, count, level, list);
  return compare === 'rows'
    ? t('After {0} adjustment, {1} pairs of rows differ {2}: {3}.', adjustment, count, level, list)
    : t('After {0} adjustment, {1} pairs of columns differ {2}: {3}.', adjustment, count, level, list);
}

function postHocProcedure(a: PhraseArgs, t: Translate): string {
  const adjustment = adjustmentName(str(a, 'adjustment'), t);
  const compare = str(a, 'compare');
  if (compare === 'cells') return t('Post-hoc cell-wise adjusted residual tests ({0})', adjustment);
  return compare === 'rows' ? t('Post-hoc pairwise comparisons of rows ({0})', adjustment) : t('Post-hoc pairwise comparisons of columns ({0})', adjustment);
}

/** A fitted family by name, as sentences write it. */
function familyName(family: string, t: Translate): string {
  if (family === 'poisson') return t('Poisson');
  if (family === 'binomial') return t('binomial');
  if (family === 'geometric') return t('geometric');
  if (family === 'normal') return t('normal');
  throw new Error(`no wording for the family "${family}"`);
}

function distributionFitConclusion(a: PhraseArgs, t: Translate): string {
  const name = familyName(str(a, 'family'), t);
  const level = atLevel(num(a, 'alpha'), t);
  const p = pOf(a, t);
  return flag(a, 'significant')
    ? t('The values do not follow a {0} distribution {1} ({2}): the observed counts per bin depart from the fitted ones by more than chance would explain.', name, level, p)
    : t('The data are consistent with a {0} distribution {1} ({2}); this does not prove the values are {0}, only that the departure is within chance.', name, level, p);
}

function monteCarloName(statistic: string, t: Translate): string {
  if (statistic === 'pearson') return t('Pearson chi-square, Monte Carlo p-value');
  if (statistic === 'likelihood-ratio') return t('Likelihood-ratio chi-square, Monte Carlo p-value');
  if (statistic === 'cressie-read') return t('Cressie–Read power divergence, Monte Carlo p-value');
  if (statistic === 'probability') return t('Fisher’s exact test (tables ordered by probability), Monte Carlo p-value');
  throw new Error(`no wording for the statistic "${statistic}"`);
}

function exactMultinomialName(statistic: string, t: Translate): string {
  if (statistic === 'probability') return t('Exact multinomial test (outcomes ordered by probability)');
  if (statistic === 'pearson') return t('Exact multinomial test of the Pearson statistic');
  if (statistic === 'likelihood-ratio') return t('Exact multinomial test of the likelihood-ratio statistic');
  return t('Exact multinomial test of the Cressie–Read statistic');
}

function monteCarloNote(a: PhraseArgs, t: Translate): string {
  const values = [num(a, 'resamples'), num(a, 'seed'), num(a, 'standardError').toPrecision(2), num(a, 'lower').toPrecision(3), num(a, 'upper').toPrecision(3)] as const;
  return str(a, 'what') === 'tables'
    ? t('{0} random tables with the observed margins (seed {1}); Monte Carlo standard error {2}, 99% interval {3}–{4}.', ...values)
    : t('{0} random samples from the hypothesised distribution (seed {1}); Monte Carlo standard error {2}, 99% interval {3}–{4}.', ...values);
}

export const PHRASES: Readonly<Record<string, PhraseWriter>> = {
  // Conclusions.
  'conclusion.goodness-of-fit': goodnessOfFitConclusion,
  'conclusion.independence': independenceConclusion,
  'conclusion.method-flipped': methodFlipped,
  'conclusion.variance': varianceConclusion,
  'conclusion.stratified': stratifiedConclusion,
  'conclusion.distribution-fit': distributionFitConclusion,
  'conclusion.posthoc': postHocConclusion,
  'conclusion.cochran-armitage': cochranArmitageConclusion,
  'conclusion.linear-by-linear': linearByLinearConclusion,
  'conclusion.mcnemar': mcnemarConclusion,
  'conclusion.bowker': (a, t) =>
    flag(a, 'significant')
      ? t('Moves between categories are not symmetric {0} ({1}): for some pairs of categories, more units moved one way than the other.', atLevel(num(a, 'alpha'), t), pOf(a, t))
      : t('The data do not show asymmetric moves between categories {0} ({1}).', atLevel(num(a, 'alpha'), t), pOf(a, t)),

  // Procedure titles.
  'procedure.goodness-of-fit': (a, t) => t('Chi-square goodness-of-fit test ({0})', phraseIn(a, 'statistic', t)),
  'procedure.independence': (a, t) => t('Chi-square test of independence ({0})', phraseIn(a, 'statistic', t)),

  'procedure.variance': (_, t) => t('Chi-square test for one variance'),
  'procedure.stratified-exact': (_, t) => t('Exact conditional test of independence in 2×2×K tables'),
  'procedure.cmh': (a, t) => (flag(a, 'correction') ? t('Cochran–Mantel–Haenszel test with continuity correction') : t('Cochran–Mantel–Haenszel test')),
  'procedure.cmh-generalized': (_, t) => t('Generalized Cochran–Mantel–Haenszel test'),
  'procedure.mcnemar': mcnemarProcedure,
  'procedure.cochran-armitage': (_, t) => t('Cochran–Armitage test for trend'),
  'procedure.linear-by-linear': (_, t) => t('Linear-by-linear association test'),
  'procedure.posthoc': postHocProcedure,
  'procedure.distribution-fit': (a, t) => t('Chi-square goodness of fit to a {0} distribution (parameters estimated)', familyName(str(a, 'family'), t)),
  'procedure.with-method': (a, t) => t('{0}, {1} p-value', phraseOrText(a, 'procedure', t), methodText(str(a, 'method'), t)),

  // Statistics.
  'statistic.chi-square-approximation': (a, t) => t('{0}, chi-square approximation', phraseOrText(a, 'procedure', t)),
  'statistic.pearson': (_, t) => t('Pearson chi-square'),
  'statistic.likelihood-ratio': (_, t) => t('Likelihood-ratio chi-square'),
  'statistic.cressie-read': (a, t) => t('Cressie–Read power divergence (λ = {0})', lambdaText(num(a, 'lambda'))),
  'statistic.pearson-yates': (_, t) => t("Pearson chi-square with Yates' continuity correction"),
  'statistic.fisher-two-sided': (_, t) => t("Fisher's exact test (two-sided)"),
  'statistic.breslow-day': (_, t) => t('Breslow–Day test of homogeneous odds ratios'),
  'statistic.breslow-day-tarone': (_, t) => t("Breslow–Day test with Tarone's adjustment"),
  'statistic.cmh': (_, t) => t('Cochran–Mantel–Haenszel chi-square'),
  'statistic.cmh-corrected': (_, t) => t('Cochran–Mantel–Haenszel chi-square with continuity correction'),
  'statistic.cmh-exact': (_, t) => t('Exact conditional test (common odds ratio 1)'),
  'note.cmh-exact': (a, t) => t("Σa = {0}, given every stratum's margins", num(a, 'sumA')),
  'statistic.cmh-general': (_, t) => t('Generalized CMH: general association'),
  'statistic.cmh-row-means': (_, t) => t('Generalized CMH: row mean scores differ'),
  'statistic.cmh-correlation': (_, t) => t('Generalized CMH: nonzero correlation'),
  'note.uses-column-scores': (_, t) => t('Uses the column scores.'),
  'note.uses-both-scores': (_, t) => t('Uses the row and column scores.'),
  'statistic.mcnemar': (_, t) => t('McNemar chi-square'),
  'statistic.mcnemar-corrected': (_, t) => t('McNemar chi-square with continuity correction'),
  'statistic.mcnemar-exact': (_, t) => t('Exact binomial test of the discordant pairs'),
  'note.mcnemar-exact': (a, t) => t('b = {0} of {1} discordant pairs, tested against ½', num(a, 'b'), num(a, 'discordant')),
  'statistic.mcnemar-mid-p': (_, t) => t('Mid-p binomial test of the discordant pairs'),
  'note.mcnemar-mid-p': (_, t) => t('The exact p-value minus half the probability of the observed split; less conservative than the exact test.'),
  'statistic.bowker': (_, t) => t("Bowker's test of symmetry"),
  'statistic.cochran-armitage': (_, t) => t('Cochran–Armitage trend chi-square'),
  'statistic.cochran-armitage-z': (_, t) => t('Cochran–Armitage z (positive: first-row proportion rises with the score)'),
  'statistic.departure-from-trend': (_, t) => t('Departure from a linear trend (X² − trend)'),
  'statistic.linear-by-linear': (_, t) => t('Linear-by-linear association'),
  'detail.trend-direction': (_, t) => t('z > 0 when the first row’s proportion rises with the score'),
  'statistic.pearson-overall': (_, t) => t('Pearson chi-square (overall)'),
  'statistic.posthoc-cell': (a, t) =>
    flag(a, 'more') ? t('Cell {0} × {1}: more than expected', str(a, 'row'), str(a, 'column')) : t('Cell {0} × {1}: fewer than expected', str(a, 'row'), str(a, 'column')),
  'note.posthoc-cell': (a, t) =>
    t(
      'observed {0}, expected {1}; unadjusted p = {2}, {3}-adjusted p = {4}',
      num(a, 'observed'),
      num(a, 'expected').toPrecision(4),
      num(a, 'p').toPrecision(3),
      adjustmentName(str(a, 'adjustment'), t),
      num(a, 'adjustedP').toPrecision(3),
    ),
  'statistic.posthoc-pair': (a, t) =>
    flag(a, 'rows') ? t('Rows {0} vs {1}', str(a, 'first'), str(a, 'second')) : t('Columns {0} vs {1}', str(a, 'first'), str(a, 'second')),
  'note.posthoc-pair': (a, t) =>
    t('unadjusted p = {0}, {1}-adjusted p = {2}', num(a, 'p').toPrecision(3), adjustmentName(str(a, 'adjustment'), t), num(a, 'adjustedP').toPrecision(3)),
  'statistic.chernoff-lehmann': (a, t) => t('Pearson chi-square on {0} df (Chernoff–Lehmann upper bound of p)', num(a, 'df')),
  'statistic.monte-carlo': (a, t) => monteCarloName(str(a, 'statistic'), t),
  'note.monte-carlo': monteCarloNote,
  'detail.paired-difference-direction': (_, t) => t('row-1 share minus column-1 share: (b − c)/n'),
  'detail.monte-carlo-rule': (_, t) => t('(1 + extreme resamples) / (resamples + 1); 99% Wilson interval'),
  'statistic.fisher': (_, t) => t("Fisher's exact test"),
  'statistic.fisher-freeman-halton': (_, t) => t("Fisher's exact test (Fisher–Freeman–Halton)"),
  'note.fisher-two-sided': (_, t) => t('Two-sided: the total probability of the tables with the observed margins that are no more probable than the observed one.'),
  'statistic.exact-multinomial': (a, t) => exactMultinomialName(str(a, 'statistic'), t),
  'note.exact-multinomial': (a, t) => t('All {0} outcomes of {1} units in {2} categories enumerated.', num(a, 'outcomes').toFixed(0), num(a, 'n'), num(a, 'categories')),
  'note.fisher-one-sided': (a, t) =>
    t('Conditional on both margins. One-sided: {0} if the alternative is odds ratio > 1, {1} if it is odds ratio < 1.', describeP(prob(a, 'greater')), describeP(prob(a, 'less'))),

  // Effect sizes and estimates.
  'estimate.cohens-w': (_, t) => t("Cohen's w"),
  'note.cohens-w': (_, t) => t('sqrt(X²/n) from the Pearson statistic; about 0.1 small, 0.3 medium, 0.5 large (Cohen 1988, common practice).'),
  'estimate.phi': (_, t) => t('Phi coefficient φ'),
  'note.phi': (_, t) => t("Signed: positive when the first row is more likely than the second to fall in the first column. Its absolute value equals Cramér's V."),
  'estimate.cramers-v': (_, t) => t("Cramér's V"),
  'note.cramers-v': (_, t) => t('From the uncorrected Pearson X²: sqrt(X² / (n·(min(r, c) − 1))).'),
  'estimate.cramers-v-corrected': (_, t) => t("Cramér's V, bias-corrected (Bergsma 2013)"),
  'note.cramers-v-corrected': (_, t) => t('Removes the upward bias of V in small samples and large tables.'),
  'note.not-defined-small-table': (_, t) => t('Not defined for a table this small.'),
  'estimate.conditional-odds-ratio': (_, t) => t('Odds ratio, conditional maximum likelihood'),
  'note.conditional-odds-ratio': (_, t) => t("The estimate and interval that go with Fisher's exact test."),
  'estimate.odds-ratio': (_, t) => t('Odds ratio'),
  'note.odds-ratio': (a, t) => t('Odds of `{0}` in `{1}` divided by the odds in `{2}` (ad/bc).', str(a, 'event'), str(a, 'first'), str(a, 'second')),
  'estimate.relative-risk': (_, t) => t('Relative risk'),
  'note.relative-risk': (a, t) => t('Proportion in `{0}` for `{1}` divided by that for `{2}`; rows are taken as the groups.', str(a, 'event'), str(a, 'first'), str(a, 'second')),

  'estimate.sample-variance': (_, t) => t('Sample variance s²'),
  'estimate.sample-sd': (_, t) => t('Sample standard deviation s'),
  'estimate.sample-variance-robust': (_, t) => t('Sample variance s², robust interval'),
  'estimate.sample-sd-robust': (_, t) => t('Sample standard deviation s, robust interval'),
  'estimate.skewness': (_, t) => t('Skewness (G1)'),
  'note.skewness': (a, t) => t('standard error {0} under normality', num(a, 'standardError').toPrecision(3)),
  'estimate.excess-kurtosis': (_, t) => t('Excess kurtosis (G2)'),
  'note.excess-kurtosis': (a, t) => t('standard error {0} under normality; 0 for a normal distribution', num(a, 'standardError').toPrecision(3)),
  'note.bonett-trimmed': (_, t) => t('Kurtosis estimated around the trimmed mean, as Bonett proposes.'),
  'note.bonett-moments': (_, t) => t('Computed from streamed moments: kurtosis estimated around the mean rather than the trimmed mean Bonett proposes.'),
  'estimate.variance-ratio': (_, t) => t('Variance ratio s²/σ0²'),
  'estimate.sd-ratio': (_, t) => t('Standard deviation ratio s/σ0'),

  'estimate.mantel-haenszel': (_, t) => t('Mantel–Haenszel common odds ratio'),
  'estimate.common-conditional-odds-ratio': (_, t) => t('Common odds ratio, conditional maximum likelihood'),
  'note.common-conditional-odds-ratio': (_, t) => t('The estimate and interval that go with the exact conditional test.'),
  'estimate.paired-difference': (a, t) => t('Difference of paired proportions, P({0} first) − P({0} second)', str(a, 'label')),
  'estimate.paired-difference-agresti-min': (_, t) => t('Difference of paired proportions, Agresti–Min interval'),
  'estimate.discordant-ratio': (_, t) => t('Ratio of discordant pairs b/c (conditional odds ratio)'),

  'estimate.score-correlation': (_, t) => t('Pearson correlation of the scores'),

  'estimate.fit-mean': (_, t) => t('μ (mean)'),
  'estimate.fit-sd': (_, t) => t('σ (maximum likelihood, divisor n)'),
  'estimate.fit-binomial-p': (a, t) => t('p (success probability, {0} trials)', num(a, 'trials')),
  'estimate.fit-poisson-lambda': (_, t) => t('λ (mean)'),
  'estimate.fit-geometric-p': (_, t) => t('p (success probability; support 0, 1, 2, … failures before the first success)'),

  // Interval parameters and methods.
  'parameter.common-odds-ratio': (_, t) => t('common odds ratio'),
  'parameter.paired-difference': (_, t) => t('difference of paired proportions'),
  'method.exact-conditional-strata': (_, t) => t('exact conditional (inverting the one-sided conditional tests)'),
  'method.robins-breslow-greenland': (_, t) => t('Robins–Breslow–Greenland variance of the log Mantel–Haenszel estimate'),
  'method.wald': (_, t) => t('Wald'),
  'method.agresti-min': (_, t) => t('Agresti–Min (2005): Wald after adding ½ to each cell'),
  'method.clopper-pearson-ratio': (_, t) => t('exact conditional (Clopper–Pearson interval for b/(b + c), mapped by π/(1 − π))'),
  'method.chi-square-lower-bound': (_, t) => t('one-sided lower bound, chi-square'),
  'method.chi-square-upper-bound': (_, t) => t('one-sided upper bound, chi-square'),
  'method.equal-tail-chi-square': (_, t) => t('equal-tail chi-square'),
  'method.bonett': (a, t) => {
    const alternative = str(a, 'alternative');
    if (alternative === 'two-sided') return t('Bonett (2006)');
    return alternative === 'greater' ? t('Bonett (2006), one-sided lower bound') : t('Bonett (2006), one-sided upper bound');
  },
  'parameter.odds-ratio': (_, t) => t('odds ratio'),
  'parameter.relative-risk': (_, t) => t('relative risk'),
  'method.exact-conditional': (_, t) => t('exact conditional (inverting the one-sided Fisher tests)'),
  'method.woolf': (_, t) => t('Woolf (log)'),
  'method.katz': (_, t) => t('log (Katz)'),
};
