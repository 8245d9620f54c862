/**
 * What every statistic, effect size, assumption and notice in a report means: what it is, how to read it,
 * and one formula or citation. Written once here; the panel shows them on hover and keyboard focus, and the
 * markdown hover in the editor shows the same text. Pure.
 */

export interface Explanation {
  /** The term as a reader meets it. */
  readonly term: string;
  /** What it is. */
  readonly what: string;
  /** How to read it. */
  readonly read: string;
  /** One formula or citation. */
  readonly source: string;
}

const E = (term: string, what: string, read: string, source: string): Explanation => ({ term, what, read, source });

/** Keyed by the ids results carry (effect sizes, estimates, statistic lines, assumptions, notice codes) and by symbol. */
export const EXPLANATIONS: Readonly<Record<string, Explanation>> = {
  // Statistics
  'X²': E('Pearson X²', 'The sum over cells of (observed − expected)² / expected.', 'Larger means the counts sit farther from what the hypothesis expects; compared with a χ² distribution with df degrees of freedom.', 'Pearson (1900); X² = Σ (O − E)² / E.'),
  'χ²': E('χ² statistic', 'The test statistic, referred to a chi-square distribution.', 'Read it with its df: the p-value is the chance of a value at least this large if the hypothesis holds.', 'For one variance: χ² = (n − 1)s² / σ0².'),
  pearson: E('Pearson X²', 'The sum over cells of (observed − expected)² / expected.', 'Larger means the counts sit farther from what the hypothesis expects.', 'Pearson (1900); X² = Σ (O − E)² / E.'),
  'G²': E('Likelihood-ratio G²', 'Twice the log-likelihood ratio of the observed to the expected counts.', 'Usually close to X²; a large gap between them is a sign the chi-square approximation is strained.', 'G² = 2 Σ O · ln(O / E) (Wilks 1938).'),
  'likelihood-ratio': E('Likelihood-ratio G²', 'Twice the log-likelihood ratio of the observed to the expected counts.', 'Usually close to X²; a large gap between them is a sign the approximation is strained.', 'G² = 2 Σ O · ln(O / E) (Wilks 1938).'),
  CR: E('Cressie–Read statistic', 'A power-divergence statistic between X² (λ = 1) and G² (λ = 0).', 'With λ = 2/3 its chi-square approximation holds well in small samples.', 'Cressie & Read (1984): 2/(λ(λ+1)) Σ O[(O/E)^λ − 1].'),
  'cressie-read': E('Cressie–Read statistic', 'A power-divergence statistic between X² (λ = 1) and G² (λ = 0).', 'With λ = 2/3 its chi-square approximation holds well in small samples.', 'Cressie & Read (1984).'),
  'pearson-yates': E("Yates' continuity correction", 'X² for a 2×2 table with each |O − E| reduced by 0.5.', 'Conservative: its p-value is larger than the uncorrected one; shown for comparison.', 'Yates (1934): Σ (|O − E| − 0.5)² / E.'),
  'fisher-exact': E("Fisher's exact test", 'The probability of tables with the observed margins that are no more probable than the observed one.', 'Needs no large-sample approximation; the reference when expected counts are small.', 'Fisher (1935); r×c: Freeman & Halton (1951).'),
  z: E('z statistic', 'A standardized statistic referred to the standard normal distribution.', '|z| above 1.96 is significant at the 5 % level two-sided.', 'z = estimate / standard error.'),
  'cochran-armitage-z': E('Cochran–Armitage trend z', 'Tests whether a proportion rises or falls along ordered groups.', 'Positive: the first-row proportion rises with the score.', 'Cochran (1954), Armitage (1955).'),
  'p-value': E('p-value', 'The chance, if the hypothesis were true, of a result at least as far from it as this one.', 'Small (below α) means the data are hard to reconcile with the hypothesis; it is not the chance the hypothesis is true and says nothing about the size of the effect.', 'Wasserstein & Lazar (2016), the ASA statement on p-values.'),
  'exact p': E('Exact p-value', 'Computed from the exact distribution of the tables with the observed margins, not from the chi-square approximation.', 'Reported instead of the chi-square p-value when expected counts are small.', 'Fisher (1935); Freeman & Halton (1951).'),
  'Monte Carlo p': E('Monte Carlo p-value', 'The share of random tables with the observed margins whose statistic is at least the observed one.', 'Carries a small simulation error (its standard error is shown); rerun with a seed to reproduce.', 'Patefield (1981) for random r×c tables; (k + 1)/(B + 1).'),
  'mid-p': E('Mid-p value', 'The exact p-value minus half the probability of the observed outcome.', 'Less conservative than the exact p-value, closer to the nominal α on average.', 'Lancaster (1961).'),
  df: E('Degrees of freedom', 'The number of independent pieces of information the statistic is built from.', 'Fixes which chi-square distribution the statistic is compared with: (r − 1)(c − 1) for an r×c table, k − 1 − estimated parameters for k categories, n − 1 for one variance.', 'Fisher (1922).'),
  'Degrees of freedom': E('Degrees of freedom', 'The number of independent pieces of information the statistic is built from.', 'Fixes which chi-square distribution the statistic is compared with.', '(r − 1)(c − 1); k − 1; n − 1.'),
  'α': E('Significance level α', 'The false-alarm rate accepted in advance.', 'A p-value below α is called significant; choose α before looking at the data.', 'Neyman & Pearson (1933).'),
  N: E('Sample size N', 'The number of observations counted.', 'With a very large N, tiny, unimportant differences become significant: read the effect size.', '—'),
  mcnemar: E("McNemar's test", 'Compares the two kinds of discordant pairs (changed one way vs the other).', 'Significant: the share changed between the two answers; concordant pairs do not count.', 'McNemar (1947): X² = (b − c)² / (b + c).'),
  'mcnemar-corrected': E("McNemar's test with continuity correction", 'McNemar X² with |b − c| reduced by 1.', 'Conservative; shown for comparison.', 'Edwards (1948): (|b − c| − 1)² / (b + c).'),
  'mcnemar-exact': E('Exact binomial test of the discordant pairs', 'Treats b out of b + c discordant pairs as binomial with p = 1/2.', 'The reference when there are few discordant pairs.', 'Exact binomial test; McNemar (1947).'),
  'mcnemar-mid-p': E('Mid-p binomial test of the discordant pairs', 'The exact binomial p-value minus half the probability of the observed split.', 'Closer to the nominal α than the exact test; recommended for small counts.', 'Fagerland, Lydersen & Laake (2013).'),
  b: E('Discordant pairs b', 'The number of pairs that changed from the first answer to the second.', 'Compared with c, the pairs that changed the other way.', 'McNemar (1947).'),
  bowker: E("Bowker's test of symmetry", 'Tests whether a square table of paired answers is symmetric (changes balance in every pair of categories).', 'Significant: answers moved more in one direction than the other.', 'Bowker (1948): Σ (n_ij − n_ji)² / (n_ij + n_ji).'),
  cmh: E('Cochran–Mantel–Haenszel test', 'Tests for an association in 2×2 tables while holding a stratifying variable fixed.', 'Significant: an association that is not explained by the strata.', 'Mantel & Haenszel (1959).'),
  'cmh-corrected': E('CMH test with continuity correction', 'The CMH statistic with a 0.5 correction.', 'Conservative; shown for comparison.', 'Mantel & Haenszel (1959).'),
  'cmh-exact': E('Exact conditional test', 'The exact test of a common odds ratio of 1, given every stratum’s margins.', 'The reference when strata are small.', 'Mehta, Patel & Gray (1985).'),
  'cmh-general': E('Generalized CMH: general association', 'Tests any association between rows and columns within strata.', 'For nominal rows and columns.', 'Landis, Heyman & Koch (1978).'),
  'cmh-row-means': E('Generalized CMH: row mean scores', 'Tests whether the rows differ in their mean column score within strata.', 'For ordered columns.', 'Landis, Heyman & Koch (1978).'),
  'cmh-correlation': E('Generalized CMH: correlation', 'Tests a linear association between row and column scores within strata.', 'For ordered rows and columns.', 'Landis, Heyman & Koch (1978).'),
  'breslow-day': E('Breslow–Day test', 'Tests whether the odds ratio is the same in every stratum.', 'Significant: the strata disagree, and one common odds ratio hides that.', 'Breslow & Day (1980).'),
  'breslow-day-tarone': E("Breslow–Day with Tarone's adjustment", 'The Breslow–Day test corrected to be a proper chi-square when the MH estimate is used.', 'Read it as the Breslow–Day test.', 'Tarone (1985).'),
  'cochran-armitage': E('Cochran–Armitage trend test', 'Tests a linear trend of a proportion across ordered groups.', 'More powerful than the overall X² when the proportions change steadily.', 'Cochran (1954), Armitage (1955).'),
  'departure-from-trend': E('Departure from a linear trend', 'What remains of X² after the linear trend.', 'Significant: the proportions do not follow a straight line in the scores.', 'X² − trend X², df k − 2.'),
  'linear-by-linear': E('Linear-by-linear association', 'Tests a linear association between ordered row and column scores.', 'Uses the order the overall X² ignores.', 'M² = (n − 1) r² (Agresti 2013, §3.4).'),
  'common-odds-ratio': E('A common odds ratio across strata', 'The Mantel–Haenszel estimate assumes the strata share one odds ratio.', 'When Breslow–Day says they differ, report the strata separately.', 'Breslow & Day (1980).'),

  cramersV: E("Cramér's V", 'The strength of association in an r×c table, from 0 (none) to 1 (complete).', 'Common practice reads about 0.1 as small, 0.3 as medium, 0.5 as large (for min(r, c) = 2); it carries no direction.', 'Cramér (1946): V = √(X² / (n · (min(r, c) − 1))).'),
  cramersVCorrected: E("Cramér's V, bias-corrected", 'V with its upward small-sample bias removed.', 'Prefer it to V in small samples and large tables.', 'Bergsma (2013).'),
  phi: E('Phi coefficient φ', 'The correlation between the two binary variables of a 2×2 table.', 'Signed: positive when the first row leans to the first column; |φ| equals V.', 'φ = (ad − bc) / √(r₁r₂c₁c₂).'),
  cohensW: E("Cohen's w", 'The size of the departure of the proportions from the hypothesised ones.', 'Common practice (Cohen 1988): 0.1 small, 0.3 medium, 0.5 large.', 'w = √(Σ (p_obs − p_exp)² / p_exp) = √(X² / n).'),
  oddsRatio: E('Odds ratio', 'The odds of the first column in the first row divided by those in the second row.', '1 means no association; above 1 the first row favours the first column. Read its interval, not only the point.', 'OR = ad / bc; Woolf (1955) log interval.'),
  conditionalOddsRatio: E('Conditional odds ratio', 'The odds ratio estimated by conditional maximum likelihood given the margins.', 'The estimate that goes with the exact test.', 'Cornfield (1956); Fisher (1935).'),
  relativeRisk: E('Relative risk', 'The proportion in the first column for the first row divided by that for the second row.', '1 means no difference; 2 means twice as likely.', 'RR = (a/(a+b)) / (c/(c+d)); Katz et al. (1978) interval.'),
  mantelHaenszelOddsRatio: E('Mantel–Haenszel common odds ratio', 'One odds ratio for the association within strata, pooling 2×2 tables.', 'The association after allowing for the stratifying variable; check that the strata agree (Breslow–Day).', 'Mantel & Haenszel (1959); Robins, Breslow & Greenland (1986) interval.'),
  pairedDifferenceAgrestiMin: E('Paired difference, Agresti–Min interval', 'The change in the paired proportion with an interval that adds one pseudo-pair to each cell.', 'Holds its coverage better than the simple interval in small samples.', 'Agresti & Min (2005).'),
  discordantOddsRatio: E('Ratio of discordant pairs b/c', 'How many more pairs changed one way than the other.', '1 means balanced change; it is the conditional odds ratio of paired data.', 'b / c (Breslow & Day 1980, §7).'),
  sigmaRatio: E('Ratio σ1/σ0', 'The standard deviation the power plan should detect, relative to σ0.', '1.3 means a 30 % larger standard deviation.', 'Power from the chi-square distribution with n − 1 df.'),
  lambda: E('Poisson mean λ', 'The mean count fitted to the data.', 'Expected counts of the Poisson distribution use it; it costs one degree of freedom.', 'Maximum likelihood: the sample mean.'),
  mean: E('Mean μ', 'The mean fitted to the data.', 'Used for the expected counts of the fitted distribution; costs one degree of freedom.', 'Maximum likelihood estimate.'),
  p: E('Success probability p', 'The probability fitted to the data.', 'Used for the expected counts of the fitted distribution; costs one degree of freedom.', 'Maximum likelihood estimate.'),
  scoreCorrelation: E('Correlation of the scores', 'The Pearson correlation of row and column scores over all observations.', 'Its sign gives the direction of the trend.', 'Agresti (2013), §3.4.'),
  pairedDifference: E('Difference of paired proportions', 'How much the share changed between the two answers of the same units.', '0 means no change; its interval shows the plausible range of the change.', '(b − c) / n from the discordant pairs.'),
  varianceRatio: E('Variance ratio s²/σ0²', 'The sample variance relative to the hypothesised one.', '1 means the spread is as specified; 1.10 means 10 % more variance (5 % more standard deviation).', 's² / σ0²; its interval from the chi-square distribution with n − 1 df.'),
  sdRatio: E('Standard deviation ratio s/σ0', 'The sample standard deviation relative to the hypothesised one.', 'Above 1: more spread than specified.', 's / σ0.'),
  sd: E('Sample standard deviation s', 'The spread of the values around their mean.', 'Compare it and its interval with σ0.', 's = √(Σ (x − x̄)² / (n − 1)).'),
  variance: E('Sample variance s²', 'The average squared deviation from the mean, with n − 1 in the denominator.', 'Its interval comes from the chi-square distribution and relies on normality.', 's² = Σ (x − x̄)² / (n − 1).'),
  sdBonett: E("Bonett's robust interval for σ", 'An interval for the standard deviation that allows for the observed kurtosis.', 'When it disagrees with the chi-square interval, the chi-square result rests on normality and should not be trusted alone.', 'Bonett (2006), Computational Statistics & Data Analysis 50.'),
  varianceBonett: E("Bonett's robust interval for σ²", 'An interval for the variance that allows for the observed kurtosis.', 'When it disagrees with the chi-square interval, trust it rather than the chi-square one.', 'Bonett (2006).'),
  skewness: E('Skewness G1', 'How lopsided the distribution of the values is.', 'Near 0 for a normal distribution; more than about 2 standard errors away is a warning sign (common practice).', 'Joanes & Gill (1998), sample skewness G1.'),
  excessKurtosis: E('Excess kurtosis G2', 'How heavy the tails are compared with a normal distribution.', '0 for a normal distribution; the variance test is very sensitive to it.', 'Joanes & Gill (1998), sample excess kurtosis G2.'),
  // Residuals
  'standardized residual': E('Standardized residual z', 'A category’s deviation from its expected count in standard-deviation units under the hypothesis.', 'Beyond ±1.96 the category stands out at about the 5 % level (not adjusted for looking at many categories).', 'z = (O − E) / √(E(1 − p)).'),
  'adjusted residual': E('Adjusted residual', 'A cell’s deviation from its expected count, in standard deviations under independence.', 'Beyond ±1.96 (5 %), ±2.58 (1 %), ±3.29 (0.1 %) the cell stands out; many cells mean some will by chance.', 'Haberman (1973): (O − E) / √(E(1 − r/n)(1 − c/n)).'),
  'Share of χ²': E('Share of the statistic', 'How much of X² comes from this category.', 'The categories with the largest shares drive the result.', '(O − E)² / E divided by X².'),
  // Assumptions
  'expected-counts': E('Expected counts large enough', 'The chi-square p-value is an approximation that needs enough expected counts per cell.', 'Common practice: no expected count below 1, at most 20 % below 5; otherwise use an exact or Monte Carlo p-value.', 'Cochran (1954).'),
  independence: E('Independent observations', 'Each unit contributes to one cell only, unaffected by the others.', 'Repeated measures of the same unit, or clustered samples, make the p-value too small; this cannot be checked from counts.', 'Standard assumption of every chi-square test on counts.'),
  normality: E('Normal distribution of the values', 'The chi-square test for a variance holds only for normally distributed values.', 'Heavier tails make it reject too often, and a larger sample does not fix that: compare with Bonett’s interval.', 'Box (1953); Bonett (2006).'),
  'sampling-design': E('Sampling design', 'How the table was collected: fixed total, fixed rows, or neither.', 'The test is the same for all three, but what the odds ratio and relative risk describe depends on it.', 'Agresti (2013), Categorical Data Analysis, ch. 2.'),
  'fixed-categories': E('Categories fixed in advance', 'The categories and their expected proportions were chosen before seeing the data.', 'Categories merged or chosen after looking make the p-value too small.', 'Common practice.'),
  pairing: E('Pairs of the same unit', 'Each pair is two answers from the same unit (before/after, two raters).', 'Only the discordant pairs carry information about change.', 'McNemar (1947).'),
  // How sure the conclusion is (src/report/evidence.ts)
  fragility: E('Fragility index', 'The smallest number of single outcomes that, changed, would make a significant result not significant.', 'A small index (1 or 2) means the conclusion rests on a handful of observations; read it beside N (the quotient is index / N).', 'Walsh et al. (2014) for 2×2 tables; Baer et al. (2021) for other tables.'),
  reverseFragility: E('Reverse fragility index', 'The smallest number of single outcomes that, changed, would make a non-significant result significant.', 'A small index means "no difference found" is itself close to the line.', 'Walsh et al. (2014); Baer et al. (2021).'),
  bayesFactor: E('Bayes factor', 'How many times more probable the data are under the alternative (BF₁₀) than under the null (BF₀₁ = 1 / BF₁₀), for the stated prior and sampling plan.', 'About 1–3 anecdotal, 3–10 moderate, 10–30 strong, 30–100 very strong, above 100 extreme (Jeffreys’ bands); unlike p, it can favour the null.', 'Gunel & Dickey (1974); Jamil et al. (2017).'),
  equivalence: E('Equivalence', 'A test that the quantity lies inside a stated tolerance, not merely that a difference was not found.', 'Equivalence is shown when the 1 − 2α interval lies inside the band (two one-sided tests).', 'Schuirmann (1987); Wellek (2010) for goodness of fit.'),
  nonInferiority: E('Non-inferiority', 'A one-sided test that σ stays below a stated maximum.', 'Shown when the one-sided upper bound lies below the maximum.', 'Wellek (2010).'),
  family: E('Family of tests', 'This test is one of several run together (a report or a folder); its p-value is adjusted for their number.', 'Read the adjusted p-value against α; a conclusion that changes under adjustment deserves caution.', 'Holm (1979); Benjamini & Hochberg (1995).'),
  // Notices
  'small-expected': E('Small expected counts', 'Some expected counts are below the common-practice limits.', 'The chi-square p-value may be off; an exact or Monte Carlo p-value does not rely on it.', 'Cochran (1954).'),
  'normality-sensitive': E('Sensitive to non-normality', 'The variance test and its interval assume normally distributed values.', 'Read Bonett’s robust interval beside it.', 'Box (1953).'),
  'robust-disagrees': E('Robust interval disagrees', 'The chi-square and Bonett intervals disagree about σ0.', 'The conclusion depends on normality: do not rely on the chi-square result alone.', 'Bonett (2006).'),
  'exact-beside': E('Exact p-value shown beside', 'Because expected counts are small, the exact p-value is shown next to the chi-square one.', 'If they disagree, the exact one is the one to trust.', 'Fisher (1935).'),
  'exact-ordering': E('How the exact p-value orders tables', 'Fisher’s exact test ranks tables by probability, not by X².', 'It can differ slightly from the permutation distribution of X².', 'Freeman & Halton (1951).'),
  'two-sided-convention': E('Two-sided p-value convention', 'Twice the smaller tail probability, capped at 1.', 'Matches the equal-tail interval.', 'Equal-tail convention.'),
  'rescaled-expected': E('Expected counts rescaled', 'The expected counts given were rescaled to the observed total.', 'Check that the proportions were meant, not the counts.', '—'),
  'continuity-correction': E('Continuity correction', 'Yates’ correction was applied to the 2×2 table.', 'It makes the test conservative.', 'Yates (1934).'),
  'heterogeneous-odds-ratios': E('Odds ratios differ between strata', 'The strata do not share one odds ratio.', 'The common odds ratio summarizes different associations; report the strata separately.', 'Breslow & Day (1980).'),
  'bayes-factor-estimated-parameters': E('No Bayes factor with estimated parameters', 'The Dirichlet–multinomial Bayes factor compares the data with proportions fixed in advance; here the proportions were fitted to the same data.', 'Only the p-value (with df reduced for the fitted parameters) is reported; a Bayes factor would need a prior on those parameters too.', 'Point-null Bayes factor: Jamil et al. (2017); composite nulls: Kass & Raftery (1995).'),
  'estimated-parameters': E('Parameters estimated from the data', 'The expected counts use parameters fitted to these data.', 'Each fitted parameter takes one degree of freedom away.', 'Fisher (1924).'),
};

