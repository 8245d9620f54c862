/**
 * The shapes of results. Types only: no behaviour lives here.
 *
 * Two families: what `stats/` returns (`Computed…`, `Found…`: numbers, tables, and `Phrase`s — codes with their
 * arguments, no sentences), and the published shape (`TestResult`, `Notice`, …) that `report/words` writes from it,
 * with the words filled in. The published shape is what the command line prints as JSON, a saved test records and
 * the webview receives; every field is plain data so it serialises unchanged.
 */
import type { BayesFactor } from './procedures/bayes-factor';
import type { Fragility } from './procedures/fragility';

export type Alternative = 'two-sided' | 'greater' | 'less';

/**
 * A probability that may be far below the double range.
 * `value` is the probability as a double (it underflows to 0 below about 1e-308);
 * `log10` is its base-10 logarithm, always finite for a probability > 0 in exact arithmetic
 * (for example -437.2 for the upper tail at x = 2000, df = 1).
 */
export interface Probability {
  readonly value: number;
  readonly log10: number;
}

/** A confidence interval or a one-sided bound (one side infinite). */
export interface Interval {
  readonly lower: number;
  readonly upper: number;
  /** Confidence level, e.g. 0.95. */
  readonly level: number;
  /** What the interval is for, e.g. "σ²", "σ", "odds ratio". */
  readonly parameter: string;
  /** The method, e.g. "equal-tail chi-square", "Bonett (2006)", "Woolf (log)". */
  readonly method: string;
}

/** A named estimate: an effect size, an odds ratio, a sample variance, … */
export interface Estimate {
  /** Stable identifier for machine output, e.g. "cramersV", "oddsRatio". */
  readonly id: string;
  /** Label for people, e.g. "Cramér's V". */
  readonly name: string;
  readonly value: number;
  readonly interval?: Interval;
  readonly note?: string;
}

export type NoticeSeverity = 'info' | 'warning';

/** Something the reader must know: a rescaling done, a small expected count, a dropped row. */
export interface Notice {
  /** Stable identifier, e.g. "small-expected", "rescaled-expected", "dropped-empty-row". */
  readonly code: string;
  readonly severity: NoticeSeverity;
  readonly message: string;
}

export type AssumptionStatus = 'met' | 'failed' | 'unchecked';

export interface Assumption {
  /** Stable identifier, e.g. "independence", "expected-counts", "normality", "sampling-design". */
  readonly id: string;
  readonly title: string;
  readonly status: AssumptionStatus;
  /** Two or three sentences a practitioner can read. */
  readonly explanation: string;
  /** What to use instead when it fails, e.g. "Fisher's exact test", "Bonett's interval". */
  readonly alternative?: string;
}

/** An additional statistic computed on the same data (G², Yates-corrected X², Fisher's exact, Monte Carlo…). */
export interface StatisticLine {
  readonly id: string;
  readonly name: string;
  /** Symbol shown in reports, e.g. "X²", "G²", "χ²", "z". */
  readonly symbol: string;
  /** NaN where the method has no statistic (Fisher's exact test). */
  readonly statistic: number;
  readonly df: number | null;
  readonly pValue: Probability;
  readonly note?: string;
  /** Monte Carlo standard error of the p-value, where it applies. */
  readonly standardError?: number;
}

/** One category of a goodness-of-fit test. */
export interface CategoryRow {
  readonly label: string;
  readonly observed: number;
  readonly expected: number;
  readonly pearsonResidual: number;
  readonly standardizedResidual: number;
  readonly contribution: number;
}

/** An r×c table with everything computed per cell. */
export interface CellGrid {
  readonly rowLabels: readonly string[];
  readonly columnLabels: readonly string[];
  readonly observed: readonly (readonly number[])[];
  readonly expected: readonly (readonly number[])[];
  readonly pearsonResiduals: readonly (readonly number[])[];
  readonly adjustedResiduals: readonly (readonly number[])[];
  readonly contributions: readonly (readonly number[])[];
  readonly rowTotals: readonly number[];
  readonly columnTotals: readonly number[];
  readonly total: number;
}

