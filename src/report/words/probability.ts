/**
 * Probabilities, levels, names and numbers as sentences write them, so every output (conclusions, notices,
 * tables) writes a p-value the same way.
 */
import type { Probability } from '../../stats/result';

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

/** A p-value in words for sentences: "p = 0.008", "p ≈ 3.2 × 10^-437". */
export function describeP(p: Probability): string {
  return `${p.value >= 0.001 || (p.value === 0 && p.log10 === -Infinity) ? 'p =' : 'p ≈'} ${formatProbability(p)}`;
}

/**
 * A variable's name as sentences write it (`oven`, in backticks like every label quoted from the data), or
 * undefined when no name is known (blank counts as unknown).
 */
export function nameOf(name: string | undefined): string | undefined {
  const trimmed = typeof name === 'string' ? name.trim() : '';
  return trimmed === '' ? undefined : quoted(trimmed);
}

/** A label from the data in backticks (a backtick inside becomes a quote, so the markdown stays intact). */
export function quoted(label: string): string {
  return `\`${label.replace(/`/g, "'")}\``;
}

/** The first letter in upper case, for a phrase that starts a sentence. */
export function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** The percentage of a significance level, as "5" for α = 0.05. */
export function percentOf(level: number): string {
  return String(Number((level * 100).toPrecision(6)));
}

/** A number for sentences and notes: four significant digits, no trailing zeros. */
export function sentenceNumber(x: number): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(4))) : String(x);
}
