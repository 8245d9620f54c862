/**
 * Assumption and notice builders shared by the procedures, so the same rule is worded and
 * applied the same way in every result that rests on the chi-square approximation (goodness of fit, r×c tables,
 * post-hoc comparisons).
 */
import { formatProbability } from './probabilityText';
import { InputError, type ArgumentLocation } from '../../errors';
import type { Assumption, Notice, Probability } from '../result';

/** The expected-count rule of thumb, common practice (often attributed to Cochran 1954). */
export const SMALL_EXPECTED_RULE = 'common practice: no expected count below 1, and at most 20% of them below 5';

export interface ExpectedCountCheck {
  /** True when the rule above fails. */
  readonly small: boolean;
  /** Labels of the cells or categories with an expected count below 5. */
  readonly belowFive: readonly string[];
  /** Labels of the cells or categories with an expected count below 1. */
  readonly belowOne: readonly string[];
  readonly smallest: number;
  readonly assumption: Assumption;
  /** A warning naming the cells, present only when the rule fails. */
  readonly notice?: Notice;
}

/**
 * Applies the expected-count rule.
 * @param expected expected counts, one per category or cell
 * @param labels a label for each, in the same order (e.g. "Blue", or "row Night × column Late")
 * @param what "categories" or "cells", for the wording
 * @param alternative what to use when the rule fails
 */
export function checkExpectedCounts(
  expected: readonly number[],
  labels: readonly string[],
  what: 'categories' | 'cells',
  alternative: string,
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
  const percent = `${(share * 100).toFixed(0)}%`;
  const counts = `The smallest expected count is ${formatCount(smallest)}; ${percent} of the ${what} are below 5 (${SMALL_EXPECTED_RULE}).`;
  const assumption: Assumption = {
    id: 'expected-counts',
    title: 'Expected counts large enough for the chi-square approximation',
    status: small ? 'failed' : 'met',
    explanation: small
      ? `${counts} With counts this small the chi-square distribution can describe the statistic poorly, so the p-value may be too small or too large.`
      : `${counts} The chi-square p-value should be a fair approximation.`,
    ...(small ? { alternative } : {}),
  };
  if (!small) return { small, belowFive, belowOne, smallest, assumption };
  const named = belowOne.length > 0 ? belowOne : belowFive;
  const message =
    `Small expected counts: ${belowFive.length} of ${expected.length} ${what} (${percent}) are below 5` +
    (belowOne.length > 0 ? `, and ${belowOne.length} below 1` : '') +
    ` (${belowOne.length > 0 ? 'below 1' : 'below 5'}: ${listLabels(named)}). ` +
    `The chi-square p-value may be inaccurate (${SMALL_EXPECTED_RULE}). Consider ${alternative}.`;
  return { small, belowFive, belowOne, smallest, assumption, notice: { code: 'small-expected', severity: 'warning', message } };
}

function listLabels(labels: readonly string[]): string {
  const shown = labels.slice(0, 8).join(', ');
  return labels.length > 8 ? `${shown} and ${labels.length - 8} more` : shown;
}

function formatCount(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(3);
}

/** Independent observations: a design question the data cannot answer. */
export function independenceAssumption(unit: string): Assumption {
  return {
    id: 'independence',
    title: 'Independent observations',
    status: 'unchecked',
    explanation:
      `Each ${unit} must be counted once and must not influence another (no repeated measurements of the same ` +
      'subject, no clusters treated as separate units). This comes from how the data were collected and cannot be ' +
      'checked from the numbers.',
  };
}

/** A p-value in words for conclusion sentences, written as every report writes it: "p = 0.008", "p ≈ 3.2 × 10^-437". */
export function describeP(p: Probability): string {
  return `${p.value >= 0.001 || (p.value === 0 && p.log10 === -Infinity) ? 'p =' : 'p ≈'} ${formatProbability(p)}`;
}

/**
 * A variable's name as conclusion sentences write it (`oven`, in backticks like every label quoted from
 * the data), or undefined when no name is known (blank counts as unknown).
 */
export function nameOf(name: string | undefined): string | undefined {
  const trimmed = typeof name === 'string' ? name.trim() : '';
  return trimmed === '' ? undefined : `\`${trimmed.replace(/`/g, "'")}\``;
}

/** The first letter in upper case, for a phrase that starts a sentence. */
export function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** "at the 5% level" for α = 0.05. */
export function describeAlpha(alpha: number): string {
  return `at the ${Number((alpha * 100).toPrecision(6))}% level`;
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

/** A number for sentences and notes: four significant digits, no trailing zeros. */
export function formatNumber(x: number): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(4))) : String(x);
}
