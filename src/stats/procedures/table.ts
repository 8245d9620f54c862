/**
 * Chi-square test of independence (or homogeneity) on an r×c table of counts. The main statistic is a member
 * of the power-divergence family (Pearson X² by default); Yates' continuity correction is applied only when
 * asked for and only to the Pearson statistic of a 2×2 table. Effect sizes always use the uncorrected X².
 * For a 2×2 table the result adds Fisher's exact test, phi, and the odds ratio and relative risk with
 * log-scale intervals (Woolf 1955; Katz et al. 1978).
 */
import { InputError } from '../../errors';
import { capitalise, checkExpectedCounts, describeAlpha, describeP, formatNumber, independenceAssumption, nameOf, requireCount, requireCountTotal, requireLevel } from './assumptions';
import { chiSquareUpperProbability } from '../distributions/chisquare';
import { type DivergenceLine, type DivergenceSettings, divergenceLines, mainStatisticFields, resolveStatistic } from './divergence';
import { fisherExact2x2 } from './fisher2x2';
import { compensatedSum } from '../moments';
import { normalUpperQuantile } from '../distributions/normal';
import type { CellGrid, Estimate, Notice, StatisticLine, TestResult } from '../result';

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
  readonly notices: Notice[];
}

export function independenceTest(table: readonly (readonly number[])[], options: IndependenceTestOptions = {}): TestResult {
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
      notices.push({ code: 'correction-not-applied', severity: 'info', message: `Yates' continuity correction is defined for 2×2 tables only; this table is ${r}×${c}, so it was not applied.` });
    } else if (statistic !== 'pearson') {
      notices.push({ code: 'correction-not-applied', severity: 'info', message: "Yates' continuity correction applies to the Pearson statistic only; it was not applied to the chosen statistic." });
    } else {
      // Yates (1934): |o − e| reduced by 0.5, but never below 0 (so a table that fits almost exactly gives 0, not a positive value).
      const contributions = differenceFlat.map((diff, i) => Math.max(0, Math.abs(diff) - 0.5) ** 2 / expectedFlat[i]);
      const corrected = compensatedSum(contributions);
      lines.push({
        id: 'pearson-yates',
        line: { id: 'pearson-yates', name: "Pearson chi-square with Yates' continuity correction", symbol: 'X²', statistic: corrected, df, pValue: chiSquareUpperProbability(corrected, df) },
        contributions,
      });
      correctionApplied = true;
      notices.push({
        code: 'continuity-correction',
        severity: 'info',
        message: `Yates' continuity correction was applied: X² = ${formatNumber(corrected)} instead of ${formatNumber(pearson.line.statistic)}. Effect sizes use the uncorrected X².`,
      });
    }
  }
  const main = correctionApplied ? lines.find((l) => l.id === 'pearson-yates')! : lines.find((l) => l.id === statistic)!;
  const otherStatistics: StatisticLine[] = lines.filter((l) => l !== main).map((l) => l.line);

  const estimates: Estimate[] = [];
  const effectSizes: Estimate[] = cramersV(pearson.line.statistic, total, r, c);
  let fisherDetails: Record<string, unknown> | undefined;
  if (is2x2) {
    const fisher = fisherExact2x2(counts, confidence);
    otherStatistics.push({
      id: 'fisher-exact',
      name: "Fisher's exact test (two-sided)",
      symbol: '',
      statistic: NaN,
      df: null,
      pValue: fisher.twoSided,
      note: `Conditional on both margins. One-sided: ${describeP(fisher.greater)} if the alternative is odds ratio > 1, ${describeP(fisher.less)} if it is odds ratio < 1.`,
    });
    fisherDetails = { twoSided: fisher.twoSided, greater: fisher.greater, less: fisher.less, conditionalOddsRatio: fisher.conditionalOddsRatio };
    // Sign of phi from o11 − e11, which equals (ad − bc)/N without forming products of 1e18.
    const sign = Math.sign(differences[0][0]);
    effectSizes.unshift({ id: 'phi', name: 'Phi coefficient φ', value: sign * Math.sqrt(pearson.line.statistic / total), note: 'Signed: positive when the first row is more likely than the second to fall in the first column. Its absolute value equals Cramér\'s V.' });
    estimates.push(...twoByTwoEstimates(counts, rowLabels, columnLabels, confidence, notices));
    if (Number.isFinite(fisher.conditionalOddsRatio)) {
      const ci = fisher.conditionalInterval;
      estimates.push({
        id: 'conditionalOddsRatio',
        name: 'Odds ratio, conditional maximum likelihood',
        value: fisher.conditionalOddsRatio,
        ...(ci ? { interval: { lower: ci.lower, upper: ci.upper, level: ci.level, parameter: 'odds ratio', method: 'exact conditional (inverting the one-sided Fisher tests)' } } : {}),
        note: "The estimate and interval that go with Fisher's exact test.",
      });
    }
  }

  const cellLabels = counts.flatMap((row, i) => row.map((_, j) => `${rowLabels[i]} × ${columnLabels[j]}`));
  const check = checkExpectedCounts(expectedFlat, cellLabels, 'cells', is2x2 ? "Fisher's exact test" : 'an exact test (Fisher–Freeman–Halton) or a Monte Carlo p-value');
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
  const conclusion = independenceConclusion(significant, alpha, describeP(pValue), options.rowVariable, options.columnVariable);

  return {
    kind: 'test',
    test: 'independence',
    procedure: `Chi-square test of independence (${main.line.name})`,
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
      {
        id: 'sampling-design',
        title: 'Sampling design',
        status: 'unchecked',
        explanation:
          'The same chi-square test serves three designs: one sample cross-classified (independence), separate samples per row with fixed row totals (homogeneity), and both margins fixed in advance. The p-value is the same, but what it says depends on the design, which the counts cannot reveal. Relative risk is meaningful only when rows are groups sampled or assigned in advance, not when the columns were fixed (case–control).',
      },
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
 * The conclusion in plain words. With the variables named (the columns a table was cross-tabulated
 * from), the sentence uses their names; otherwise it speaks of the row and column variables.
 */
function independenceConclusion(significant: boolean, alpha: number, p: string, rowVariable?: string, columnVariable?: string): string {
  const level = describeAlpha(alpha);
  const row = nameOf(rowVariable);
  const column = nameOf(columnVariable);
  if (row === undefined && column === undefined) {
    return significant
      ? `The row and column variables are associated: how counts spread over the columns differs between rows by more than chance would explain ${level} (${p}).`
      : `The data do not show an association between the row and column variables ${level}: the differences between rows are within what chance would produce (${p}).`;
  }
  const rows = row ?? 'the row variable';
  const columns = column ?? 'the column variable';
  const mix = column ? `the mix of ${column}` : 'the spread over the columns';
  const groups = row ? `the ${row} groups` : 'the rows';
  return significant
    ? `${capitalise(rows)} and ${columns} are associated: ${mix} differs between ${groups} by more than chance would explain ${level} (${p}).`
    : `The data do not show an association between ${rows} and ${columns} ${level}: the differences in ${mix} between ${groups} are within what chance would produce (${p}).`;
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

  const notices: Notice[] = [];
  const keepRows = table.map((row) => row.some((v) => v > 0));
  const keepColumns = columnLabels.map((_, j) => table.some((row) => row[j] > 0));
  const droppedRows = rowLabels.filter((_, i) => !keepRows[i]);
  const droppedColumns = columnLabels.filter((_, j) => !keepColumns[j]);
  if (droppedRows.length > 0) {
    notices.push({ code: 'dropped-empty-row', severity: 'info', message: `Rows with a total of 0 were left out (they carry no information): ${droppedRows.join(', ')}.` });
  }
  if (droppedColumns.length > 0) {
    notices.push({ code: 'dropped-empty-column', severity: 'info', message: `Columns with a total of 0 were left out (they carry no information): ${droppedColumns.join(', ')}.` });
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
function cramersV(pearson: number, total: number, r: number, c: number): Estimate[] {
  const phi2 = pearson / total;
  const v = Math.sqrt(phi2 / (Math.min(r, c) - 1));
  const shrink = total > 1 ? ((r - 1) * (c - 1)) / (total - 1) : NaN;
  const phi2Corrected = Math.max(0, phi2 - shrink);
  const rCorrected = r - (r - 1) ** 2 / (total - 1);
  const cCorrected = c - (c - 1) ** 2 / (total - 1);
  const denominator = Math.min(rCorrected - 1, cCorrected - 1);
  const corrected = denominator > 0 ? Math.sqrt(phi2Corrected / denominator) : NaN;
  return [
    { id: 'cramersV', name: "Cramér's V", value: v, note: 'From the uncorrected Pearson X²: sqrt(X² / (n·(min(r, c) − 1))).' },
    {
      id: 'cramersVCorrected',
      name: "Cramér's V, bias-corrected (Bergsma 2013)",
      value: corrected,
      note: Number.isNaN(corrected) ? 'Not defined for a table this small.' : 'Removes the upward bias of V in small samples and large tables.',
    },
  ];
}

/** Odds ratio (Woolf's log interval) and relative risk (log interval, Katz et al. 1978) for [[a, b], [c, d]]. */
function twoByTwoEstimates(counts: number[][], rowLabels: string[], columnLabels: string[], confidence: number, notices: Notice[]): Estimate[] {
  const hasZero = counts.flat().some((v) => v === 0);
  const shift = hasZero ? 0.5 : 0;
  const [a, b, c, d] = counts.flat().map((v) => v + shift);
  if (hasZero) {
    notices.push({
      code: 'haldane-anscombe',
      severity: 'info',
      message: 'A cell is 0, so 0.5 was added to every cell before computing the odds ratio, the relative risk and their intervals (Haldane–Anscombe correction).',
    });
  }
  const z = normalUpperQuantile((1 - confidence) / 2);
  const logInterval = (logValue: number, se: number, parameter: string, method: string): Estimate['interval'] => ({
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
  const event = `\`${columnLabels[0]}\``;
  return [
    {
      id: 'oddsRatio',
      name: 'Odds ratio',
      value: Math.exp(logOdds),
      interval: logInterval(logOdds, logOddsSe, 'odds ratio', 'Woolf (log)'),
      note: `Odds of ${event} in \`${rowLabels[0]}\` divided by the odds in \`${rowLabels[1]}\` (ad/bc).`,
    },
    {
      id: 'relativeRisk',
      name: 'Relative risk',
      value: Math.exp(logRisk),
      interval: logInterval(logRisk, logRiskSe, 'relative risk', 'log (Katz)'),
      note: `Proportion in ${event} for \`${rowLabels[0]}\` divided by that for \`${rowLabels[1]}\`; rows are taken as the groups.`,
    },
  ];
}
