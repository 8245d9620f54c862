/**
 * Post-hoc analysis of an r×c table after an overall test of independence:
 * - pairwise comparisons of rows (or columns): the Pearson chi-square test of homogeneity on each pair, a
 *   2×c (or r×2) sub-table, df c − 1 (or r − 1);
 * - cell-wise tests: each adjusted standardized residual (Haberman 1973) is approximately standard normal
 *   under independence, giving a two-sided p-value per cell.
 * Each family of p-values is adjusted for multiplicity: Bonferroni, Holm (1979) step-down, or
 * Benjamini–Hochberg (1995) step-up false discovery rate. Every line names the rows, columns or cell it is about.
 */
import { InputError } from '../../errors';
import { chiSquareCore, chiSquareLine, columnSums, labelsOr, pearsonTable, requireChoice, requireCountTable, rowSums, sum, testResult } from './advanced-common';
import { checkExpectedCounts, describeAlpha, describeP, independenceAssumption, requireLevel } from './assumptions';
import { normalLowerProbability, normalUpperProbability } from '../distributions/normal';
import { probabilityFromValue, twoSidedFromTails } from '../distributions/probability';
import { adjustedResidual } from './table';
import type { Notice, Probability, StatisticLine, TestResult } from '../result';
import { adjustPValues } from '../multiplicity';

export type Adjustment = 'bonferroni' | 'holm' | 'benjamini-hochberg';
export type Comparison = 'rows' | 'columns' | 'cells';

export { adjustPValues } from '../multiplicity';

export interface PostHocOptions {
  readonly compare?: Comparison;
  readonly adjustment?: Adjustment;
  readonly alpha?: number;
  readonly rowLabels?: readonly string[];
  readonly columnLabels?: readonly string[];
}

export interface PairwiseComparison {
  readonly first: string;
  readonly second: string;
  /** 0-based indices of the two rows (or columns) compared. */
  readonly indices: readonly [number, number];
  readonly statistic: number;
  readonly df: number;
  readonly pValue: number;
  readonly adjustedPValue: number;
  readonly significant: boolean;
}

export interface CellTest {
  readonly row: number;
  readonly column: number;
  readonly rowLabel: string;
  readonly columnLabel: string;
  readonly observed: number;
  readonly expected: number;
  readonly adjustedResidual: number;
  readonly pValue: number;
  readonly adjustedPValue: number;
  readonly significant: boolean;
}

/** Pairwise homogeneity tests between rows (transpose the table for columns). */
export function pairwiseRows(table: readonly (readonly number[])[], labels: readonly string[], adjustment: Adjustment, alpha: number): PairwiseComparison[] {
  const raw: Omit<PairwiseComparison, 'adjustedPValue' | 'significant'>[] = [];
  for (let i = 0; i < table.length; i++) {
    for (let j = i + 1; j < table.length; j++) {
      const { statistic, df } = pearsonTable([table[i], table[j]]);
      const p = df > 0 ? chiSquareLine('pair', '', 'X²', statistic, df).pValue.value : 1;
      raw.push({ first: labels[i], second: labels[j], indices: [i, j], statistic, df, pValue: p });
    }
  }
  const adjusted = adjustPValues(raw.map((r) => r.pValue), adjustment);
  return raw.map((r, k) => ({ ...r, adjustedPValue: adjusted[k], significant: adjusted[k] < alpha }));
}

/** Adjusted standardized residual tests for every cell. */
export function cellTests(table: readonly (readonly number[])[], rowLabels: readonly string[], columnLabels: readonly string[], adjustment: Adjustment, alpha: number): CellTest[] {
  const rows = rowSums(table);
  const cols = columnSums(table);
  const n = sum(rows);
  const raw = table.flatMap((row, i) =>
    row.map((o, j) => {
      const e = (rows[i] * cols[j]) / n;
      const z = adjustedResidual(o, rows[i], cols[j], n);
      const p = twoSidedNormal(z).value;
      return { row: i, column: j, rowLabel: rowLabels[i], columnLabel: columnLabels[j], observed: o, expected: e, adjustedResidual: z, pValue: p };
    }),
  );
  const adjusted = adjustPValues(raw.map((r) => r.pValue), adjustment);
  return raw.map((r, k) => ({ ...r, adjustedPValue: adjusted[k], significant: adjusted[k] < alpha }));
}

function twoSidedNormal(z: number): Probability {
  return twoSidedFromTails(normalLowerProbability(z), normalUpperProbability(z));
}

const ADJUSTMENT_NAMES: Record<Adjustment, string> = {
  bonferroni: 'Bonferroni',
  holm: 'Holm',
  'benjamini-hochberg': 'Benjamini–Hochberg (false discovery rate)',
};

