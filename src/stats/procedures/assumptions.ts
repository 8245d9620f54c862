/**
 * Assumption and notice builders shared by the procedures, so the same rule is applied the same way in every
 * result that rests on the chi-square approximation (goodness of fit, r×c tables, post-hoc comparisons); the words
 * are written by report/words from the codes and numbers returned here. Also the shared checks of levels and counts.
 */
import { InputError, type ArgumentLocation } from '../../errors';
import type { FoundAssumption, FoundNotice } from '../result';

/**
 * What to use instead when the expected-count rule fails (`report/words` names it): an exact multinomial test or a
 * Monte Carlo p-value for goodness of fit, Fisher's exact test for a 2×2 table, an exact or Monte Carlo test for a
 * larger table, and for post-hoc comparisons an exact test of the whole table with the cell-wise z read with caution.
 */
export type SmallExpectedAlternative = 'multinomial-or-monte-carlo' | 'fisher' | 'exact-or-monte-carlo' | 'exact-overall';

/** How many cell or category labels a notice names before it says how many more there are. */
export const LABELS_NAMED = 8;

export interface ExpectedCountCheck {
  /** True when the rule fails: an expected count below 1, or more than 20% below 5 (common practice, often attributed to Cochran 1954). */
  readonly small: boolean;
  /** Labels of the cells or categories with an expected count below 5. */
  readonly belowFive: readonly string[];
  /** Labels of the cells or categories with an expected count below 1. */
  readonly belowOne: readonly string[];
  readonly smallest: number;
  readonly assumption: FoundAssumption;
  /** A warning naming the cells, present only when the rule fails. */
  readonly notice?: FoundNotice;
}

/**
 * Applies the expected-count rule.
 * @param expected expected counts, one per category or cell
 * @param labels a label for each, in the same order (e.g. "Blue", or "Night × Late")
 * @param what whether the counts are of categories or of cells
 * @param alternative what to use when the rule fails
 */
export function checkExpectedCounts(
  expected: readonly number[],
  labels: readonly string[],
  what: 'categories' | 'cells',
  alternative: SmallExpectedAlternative,
): ExpectedCountCheck {
  const belowFive: string[] = [];
  const belowOne: string[] = [];
  let smallest = Infinity;
  expected.forEach((e, i) => {
    if (e < 5) belowFive.push(labels[i]);
    if (e < 1) belowOne.push(labels[i]);
    smallest = Math.min(smallest, e);
  });
  const share = expected.length === 0 ? 0 : belowFive.length / expected.length;
  const small = belowOne.length > 0 || share > 0.2;
  const assumption: FoundAssumption = {
    id: 'expected-counts',
    status: small ? 'failed' : 'met',
    args: { smallest, share, what, ...(small ? { alternative } : {}) },
  };
  if (!small) return { small, belowFive, belowOne, smallest, assumption };
  const named = belowOne.length > 0 ? belowOne : belowFive;
  const args = { belowFive: belowFive.length, belowOne: belowOne.length, total: expected.length, share, what, named: named.slice(0, LABELS_NAMED), namedCount: named.length, alternative };
  return { small, belowFive, belowOne, smallest, assumption, notice: { code: 'small-expected', severity: 'warning', args } };
}

/** The unit whose independence a design must ensure (each counted once, none influencing another). */
export type IndependentUnit = 'counted unit' | 'observation' | 'value' | 'pair';

/** Independent observations: a design question the data cannot answer. */
export function independenceAssumption(unit: IndependentUnit): FoundAssumption {
  return { id: 'independence', status: 'unchecked', args: { unit } };
}

/** Refuses a significance level or confidence level outside (0, 1). */
export function requireLevel(value: number, name: 'alpha' | 'confidence'): number {
  if (!(typeof value === 'number' && value > 0 && value < 1)) {
    throw new InputError(`${name}: expected a number strictly between 0 and 1, found ${String(value)}`, { argument: { name } }, `invalid-${name}`);
  }
  return value;
}

/**
 * Refuses a count that is not a finite non-negative whole number.
 * @param where how the user finds it, e.g. "category `Blue`" or "row 2 (`Night`), column 3 (`Late`)"
 */
export function requireCount(value: number, where: string, argument: ArgumentLocation): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0 || !Number.isInteger(value)) {
    const found = typeof value === 'number' ? String(value) : JSON.stringify(value);
    throw new InputError(`${where}: expected a count (a whole number ≥ 0), found ${found}`, { argument }, 'invalid-count');
  }
  if (value > MAX_COUNT) throw new InputError(`${where}: found ${value}, above the largest exactly representable count (2^53 − 1)`, { argument }, 'count-too-large');
}

/**
 * The largest count (and total of counts) accepted anywhere: 2^53 − 1. Above it a double no longer holds every
 * whole number, so a count would be rounded and a loop stepping by one would never end.
 */
export const MAX_COUNT = Number.MAX_SAFE_INTEGER;

/** Refuses a total of counts above MAX_COUNT (each count being below it). */
export function requireCountTotal(total: number, what: string, argument: ArgumentLocation): void {
  if (total > MAX_COUNT) {
    throw new InputError(`${what}: the total count ${total} is above the largest exactly representable count (2^53 − 1); counts this large cannot be tested exactly`, { argument }, 'count-too-large');
  }
}
