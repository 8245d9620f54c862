/**
 * Chi-square test of independence (or homogeneity) on an r×c table of counts. The main statistic is a member
 * of the power-divergence family (Pearson X² by default); Yates' continuity correction is applied only when
 * asked for and only to the Pearson statistic of a 2×2 table. Effect sizes always use the uncorrected X².
 * For a 2×2 table the result adds Fisher's exact test, phi, and the odds ratio and relative risk with
 * log-scale intervals (Woolf 1955; Katz et al. 1978).
 */
import { InputError } from '../../errors';
import { checkExpectedCounts, independenceAssumption, requireCount, requireCountTotal, requireLevel } from './assumptions';
import { chiSquareUpperProbability } from '../distributions/chisquare';
import { type DivergenceLine, type DivergenceSettings, divergenceLines, mainStatisticFields, resolveStatistic } from './divergence';
import { fisherExact2x2 } from './fisher2x2';
import { compensatedSum } from '../moments';
import { normalUpperQuantile } from '../distributions/normal';
import type { CellGrid, FoundEstimate, FoundNotice, FoundStatisticLine, ComputedTestResult, Phrase } from '../result';

export interface IndependenceTestOptions extends DivergenceSettings {
  readonly rowLabels?: readonly string[];
  readonly columnLabels?: readonly string[];
  /** Yates' continuity correction (2×2 Pearson only). Default false. */
  readonly correction?: boolean;
  /** Confidence level of the odds-ratio and relative-risk intervals. Default 0.95. */
  readonly confidence?: number;
  /** What the rows classify (e.g. the column `oven` the rows came from); named in the conclusion. */
  readonly rowVariable?: string;
  /** What the columns classify (e.g. `defect`); named in the conclusion. */
  readonly columnVariable?: string;
}

interface Prepared {
  readonly counts: number[][];
  readonly rowLabels: string[];
  readonly columnLabels: string[];
  readonly notices: FoundNotice[];
}

