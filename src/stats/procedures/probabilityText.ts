/**
 * Probabilities written for people. Lives in `stats/` because conclusion sentences are built here;
 * `report/` re-exports it so every output writes a p-value the same way.
 */
import type { Probability } from '../result';

const TIMES = ' × 10^';

/**
 * The positive number whose base-10 logarithm is `log10`, as "m × 10^e" with `significant` digits in m.
 * Works for any finite logarithm (10^-3274.3 prints as "5.0 × 10^-3275").
 */
export function scientificFromLog10(log10: number, significant = 2): string {
  if (!Number.isFinite(log10)) return log10 > 0 ? '∞' : '0';
  let exponent = Math.floor(log10);
  let mantissa = 10 ** (log10 - exponent);
  let digits = mantissa.toFixed(Math.max(0, significant - 1));
  if (Number(digits) >= 10) {
    exponent += 1;
    mantissa /= 10;
    digits = mantissa.toFixed(Math.max(0, significant - 1));
  }
  return `${digits}${TIMES}${exponent}`;
}

/** A probability in decimal form for p ≥ 0.001, otherwise as a power of ten ("0.925", "3.2 × 10^-437"). */
export function formatProbability(p: Probability, significant = 2): string {
  if (p.value >= 0.001) return p.value >= 0.9995 && p.value < 1 ? p.value.toFixed(4) : p.value.toFixed(3);
  if (p.value === 0 && p.log10 === -Infinity) return '0';
  return scientificFromLog10(Number.isFinite(p.log10) ? p.log10 : Math.log10(p.value), significant);
}