/** Post-hoc comparisons on an r×c table, with the overall Pearson test at the head of the result. */
export function postHocTest(table: readonly (readonly number[])[], options: PostHocOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const compare = requireChoice<Comparison>(options.compare, ['rows', 'columns', 'cells'], 'cells', 'compare');
  const adjustment = options.adjustment ?? 'holm';
  if (!(adjustment in ADJUSTMENT_NAMES)) throw new InputError(`adjustment: expected one of ${Object.keys(ADJUSTMENT_NAMES).join(', ')}, found ${String(adjustment)}`, { argument: { name: 'adjustment' } }, 'invalid-adjustment');
  const rowLabels = labelsOr(options.rowLabels, counts.length, 'row ', 'rowLabels');
  const columnLabels = labelsOr(options.columnLabels, counts[0].length, 'column ', 'columnLabels');
  const rows = rowSums(counts);
  const cols = columnSums(counts);
  const emptyRow = rows.findIndex((x) => x === 0);
  const emptyColumn = cols.findIndex((x) => x === 0);
  if (emptyRow >= 0 || emptyColumn >= 0) {
    const what = emptyRow >= 0 ? `row ${emptyRow + 1} ("${rowLabels[emptyRow]}")` : `column ${emptyColumn + 1} ("${columnLabels[emptyColumn]}")`;
    throw new InputError(`table: ${what} has no counts; remove it before post-hoc comparisons`, { argument: { name: 'table' } }, 'empty-margin');
  }
  if (counts.length < 2 || counts[0].length < 2) throw new InputError(`table: expected at least a 2×2 table, found ${counts.length}×${counts[0].length}`, { argument: { name: 'table' } }, 'wrong-shape');
  const overall = pearsonTable(counts);
  const overallLine = chiSquareLine('pearson', 'Pearson chi-square (overall)', 'X²', overall.statistic, overall.df);
  const notices: Notice[] = [];
  const n = sum(rows);
  const expectedCheck = checkExpectedCounts(
    counts.flatMap((row, i) => row.map((_, j) => (rows[i] * cols[j]) / n)),
    counts.flatMap((row, i) => row.map((_, j) => `${rowLabels[i]} × ${columnLabels[j]}`)),
    'cells',
    'an exact test of the overall table, and caution with the cell-wise z approximations',
  );
  if (expectedCheck.notice) notices.push(expectedCheck.notice);
  if (overallLine.pValue.value >= alpha) {
    notices.push({ code: 'overall-not-significant', severity: 'info', message: `The overall test is not significant ${describeAlpha(alpha)} (${describeP(overallLine.pValue)}); post-hoc comparisons are usually read only after a significant overall test.` });
  }
  const adjustName = ADJUSTMENT_NAMES[adjustment];
  let lines: StatisticLine[];
  let detail: Record<string, unknown>;
  let flagged: string[];
  if (compare === 'cells') {
    const cells = cellTests(counts, rowLabels, columnLabels, adjustment, alpha);
    lines = cells.map((c) => ({
      id: `cell-${c.row + 1}-${c.column + 1}`,
      name: `Cell ${c.rowLabel} × ${c.columnLabel}: ${c.adjustedResidual > 0 ? 'more' : 'fewer'} than expected`,
      symbol: 'z',
      statistic: c.adjustedResidual,
      df: null,
      pValue: probabilityFromValue(c.adjustedPValue),
      note: `observed ${c.observed}, expected ${c.expected.toPrecision(4)}; unadjusted p = ${c.pValue.toPrecision(3)}, ${adjustName}-adjusted p = ${c.adjustedPValue.toPrecision(3)}`,
    }));
    detail = { cells };
    flagged = cells.filter((c) => c.significant).map((c) => `${c.rowLabel} × ${c.columnLabel}`);
  } else {
    const byRows = compare === 'rows';
    const t = byRows ? counts : counts[0].map((_, j) => counts.map((row) => row[j]));
    const labels = byRows ? rowLabels : columnLabels;
    const pairs = pairwiseRows(t, labels, adjustment, alpha);
    lines = pairs.map((p) => ({
      id: `${compare}-${p.indices[0] + 1}-${p.indices[1] + 1}`,
      name: `${byRows ? 'Rows' : 'Columns'} ${p.first} vs ${p.second}`,
      symbol: 'X²',
      statistic: p.statistic,
      df: p.df,
      pValue: probabilityFromValue(p.adjustedPValue),
      note: `unadjusted p = ${p.pValue.toPrecision(3)}, ${adjustName}-adjusted p = ${p.adjustedPValue.toPrecision(3)}`,
    }));
    detail = { pairs };
    flagged = pairs.filter((p) => p.significant).map((p) => `${p.first} vs ${p.second}`);
  }
  const subject = compare === 'cells' ? 'cells' : `pairs of ${compare}`;
  return testResult(
    {
      ...chiSquareCore('post-hoc', `Post-hoc ${compare === 'cells' ? 'cell-wise adjusted residual tests' : `pairwise comparisons of ${compare}`} (${adjustName})`, overallLine, n, alpha),
      conclusion:
        flagged.length > 0
          ? `After ${adjustName} adjustment, ${flagged.length} ${subject} differ ${describeAlpha(alpha)}: ${flagged.slice(0, 10).join('; ')}${flagged.length > 10 ? '; …' : ''}.`
          : `After ${adjustName} adjustment, no ${compare === 'cells' ? 'cell departs' : `pair of ${compare} differs`} from independence ${describeAlpha(alpha)}.`,
    },
    {
      otherStatistics: lines,
      notices,
      assumptions: [expectedCheck.assumption, independenceAssumption('counted unit')],
      details: { compare, adjustment, ...detail },
    },
  );
}
