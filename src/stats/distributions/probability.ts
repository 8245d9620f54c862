/**
 * Building {value, log10} probabilities (see result.ts): `value` underflows to 0 below about 1e-308,
 * `log10` does not, so a p-value of 1e-437 is still reported as a power of ten.
 */
import type { Probability } from '../result';

const LOG10_E = Math.LOG10E;
const LOG10_2 = Math.log10(2);

/** From a natural log of a probability (lnP ≤ 0). NaN → NaN in both fields; lnP > 0 is capped at 1. */
export function probabilityFromLog(lnP: number): Probability {
  if (Number.isNaN(lnP)) return { value: NaN, log10: NaN };
  const ln = Math.min(lnP, 0);
  return { value: Math.exp(ln), log10: ln * LOG10_E };
}

/** From a probability value in [0, 1]; 0 gives log10 = −Infinity. Values outside [0, 1] or NaN → NaN. */
export function probabilityFromValue(p: number): Probability {
  if (!(p >= 0 && p <= 1)) return { value: NaN, log10: NaN };
  return { value: p, log10: Math.log10(p) };
}

/**
 * From a probability computed directly as a value and, separately, as a natural log: keeps the value's
 * full precision where it is representable and the log where it underflows.
 */
export function probabilityFromBoth(value: number, lnP: number): Probability {
  if (Number.isNaN(value) || Number.isNaN(lnP)) return { value: NaN, log10: NaN };
  return { value, log10: Math.min(lnP, 0) * LOG10_E };
}

/** Two-sided p-value from the two one-sided tails: 2 · min(lower, upper), capped at 1. */
export function twoSidedFromTails(lowerP: Probability, upperP: Probability): Probability {
  if (Number.isNaN(lowerP.log10) || Number.isNaN(upperP.log10)) return { value: NaN, log10: NaN };
  const smaller = lowerP.log10 <= upperP.log10 ? lowerP : upperP;
  if (smaller.log10 + LOG10_2 >= 0) return { value: 1, log10: 0 };
  return { value: Math.min(1, 2 * smaller.value), log10: smaller.log10 + LOG10_2 };
}

/** Natural log of (1 − e^lnP) without cancellation (Mächler 2012, "Accurately computing log(1 − exp(−|a|))"). */
export function log1mExp(lnP: number): number {
  return lnP > -Math.LN2 ? Math.log(-Math.expm1(lnP)) : Math.log1p(-Math.exp(lnP));
}
