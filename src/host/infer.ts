// Looks at the first records of a table and infers what can be inferred: which columns are numbers,
// which are categories (with their level counts), and whether the table is already a table of counts.
import { looksNumeric } from '../data/numbers';
import type { Records } from '../data/records';

export interface ColumnProfile {
  readonly name: string;
  readonly numeric: boolean;
  /** Whole, non-negative numbers only (a count column). */
  readonly counts: boolean;
  /** Level counts among the rows looked at, most frequent first (categorical columns). */
  readonly levels: readonly { readonly label: string; readonly count: number }[];
  readonly firstValues: readonly string[];
}

export type Shape =
  /** First column labels, two or more count columns: an r×c table of counts. */
  | { readonly kind: 'counted-table' }
  /** A label column and one count column: category counts. */
  | { readonly kind: 'category-counts'; readonly labelColumn: string; readonly countColumn: string }
  /** Raw records: one row per observation. */
  | { readonly kind: 'raw' };

export function profileColumns(records: Records, missing: readonly string[]): ColumnProfile[] {
  const missingSet = new Set(missing);
  return records.columns.map((name, j) => {
    const values = records.rows.map((r) => (r[j] ?? '').trim()).filter((v) => !missingSet.has(v));
    const numeric = values.length > 0 && values.every((v) => looksNumeric(v));
    const counts = numeric && values.every((v) => /^\d+$/.test(v));
    const tally = new Map<string, number>();
    for (const v of values) tally.set(v, (tally.get(v) ?? 0) + 1);
    const levels = [...tally.entries()].map(([label, count]) => ({ label, count })).sort((a, b) => b.count - a.count);
    return { name, numeric, counts, levels, firstValues: values.slice(0, 6) };
  });
}

export function inferShape(records: Records, profiles: readonly ColumnProfile[]): Shape {
  if (profiles.length < 2 || records.rows.length === 0) return { kind: 'raw' };
  const [first, ...rest] = profiles;
  const labelsUnique = first.levels.every((l) => l.count === 1) && !first.numeric;
  if (labelsUnique && rest.every((p) => p.counts) && records.rows.length <= 200) {
    if (rest.length >= 2) return { kind: 'counted-table' };
    return { kind: 'category-counts', labelColumn: first.name, countColumn: rest[0].name };
  }
  return { kind: 'raw' };
}

/** A line for a QuickPick detail: "12 levels: Oven A (40), Oven B (33), …" or "numbers: 12.1, 12.4, …". */
export function describeColumn(p: ColumnProfile): string {
  if (p.numeric && p.levels.length > 12) return `numbers: ${p.firstValues.join(', ')}${p.firstValues.length >= 6 ? ', …' : ''}`;
  const shown = p.levels.slice(0, 5).map((l) => `${l.label || '(blank)'} (${l.count})`).join(', ');
  return `${p.levels.length} level${p.levels.length === 1 ? '' : 's'}: ${shown}${p.levels.length > 5 ? ', …' : ''}`;
}

/** Which test fits a choice of columns. */
export function testForColumns(columns: readonly ColumnProfile[]): 'independence' | 'goodness-of-fit' | 'variance' | undefined {
  if (columns.length === 2) return 'independence';
  if (columns.length === 1) return columns[0].numeric && columns[0].levels.length > 12 ? 'variance' : 'goodness-of-fit';
  return undefined;
}
