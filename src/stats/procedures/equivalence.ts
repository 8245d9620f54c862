/**
 * Equivalence tests: showing that something lies within a tolerance rather than failing to show a difference.
 *
 * One variance (normal data, n values with sample variance s²): σ within [σL, σU] by two one-sided chi-square
 * tests (Schuirmann's TOST idea applied to (n − 1)s²/σ² ~ χ²(n − 1)):
 *   H₀₁: σ ≤ σL  against σ > σL:  p₁ = P(χ² ≥ (n − 1)s²/σL²)
 *   H₀₂: σ ≥ σU  against σ < σU:  p₂ = P(χ² ≤ (n − 1)s²/σU²)
 * p = max(p₁, p₂); equivalence is shown when p < α, which happens exactly when the equal-tail 1 − 2α interval for σ
 * lies inside (σL, σU). With no lower limit it is the non-inferiority test σ < σmax (p = p₂, one-sided 1 − α bound).
 *
 * Goodness of fit: Wellek's (2010, Testing Statistical Hypotheses of Equivalence and Noninferiority, 2nd ed.,
 * chapter on the multinomial goodness-of-fit problem) asymptotic test that the category probabilities π lie within
 * Euclidean distance ε of the target p: H₀: d²(π, p) ≥ ε² against H₁: d² < ε², with d̂² = Σ(π̂ₖ − pₖ)² and the
 * delta-method standard error σ̂/√n, σ̂² = 4[Σ π̂ₖ(π̂ₖ − pₖ)² − (Σ π̂ₖ(π̂ₖ − pₖ))²]. Reject when
 * d̂² < ε² − z₁₋α σ̂/√n; the p-value is Φ((d̂² − ε²)√n/σ̂), and the matching upper 1 − α confidence bound for d is
 * sqrt(d̂² + z₁₋α σ̂/√n). (Formulae written from the book's construction, from memory; the size at the boundary is
 * checked by simulation in the tests.)
 */
import { InputError } from '../../errors';
import { chiSquareLowerProbability, chiSquareQuantile, chiSquareUpperProbability, chiSquareUpperQuantile } from '../distributions/chisquare';
import { normalLowerProbability, normalUpperQuantile } from '../distributions/normal';
import type { Probability } from '../result';

export interface EquivalenceInterval {
  readonly lower: number;
  readonly upper: number;
  readonly level: number;
}

export interface VarianceEquivalence {
  readonly pValue: Probability;
  readonly equivalent: boolean;
  /** σL; absent for the non-inferiority form. */
  readonly lower?: number;
  readonly upper: number;
  /** p-values of the two one-sided tests (lowerTest absent for non-inferiority). */
  readonly lowerTest?: Probability;
  readonly upperTest: Probability;
  /** The interval for σ: equal-tail 1 − 2α for the two-sided band, [0, one-sided 1 − α bound] for non-inferiority. */
  readonly interval: EquivalenceInterval;
  readonly form: 'equivalence' | 'non-inferiority';
}

function positive(x: number | undefined, name: 'lower' | 'upper'): void {
  if (x !== undefined && !(typeof x === 'number' && Number.isFinite(x) && x > 0)) {
    throw new InputError(`${name}: expected a standard deviation greater than 0, found ${JSON.stringify(x)}`, { argument: { name } }, 'invalid-equivalence-limit');
  }
}

function requireAlpha(alpha: number): void {
  if (!(alpha > 0 && alpha < 0.5)) throw new InputError(`alpha: expected a number between 0 and 0.5 for an equivalence test, found ${JSON.stringify(alpha)}`, { argument: { name: 'alpha' } }, 'invalid-alpha');
}

/**
 * @param n number of values (≥ 2)
 * @param variance sample variance s² (divisor n − 1)
 * @param lower σL (σ, not σ²); omit for the non-inferiority form σ < upper
 * @param upper σU or σmax
 */
