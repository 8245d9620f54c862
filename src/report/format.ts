/**
 * Number formatting shared by every report (text, markdown, panel): a `decimals` setting for statistics,
 * APA-style p-values (no leading zero, "p < .001"), and powers of ten for probabilities far below the
 * double range, computed from their base-10 logarithm. Pure.
 */
import type { Probability } from '../stats/result';
import { formatProbability, scientificFromLog10 } from './words/probability';

export { formatProbability, scientificFromLog10 };

export interface FormatOptions {
  /** Decimals for statistics, counts that are not whole, and intervals. Default 2. */
  readonly decimals: number;
}

export const DEFAULT_FORMAT: FormatOptions = { decimals: 2 };

function groupThousands(integerDigits: string): string {
  return integerDigits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * A number with a fixed number of decimals, thousands separated; values too small to show in that many
 * decimals switch to scientific notation ("3.2 × 10^-5") rather than printing 0.00.
 */
export function formatNumber(x: number, decimals = DEFAULT_FORMAT.decimals): string {
  if (Number.isNaN(x)) return 'NaN';
  if (x === Infinity) return '∞';
  if (x === -Infinity) return '-∞';
  if (x === 0) return (0).toFixed(decimals);
  const magnitude = Math.abs(x);
  if (magnitude < 0.5 * 10 ** -decimals || magnitude >= 1e15) return formatScientific(x, Math.max(2, decimals));
  const fixed = magnitude.toFixed(decimals);
  const [whole, fraction] = fixed.split('.');
  return `${x < 0 ? '-' : ''}${groupThousands(whole)}${fraction !== undefined ? '.' + fraction : ''}`;
}

/** "+8.00", "−3.10", "0.00": signed with a true minus sign, the decimals setting; "–" when not a number. */
export function signedNumber(x: number, decimals = DEFAULT_FORMAT.decimals): string {
  if (!Number.isFinite(x)) return '–';
  const text = formatNumber(Math.abs(x), decimals);
  return x > 0 ? `+${text}` : x < 0 ? `−${text}` : text;
}

/** A count: whole numbers with thousands separators, anything else with decimals. */
export function formatCount(x: number, decimals = DEFAULT_FORMAT.decimals): string {
  return Number.isInteger(x) ? `${x < 0 ? '-' : ''}${groupThousands(String(Math.abs(x)))}` : formatNumber(x, decimals);
}

/**
 * Degrees of freedom: whole numbers as they are (no thousands separator), fractional ones from 1 upward with up to the given decimals
 * ("2.5", "3.14"), and fractional ones below 1 with `decimals + 1` significant digits ("0.0153",
 * "1.00 × 10^-10"), so a tiny df is never written as 0.
 */
export function formatDf(df: number, decimals = DEFAULT_FORMAT.decimals): string {
  // Never grouped: "χ²(1767, N = 1,768)" reads as one df, where "1,767" would read as two arguments.
  if (Number.isInteger(df)) return String(df);
  if (!Number.isFinite(df)) return formatNumber(df);
  const magnitude = Math.abs(df);
  if (magnitude >= 1) return String(Number(df.toFixed(decimals)));
  if (magnitude < 1e-4) return formatScientific(df, decimals + 1);
  return String(Number(df.toPrecision(decimals + 1)));
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '+': '⁺', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/**
 * "5.1 × 10⁻⁵" from "5.1 × 10^-5": exponents as superscripts for the panel. Plain text and markdown keep
 * the caret form, which every terminal, spreadsheet and markdown renderer shows alike.
 */
export function superscriptExponents(text: string): string {
  return text.replace(/10\^([+-]?\d+)/g, (_whole, exponent: string) => `10${[...exponent].map((c) => SUPERSCRIPT[c]).join('')}`);
}

/** "3.2 × 10^-5" with `significant` significant digits. */
export function formatScientific(x: number, significant = 2): string {
  if (x === 0 || !Number.isFinite(x)) return formatNumber(x);
  return `${x < 0 ? '-' : ''}${scientificFromLog10(Math.log10(Math.abs(x)), significant)}`;
}

/** APA style: "p = .925", "p = .049", "p < .001" (three decimals, no leading zero). */
export function formatPApa(p: Probability): string {
  if (p.value < 0.001) return 'p < .001';
  if (p.value > 0.999) return 'p > .999';
  return `p = ${withoutLeadingZero(p.value.toFixed(3))}`;
}

/** ".925" for statistics that cannot exceed 1 (APA style). */
export function withoutLeadingZero(text: string): string {
  return text.replace(/^(-?)0\./, '$1.');
}

/** The exact statement for a small p-value: "p ≈ 3.2 × 10^-437"; undefined when APA style says it all. */
export function formatPExact(p: Probability, significant = 2): string | undefined {
  if (p.value >= 0.001) return undefined;
  return `p ≈ ${formatProbability(p, significant)}`;
}

/** The symbol shown in an APA line: Pearson's X² is written χ² as usual; others stay as given. */
export function apaSymbol(symbol: string): string {
  return symbol === 'X²' ? 'χ²' : symbol;
}

/**
 * "χ²(3, N = 556) = 0.47, p = .925" — the statistic with df and N, and the APA p-value.
 * `df` null (a statistic without degrees of freedom, such as z) leaves the parentheses out: "z = 4.07, p < .001".
 * `pName` names a p-value that is not the chi-square approximation's: "χ²(4, N = 39) = 11.90, exact p = .026".
 */
export function formatApaLine(symbol: string, statistic: number, df: number | null, n: number | null, p: Probability, format: FormatOptions = DEFAULT_FORMAT, pName = 'p'): string {
  const inside = df === null ? [] : [formatDf(df, format.decimals), ...(n !== null ? [`N = ${formatCount(n, format.decimals)}`] : [])];
  const head = inside.length > 0 ? `${apaSymbol(symbol)}(${inside.join(', ')})` : apaSymbol(symbol);
  // A count used as the statistic (McNemar's b, the exact conditional test's Σa) is written as a count.
  const isCount = Number.isInteger(statistic) && /^(b|c|Σa)$/.test(symbol);
  const stat = Number.isNaN(statistic) ? '' : ` = ${isCount ? formatCount(statistic) : formatNumber(statistic, format.decimals)}`;
  return `${head}${stat}, ${formatPApa(p).replace(/^p/, pName)}`;
}

/** "95%" from 0.95; "99.9%" from 0.999. */
export function formatPercent(level: number): string {
  return `${Number((level * 100).toFixed(4))}%`;
}

/**
 * An estimate, effect size or interval end: `decimals` places from 1 upward, and `decimals + 1`
 * significant digits below 1 (so σ² = 0.0153 is not shown as 0.02).
 */
export function formatEstimate(x: number, format: FormatOptions = DEFAULT_FORMAT): string {
  if (x === 0) return '0';
  if (!Number.isFinite(x) || Math.abs(x) >= 1) return formatNumber(x, format.decimals);
  if (Math.abs(x) < 1e-4) return formatScientific(x, format.decimals + 1);
  return x.toPrecision(format.decimals + 1);
}

/**
 * A positive quantity that may underflow (a density, a critical value): as an estimate, except that a value
 * that underflowed to 0 while its base-10 logarithm is known is written as that power of ten
 * ("5.0 × 10^-437"); a value that is truly 0 (no finite logarithm) prints 0.
 */
export function formatEstimateWithLog(x: number, log10: number | undefined, format: FormatOptions = DEFAULT_FORMAT): string {
  if (x === 0 && log10 !== undefined && Number.isFinite(log10)) return scientificFromLog10(log10, format.decimals + 1);
  return formatEstimate(x, format);
}

/** An interval with its ends formatted as estimates: "[0.00885, 0.0326]", "[0, 0.0287]", "[1.44, ∞)". */
export function formatEstimateInterval(lower: number, upper: number, format: FormatOptions = DEFAULT_FORMAT, logs: { readonly lowerLog10?: number; readonly upperLog10?: number } = {}): string {
  const close = upper === Infinity ? ')' : ']';
  const open = lower === -Infinity ? '(' : '[';
  return `${open}${formatEstimateWithLog(lower, logs.lowerLog10, format)}, ${formatEstimateWithLog(upper, logs.upperLog10, format)}${close}`;
}
