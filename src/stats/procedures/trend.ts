/**
 * Ordered categories.
 *
 * - Cochran–Armitage test for trend in proportions (Cochran 1954; Armitage 1955) on a 2×k table whose first
 *   row counts the events and whose columns are ordered groups with scores s_j:
 *     z = Σ x_j (s_j − s̄) / √(p̄(1 − p̄) Σ n_j (s_j − s̄)²),  s̄ = Σ n_j s_j / N,
 *   the form without the (N − 1)/N factor (as R's prop.trend.test). Direction convention: z > 0 when the
 *   proportion in the FIRST row rises with the score. The departure from a linear trend, X² − z² with
 *   k − 2 degrees of freedom, is reported beside it.
 * - Linear-by-linear association for two ordinal variables (Agresti 2002, §3.4.1): M² = (N − 1) r², where r is
 *   the Pearson correlation of the row and column scores over the N units; df 1.
 */
import { InputError } from '../../errors';
import { chiSquareLine, columnSums, labelsOr, pearsonTable, requireChoice, requireCountTable, rowSums, sum, testResult } from './advanced-common';
import { describeAlpha, describeP, independenceAssumption, requireLevel } from './assumptions';
import { normalLowerProbability, normalUpperProbability } from '../distributions/normal';
import { twoSidedFromTails } from '../distributions/probability';
import type { Alternative, Probability, StatisticLine, TestResult } from '../result';

const ALTERNATIVES: readonly Alternative[] = ['two-sided', 'greater', 'less'];

export interface TrendOptions {
  readonly alpha?: number;
  /** Scores of the ordered columns. Default 1, 2, …, k (equally spaced). */
  readonly scores?: readonly number[];
  /** 'greater': the first row's proportion rises with the score; 'less': it falls. Default 'two-sided'. */
  readonly alternative?: Alternative;
  readonly rowLabels?: readonly string[];
  readonly columnLabels?: readonly string[];
}

function requireScores(scores: readonly number[] | undefined, count: number, what: 'scores' | 'rowScores' | 'columnScores'): number[] {
  if (scores === undefined) return Array.from({ length: count }, (_, i) => i + 1);
  if (!Array.isArray(scores) || scores.length !== count) {
    throw new InputError(`${what}: expected ${count} scores (one per ordered category), found ${Array.isArray(scores) ? scores.length : JSON.stringify(scores)}`, { argument: { name: what } }, 'invalid-scores');
  }
  scores.forEach((s, i) => {
    if (typeof s !== 'number' || !Number.isFinite(s)) throw new InputError(`${what}[${i}]: expected a finite number, found ${JSON.stringify(s)}`, { argument: { name: what, at: [i] } }, 'invalid-scores');
  });
  if (new Set(scores).size === 1) throw new InputError(`${what}: all scores are equal, so there is no order to test`, { argument: { name: what } }, 'invalid-scores');
  return scores.slice();
}

/** z, its one- and two-sided p-values, for a signed normal statistic. */
function normalSides(z: number): { greater: Probability; less: Probability; twoSided: Probability } {
  const greater = normalUpperProbability(z);
  const less = normalLowerProbability(z);
  return { greater, less, twoSided: twoSidedFromTails(less, greater) };
}

export function cochranArmitageTest(table: readonly (readonly number[])[], options: TrendOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  if (counts.length !== 2) {
    throw new InputError(`table: the trend test needs 2 rows (events, non-events) and one column per ordered group, found ${counts.length} rows`, { argument: { name: 'table' } }, 'wrong-shape');
  }
  const k = counts[0].length;
  if (k < 2) throw new InputError(`table: the trend test needs at least 2 ordered groups, found ${k}`, { argument: { name: 'table' } }, 'wrong-shape');
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const alternative = requireChoice<Alternative>(options.alternative, ALTERNATIVES, 'two-sided', 'alternative');
  const scores = requireScores(options.scores, k, 'scores');
  const rowLabels = labelsOr(options.rowLabels, 2, 'row ', 'rowLabels');
  const columnLabels = labelsOr(options.columnLabels, k, 'group ', 'columnLabels');
  const events = counts[0];
  const totals = columnSums(counts);
  const n = sum(totals);
  const eventTotal = sum(events);
  if (eventTotal === 0 || eventTotal === n) {
    throw new InputError(`table: every unit is in row "${rowLabels[eventTotal === 0 ? 1 : 0]}", so the proportion cannot vary`, { argument: { name: 'table' } }, 'constant-row');
  }
  const pBar = eventTotal / n;
  const sBar = sum(totals.map((t, j) => t * scores[j])) / n;
  const numerator = sum(events.map((x, j) => x * (scores[j] - sBar)));
  const spread = sum(totals.map((t, j) => t * (scores[j] - sBar) ** 2));
  if (!(spread > 0)) throw new InputError('scores: all units fall in groups with the same score, so there is no order to test', { argument: { name: 'scores' } }, 'invalid-scores');
  const z = numerator / Math.sqrt(pBar * (1 - pBar) * spread);
  const trend = z * z;
  const sides = normalSides(z);

  // Pearson X² of the 2×k table, for the departure from linearity.
  const pearson = pearsonTable(counts).statistic;
  const trendLine = chiSquareLine('cochran-armitage', 'Cochran–Armitage trend chi-square', 'X²', trend, 1);
  const zLine: StatisticLine = { id: 'cochran-armitage-z', name: 'Cochran–Armitage z (positive: first-row proportion rises with the score)', symbol: 'z', statistic: z, df: null, pValue: alternative === 'less' ? sides.less : alternative === 'greater' ? sides.greater : sides.twoSided };
  const departure = k > 2 ? chiSquareLine('departure-from-trend', 'Departure from a linear trend (X² − trend)', 'X²', Math.max(0, pearson - trend), k - 2) : null;
  const oneSided = alternative !== 'two-sided';
  const pValue = oneSided ? zLine.pValue : trendLine.pValue;
  const significant = pValue.value < alpha;
  const proportions = events.map((x, j) => (totals[j] > 0 ? x / totals[j] : NaN));
  const direction = z > 0 ? 'rises' : 'falls';
  return testResult(
    {
      ...signedCore('Cochran–Armitage test for trend', 'X²', trend, z, alternative, n, pValue, alpha),
      conclusion: significant
        ? `The proportion of "${rowLabels[0]}" ${direction} with the score of the ordered groups ${describeAlpha(alpha)} (${describeP(pValue)}).`
        : `The data do not show a ${oneSided ? (alternative === 'greater' ? 'rising' : 'falling') : 'linear'} trend in the proportion of "${rowLabels[0]}" across the ordered groups ${describeAlpha(alpha)} (${describeP(pValue)}).`,
    },
    {
      otherStatistics: [oneSided ? trendLine : zLine, ...(departure ? [departure] : [])],
      notices: options.scores === undefined ? [{ code: 'default-scores', severity: 'info', message: `Scores not given: equally spaced scores 1 to ${k} were used. The result depends on the scores; give "scores" when the groups are not evenly spaced.` }] : [],
      assumptions: [independenceAssumption('counted unit')],
      details: {
        scores,
        direction: 'z > 0 when the first row’s proportion rises with the score',
        proportions: columnLabels.map((label, j) => ({ group: label, score: scores[j], events: events[j], total: totals[j], proportion: proportions[j] })),
        z,
        pValues: { twoSided: sides.twoSided, greater: sides.greater, less: sides.less },
      },
    },
  );
}

