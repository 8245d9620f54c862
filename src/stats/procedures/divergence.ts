/**
 * The Cressie–Read power-divergence family (Cressie & Read 1984), shared by goodness of fit and
 * r×c tables:
 *
 *   2 / (λ(λ+1)) · Σ o·[(o/e)^λ − 1]     λ = 1: Pearson X², λ = 0: likelihood ratio G², λ = 2/3: Cressie–Read.
 *
 * Each term is written in its non-negative form 2/(λ(λ+1)) · {o·[(o/e)^λ − 1] − λ(o − e)}, which has the same
 * sum whenever Σo = Σe (true for every caller: expected counts are scaled to the observed total) but gives a
 * contribution per cell that is never negative and keeps full relative precision when o is close to e
 * (a power series in r = (o − e)/e is used for |r| < 0.1, so counts of 1e9 that almost fit lose nothing).
 */
import { InputError } from '../../errors';
import { chiSquareUpperProbability } from '../distributions/chisquare';
import { compensatedSum } from '../moments';
import type { StatisticLine } from '../result';

export type DivergenceStatistic = 'pearson' | 'likelihood-ratio' | 'cressie-read';

/** λ for each named statistic; `lambda` overrides only for 'cressie-read' (default 2/3). */
export function lambdaFor(statistic: DivergenceStatistic, lambda?: number): number {
  if (statistic === 'pearson') return 1;
  if (statistic === 'likelihood-ratio') return 0;
  return lambda ?? 2 / 3;
}

export interface StatisticLabel {
  readonly id: string;
  readonly name: string;
  readonly symbol: string;
}

export function labelFor(statistic: DivergenceStatistic, lambda: number): StatisticLabel {
  if (statistic === 'pearson') return { id: 'pearson', name: 'Pearson chi-square', symbol: 'X²' };
  if (statistic === 'likelihood-ratio') return { id: 'likelihood-ratio', name: 'Likelihood-ratio chi-square', symbol: 'G²' };
  return { id: 'cressie-read', name: `Cressie–Read power divergence (λ = ${formatLambda(lambda)})`, symbol: 'CR' };
}

function formatLambda(lambda: number): string {
  if (Math.abs(lambda - 2 / 3) < 1e-15) return '2/3';
  if (Math.abs(lambda + 1 / 2) < 1e-15) return '−1/2';
  return String(lambda).replace('-', '−');
}

const SERIES_LIMIT = 0.1;

/**
 * One non-negative term of the power divergence, 2/(λ(λ+1)) · {o[(o/e)^λ − 1] − λ(o − e)}, with the limits
 * at λ = 0 (2[o ln(o/e) − o + e]) and λ = −1 (2[e ln(e/o) + o − e]).
 * Requires e > 0 and o ≥ 0. Infinite when o = 0 and λ ≤ −1. `difference` is o − e when the caller knows it
 * more precisely than the subtraction of a rounded e would give (r×c tables with counts near 1e9).
 */
export function divergenceTerm(observed: number, expected: number, lambda: number, difference = observed - expected): number {
  const o = observed;
  const e = expected;
  const r = difference / e;
  if (Math.abs(r) < SERIES_LIMIT) {
    // 2e · Σ_{k≥2} c_k r^k with c_2 = 1/2, c_{k+1} = c_k (λ − k + 1)/(k + 1): the binomial series of (1+r)^{λ+1}
    // divided by λ(λ+1), which has no singularity at λ = 0 or λ = −1.
    let coefficient = 0.5;
    let power = r * r;
    let sum = coefficient * power;
    for (let k = 2; k < 80; k++) {
      coefficient *= (lambda - k + 1) / (k + 1);
      power *= r;
      const term = coefficient * power;
      sum += term;
      if (Math.abs(term) <= 1e-17 * Math.abs(sum)) break;
    }
    return 2 * e * sum;
  }
  if (lambda === 0) return o === 0 ? 2 * e : 2 * (o * Math.log(o / e) - o + e);
  if (lambda === -1) return o === 0 ? Infinity : 2 * (e * Math.log(e / o) + o - e);
  if (o === 0) return lambda > -1 ? (2 * e) / (lambda + 1) : Infinity;
  return (2 / (lambda * (lambda + 1))) * (o * Math.expm1(lambda * Math.log1p(r)) - lambda * difference);
}

