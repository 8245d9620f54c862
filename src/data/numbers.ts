/**
 * Strict number reading for data fields. `Number()` alone is too lenient for data (it reads "" as 0,
 * "0x1f" as 31 and " 12 " as 12), so a field must match the decimal grammar first.
 */
import type { DecimalMark } from './options';

const plainNumber = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const groupedWithComma = /^[+-]?\d{1,3}(?:,\d{3})+(?:\.\d+)?$/;
const groupedWithDot = /^[+-]?\d{1,3}(?:\.\d{3})+(?:,\d+)?$/;
const groupedWithSpace = /^[+-]?\d{1,3}(?:[ \u00a0\u202f]\d{3})+(?:[.,]\d+)?$/;

/**
 * A decimal number written with the given decimal mark, or NaN. Digit grouping (1,234.5 or
 * 1.234,5 or 1 234) is accepted only where it cannot be confused with the decimal mark.
 */
export function parseDecimal(text: string, decimal: DecimalMark = '.'): number {
  const x = readDecimal(text.trim(), decimal);
  // 1e400 is a well-formed number that a double cannot hold.
  return Number.isFinite(x) ? x : NaN;
}

function readDecimal(t: string, decimal: DecimalMark): number {
  if (decimal === '.') {
    if (plainNumber.test(t)) return Number(t);
    if (groupedWithComma.test(t)) return Number(t.replace(/,/g, ''));
  } else {
    if (t.includes('.')) return groupedWithDot.test(t) ? Number(t.replace(/\./g, '').replace(',', '.')) : NaN;
    const dotted = t.replace(',', '.');
    if (plainNumber.test(dotted)) return Number(dotted);
  }
  if (groupedWithSpace.test(t)) {
    const ungrouped = t.replace(/[ \u00a0\u202f]/g, '');
    return decimal === ',' ? Number(ungrouped.replace(',', '.')) : ungrouped.includes(',') ? NaN : Number(ungrouped);
  }
  return NaN;
}

/** True when a field is a number in either notation (used by header and shape detection). */
export function looksNumeric(text: string, decimal: DecimalMark = '.'): boolean {
  return !Number.isNaN(parseDecimal(text, decimal));
}

/** A measurement cell: a decimal number, optionally followed by a percent sign (the number is kept as written: "12.5 %" is 12.5). */
export function parseMeasurement(text: string, decimal: DecimalMark = '.'): number {
  const t = text.trim();
  return parseDecimal(t.endsWith('%') ? t.slice(0, -1) : t, decimal);
}