/** The head of a result whose statistic is z (one-sided) or its square on 1 df (two-sided). */
function signedCore(procedure: string, squareSymbol: string, square: number, z: number, alternative: Alternative, n: number, pValue: Probability, alpha: number) {
  const oneSided = alternative !== 'two-sided';
  return {
    test: 'trend',
    procedure,
    statisticSymbol: oneSided ? 'z' : squareSymbol,
    statistic: oneSided ? z : square,
    df: oneSided ? null : 1,
    n,
    pValue,
    alternative,
    reference: oneSided ? ({ kind: 'normal' } as const) : ({ kind: 'chi-square', df: 1 } as const),
    alpha,
  };
}

export interface LinearByLinearOptions {
  readonly alpha?: number;
  readonly rowScores?: readonly number[];
  readonly columnScores?: readonly number[];
  readonly alternative?: Alternative;
}

/** Linear-by-linear association M² = (N − 1) r² for an r×c table of two ordinal variables. */
export function linearByLinearTest(table: readonly (readonly number[])[], options: LinearByLinearOptions = {}): TestResult {
  const counts = requireCountTable(table, { name: 'table' });
  const r = counts.length;
  const c = counts[0].length;
  if (r < 2 || c < 2) throw new InputError(`table: expected at least a 2×2 table, found ${r}×${c}`, { argument: { name: 'table' } }, 'wrong-shape');
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const alternative = requireChoice<Alternative>(options.alternative, ALTERNATIVES, 'two-sided', 'alternative');
  const u = requireScores(options.rowScores, r, 'rowScores');
  const v = requireScores(options.columnScores, c, 'columnScores');
  const rows = rowSums(counts);
  const cols = columnSums(counts);
  const n = sum(rows);
  const uBar = sum(rows.map((x, i) => x * u[i])) / n;
  const vBar = sum(cols.map((x, j) => x * v[j])) / n;
  const sxy = sum(counts.flatMap((row, i) => row.map((x, j) => x * (u[i] - uBar) * (v[j] - vBar))));
  const sxx = sum(rows.map((x, i) => x * (u[i] - uBar) ** 2));
  const syy = sum(cols.map((x, j) => x * (v[j] - vBar) ** 2));
  if (!(sxx > 0 && syy > 0)) throw new InputError('table: all units share one row score or one column score, so the correlation is undefined', { argument: { name: 'table' } }, 'invalid-scores');
  const correlation = sxy / Math.sqrt(sxx * syy);
  const m2 = (n - 1) * correlation * correlation;
  const z = Math.sign(correlation) * Math.sqrt(m2);
  const sides = normalSides(z);
  const line = chiSquareLine('linear-by-linear', 'Linear-by-linear association', 'M²', m2, 1);
  const oneSided = alternative !== 'two-sided';
  const pValue = alternative === 'greater' ? sides.greater : alternative === 'less' ? sides.less : line.pValue;
  const significant = pValue.value < alpha;
  return testResult(
    {
      ...signedCore('Linear-by-linear association test', 'M²', m2, z, alternative, n, pValue, alpha),
      conclusion: significant
        ? `Higher row scores go with ${correlation > 0 ? 'higher' : 'lower'} column scores ${describeAlpha(alpha)} (r = ${correlation.toFixed(3)}, ${describeP(pValue)}).`
        : `The data do not show a linear association between the ordered variables ${describeAlpha(alpha)} (r = ${correlation.toFixed(3)}, ${describeP(pValue)}).`,
    },
    {
      otherStatistics: oneSided ? [line] : [],
      estimates: [{ id: 'scoreCorrelation', name: 'Pearson correlation of the scores', value: correlation }],
      assumptions: [independenceAssumption('counted unit')],
      details: { rowScores: u, columnScores: v, correlation, z },
    },
  );
}