export interface Divergence {
  readonly statistic: number;
  /** One non-negative contribution per cell, summing to the statistic. */
  readonly contributions: number[];
}

/**
 * The power divergence of observed from expected counts. Cells with e = 0 must have o = 0 (the caller
 * refuses the other case with a message naming the cell) and contribute 0.
 */
export function powerDivergence(
  observed: readonly number[],
  expected: readonly number[],
  lambda: number,
  differences?: readonly number[],
): Divergence {
  const contributions = observed.map((o, i) => (expected[i] === 0 ? 0 : divergenceTerm(o, expected[i], lambda, differences?.[i])));
  // An infinite term (o = 0 with λ ≤ −1) would turn the compensated sum into NaN.
  const statistic = contributions.includes(Infinity) ? Infinity : compensatedSum(contributions);
  return { statistic, contributions };
}

/** The options fit and table share for choosing the statistic. */
export interface DivergenceSettings {
  /** Main statistic. Default 'pearson'. */
  readonly statistic?: DivergenceStatistic;
  /** λ for 'cressie-read'. Default 2/3. */
  readonly lambda?: number;
  /** Significance level. Default 0.05. */
  readonly alpha?: number;
}

export const DIVERGENCE_STATISTICS: readonly DivergenceStatistic[] = ['pearson', 'likelihood-ratio', 'cressie-read'];

/** Validates the choice of statistic and λ, naming the field on error. */
export function resolveStatistic(options: DivergenceSettings): { statistic: DivergenceStatistic; lambda: number; cressieReadLambda: number } {
  const statistic = options.statistic ?? 'pearson';
  if (!DIVERGENCE_STATISTICS.includes(statistic)) {
    throw new InputError(`statistic: expected one of ${DIVERGENCE_STATISTICS.join(', ')}, found ${String(statistic)}`, { argument: { name: 'statistic' } }, 'invalid-statistic');
  }
  const lambda = lambdaFor(statistic, options.lambda);
  if (typeof lambda !== 'number' || !Number.isFinite(lambda)) {
    throw new InputError(`lambda: expected a finite number, found ${String(options.lambda)}`, { argument: { name: 'lambda' } }, 'invalid-lambda');
  }
  // The Cressie–Read line shown beside the main statistic always uses the chosen λ (default 2/3),
  // whatever the main statistic is; otherwise it would repeat Pearson (λ = 1) or G² (λ = 0).
  return { statistic, lambda, cressieReadLambda: lambdaFor('cressie-read', options.lambda) };
}

export interface DivergenceLine {
  readonly id: string;
  readonly line: StatisticLine;
  readonly contributions: readonly number[];
}

/** Pearson, likelihood-ratio and Cressie–Read (with its own λ) on the same counts, each with its p-value. */
export function divergenceLines(
  observed: readonly number[],
  expected: readonly number[],
  df: number,
  cressieReadLambda: number,
  differences?: readonly number[],
): DivergenceLine[] {
  return DIVERGENCE_STATISTICS.map((s) => {
    const l = lambdaFor(s, s === 'cressie-read' ? cressieReadLambda : undefined);
    const { statistic, contributions } = powerDivergence(observed, expected, l, differences);
    return { id: s, line: { ...labelFor(s, l), statistic, df, pValue: chiSquareUpperProbability(statistic, df) }, contributions };
  });
}

/** The TestResult fields that follow from the main chi-square statistic of a count test. */
export function mainStatisticFields(line: StatisticLine, n: number, alpha: number) {
  const df = line.df ?? NaN;
  return {
    statisticSymbol: line.symbol,
    statistic: line.statistic,
    df,
    n,
    pValue: line.pValue,
    alternative: null,
    reference: { kind: 'chi-square' as const, df },
    alpha,
    significant: line.pValue.value < alpha,
  };
}