export function independenceTest(table: readonly (readonly number[])[], options: IndependenceTestOptions = {}): ComputedTestResult {
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const confidence = requireLevel(options.confidence ?? 0.95, 'confidence');
  const { statistic, lambda, cressieReadLambda } = resolveStatistic(options);
  const { counts, rowLabels, columnLabels, notices } = prepare(table, options);
  const r = counts.length;
  const c = counts[0].length;
  const is2x2 = r === 2 && c === 2;

  const rowTotals = counts.map((row) => compensatedSum(row));
  const columnTotals = columnLabels.map((_, j) => compensatedSum(counts.map((row) => row[j])));
  const total = compensatedSum(rowTotals);
  // R·C/N: for counts up to 1e9 the product is below 1e27, far from overflow, and each step rounds once.
  const expected = rowTotals.map((ri) => columnTotals.map((cj) => (ri * cj) / total));
  const differences = counts.map((row, i) => row.map((o, j) => exactDifference(o, rowTotals[i], columnTotals[j], total)));
  const df = (r - 1) * (c - 1);
  const observedFlat = counts.flat();
  const expectedFlat = expected.flat();
  const differenceFlat = differences.flat();

  const lines: DivergenceLine[] = divergenceLines(observedFlat, expectedFlat, df, cressieReadLambda, differenceFlat);
  const pearson = lines.find((l) => l.id === 'pearson')!;

  let correctionApplied = false;
  if (options.correction) {
    if (!is2x2) {
      notices.push({ code: 'correction-not-applied', severity: 'info', args: { reason: 'not-2x2', rows: r, columns: c } });
    } else if (statistic !== 'pearson') {
      notices.push({ code: 'correction-not-applied', severity: 'info', args: { reason: 'not-pearson' } });
    } else {
      // Yates (1934): |o − e| reduced by 0.5, but never below 0 (so a table that fits almost exactly gives 0, not a positive value).
      const contributions = differenceFlat.map((diff, i) => Math.max(0, Math.abs(diff) - 0.5) ** 2 / expectedFlat[i]);
      const corrected = compensatedSum(contributions);
      lines.push({
        id: 'pearson-yates',
        line: { id: 'pearson-yates', name: { code: 'statistic.pearson-yates' }, symbol: 'X²', statistic: corrected, df, pValue: chiSquareUpperProbability(corrected, df) },
        contributions,
      });
      correctionApplied = true;
      notices.push({
        code: 'continuity-correction',
        severity: 'info',
        args: { corrected, uncorrected: pearson.line.statistic },
      });
    }
  }
  const main = correctionApplied ? lines.find((l) => l.id === 'pearson-yates')! : lines.find((l) => l.id === statistic)!;
  const otherStatistics: FoundStatisticLine[] = lines.filter((l) => l !== main).map((l) => l.line);

  const estimates: FoundEstimate[] = [];
  const effectSizes: FoundEstimate[] = cramersV(pearson.line.statistic, total, r, c);
  let fisherDetails: Record<string, unknown> | undefined;
  if (is2x2) {
    const fisher = fisherExact2x2(counts, confidence);
    otherStatistics.push({
      id: 'fisher-exact',
      name: { code: 'statistic.fisher-two-sided' },
      symbol: '',
      statistic: NaN,
      df: null,
      pValue: fisher.twoSided,
      note: { code: 'note.fisher-one-sided', args: { greater: fisher.greater, less: fisher.less } },
    });
    fisherDetails = { twoSided: fisher.twoSided, greater: fisher.greater, less: fisher.less, conditionalOddsRatio: fisher.conditionalOddsRatio };
    // Sign of phi from o11 − e11, which equals (ad − bc)/N without forming products of 1e18.
    const sign = Math.sign(differences[0][0]);
    effectSizes.unshift({ id: 'phi', name: { code: 'estimate.phi' }, value: sign * Math.sqrt(pearson.line.statistic / total), note: { code: 'note.phi' } });
    estimates.push(...twoByTwoEstimates(counts, rowLabels, columnLabels, confidence, notices));
    if (Number.isFinite(fisher.conditionalOddsRatio)) {
      const ci = fisher.conditionalInterval;
      estimates.push({
        id: 'conditionalOddsRatio',
        name: { code: 'estimate.conditional-odds-ratio' },
        value: fisher.conditionalOddsRatio,
        ...(ci ? { interval: { lower: ci.lower, upper: ci.upper, level: ci.level, parameter: { code: 'parameter.odds-ratio' }, method: { code: 'method.exact-conditional' } } } : {}),
        note: { code: 'note.conditional-odds-ratio' },
      });
    }
  }

  const cellLabels = counts.flatMap((row, i) => row.map((_, j) => `${rowLabels[i]} × ${columnLabels[j]}`));
  const check = checkExpectedCounts(expectedFlat, cellLabels, 'cells', is2x2 ? 'fisher' : 'exact-or-monte-carlo');
  if (check.notice) notices.push(check.notice);

  const grid: CellGrid = {
    rowLabels,
    columnLabels,
    observed: counts,
    expected,
    pearsonResiduals: differences.map((row, i) => row.map((diff, j) => diff / Math.sqrt(expected[i][j]))),
    adjustedResiduals: counts.map((row, i) => row.map((o, j) => adjustedResidual(o, rowTotals[i], columnTotals[j], total))),
    contributions: counts.map((row, i) => row.map((_, j) => main.contributions[i * c + j])),
    rowTotals,
    columnTotals,
    total,
  };

  const pValue = main.line.pValue;
  const significant = pValue.value < alpha;
  const conclusion = { code: 'conclusion.independence', args: { significant, alpha, p: pValue, rowVariable: options.rowVariable, columnVariable: options.columnVariable } };

  return {
    kind: 'test',
    test: 'independence',
    procedure: { code: 'procedure.independence', args: { statistic: main.line.name } },
    ...mainStatisticFields(main.line, total, alpha),
    conclusion,
    otherStatistics,
    effectSizes,
    estimates,
    grid,
    notices,
    assumptions: [
      check.assumption,
      independenceAssumption('counted unit'),
      { id: 'sampling-design', status: 'unchecked' },
    ],
    details: {
      correctionApplied,
      lambda,
      mainStatistic: main.id,
      contributionsTo: main.id,
      ...(fisherDetails ? { fisherExact: fisherDetails } : {}),
    },
  };
}