/** The reference distribution of the main statistic, for plots and critical values. */
export type ReferenceDistribution =
  | { readonly kind: 'chi-square'; readonly df: number }
  | { readonly kind: 'normal' }
  | { readonly kind: 'none' };

/** Result of a hypothesis test. */
export interface TestResult {
  readonly kind: 'test';
  /** The spec's test name: "variance", "goodness-of-fit", "independence", "paired", "stratified", "trend", … */
  readonly test: string;
  /** Human title, e.g. "Pearson chi-square test of independence". */
  readonly procedure: string;
  readonly statisticSymbol: string;
  readonly statistic: number;
  readonly df: number | null;
  /** Sample size (total count, or number of values). */
  readonly n: number | null;
  readonly pValue: Probability;
  readonly alternative: Alternative | null;
  readonly reference: ReferenceDistribution;
  readonly alpha: number;
  /** pValue < alpha. */
  readonly significant: boolean;
  /** One sentence in plain words. */
  readonly conclusion: string;
  readonly otherStatistics: readonly StatisticLine[];
  readonly effectSizes: readonly Estimate[];
  readonly estimates: readonly Estimate[];
  /** The main interval (for the variance test: σ² at the chosen confidence). */
  readonly confidenceInterval?: Interval;
  readonly categories?: readonly CategoryRow[];
  readonly grid?: CellGrid;
  readonly notices: readonly Notice[];
  readonly assumptions: readonly Assumption[];
  /** Procedure-specific extras for machine output (named fields, plain JSON). */
  readonly details?: Readonly<Record<string, unknown>>;
  /** How many single-observation changes flip the conclusion (count-based tests; src/stats/procedures/fragility.ts). */
  readonly fragility?: Fragility & { readonly basis: FragilityBasis };
  /** Bayes factor beside the p-value (src/stats/procedures/bayes-factor.ts). */
  readonly bayesFactor?: BayesFactor;
  /** Equivalence test asked for in the spec (src/stats/procedures/equivalence.ts). */
  readonly equivalence?: EquivalenceSection;
  /** Set when the test is read as one of a family (a report or a folder of saved tests). */
  readonly family?: { readonly size: number; readonly method: string; readonly adjustedPValue: number };
}

/**
 * The p-value the fragility search recomputed: the reported test itself ("reported"), Fisher's exact, Pearson's
 * X² with or without Yates' correction, or the chi-square approximation of the reported statistic when the
 * reported p-value is exact or resampled ("asymptotic"), or, for post-hoc comparisons, the smallest adjusted p-value of
 * the family: the conclusion that at least one comparison is significant after the adjustment ("post-hoc-family").
 */
export type FragilityBasis = 'reported' | 'fisher' | 'pearson' | 'yates' | 'asymptotic' | 'post-hoc-family';

export interface EquivalenceSection {
  readonly pValue: number;
  readonly pValueLog10: number;
  readonly equivalent: boolean;
  readonly lower?: number;
  readonly upper?: number;
  readonly margin?: number;
  readonly interval: { readonly lower: number; readonly upper: number; readonly level: number };
  /** "equivalence" (two-sided band), "non-inferiority" (σ ≤ σmax), or "goodness-of-fit" (Wellek). */
  readonly form: 'equivalence' | 'non-inferiority' | 'goodness-of-fit';
  /** Goodness of fit: the observed Euclidean distance. */
  readonly distance?: number;
}

/** Result of a distribution query. */
export interface DistributionResult {
  readonly kind: 'distribution';
  readonly test: 'distribution';
  readonly df: number;
  readonly noncentrality: number;
  /**
   * For each x asked: lower and upper tail probabilities and density. `densityLog10` is present only when
   * the density underflowed to 0 although it is positive (then it gives the power of ten).
   */
  readonly points: readonly { readonly x: number; readonly lower: Probability; readonly upper: Probability; readonly density: number; readonly densityLog10?: number }[];
  /**
   * For each p asked: critical values. `lower` has P(X ≤ c) = p, `upper` has P(X > c) = p, two-sided splits p in halves.
   * `lowerLog10` / `upperLog10` are present only when that value underflowed to 0 although it is positive.
   */
  readonly critical: readonly {
    readonly p: number;
    readonly lower: number;
    readonly upper: number;
    readonly lowerLog10?: number;
    readonly upperLog10?: number;
    readonly twoSided: { readonly lower: number; readonly upper: number; readonly lowerLog10?: number; readonly upperLog10?: number };
  }[];
  readonly notices: readonly Notice[];
}

