/**
 * Fisher's exact test for a 2×2 table [[a, b], [c, d]]: conditional on both margins, the count a follows the
 * hypergeometric distribution. Two-sided p sums the probabilities of every table no more likely than the one
 * observed (with a relative tolerance of 1e-7 for ties), as in Fisher's and most later treatments; one-sided
 * p-values are the tails P(X ≥ a) ("greater": odds ratio > 1) and P(X ≤ a) ("less").
 *
 * Hypergeometric probabilities are ratios of binomial ones (logBinomialPmf in discrete.ts: Loader's (2000)
 * saddle-point form with Stirling-series errors and the deviance term bd0), which keeps full relative precision for counts up to 1e9 and beyond, where a difference of
 * log-binomial coefficients of size 1e10 would lose five digits. Tails are summed outwards from their start
 * until the terms no longer matter, or integrated when that would take more than about 1e5 terms (logTailSum),
 * so a tail costs the same at margins of 1e9 and 1e15.
 */
import { logBinomialPmf, logTailSum } from '../distributions/discrete';
import { devianceWithDifference, stirlingError } from '../distributions/gamma';

const LN_2PI = Math.log(2 * Math.PI);
import { probabilityFromLog, probabilityFromValue } from '../distributions/probability';
import type { Probability } from '../result';

export interface FisherExact2x2 {
  /** Sum of P(tables at most as likely as the observed one). */
  readonly twoSided: Probability;
  /** P(X ≥ a): evidence that the odds ratio exceeds 1. */
  readonly greater: Probability;
  /** P(X ≤ a): evidence that the odds ratio is below 1. */
  readonly less: Probability;
  /** Conditional maximum-likelihood estimate of the odds ratio (0 or Infinity at the edge of the support). */
  readonly conditionalOddsRatio: number;
  /**
   * Exact conditional interval for the odds ratio at the level asked (Cornfield 1956; as R's fisher.test): the ψ
   * with P_ψ(X ≥ a) = (1 − level)/2 and with P_ψ(X ≤ a) = (1 − level)/2 under the noncentral hypergeometric.
   * Undefined for N above 1e6, like the estimate, or a support of more than 1e5 values (cost: about 100 passes over it).
   */
  readonly conditionalInterval?: { readonly lower: number; readonly upper: number; readonly level: number };
}

/** The hypergeometric distribution of a given the margins of [[a, b], [c, d]]. */
class Hypergeometric {
  readonly lo: number;
  readonly hi: number;
  readonly mode: number;
  private readonly p: number;
  private readonly q: number;
  private readonly logDenominator: number;
  /** The means of the four cells, r1·c1/N, r1·(N − c1)/N, r2·c1/N, r2·(N − c1)/N. */
  private readonly means: readonly [number, number, number, number];
  private readonly constant: number;

  constructor(
    private readonly row1: number,
    private readonly row2: number,
    private readonly column1: number,
  ) {
    const total = row1 + row2;
    const column2 = total - column1;
    this.lo = Math.max(0, column1 - row2);
    this.hi = Math.min(row1, column1);
    // ⌊(c1 + 1)(r1 + 1)/(N + 2)⌋, in whole numbers when the product passes 2^53.
    const product = (column1 + 1) * (row1 + 1);
    const mode = product <= Number.MAX_SAFE_INTEGER ? Math.floor(product / (total + 2)) : Number(((BigInt(column1) + 1n) * (BigInt(row1) + 1n)) / (BigInt(total) + 2n));
    this.mode = Math.min(this.hi, Math.max(this.lo, mode));
    this.p = column1 / total;
    this.q = column2 / total;
    this.logDenominator = logBinomialPmf(column1, total, this.p, this.q);
    this.means = [(row1 * column1) / total, (row1 * column2) / total, (row2 * column1) / total, (row2 * column2) / total];
    this.constant =
      stirlingError(row1) + stirlingError(row2) - stirlingError(total) + stirlingError(column1) + stirlingError(column2) +
      0.5 * (Math.log(row1) + Math.log(row2) + Math.log(column1) + Math.log(column2) - Math.log(total) - LN_2PI);
  }

  /** ln P(X = x) at whole x. */
  logProbability(x: number): number {
    if (x < this.lo || x > this.hi) return -Infinity;
    return this.logSmooth(x, 0);
  }

  /** x − r1·c1/N for a whole x, from the exact numerator x·N − r1·c1 (in whole numbers past 2^53). */
  private offsetFromMean(x: number): number {
    const total = this.row1 + this.row2;
    const a = x * total;
    const b = this.row1 * this.column1;
    if (a <= Number.MAX_SAFE_INTEGER && b <= Number.MAX_SAFE_INTEGER) return (a - b) / total;
    return Number(BigInt(x) * BigInt(total) - BigInt(this.row1) * BigInt(this.column1)) / total;
  }