/**
 * o − R·C/N as (o·N − R·C)/N with the numerator exact: in doubles while both products are exact integers,
 * in BigInt beyond 2^53. Subtracting a rounded expected count of 1e9 would leave an error of 1e-7, which
 * matters when o and e agree to a few parts in a million.
 */
export function exactDifference(o: number, rowTotal: number, columnTotal: number, total: number): number {
  const a = o * total;
  const b = rowTotal * columnTotal;
  if (a <= Number.MAX_SAFE_INTEGER && b <= Number.MAX_SAFE_INTEGER) return (a - b) / total;
  return Number(BigInt(o) * BigInt(total) - BigInt(rowTotal) * BigInt(columnTotal)) / total;
}

/**
 * Adjusted standardized residual (Haberman 1973) of one cell: (o − e) / √(e·(1 − R/N)·(1 − C/N)) with e = R·C/N
 * and o − e taken exactly (exactDifference), so it stays accurate for counts near 1e9.
 */
export function adjustedResidual(o: number, rowTotal: number, columnTotal: number, total: number): number {
  const expected = (rowTotal * columnTotal) / total;
  return exactDifference(o, rowTotal, columnTotal, total) / Math.sqrt(expected * (1 - rowTotal / total) * (1 - columnTotal / total));
}

function prepare(table: readonly (readonly number[])[], options: IndependenceTestOptions): Prepared {
  if (!Array.isArray(table as unknown) || table.length === 0) {
    throw new InputError('table: expected an array of rows of counts, found an empty table', { argument: { name: 'table' } }, 'table-too-small');
  }
  table.forEach((row, i) => {
    if (!Array.isArray(row as unknown)) throw new InputError(`row ${i + 1}: expected an array of counts, found ${JSON.stringify(row)}`, { argument: { name: 'table', at: [i] } }, 'invalid-row');
  });
  const width = table[0].length;
  table.forEach((row, i) => {
    if (row.length !== width) {
      throw new InputError(`row ${i + 1}: expected ${width} counts like row 1, found ${row.length}`, { argument: { name: 'table', at: [i] } }, 'ragged-row');
    }
  });
  const rowLabels = labelsFor(options.rowLabels, table.length, 'row', 'rowLabels');
  const columnLabels = labelsFor(options.columnLabels, width, 'column', 'columnLabels');
  table.forEach((row, i) =>
    row.forEach((value, j) => requireCount(value, `row ${i + 1} (\`${rowLabels[i]}\`), column ${j + 1} (\`${columnLabels[j]}\`)`, { name: 'table', at: [i, j] })),
  );
  requireCountTotal(compensatedSum(table.flat()), 'table', { name: 'table' });

  const notices: FoundNotice[] = [];
  const keepRows = table.map((row) => row.some((v) => v > 0));
  const keepColumns = columnLabels.map((_, j) => table.some((row) => row[j] > 0));
  const droppedRows = rowLabels.filter((_, i) => !keepRows[i]);
  const droppedColumns = columnLabels.filter((_, j) => !keepColumns[j]);
  if (droppedRows.length > 0) {
    notices.push({ code: 'dropped-empty-row', severity: 'info', args: { labels: droppedRows } });
  }
  if (droppedColumns.length > 0) {
    notices.push({ code: 'dropped-empty-column', severity: 'info', args: { labels: droppedColumns } });
  }
  const counts = table.filter((_, i) => keepRows[i]).map((row) => row.filter((_, j) => keepColumns[j]));
  const r = counts.length;
  const c = r === 0 ? 0 : counts[0].length;
  if (r < 2 || c < 2) {
    const dropped = droppedRows.length + droppedColumns.length > 0 ? ' after leaving out rows and columns whose total is 0' : '';
    throw new InputError(
      `table: a test of independence needs at least 2 rows and 2 columns with counts; this table is ${r}×${c}${dropped}`,
      { argument: { name: 'table' } },
      'table-too-small',
    );
  }
  return {
    counts,
    rowLabels: rowLabels.filter((_, i) => keepRows[i]),
    columnLabels: columnLabels.filter((_, j) => keepColumns[j]),
    notices,
  };
}