/**
 * The explanation for an id, a symbol or a term; undefined when there is none. Ids of resampled lines
 * ("pearson-exact", "likelihood-ratio-monte-carlo", "pearson-asymptotic") take the method's or the statistic's.
 */
export function explain(key: string | undefined): Explanation | undefined {
  if (!key) return undefined;
  const direct = EXPLANATIONS[key] ?? Object.values(EXPLANATIONS).find((e) => e.term.toLowerCase() === key.toLowerCase());
  if (direct) return direct;
  if (key.endsWith('-exact')) return EXPLANATIONS['exact p'];
  if (key.endsWith('-monte-carlo')) return EXPLANATIONS['Monte Carlo p'];
  if (key.endsWith('-asymptotic')) return explain(key.slice(0, -'-asymptotic'.length));
  return undefined;
}

/** One paragraph for a tooltip: what it is, how to read it, the source. */
export function explanationText(e: Explanation): string {
  return `${e.term}: ${e.what} ${e.read} (${e.source})`;
}

/** Markdown for an editor hover. */
export function explanationMarkdown(e: Explanation): string {
  const esc = (t: string) => t.replace(/([\\`*_{}[\]<>|#])/g, '\\$1');
  return `**${esc(e.term)}**\n\n${esc(e.what)} ${esc(e.read)}\n\n*${esc(e.source)}*`;
}

/** Symbols the hover recognises on their own (single letters such as z or N would match everywhere). */
const SYMBOLS = new Set(['X²', 'χ²', 'G²']);

/**
 * The term under a position in a line of a report (for the markdown hover): the longest glossary term or
 * statistic name that covers the column. Case-insensitive for words; symbols match exactly.
 */
export function explanationAt(line: string, column: number): { readonly explanation: Explanation; readonly start: number; readonly end: number } | undefined {
  let best: { explanation: Explanation; start: number; end: number } | undefined;
  const lower = line.toLowerCase();
  for (const [key, explanation] of Object.entries(EXPLANATIONS)) {
    for (const needle of new Set([explanation.term, ...(SYMBOLS.has(key) || /\s/.test(key) ? [key] : [])])) {
      const symbol = needle.length <= 3;
      const haystack = symbol ? line : lower;
      const target = symbol ? needle : needle.toLowerCase();
      for (let at = haystack.indexOf(target); at >= 0; at = haystack.indexOf(target, at + 1)) {
        const end = at + target.length;
        // A symbol must stand alone ("X²(" or "X² =", not inside a word).
        if (symbol && (/[\p{L}\p{N}]/u.test(line[at - 1] ?? '') || /[\p{L}]/u.test(line[end] ?? ''))) continue;
        if (column >= at && column <= end && (!best || end - at > best.end - best.start)) best = { explanation, start: at, end };
      }
    }
  }
  return best;
}
