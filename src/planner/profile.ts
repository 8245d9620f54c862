/**
 * Shape inference on the first records of a table: which columns hold numbers (with signs, digit grouping,
 * either decimal mark, or a percent sign), which hold whole counts, which hold categories, and whether the
 * table is already counted (a counted r×c table, category counts, or long counts with a weight column).
 * Pure: records in, profiles and a shape with its reason out.
 */
import { parseMeasurement } from '../data/numbers';
import type { DecimalMark } from '../data/options';
import type { Records } from '../data/records';
import { listOf, text, type Text } from './questions';


/** Cells of an otherwise numeric column that are not numbers. */
export interface StrayCells {
  readonly count: number;
  /** 1-based line (or record position) of the first one, and its text. */
  readonly firstLine: number;
  readonly firstText: string;
}

export interface ColumnProfile {
  readonly name: string;
  /** Every present cell is a number. */
  readonly numeric: boolean;
  /** Every present cell is a whole number ≥ 0 (a count or a frequency weight). */
  readonly counts: boolean;
  /** The decimal mark the column's numbers are written with. */
  readonly decimal: DecimalMark;
  /** Some cells end in a percent sign. */
  readonly percent: boolean;
  /** Sum of the column when it holds counts. */
  readonly total: number;
  /** Level counts among the rows looked at, most frequent first. */
  readonly levels: readonly { readonly label: string; readonly count: number }[];
  readonly firstValues: readonly string[];
  /** Present (non-missing) cells. */
  readonly present: number;
  /** Set when most cells are numbers but a few are not: the column is offered, with these named. */
  readonly stray?: StrayCells;
  /**
   * Set when the column numbers the rows: at least 10 whole numbers, all different, forming one unbroken run
   * (1, 2, 3, … or 20001, 20002, …). Its spread and distribution describe the numbering, not a measurement.
   */
  readonly rowNumber?: { readonly from: number; readonly to: number };
}

/** Fewer rows than this never count as a row numbering (a short run of whole numbers may be a real measurement). */
const ROW_NUMBER_MIN = 10;

/** The run `from … to` when the numbers are whole, all different, and fill the run with no gap; else undefined. */
export function rowNumbering(values: readonly number[]): { from: number; to: number } | undefined {
  if (values.length < ROW_NUMBER_MIN || !values.every((x) => Number.isInteger(x))) return undefined;
  let from = Infinity;
  let to = -Infinity;
  for (const x of values) {
    if (x < from) from = x;
    if (x > to) to = x;
  }
  if (to - from + 1 !== values.length || new Set(values).size !== values.length) return undefined;
  return { from, to };
}

/** A column counts as "numeric except a few cells" when at most this share of its cells are not numbers. */
const STRAY_SHARE = 0.2;

function numbersIn(values: readonly { text: string; line: number }[], decimal: DecimalMark): { parsed: number[]; bad: { text: string; line: number }[] } {
  const parsed: number[] = [];
  const bad: { text: string; line: number }[] = [];
  for (const v of values) {
    const x = parseMeasurement(v.text, decimal);
    if (Number.isNaN(x)) bad.push(v);
    else parsed.push(x);
  }
  return { parsed, bad };
}

export function profileColumns(records: Records, missing: readonly string[]): ColumnProfile[] {
  const missingSet = new Set(missing);
  const preferred: DecimalMark = records.dialect?.decimal ?? '.';
  return records.columns.map((name, j) => {
    const cells = records.rows
      .map((r, i) => ({ text: (r[j] ?? '').trim(), line: records.lines[i] ?? i + 1 }))
      .filter((c) => !missingSet.has(c.text));
    const texts = cells.map((c) => c.text);
    // The column's decimal mark: the dialect's, unless every cell reads only with the other one ("2,5" "3,75").
    let decimal = preferred;
    let read = numbersIn(cells, decimal);
    const other: DecimalMark = preferred === '.' ? ',' : '.';
    if (read.bad.length > 0) {
      const alternative = numbersIn(cells, other);
      if (alternative.bad.length < read.bad.length) {
        decimal = other;
        read = alternative;
      }
    }
    const numeric = cells.length > 0 && read.bad.length === 0;
    const counts = numeric && read.parsed.every((x) => Number.isInteger(x) && x >= 0) && !texts.some((t) => t.endsWith('%'));
    const strayOk = !numeric && read.parsed.length >= 3 && read.bad.length <= STRAY_SHARE * cells.length;
    const tally = new Map<string, number>();
    for (const v of texts) tally.set(v, (tally.get(v) ?? 0) + 1);
    // In the order first seen, as the tables and the saved test put them (one category order everywhere).
    const levels = [...tally.entries()].map(([label, count]) => ({ label, count }));
    const rowNumber = numeric ? rowNumbering(read.parsed) : undefined;
    return {
      name,
      numeric,
      counts,
      decimal,
      percent: texts.some((t) => t.endsWith('%')),
      total: counts ? read.parsed.reduce((a, b) => a + b, 0) : 0,
      levels,
      firstValues: texts.slice(0, 6),
      present: cells.length,
      ...(strayOk ? { stray: { count: read.bad.length, firstLine: read.bad[0].line, firstText: read.bad[0].text } } : {}),
      ...(rowNumber ? { rowNumber } : {}),
    };
  });
}

export type Shape =
  /** First column row labels, two or more count columns: an r×c table of counts. */
  | { readonly kind: 'counted-table'; readonly labelColumn: string; readonly countColumns: readonly string[]; readonly reason: Text }
  /** A label column and one count column: category counts. */
  | { readonly kind: 'category-counts'; readonly labelColumn: string; readonly countColumn: string; readonly reason: Text }
  /** Categorical columns whose combinations each appear once, and a count column: each row stands for `weight` records. */
  | { readonly kind: 'long-counts'; readonly categoryColumns: readonly string[]; readonly weightColumn: string; readonly reason: Text }
  /** Raw records: one row per observation. */
  | { readonly kind: 'raw' };

