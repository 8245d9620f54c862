/**
 * Power and sample size for chi-square tests.
 *
 * - Goodness of fit and independence: under the alternative the statistic is approximately noncentral
 *   chi-square with noncentrality λ = n·w² (Cohen 1988, ch. 7), w = Cohen's effect size. Power is
 *   P(χ²(df, λ) > c) with c the upper-α point of the central χ²(df). The degrees of freedom are k − 1 for
 *   goodness of fit with k categories and (r − 1)(c − 1) for an r×c table.
 * - Test for one variance: (n − 1)s²/σ0² is distributed as (σ1/σ0)²·χ²(n − 1), so power comes from central
 *   chi-square tails at the critical values divided by (σ1/σ0)².
 * - The sample size for a target power is the smallest whole n whose power reaches the target (power rises
 *   with n, so a doubling search then bisection finds it).
 */
import { InputError } from '../../errors';
import { chiSquareLowerTail, chiSquareQuantile, chiSquareUpperQuantile, chiSquareUpperTail } from '../distributions/chisquare';
import { noncentralChiSquareUpperTail } from '../distributions/noncentral';
import type { Alternative, Notice, PowerResult } from '../result';

export type PowerTarget = 'goodness-of-fit' | 'independence' | 'variance';

export interface PowerQuestion {
  readonly target: PowerTarget;
  /** Cohen's w (goodness of fit, independence). */
  readonly effectSize?: number;
  /** σ1/σ0 (variance test). */
  readonly sigmaRatio?: number;
  /** Degrees of freedom (goodness of fit: k − 1; independence: (r − 1)(c − 1)). Ignored for the variance test. */
  readonly df?: number;
  readonly alpha?: number;
  /** Give n to get the power… */
  readonly n?: number;
  /** …or the power to get the smallest n. */
  readonly power?: number;
  /** Variance test only. Default 'two-sided'. */
  readonly alternative?: Alternative;
}

const MAX_N = 1e9;

function fail(field: string, message: string): never {
  throw new InputError(`${field}: ${message}`, { argument: { name: field } }, `invalid-${field}`);
}

/** Power of the chi-square test with df degrees of freedom for effect size w and n units. */
export function chiSquarePower(w: number, n: number, df: number, alpha: number): number {
  const critical = chiSquareUpperQuantile(alpha, df);
  return noncentralChiSquareUpperTail(critical, df, n * w * w);
}

/** Power of the test for one variance with n values when σ/σ0 = ratio. */
export function variancePower(ratio: number, n: number, alpha: number, alternative: Alternative): number {
  const df = n - 1;
  const r2 = ratio * ratio;
  if (alternative === 'greater') return chiSquareUpperTail(chiSquareUpperQuantile(alpha, df) / r2, df);
  if (alternative === 'less') return chiSquareLowerTail(chiSquareQuantile(alpha, df) / r2, df);
  return chiSquareUpperTail(chiSquareUpperQuantile(alpha / 2, df) / r2, df) + chiSquareLowerTail(chiSquareQuantile(alpha / 2, df) / r2, df);
}

/** Smallest whole n ≥ minimum with power(n) ≥ target, or null if none up to 1e9. */
export function smallestN(power: (n: number) => number, target: number, minimum: number): number | null {
  if (power(minimum) >= target) return minimum;
  let low = minimum;
  let high = Math.max(minimum + 1, 2 * minimum);
  while (power(high) < target) {
    low = high;
    high *= 2;
    if (high > MAX_N) return null;
  }
  while (high - low > 1) {
    const mid = Math.floor((low + high) / 2);
    if (power(mid) >= target) high = mid;
    else low = mid;
  }
  return high;
}