/** Result of a power or sample-size question. */
export interface PowerResult {
  readonly kind: 'power';
  readonly test: 'power';
  /** Which test the power is for: "goodness-of-fit", "independence", "variance". */
  readonly target: string;
  readonly effectSize: { readonly id: string; readonly name: string; readonly value: number };
  readonly df: number;
  readonly alpha: number;
  readonly n: number;
  readonly power: number;
  /** Whether n was solved for (given power) or power computed (given n). */
  readonly solvedFor: 'n' | 'power';
  readonly curve: readonly { readonly n: number; readonly power: number }[];
  readonly notices: readonly Notice[];
  readonly details?: Readonly<Record<string, unknown>>;
}

export type Result = TestResult | DistributionResult | PowerResult;

/**
 * Words for readers, left to `report/words`: a code naming the sentence or label, and the values it needs.
 * Numbers stay numbers here (report/ formats them); names from the data stay as given.
 */
export interface Phrase {
  readonly code: string;
  readonly args?: PhraseArgs;
}

/** An argument: a number, a name from the data, a probability, a list, or a phrase inside the phrase. */
export type PhraseValue = string | number | boolean | Probability | Phrase | readonly string[] | readonly number[];
export type PhraseArgs = Readonly<Record<string, PhraseValue | undefined>>;

/**
 * A reader-facing text of a computed result: a `Phrase`, or a sentence already written outside `stats/` (the
 * saved-test layer and the data readers still write some of theirs).
 */
export type Words = Phrase | string;

/** A notice as `stats/` reports it: its code and arguments; `report/words` writes the message. */
export interface FoundNotice {
  readonly code: string;
  readonly severity: NoticeSeverity;
  readonly args?: PhraseArgs;
}

/** An assumption as `stats/` reports it: which one, its status and the numbers behind it. */
export interface FoundAssumption {
  readonly id: string;
  readonly status: AssumptionStatus;
  readonly args?: PhraseArgs;
}

export interface FoundInterval extends Omit<Interval, 'parameter' | 'method'> {
  readonly parameter: Words;
  readonly method: Words;
}

export interface FoundEstimate extends Omit<Estimate, 'name' | 'note' | 'interval'> {
  readonly name: Words;
  readonly interval?: FoundInterval;
  readonly note?: Words;
}

export interface FoundStatisticLine extends Omit<StatisticLine, 'name' | 'note'> {
  readonly name: Words;
  readonly note?: Words;
}

/** A test's result as `stats/` computes it; `report/words` turns it into a `TestResult` (same fields, same order). */
export interface ComputedTestResult
  extends Omit<TestResult, 'procedure' | 'conclusion' | 'otherStatistics' | 'effectSizes' | 'estimates' | 'confidenceInterval' | 'notices' | 'assumptions'> {
  readonly procedure: Phrase;
  readonly conclusion: Phrase;
  readonly otherStatistics: readonly FoundStatisticLine[];
  readonly effectSizes: readonly FoundEstimate[];
  readonly estimates: readonly FoundEstimate[];
  readonly confidenceInterval?: FoundInterval;
  readonly notices: readonly (FoundNotice | Notice)[];
  readonly assumptions: readonly (FoundAssumption | Assumption)[];
}

export interface ComputedDistributionResult extends Omit<DistributionResult, 'notices'> {
  readonly notices: readonly (FoundNotice | Notice)[];
}

export interface ComputedPowerResult extends Omit<PowerResult, 'notices' | 'effectSize'> {
  readonly effectSize: { readonly id: string; readonly name: Words; readonly value: number };
  readonly notices: readonly (FoundNotice | Notice)[];
}

export type ComputedResult = ComputedTestResult | ComputedDistributionResult | ComputedPowerResult;
