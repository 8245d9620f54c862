/**
 * Small pieces shared by the exact, paired, stratified, trend and post-hoc procedures: count checks with
 * the cell named, statistic lines, and the assembly of a TestResult.
 */
import { InputError, inside, type ArgumentLocation } from '../../errors';
import { requireCount, requireCountTotal } from './assumptions';
import { chiSquareUpperProbability } from '../distributions/chisquare';
import { compensatedSum } from '../moments';
import type { Notice, Probability, StatisticLine, TestResult } from '../result';

/** A count table checked cell by cell; the message names the row and the column, the location the argument and the cell. */
export function requireCountTable(table: unknown, argument: ArgumentLocation, what = 'table'): number[][] {
  if (!Array.isArray(table) || table.length === 0) {
    throw new InputError(`${what}: expected an array of rows of counts, found ${JSON.stringify(table)}`, { argument }, 'table-too-small');
  }
  const width = Array.isArray(table[0]) ? table[0].length : -1;
  const counts = table.map((row: unknown, i: number) => {
    if (!Array.isArray(row)) throw new InputError(`${what}, row ${i + 1}: expected an array of counts, found ${JSON.stringify(row)}`, { argument: inside(argument, i) }, 'invalid-row');
    if (row.length !== width) {
      throw new InputError(`${what}, row ${i + 1}: expected ${width} counts like row 1, found ${row.length}`, { argument: inside(argument, i) }, 'ragged-row');
    }
    return row.map((x: unknown, j: number) => {
      if (typeof x !== 'number' || !Number.isFinite(x) || x < 0 || !Number.isInteger(x)) {
        throw new InputError(`${what}, row ${i + 1}, column ${j + 1}: expected a count (a whole number ≥ 0), found ${JSON.stringify(x)}`, { argument: inside(argument, i, j) }, 'invalid-count');
      }
      requireCount(x, `${what}, row ${i + 1}, column ${j + 1}`, inside(argument, i, j));
      return x;
    });
  });
  requireCountTotal(sum(counts.flat()), what, argument);
  return counts;
}

/** Neumaier-compensated sum; the one in moments.ts, under the short name these procedures use. */
export const sum: (values: readonly number[]) => number = compensatedSum;

export function rowSums(table: readonly (readonly number[])[]): number[] {
  return table.map((row) => sum(row));
}

export function columnSums(table: readonly (readonly number[])[]): number[] {
  return table[0].map((_, j) => sum(table.map((row) => row[j])));
}

export function chiSquareLine(id: string, name: string, symbol: string, statistic: number, df: number, note?: string): StatisticLine {
  const pValue = Number.isNaN(statistic) ? { value: 1, log10: 0 } : chiSquareUpperProbability(statistic, df);
  return note === undefined ? { id, name, symbol, statistic, df, pValue } : { id, name, symbol, statistic, df, pValue, note };
}

export function pLine(id: string, name: string, pValue: Probability, note?: string, statistic = NaN, symbol = ''): StatisticLine {
  return note === undefined ? { id, name, symbol, statistic, df: null, pValue } : { id, name, symbol, statistic, df: null, pValue, note };
}

/** The head of a result whose main statistic is a chi-square line (no alternative: the test is one-tailed by nature). */
export function chiSquareCore(test: string, procedure: string, line: StatisticLine, n: number, alpha: number): Omit<Core, 'conclusion'> {
  const df = line.df ?? 1;
  return { test, procedure, statisticSymbol: line.symbol, statistic: line.statistic, df, n, pValue: line.pValue, alternative: null, reference: { kind: 'chi-square', df }, alpha };
}

type Core = Pick<TestResult, 'test' | 'procedure' | 'statisticSymbol' | 'statistic' | 'df' | 'n' | 'pValue' | 'alternative' | 'reference' | 'alpha' | 'conclusion'>;

/** A TestResult with empty lists where a procedure has nothing to add. */
export function testResult(core: Core, extra: Partial<Omit<TestResult, keyof Core | 'kind' | 'significant'>> = {}): TestResult {
  return {
    kind: 'test',
    ...core,
    significant: core.pValue.value < core.alpha,
    otherStatistics: extra.otherStatistics ?? [],
    effectSizes: extra.effectSizes ?? [],
    estimates: extra.estimates ?? [],
    notices: extra.notices ?? [],
    assumptions: extra.assumptions ?? [],
    ...(extra.confidenceInterval ? { confidenceInterval: extra.confidenceInterval } : {}),
    ...(extra.categories ? { categories: extra.categories } : {}),
    ...(extra.grid ? { grid: extra.grid } : {}),
    ...(extra.details ? { details: extra.details } : {}),
  };
}

export function info(code: string, message: string): Notice {
  return { code, severity: 'info', message };
}

export function warning(code: string, message: string): Notice {
  return { code, severity: 'warning', message };
}

/** An option that must be one of a fixed set of words; anything else is refused, naming the field and the choices. */
export function requireChoice<T extends string>(value: T | undefined, allowed: readonly T[], fallback: T, field: string): T {
  if (value === undefined) return fallback;
  if (!allowed.includes(value)) {
    throw new InputError(`${field}: expected one of ${allowed.map((a) => `"${a}"`).join(', ')}, found ${JSON.stringify(value)}`, { argument: { name: field } }, `invalid-${field}`);
  }
  return value;
}

/**
 * Labels of the given length: the user's, or "<prefix>1", "<prefix>2", … when none were given. Labels of another
 * length are refused, naming the field, rather than quietly replaced.
 */
export function labelsOr(labels: readonly string[] | undefined, count: number, prefix: string, field: string): string[] {
  if (labels === undefined) return Array.from({ length: count }, (_, i) => `${prefix}${i + 1}`);
  if (labels.length !== count) {
    throw new InputError(`${field}: expected ${count} labels (one per ${prefix.trim()}), found ${labels.length}`, { argument: { name: field } }, 'length-mismatch');
  }
  return labels.map(String);
}

/** Removes rows and columns whose total is zero; they carry no information about association. */
export function dropEmptyMargins(table: readonly (readonly number[])[]): number[][] {
  const columnKeep = table[0].map((_, j) => table.some((row) => row[j] > 0));
  return table.filter((row) => row.some((x) => x > 0)).map((row) => row.filter((_, j) => columnKeep[j]));
}

/** Pearson X² of independence and its df (r − 1)(c − 1), after leaving out rows and columns whose total is 0. */
export function pearsonTable(table: readonly (readonly number[])[]): { statistic: number; df: number } {
  const t = dropEmptyMargins(table);
  const rows = rowSums(t);
  const cols = columnSums(t);
  const n = sum(rows);
  let x2 = 0;
  t.forEach((row, i) => row.forEach((o, j) => {
    const e = (rows[i] * cols[j]) / n;
    x2 += ((o - e) * (o - e)) / e;
  }));
  return { statistic: x2, df: (t.length - 1) * ((t[0]?.length ?? 1) - 1) };
}