/** Answers a power question: power for n, or the smallest n for a power, with points for a power curve. */
export function powerAnalysis(q: PowerQuestion): PowerResult {
  const alpha = q.alpha ?? 0.05;
  if (!(alpha > 0 && alpha < 1)) fail('alpha', `expected a number strictly between 0 and 1, found ${String(q.alpha)}`);
  if ((q.n === undefined) === (q.power === undefined)) fail('n', 'give exactly one of "n" (to compute the power) or "power" (to find the sample size)');
  if (q.power !== undefined && !(q.power > alpha && q.power < 1)) fail('power', `expected a target power between alpha (${alpha}) and 1, found ${String(q.power)}`);
  const notices: Notice[] = [];
  let powerAt: (n: number) => number;
  let minimum: number;
  let effect: PowerResult['effectSize'];
  let df: number;
  if (q.target === 'variance') {
    const ratio = q.sigmaRatio;
    if (ratio === undefined || !(ratio > 0) || ratio === 1 || !Number.isFinite(ratio)) fail('sigmaRatio', `expected σ1/σ0, a positive number other than 1, found ${String(ratio)}`);
    const alternative = q.alternative ?? 'two-sided';
    if (alternative === 'greater' && ratio < 1) notices.push({ code: 'ratio-against-alternative', severity: 'warning', message: `σ1/σ0 = ${ratio} is below 1 but the alternative is "greater": the power will stay below alpha.` });
    if (alternative === 'less' && ratio > 1) notices.push({ code: 'ratio-against-alternative', severity: 'warning', message: `σ1/σ0 = ${ratio} is above 1 but the alternative is "less": the power will stay below alpha.` });
    powerAt = (n) => variancePower(ratio, n, alpha, alternative);
    minimum = 2;
    effect = { id: 'sigmaRatio', name: 'σ1/σ0', value: ratio };
    df = NaN;
    notices.push({ code: 'variance-power-normality', severity: 'info', message: `Variance test, ${alternative}: df = n − 1. The calculation assumes normally distributed values, as the test itself does.` });
  } else {
    const w = q.effectSize;
    if (w === undefined || !(w > 0) || !Number.isFinite(w)) fail('effectSize', `expected Cohen's w, a positive number, found ${String(w)}`);
    if (q.df === undefined || !Number.isInteger(q.df) || q.df < 1) fail('df', `expected a whole number ≥ 1, found ${String(q.df)}`);
    const d = q.df;
    powerAt = (n) => chiSquarePower(w, n, d, alpha);
    minimum = 1;
    effect = { id: 'cohensW', name: "Cohen's w", value: w };
    df = d;
    notices.push({
      code: 'power-df',
      severity: 'info',
      message:
        q.target === 'independence'
          ? `Independence test: df = (r − 1)(c − 1) = ${d}; noncentrality λ = n·w².`
          : `Goodness of fit: df = k − 1 − (estimated parameters) = ${d}; noncentrality λ = n·w².`,
    });
  }
  let n: number;
  let power: number;
  if (q.n !== undefined) {
    if (!Number.isInteger(q.n) || q.n < minimum) fail('n', `expected a whole number ≥ ${minimum}, found ${String(q.n)}`);
    n = q.n;
    power = powerAt(n);
  } else {
    const found = smallestN(powerAt, q.power!, minimum);
    if (found === null) fail('power', `the power ${q.power} is not reached with up to ${MAX_N} units for this effect size`);
    n = found;
    power = powerAt(n);
    notices.push({ code: 'sample-size-rounding', severity: 'info', message: `n is the smallest whole number of units whose power reaches ${q.power} (power at n − 1: ${n > minimum ? powerAt(n - 1).toFixed(4) : 'n/a'}).` });
  }
  return {
    kind: 'power',
    test: 'power',
    target: q.target,
    effectSize: effect,
    df: q.target === 'variance' ? n - 1 : df,
    alpha,
    n,
    power,
    solvedFor: q.n !== undefined ? 'power' : 'n',
    curve: powerCurve(powerAt, n, minimum),
    notices,
    details: q.target === 'variance' ? { alternative: q.alternative ?? 'two-sided', dfRule: 'n − 1' } : { noncentrality: n * (q.effectSize ?? 0) ** 2, dfRule: q.target === 'independence' ? '(r − 1)(c − 1)' : 'k − 1 − m' },
  };
}

/** About 40 points from the smallest n to 2.5 times the answer, for a plot. */
export function powerCurve(powerAt: (n: number) => number, n: number, minimum: number): { n: number; power: number }[] {
  const top = Math.max(minimum + 10, Math.ceil(2.5 * n));
  const step = Math.max(1, Math.ceil((top - minimum) / 40));
  const points: { n: number; power: number }[] = [];
  for (let m = minimum; m <= top; m += step) points.push({ n: m, power: powerAt(m) });
  if (!points.some((p) => p.n === n)) points.push({ n, power: powerAt(n) });
  return points.sort((a, b) => a.n - b.n);
}