const grouped = (n: number): string => n.toLocaleString('en-US');

export function inferShape(records: Records, profiles: readonly ColumnProfile[]): Shape {
  if (profiles.length < 2 || records.rows.length === 0) return { kind: 'raw' };
  const [first, ...rest] = profiles;
  const labelsUnique = !first.numeric && first.levels.length > 0 && first.levels.every((l) => l.count === 1);
  if (labelsUnique && rest.every((p) => p.counts) && records.rows.length <= 200) {
    if (rest.length >= 2) {
      return {
        kind: 'counted-table',
        labelColumn: first.name,
        countColumns: rest.map((p) => p.name),
        reason: text('every row label of `{0}` appears once and the other columns hold whole numbers, so the table is already counted', first.name),
      };
    }
    return {
      kind: 'category-counts',
      labelColumn: first.name,
      countColumn: rest[0].name,
      reason: text(
        'every label of `{0}` appears once and `{1}` holds whole numbers (total {2} over {3} rows), so each row is a category with its count',
        first.name,
        rest[0].name,
        grouped(rest[0].total),
        records.rows.length,
      ),
    };
  }
  return longCounts(records, profiles) ?? { kind: 'raw' };
}

/**
 * Long counts: every column but one is a category, their combinations each appear once, and the one left holds
 * whole numbers summing to more than the rows. When two columns could be the count (a year 2019, 2020 beside
 * the counts), the one with more different values is; a tie infers nothing.
 */
function longCounts(records: Records, profiles: readonly ColumnProfile[]): Shape | undefined {
  const fits = profiles
    .filter((w) => w.counts && w.total > records.rows.length)
    .filter((w) => {
      const others = profiles.filter((p) => p !== w);
      // With two or more category columns, one that is different on every row (a bottle or member number) makes
      // every combination unique by itself: the rows are units, not counted combinations, and \`w\` is a measurement.
      const labelsRows = others.length > 1 && others.some((p) => p.levels.length === records.rows.length);
      return others.length > 0 && !labelsRows && others.every((p) => !p.stray && isCategorical(p)) && combinationsUnique(records, others);
    })
    .sort((a, b) => b.levels.length - a.levels.length);
  if (fits.length === 0 || (fits.length > 1 && fits[0].levels.length === fits[1].levels.length)) return undefined;
  const weight = fits[0];
  const categorical = profiles.filter((p) => p !== weight);
  const names = categorical.map((p) => `\`${p.name}\``).join(' × '); // column names: shown as they are
  return {
    kind: 'long-counts',
    categoryColumns: categorical.map((p) => p.name),
    weightColumn: weight.name,
    reason: text(
      'each combination of {0} appears once and `{1}` holds whole numbers (total {2} over {3} rows), so `{1}` is used as the frequency weight: each row stands for that many records',
      names,
      weight.name,
      grouped(weight.total),
      records.rows.length,
    ),
  };
}

function combinationsUnique(records: Records, columns: readonly ColumnProfile[]): boolean {
  const index = columns.map((p) => records.columns.indexOf(p.name));
  const seen = new Set<string>();
  for (const row of records.rows) {
    const key = index.map((j) => row[j] ?? '').join('\u0000');
    if (seen.has(key)) return false;
    seen.add(key);
  }
  return true;
}

/** Treated as categories: not numbers, or few distinct whole numbers (a coded category). */
export function isCategorical(p: ColumnProfile): boolean {
  return !p.numeric || p.levels.length <= 12;
}

/** Treated as measurements: numbers with many distinct values, or numbers with a few stray cells. */
export function isMeasurement(p: ColumnProfile): boolean {
  return (p.numeric && p.levels.length > 12) || p.stray !== undefined;
}

/** Text different on every row (M1001, M1002, …; at least 10 rows): a unit's name, not a classification. */
export function namesRows(p: ColumnProfile): boolean {
  return !p.numeric && p.stray === undefined && p.present >= 10 && p.levels.length === p.present;
}

/** A line for a choice's detail: "12 levels: Oven A (40), Oven B (33), …", "numbers: 12.1, 12.4, …", with stray cells named. */
export function describeColumn(p: ColumnProfile): Text {
  if (namesRows(p)) return text('different on every row ({0}, …): names the rows, so as a category every count would be 1', p.firstValues.slice(0, 3).join(', '));
  if (p.rowNumber) return text('numbers the rows: every value different, {0} to {1} with no gap; its spread describes the numbering, not a measurement', grouped(p.rowNumber.from), grouped(p.rowNumber.to));
  if (p.stray) {
    const s = p.stray;
    return s.count === 1
      ? text('numbers, except {0} cell that is not (first on line {1}: "{2}"); running on it stops there', s.count, s.firstLine, s.firstText)
      : text('numbers, except {0} cells that are not (first on line {1}: "{2}"); running on it stops there', s.count, s.firstLine, s.firstText);
  }
  if (p.numeric && p.levels.length > 12) return text('numbers: {0}', `${p.firstValues.join(', ')}${p.firstValues.length >= 6 ? ', …' : ''}`);
  const shown = p.levels.slice(0, 5).map((l) => (l.label ? `${l.label} (${l.count})` : text('(blank) ({0})', l.count)));
  const list = listOf(shown, p.levels.length > 5);
  return p.levels.length === 1 ? text('{0} level: {1}', p.levels.length, list) : text('{0} levels: {1}', p.levels.length, list);
}