  /**
   * ln P(X = base + offset) on the smooth curve through the probabilities, for a whole base and any real offset
   * inside the support: Loader's (2000) saddle-point form of C(r1, x)·C(r2, c1 − x)/C(N, c1), with the four cells
   * x, r1 − x, c1 − x, r2 − c1 + x measured from their means r1c1/N, … by the one exact offset d = x − r1c1/N (±d
   * for each cell). With a rounded p = c1/N instead, each of the three binomial factors would carry terms of size
   * N·ulp(p) ≈ 0.4 at N = 4e15 that cancel only to about 1e-9; this form keeps about 1e-15.
   */
  private logSmooth(base: number, offset: number): number {
    const x = base + offset;
    const cells = [x, this.row1 - base - offset, this.column1 - base - offset, this.row2 - this.column1 + base + offset];
    if (cells.some((c) => c <= 0)) {
      // An edge of the support (whole x only): the ratio of three binomial probabilities with p = c1/N.
      return logBinomialPmf(x, this.row1, this.p, this.q) + logBinomialPmf(this.column1 - x, this.row2, this.p, this.q) - this.logDenominator;
    }
    const d = this.offsetFromMean(base) + offset;
    const [m1, m2, m3, m4] = this.means;
    return (
      this.constant -
      stirlingError(cells[0]) - stirlingError(cells[1]) - stirlingError(cells[2]) - stirlingError(cells[3]) -
      devianceWithDifference(cells[0], m1, d) - devianceWithDifference(cells[1], m2, -d) -
      devianceWithDifference(cells[2], m3, -d) - devianceWithDifference(cells[3], m4, d) -
      0.5 * (Math.log(cells[0]) + Math.log(cells[1]) + Math.log(cells[2]) + Math.log(cells[3]))
    );
  }

  /** P(X = x + 1) / P(X = x). */
  private ratioUp(x: number): number {
    return ((this.row1 - x) * (this.column1 - x)) / ((x + 1) * (this.row2 - this.column1 + x + 1));
  }

  /**
   * Σ P(X = y) / P(X = reference) over y from `start` outwards (step +1 or −1) to the end of the support, where
   * the terms are non-increasing: summed term by term when short, else integrated (logTailSum in discrete.ts), so
   * the cost does not grow with the margins.
   */
  relativeTail(start: number, step: 1 | -1, logReference: number): number {
    const ratio = step === 1 ? (x: number) => this.ratioUp(x) : (x: number) => 1 / this.ratioUp(x - 1);
    const logSum = logTailSum(start, step === 1 ? this.hi : this.lo, (t) => this.logSmooth(start, step * t), ratio);
    return Math.exp(logSum - logReference);
  }

  /** P(X ≥ x) */
  upperTail(x: number): Probability {
    if (x <= this.lo) return probabilityFromValue(1);
    if (x > this.hi) return probabilityFromValue(0);
    if (x >= this.mode) {
      const logStart = this.logProbability(x);
      return probabilityFromLog(logStart + Math.log(this.relativeTail(x, 1, logStart)));
    }
    return probabilityFromValue(Math.max(0, 1 - this.lowerTail(x - 1).value));
  }

  /** P(X ≤ x) */
  lowerTail(x: number): Probability {
    if (x >= this.hi) return probabilityFromValue(1);
    if (x < this.lo) return probabilityFromValue(0);
    if (x <= this.mode) {
      const logStart = this.logProbability(x);
      return probabilityFromLog(logStart + Math.log(this.relativeTail(x, -1, logStart)));
    }
    return probabilityFromValue(Math.max(0, 1 - this.upperTail(x + 1).value));
  }