export function varianceEquivalence(n: number, variance: number, lower: number | undefined, upper: number, alpha = 0.05): VarianceEquivalence {
  positive(lower, 'lower');
  positive(upper, 'upper');
  requireAlpha(alpha);
  if (lower !== undefined && !(lower < upper)) {
    throw new InputError(`lower: expected a standard deviation below upper (${upper}), found ${lower}`, { argument: { name: 'lower' } }, 'invalid-equivalence-band');
  }
  if (!(Number.isInteger(n) && n >= 2) || !(variance >= 0 && Number.isFinite(variance))) {
    const name = Number.isInteger(n) && n >= 2 ? 'variance' : 'n';
    throw new InputError(`${name}: an equivalence test needs at least 2 values and a finite variance, found n = ${n}, s² = ${variance}`, { argument: { name } }, 'too-few-values');
  }
  const df = n - 1;
  const ss = df * variance;
  const upperTest = chiSquareLowerProbability(ss / (upper * upper), df);
  if (lower === undefined) {
    const bound = Math.sqrt(ss / chiSquareQuantile(alpha, df));
    return { pValue: upperTest, equivalent: upperTest.value < alpha, upper, upperTest, interval: { lower: 0, upper: bound, level: 1 - alpha }, form: 'non-inferiority' };
  }
  const lowerTest = chiSquareUpperProbability(ss / (lower * lower), df);
  const pValue = lowerTest.log10 >= upperTest.log10 ? lowerTest : upperTest;
  const interval = {
    lower: Math.sqrt(ss / chiSquareUpperQuantile(alpha, df)),
    upper: Math.sqrt(ss / chiSquareQuantile(alpha, df)),
    level: 1 - 2 * alpha,
  };
  return { pValue, equivalent: pValue.value < alpha, lower, upper, lowerTest, upperTest, interval, form: 'equivalence' };
}

export interface FitEquivalence {
  readonly pValue: Probability;
  readonly equivalent: boolean;
  readonly margin: number;
  /** Observed Euclidean distance d̂ between the observed and the target proportions. */
  readonly distance: number;
  readonly standardError: number;
  /** [0, upper 1 − α confidence bound for d]. */
  readonly interval: EquivalenceInterval;
}

/** Wellek's asymptotic equivalence test for goodness of fit (see the top of this file). */
export function fitEquivalence(observed: readonly number[], proportions: readonly number[], margin: number, alpha = 0.05): FitEquivalence {
  if (!(typeof margin === 'number' && Number.isFinite(margin) && margin > 0 && margin < Math.SQRT2)) {
    throw new InputError(`margin: expected a distance ε between 0 and √2, found ${JSON.stringify(margin)}`, { argument: { name: 'margin' } }, 'invalid-equivalence-margin');
  }
  requireAlpha(alpha);
  if (observed.length !== proportions.length) {
    throw new InputError(`proportions: expected one target proportion per category (${observed.length}), found ${proportions.length}`, { argument: { name: 'proportions' } }, 'length-mismatch');
  }
  const n = observed.reduce((s, x) => s + x, 0);
  if (!(n > 0)) throw new InputError('observed: the counts sum to 0', { argument: { name: 'observed' } }, 'empty-table');
  let d2 = 0;
  let m1 = 0;
  let m2 = 0;
  for (let k = 0; k < observed.length; k++) {
    const pi = observed[k] / n;
    const dev = pi - proportions[k];
    d2 += dev * dev;
    m1 += pi * dev;
    m2 += pi * dev * dev;
  }
  const variance = Math.max(0, 4 * (m2 - m1 * m1));
  const se = Math.sqrt(variance / n);
  const z = normalUpperQuantile(alpha);
  const eps2 = margin * margin;
  // σ̂ = 0 (observed proportions equal to the target, or all mass in one category): the statistic is ∓∞.
  const pValue = se > 0 ? normalLowerProbability((d2 - eps2) / se) : d2 < eps2 ? { value: 0, log10: -Infinity } : { value: 1, log10: 0 };
  return {
    pValue,
    equivalent: pValue.value < alpha,
    margin,
    distance: Math.sqrt(d2),
    standardError: se,
    interval: { lower: 0, upper: Math.sqrt(d2 + z * se), level: 1 - alpha },
  };
}