function labelsFor(given: readonly string[] | undefined, count: number, kind: 'row' | 'column', key: string): string[] {
  if (given === undefined) return Array.from({ length: count }, (_, i) => `${kind} ${i + 1}`);
  if (given.length !== count) {
    throw new InputError(`${key}: expected ${count} labels (one per ${kind}), found ${given.length}`, { argument: { name: key } }, 'length-mismatch');
  }
  return given.map(String);
}

/** Cramér's V and its bias-corrected version (Bergsma 2013, J. Korean Stat. Soc. 42, 323–328). */
function cramersV(pearson: number, total: number, r: number, c: number): FoundEstimate[] {
  const phi2 = pearson / total;
  const v = Math.sqrt(phi2 / (Math.min(r, c) - 1));
  const shrink = total > 1 ? ((r - 1) * (c - 1)) / (total - 1) : NaN;
  const phi2Corrected = Math.max(0, phi2 - shrink);
  const rCorrected = r - (r - 1) ** 2 / (total - 1);
  const cCorrected = c - (c - 1) ** 2 / (total - 1);
  const denominator = Math.min(rCorrected - 1, cCorrected - 1);
  const corrected = denominator > 0 ? Math.sqrt(phi2Corrected / denominator) : NaN;
  return [
    { id: 'cramersV', name: { code: 'estimate.cramers-v' }, value: v, note: { code: 'note.cramers-v' } },
    {
      id: 'cramersVCorrected',
      name: { code: 'estimate.cramers-v-corrected' },
      value: corrected,
      note: { code: Number.isNaN(corrected) ? 'note.not-defined-small-table' : 'note.cramers-v-corrected' },
    },
  ];
}

/** Odds ratio (Woolf's log interval) and relative risk (log interval, Katz et al. 1978) for [[a, b], [c, d]]. */
function twoByTwoEstimates(counts: number[][], rowLabels: string[], columnLabels: string[], confidence: number, notices: FoundNotice[]): FoundEstimate[] {
  const hasZero = counts.flat().some((v) => v === 0);
  const shift = hasZero ? 0.5 : 0;
  const [a, b, c, d] = counts.flat().map((v) => v + shift);
  if (hasZero) {
    notices.push({
      code: 'haldane-anscombe',
      severity: 'info',
    });
  }
  const z = normalUpperQuantile((1 - confidence) / 2);
  const logInterval = (logValue: number, se: number, parameter: Phrase, method: Phrase): FoundEstimate['interval'] => ({
    lower: Math.exp(logValue - z * se),
    upper: Math.exp(logValue + z * se),
    level: confidence,
    parameter,
    method,
  });
  const logOdds = Math.log(a) + Math.log(d) - Math.log(b) - Math.log(c);
  const logOddsSe = Math.sqrt(1 / a + 1 / b + 1 / c + 1 / d);
  const logRisk = Math.log(a) - Math.log(a + b) - Math.log(c) + Math.log(c + d);
  const logRiskSe = Math.sqrt(1 / a - 1 / (a + b) + 1 / c - 1 / (c + d));
  const labels = { event: columnLabels[0], first: rowLabels[0], second: rowLabels[1] };
  return [
    {
      id: 'oddsRatio',
      name: { code: 'estimate.odds-ratio' },
      value: Math.exp(logOdds),
      interval: logInterval(logOdds, logOddsSe, { code: 'parameter.odds-ratio' }, { code: 'method.woolf' }),
      note: { code: 'note.odds-ratio', args: labels },
    },
    {
      id: 'relativeRisk',
      name: { code: 'estimate.relative-risk' },
      value: Math.exp(logRisk),
      interval: logInterval(logRisk, logRiskSe, { code: 'parameter.relative-risk' }, { code: 'method.katz' }),
      note: { code: 'note.relative-risk', args: labels },
    },
  ];
}
