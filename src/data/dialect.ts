/**
 * Dialect detection from the first lines of a text: the delimiter that splits every line into the
 * same number of fields, whether the first record is a header, and whether numbers use a decimal comma.
 */
import { looksNumeric } from './numbers';
import type { DecimalMark, Delimiter, Dialect, DialectOptions } from './options';

const CANDIDATES: readonly Delimiter[] = [',', ';', '\t', '|'];
const SAMPLE_LINES = 50;

/** Splits one line on a delimiter outside double quotes (enough for detection; parsing proper is csv-parse's job). */
export function splitOutsideQuotes(line: string, delimiter: string): string[] {
  const fields: string[] = [];
  let current = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '"') {
      if (quoted && line[i + 1] === '"') {
        current += '"';
        i++;
      } else quoted = !quoted;
    } else if (ch === delimiter && !quoted) {
      fields.push(current);
      current = '';
    } else current += ch;
  }
  fields.push(current);
  return fields;
}

function sampleLines(sample: string, comment: string | null, partial: boolean): string[] {
  const text = sample.charCodeAt(0) === 0xfeff ? sample.slice(1) : sample;
  const lines = text.split(/\r\n|\n|\r/);
  // The last line of a partial sample may be cut in the middle.
  if (partial && lines.length > 1) lines.pop();
  return lines.filter((l) => l.trim() !== '' && !(comment && l.startsWith(comment))).slice(0, SAMPLE_LINES);
}

function detectDelimiter(lines: readonly string[]): Delimiter {
  let best: Delimiter = ',';
  let bestScore = 0;
  for (const d of CANDIDATES) {
    const counts = lines.map((l) => splitOutsideQuotes(l, d).length - 1);
    if (counts.length === 0 || counts[0] === 0) continue;
    const agreeing = counts.filter((c) => c === counts[0]).length / counts.length;
    // Consistency first, then the number of fields it makes.
    const score = agreeing * 1000 + Math.min(counts[0], 999);
    if (score > bestScore) {
      bestScore = score;
      best = d;
    }
  }
  return best;
}

function detectDecimal(rows: readonly string[][], delimiter: Delimiter): DecimalMark {
  if (delimiter === ',') return '.';
  let commaNumbers = 0;
  let dotNumbers = 0;
  for (const row of rows)
    for (const f of row) {
      const t = f.trim();
      if (/^[+-]?\d+,\d+$/.test(t)) commaNumbers++;
      else if (/^[+-]?\d*\.\d+$/.test(t)) dotNumbers++;
    }
  return commaNumbers > dotNumbers ? ',' : '.';
}

/** Whether the first of these rows looks like a header (no number in it, and numbers or new labels below). */
export function detectHeader(rows: readonly string[][], decimal: DecimalMark): boolean {
  if (rows.length === 0) return true;
  const first = rows[0].map((f) => f.trim());
  if (first.some((f) => f !== '' && looksNumeric(f, decimal))) return false;
  if (new Set(first).size < first.length) return false;
  if (rows.length === 1) return true;
  // A header is likely when some column is numeric below the first row, or when the
  // first row's labels never reappear in their column.
  for (let j = 0; j < first.length; j++) {
    const below = rows.slice(1).map((r) => (r[j] ?? '').trim());
    if (below.some((f) => f !== '' && looksNumeric(f, decimal))) return true;
    if (below.includes(first[j])) return false;
  }
  return true;
}

/**
 * Detects what is not given in `given`; what is given is kept as is. `partial`: the sample is the
 * beginning of a longer text, so its last line may be incomplete.
 */
export function detectDialect(sample: string, given: DialectOptions = {}, partial = false): Dialect {
  const comment = given.comment === undefined ? '#' : given.comment;
  const lines = sampleLines(sample, comment, partial);
  const delimiter = given.delimiter && given.delimiter !== 'auto' ? given.delimiter : detectDelimiter(lines);
  const rows = lines.map((l) => splitOutsideQuotes(l, delimiter));
  const decimal = given.decimal ?? detectDecimal(rows.slice(1), delimiter);
  const header = given.header === undefined || given.header === 'auto' ? detectHeader(rows, decimal) : given.header;
  return { delimiter, decimal, header, comment };
}
