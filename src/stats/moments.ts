/**
 * Streaming, mergeable central moments (Welford 1962 for the update; Pébay 2008 for merging
 * partial results and for the third and fourth moments), and Neumaier's compensated sum.
 */

/** Neumaier's improved Kahan–Babuška summation: error independent of the number of terms. */
export function compensatedSum(values: ArrayLike<number>): number {
  let sum = 0;
  let compensation = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const t = sum + v;
    compensation += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  return sum + compensation;
}

/** Plain-data snapshot of the moments, safe to serialise or to send between processes. */
export interface MomentSummary {
  readonly n: number;
  readonly mean: number;
  /** Σ(x − mean)² */
  readonly m2: number;
  /** Σ(x − mean)³ */
  readonly m3: number;
  /** Σ(x − mean)⁴ */
  readonly m4: number;
  readonly min: number;
  readonly max: number;
}

export class MomentAccumulator {
  n = 0;
  mean = 0;
  m2 = 0;
  m3 = 0;
  m4 = 0;
  min = Infinity;
  max = -Infinity;

  push(x: number): void {
    const n1 = this.n;
    const n = n1 + 1;
    const delta = x - this.mean;
    const deltaN = delta / n;
    const deltaN2 = deltaN * deltaN;
    const term1 = delta * deltaN * n1;
    this.mean += deltaN;
    this.m4 += term1 * deltaN2 * (n * n - 3 * n + 3) + 6 * deltaN2 * this.m2 - 4 * deltaN * this.m3;
    this.m3 += term1 * deltaN * (n - 2) - 3 * deltaN * this.m2;
    this.m2 += term1;
    this.n = n;
    if (x < this.min) this.min = x;
    if (x > this.max) this.max = x;
  }

  /** Combines another partial result into this one (Pébay 2008, eqs. 2.1–2.4). */
  merge(other: MomentSummary): void {
    if (other.n === 0) return;
    if (this.n === 0) {
      Object.assign(this, { n: other.n, mean: other.mean, m2: other.m2, m3: other.m3, m4: other.m4, min: other.min, max: other.max });
      return;
    }
    const na = this.n;
    const nb = other.n;
    const n = na + nb;
    const delta = other.mean - this.mean;
    const delta2 = delta * delta;
    const m2 = this.m2 + other.m2 + (delta2 * na * nb) / n;
    const m3 =
      this.m3 + other.m3 + (delta2 * delta * na * nb * (na - nb)) / (n * n) + (3 * delta * (na * other.m2 - nb * this.m2)) / n;
    const m4 =
      this.m4 +
      other.m4 +
      (delta2 * delta2 * na * nb * (na * na - na * nb + nb * nb)) / (n * n * n) +
      (6 * delta2 * (na * na * other.m2 + nb * nb * this.m2)) / (n * n) +
      (4 * delta * (na * other.m3 - nb * this.m3)) / n;
    this.mean += (delta * nb) / n;
    this.m2 = m2;
    this.m3 = m3;
    this.m4 = m4;
    this.n = n;
    this.min = Math.min(this.min, other.min);
    this.max = Math.max(this.max, other.max);
  }

  summary(): MomentSummary {
    return { n: this.n, mean: this.mean, m2: this.m2, m3: this.m3, m4: this.m4, min: this.min, max: this.max };
  }

  static of(values: ArrayLike<number>): MomentAccumulator {
    const acc = new MomentAccumulator();
    for (let i = 0; i < values.length; i++) acc.push(values[i]);
    return acc;
  }
}

/** Sample variance s² = m2 / (n − 1); NaN for n < 2. */
export function sampleVariance(m: MomentSummary): number {
  return m.n < 2 ? NaN : m.m2 / (m.n - 1);
}

/** Adjusted Fisher–Pearson sample skewness G1 (the usual "bias-corrected" skewness). */
export function sampleSkewness(m: MomentSummary): number {
  const { n } = m;
  if (n < 3 || m.m2 === 0) return NaN;
  const g1 = (Math.sqrt(n) * m.m3) / Math.pow(m.m2, 1.5);
  return (Math.sqrt(n * (n - 1)) / (n - 2)) * g1;
}

/** Bias-corrected sample excess kurtosis G2. */
export function sampleExcessKurtosis(m: MomentSummary): number {
  const { n } = m;
  if (n < 4 || m.m2 === 0) return NaN;
  const g2 = (n * m.m4) / (m.m2 * m.m2) - 3;
  return ((n - 1) / ((n - 2) * (n - 3))) * ((n + 1) * g2 + 6);
}