  /** Smallest x in [from, to] with ln P(x) ≤ limit, where ln P is non-increasing on [from, to]; null when none. */
  private firstAtOrBelow(from: number, to: number, limit: number): number | null {
    if (this.logProbability(to) > limit) return null;
    let lo = from;
    let hi = to;
    while (lo < hi) {
      const mid = lo + Math.floor((hi - lo) / 2); // (lo + hi)/2 rounds above 2^53
      if (this.logProbability(mid) <= limit) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  }

  /** Largest x in [from, to] with ln P(x) ≤ limit, where ln P is non-decreasing on [from, to]; null when none. */
  private lastAtOrBelow(from: number, to: number, limit: number): number | null {
    if (this.logProbability(from) > limit) return null;
    let lo = from;
    let hi = to;
    while (lo < hi) {
      const mid = lo + Math.ceil((hi - lo) / 2);
      if (this.logProbability(mid) <= limit) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  }

  /** Σ P(X = y) over every y with P(y) ≤ P(x)·(1 + 1e-7). */
  twoSided(x: number): Probability {
    const logObserved = this.logProbability(x);
    const limit = logObserved + Math.log1p(1e-7);
    if (this.logProbability(this.mode) <= limit) return probabilityFromValue(1);
    const upperStart = this.firstAtOrBelow(this.mode, this.hi, limit);
    const lowerEnd = this.lastAtOrBelow(this.lo, this.mode, limit);
    let relative = 0;
    if (upperStart !== null) relative += this.relativeTail(upperStart, 1, logObserved);
    if (lowerEnd !== null) relative += this.relativeTail(lowerEnd, -1, logObserved);
    const log = Math.min(0, logObserved + Math.log(relative));
    return probabilityFromLog(log);
  }

  /** The odds ratio ψ whose noncentral hypergeometric distribution has mean x (conditional MLE). */
  conditionalMle(x: number): number {
    if (x === this.lo) return this.lo === this.hi ? NaN : 0;
    if (x === this.hi) return Infinity;
    // The support that matters: where P(X = y) under ψ = 1 is not negligible, widened generously; the MLE of
    // ψ for an observed x inside it is found by bisection on ln ψ (the mean is increasing in ψ).
    const support = this.effectiveSupport(x);
    const logBase = support.map((y) => this.logProbability(y));
    const meanAt = (logPsi: number): number => {
      const w = tiltedWeights(support, logBase, logPsi);
      let s0 = 0;
      let s1 = 0;
      for (let i = 0; i < support.length; i++) {
        s0 += w[i];
        s1 += w[i] * support[i];
      }
      return s1 / s0;
    };
    let lo = -50;
    let hi = 50;
    for (let i = 0; i < 200 && hi - lo > 1e-13; i++) {
      const mid = (lo + hi) / 2;
      if (meanAt(mid) < x) lo = mid;
      else hi = mid;
    }
    return Math.exp((lo + hi) / 2);
  }

  /** The exact conditional interval for ψ at `level` (over the whole support, which the caller keeps ≤ 1e5 + 1 values). */
  conditionalInterval(x: number, level: number): { lower: number; upper: number; level: number } {
    const support: number[] = [];
    for (let y = this.lo; y <= this.hi; y++) support.push(y);
    const logBase = support.map((y) => this.logProbability(y));
    // P_ψ(X ≥ x) (upper = true) or P_ψ(X ≤ x), as ln, under the weights P(y)·ψ^y normalised.
    const logTail = (logPsi: number, upper: boolean): number => {
      const w = tiltedWeights(support, logBase, logPsi);
      let all = 0;
      let tail = 0;
      for (let i = 0; i < support.length; i++) {
        all += w[i];
        if (upper ? support[i] >= x : support[i] <= x) tail += w[i];
      }
      return Math.log(tail) - Math.log(all);
    };
    const target = Math.log((1 - level) / 2);
    // ln P_ψ(X ≥ x) increases with ψ, ln P_ψ(X ≤ x) decreases: bisection on ln ψ over [−50, 50].
    const solve = (upper: boolean): number => {
      let a = -50;
      let b = 50;
      for (let i = 0; i < 200 && b - a > 1e-13; i++) {
        const mid = (a + b) / 2;
        if ((logTail(mid, upper) < target) === upper) a = mid;
        else b = mid;
      }
      return Math.exp((a + b) / 2);
    };
    return { lower: x <= this.lo ? 0 : solve(true), upper: x >= this.hi ? Infinity : solve(false), level };
  }

  private effectiveSupport(x: number): number[] {
    const total = this.row1 + this.row2;
    const sd = Math.sqrt((this.row1 * this.row2 * this.column1 * (total - this.column1)) / (total * total * Math.max(1, total - 1)));
    const span = Math.ceil(Math.abs(x - this.mode) + 15 * sd + 50);
    const from = Math.max(this.lo, Math.min(x, this.mode) - span);
    const to = Math.min(this.hi, Math.max(x, this.mode) + span);
    const support: number[] = [];
    for (let y = from; y <= to; y++) support.push(y);
    return support;
  }
}

/** Weights P(y)·ψ^y of the noncentral hypergeometric over `support`, scaled so the largest is 1. */
function tiltedWeights(support: readonly number[], logBase: readonly number[], logPsi: number): Float64Array {
  let maxLog = -Infinity;
  for (let i = 0; i < support.length; i++) maxLog = Math.max(maxLog, logBase[i] + support[i] * logPsi);
  const w = new Float64Array(support.length);
  for (let i = 0; i < support.length; i++) w[i] = Math.exp(logBase[i] + support[i] * logPsi - maxLog);
  return w;
}

/**
 * Fisher's exact test on [[a, b], [c, d]] (counts already validated: whole numbers ≥ 0, no empty margin).
 * The conditional MLE of the odds ratio is computed only for tables with N ≤ 1e6 (NaN otherwise).
 */
export function fisherExact2x2(table: readonly (readonly number[])[], level = 0.95): FisherExact2x2 {
  const [[a, b], [c, d]] = table;
  const distribution = new Hypergeometric(a + b, c + d, a + c);
  const n = a + b + c + d;
  const small = n <= 1e6 && distribution.lo < distribution.hi && distribution.hi - distribution.lo <= 1e5;
  return {
    twoSided: distribution.twoSided(a),
    greater: distribution.upperTail(a),
    less: distribution.lowerTail(a),
    conditionalOddsRatio: n <= 1e6 ? distribution.conditionalMle(a) : NaN,
    ...(small ? { conditionalInterval: distribution.conditionalInterval(a, level) } : {}),
  };
}

/** Only the two-sided p-value of Fisher's exact test on [[a, b], [c, d]] (no odds ratio): for searches that test many tables. */
export function fisherTwoSided2x2(table: readonly (readonly number[])[]): Probability {
  const [[a, b], [c, d]] = table;
  return new Hypergeometric(a + b, c + d, a + c).twoSided(a);
}
