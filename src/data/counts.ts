/** The one rule for a count or a frequency weight: a non-negative whole number that a double holds exactly. */
import { fail, shown, type Where } from './where';

export function wholeCount(value: number, text: string, where: Where, what = 'a count'): number {
  if (!Number.isFinite(value) || value < 0) fail(where, `expected ${what} (a non-negative whole number), found ${shown(text.trim())}`, 'bad-count');
  if (!Number.isInteger(value))
    fail(where, `expected a whole number, found ${shown(text.trim())}; count tests need frequency weights (how many times each record occurred)`, 'non-integer-weight');
  if (value > Number.MAX_SAFE_INTEGER) fail(where, `found ${shown(text.trim())}, above the largest exactly representable count (2^53 − 1)`, 'count-too-large');
  return value;
}
