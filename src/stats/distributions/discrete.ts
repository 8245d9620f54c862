/**
 * Binomial and hypergeometric probabilities in log space, for exact tests (McNemar, exact
 * conditional CMH, exact multinomial goodness of fit). Tails are sums of point probabilities,
 * summed relative to their largest term so that tails far below the double range keep a log10;
 * long tails (huge counts) are integrated instead (logTailSum).
 */
import { deviance, devianceWithDifference, logChoose, productError, stirlingError } from './gamma';
import { log1mExp, probabilityFromLog } from './probability';
import type { Probability } from '../result';

const LN_2PI = Math.log(2 * Math.PI);

/**
 * Natural log of P(X = k) for X ~ Binomial(n, p); -Infinity outside the support. `q` = 1 − p may be passed when
 * the caller knows it more precisely than 1 − p rounds (e.g. (N − C)/N).
 * Loader's (2000) saddle-point form: Stirling errors and the deviance terms bd0(k, np) and bd0(n − k, nq), which
 * keep full relative precision for n up to 1e9 and beyond, where ln C(n, k) + k ln p + (n − k) ln q cancels
 * terms of size n ln n (about ulp(ln n!) of error: 1e-12 at n = 2500, 1e-6 at n = 1e9).
 */
export function logBinomialPmf(k: number, n: number, p: number, q = 1 - p): number {
  if (!Number.isInteger(k) || k < 0 || k > n) return -Infinity;
  if (p === 0) return k === 0 ? 0 : -Infinity;
  if (q === 0) return k === n ? 0 : -Infinity;
  if (k === 0) return n === 0 ? 0 : p < 0.1 ? -deviance(n, n * q) - n * p : n * Math.log(q);
  if (k === n) return q < 0.1 ? -deviance(n, n * p) - n * q : n * Math.log(p);
  return logBinomialTermAt(k, 0, n, p, q);
}

/**
 * The same saddle-point form at k = base + offset for a real offset, k in (0, n): the smooth curve through the binomial
 * probabilities, ln[Γ(n + 1)/(Γ(k + 1)Γ(n − k + 1)) p^k q^(n−k)], which the Euler–Maclaurin tail sums (logTailSum)
 * integrate. The deviance terms take k − np from the whole `base` and the offset apart, because above 2^52 the double
 * nearest base + offset has no fraction (an error of up to ½ in k, 1e-8 in the tail at n = 9e15).
 */
export function logBinomialTermAt(base: number, offset: number, n: number, p: number, q = 1 - p): number {
  const k = base + offset;
  const np = n * p;
  // k − np with np exact (its rounding alone, 0.006 at n = 1e15 and p = 0.1, would cost 5e-10 in the tail), and
  // (n − k) − n(1 − p) = −(k − np).
  const d = base - np - productError(n, p) + offset;
  const lc = stirlingError(n) - stirlingError(k) - stirlingError(n - k) - devianceWithDifference(k, np, d) - devianceWithDifference(n - k, n * q, -d);
  return lc - 0.5 * (LN_2PI + Math.log(k) + Math.log1p(-k / n));
}

/**
 * Natural log of P(X = x) for the number of marked items X among `draws` items drawn without
 * replacement from `population` items of which `marked` are marked.
 */
export function logHypergeometricPmf(x: number, marked: number, draws: number, population: number): number {
  const [lo, hi] = hypergeometricSupport(marked, draws, population);
  if (!Number.isInteger(x) || x < lo || x > hi) return -Infinity;
  return logChoose(marked, x) + logChoose(population - marked, draws - x) - logChoose(population, draws);
}

/** [lowest, highest] value of the hypergeometric variable. */
export function hypergeometricSupport(marked: number, draws: number, population: number): [number, number] {
  return [Math.max(0, draws + marked - population), Math.min(draws, marked)];
}

/** ln Σ exp(terms), stable for any spread of magnitudes. */
export function logSumExp(terms: readonly number[]): number {
  let max = -Infinity;
  for (const t of terms) if (t > max) max = t;
  if (max === -Infinity) return -Infinity;
  let sum = 0;
  for (const t of terms) sum += Math.exp(t - max);
  return max + Math.log(sum);
}

/**
 * P(X ≤ k), X ~ Binomial(n, p), in O(1) memory and bounded time: the tail is summed from its start outwards (from k
 * down when k is at or below the mode, else the upper tail from k + 1 up, complemented) by logTailSum; n ≤ 2^53 − 1.
 */
export function binomialLowerTail(k: number, n: number, p: number): Probability {
  const top = Math.min(Math.floor(k), n);
  if (top < 0) return probabilityFromLog(-Infinity);
  if (top >= n) return probabilityFromLog(0);
  const q = 1 - p;
  const mode = Math.min(n, Math.floor((n + 1) * p));
  const odds = p / q;
  if (top <= mode) {
    // P(i − 1)/P(i) = i / ((n − i + 1)·odds)
    const at = (t: number): number => (Number.isInteger(t) ? logBinomialPmf(top - t, n, p, q) : logBinomialTermAt(top, -t, n, p, q));
    return probabilityFromLog(Math.min(0, logTailSum(top, 0, at, (i) => i / ((n - i + 1) * odds))));
  }
  // P(i + 1)/P(i) = (n − i)·odds / (i + 1)
  const at = (t: number): number => (Number.isInteger(t) ? logBinomialPmf(top + 1 + t, n, p, q) : logBinomialTermAt(top + 1, t, n, p, q));
  const upper = logTailSum(top + 1, n, at, (i) => ((n - i) * odds) / (i + 1));
  return probabilityFromLog(Math.min(0, log1mExp(upper)));
}

/** Terms summed one by one at most; past this a tail is integrated (Euler–Maclaurin) instead. */
const DIRECT_TERMS = 1 << 17;
/** A tail is cut where its terms fall below e^−45 ≈ 3e-20 of its first one. */
const TAIL_DROP = 45;

/**
 * ln Σ exp(L(x)) over the integers x from `start` to `end` (either direction), for terms that do not increase away
 * from `start` and whose log L is concave and smooth (binomial and hypergeometric probabilities and their tails).
 * `at(t)` is L(start ± t) at any real offset t from 0 to |end − start| (passed apart from start, which may be above
 * 2^52 where a double has no fraction); `ratio(x)` = exp(L(x ± 1) − L(x)) at whole x, the next term's ratio.
 *
 * Cost model: at most DIRECT_TERMS terms, or one integration of about 1,000 evaluations of L, whatever the counts;
 * O(1) memory.
 * - When the terms fall by e^−40 within DIRECT_TERMS steps (or the range is shorter), they are summed by the
 *   ratio recurrence until a term no longer changes the sum, re-anchored on L every 1024 steps.
 * - Otherwise the terms change slowly (by less than 40/DIRECT_TERMS ≈ 3e-4 per step in log) and the sum is
 *   ∫ f + (f(0) + f(W))/2 + (f′(W) − f′(0))/12 − (f‴(W) − f‴(0))/720 (Euler–Maclaurin) in the offset t from start, with the
 *   integral by 48 panels of 20-point Gauss–Legendre up to the W where the terms have fallen by e^−45, and the
 *   derivatives of f = exp(L) from five-point differences of L at whole offsets. The next term of the series,
 *   f⁽⁵⁾/30240, is below 1e-19 of the sum in this regime, and so is the part beyond W.
 * Measured against 60-digit mpmath (test/fixtures/mpmath/large_tails.json, counts 1e3 to 2^53 − 1): at most 4e-15
 * relative on ln p, a few milliseconds per tail. A library instead, measured on the same kind of tails: the incomplete
 * beta of @stdlib/math-base-special-betainc 0.2.3 is off by 3e-10 relative at n = 2e7, 3e-8 at 2e9, 2e-6 at 2e12
 * and 3e-2 at 1e15 (P(X ≤ k) for p = ½), and @stdlib/stats-base-dists-hypergeometric-cdf 0.2.1 takes 0.4 s at
 * N = 4e7 and fails past about 1e12 (it allocates the support).
 */
export function logTailSum(start: number, end: number, at: (t: number) => number, ratio: (x: number) => number): number {
  const log0 = at(0);
  if (log0 === -Infinity) return -Infinity;
  const step = end >= start ? 1 : -1;
  const length = Math.abs(end - start);
  const probe = Math.min(length, DIRECT_TERMS);
  if (probe === length || log0 - at(probe) >= 40) return log0 + Math.log(directTailSum(start, end, step, log0, at, ratio));
  return log0 + Math.log(eulerMaclaurinTail(length, log0, at));
}

function directTailSum(start: number, end: number, step: 1 | -1, log0: number, at: (t: number) => number, ratio: (x: number) => number): number {
  let sum = 0;
  let w = 1;
  for (let x = start, done = 0; step === 1 ? x <= end : x >= end; x += step, done++) {
    if ((done & 1023) === 0 && done > 0) w = Math.exp(at(done) - log0);
    sum += w;
    if (w <= 1e-17 * sum) break;
    w *= ratio(x);
  }
  return sum;
}

function eulerMaclaurinTail(length: number, log0: number, term: (t: number) => number): number {
  const at = (t: number): number => term(t) - log0;
  // W: the whole offset where the terms have fallen by e^−TAIL_DROP (bracketed by doubling, then bisected), or the end.
  let inside = DIRECT_TERMS;
  let width = length;
  for (let t = 2 * DIRECT_TERMS; ; t *= 2) {
    if (t >= length) break;
    if (at(t) <= -TAIL_DROP) {
      width = t;
      break;
    }
    inside = t;
  }
  if (width < length || at(length) <= -TAIL_DROP) {
    while (width - inside > 1) {
      const mid = inside + Math.floor((width - inside) / 2);
      if (at(mid) <= -TAIL_DROP) width = mid;
      else inside = mid;
    }
  }
  let integral = 0;
  const panel = width / PANELS;
  for (let j = 0; j < PANELS; j++) {
    const centre = (j + 0.5) * panel;
    let s = 0;
    for (let i = 0; i < GAUSS_NODES.length; i++) s += GAUSS_WEIGHTS[i] * Math.exp(at(centre + 0.5 * panel * GAUSS_NODES[i]));
    integral += 0.5 * panel * s;
  }
  return integral + 0.5 * (1 + Math.exp(at(width))) + endCorrection(at, width, -1) - endCorrection(at, 0, 1);
}

const PANELS = 48;

/**
 * f′(t)/12 − f‴(t)/720 for f = exp(L), L = `at`, from L at t, t + d, …, t + 4d (d = ±1, into the range): one-sided
 * five-point differences for L′ and L″; f‴ = f·(L′³ + 3L′L″ + L‴), with L‴ (below 1e-12 here) left out.
 */
function endCorrection(at: (t: number) => number, t: number, d: 1 | -1): number {
  const l0 = at(t);
  const l1 = at(t + d);
  const l2 = at(t + 2 * d);
  const l3 = at(t + 3 * d);
  const l4 = at(t + 4 * d);
  const g1 = (d * (-25 * l0 + 48 * l1 - 36 * l2 + 16 * l3 - 3 * l4)) / 12;
  const g2 = (35 * l0 - 104 * l1 + 114 * l2 - 56 * l3 + 11 * l4) / 12;
  const f = Math.exp(l0);
  return f * (g1 / 12 - (g1 * g1 * g1 + 3 * g1 * g2) / 720);
}

/** Nodes and weights of n-point Gauss–Legendre quadrature on [−1, 1] (Newton's method on P_n). */
function gaussLegendre(n: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let derivative = 0;
    for (let iteration = 0; iteration < 100; iteration++) {
      let p0 = 1;
      let p1 = x;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      derivative = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / derivative;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    nodes[i] = x;
    weights[i] = 2 / ((1 - x * x) * derivative * derivative);
  }
  return { nodes, weights };
}

const { nodes: GAUSS_NODES, weights: GAUSS_WEIGHTS } = gaussLegendre(20);

/**
 * Two-sided p-value of a discrete statistic whose log point probabilities over its support are
 * `logPmf` (index i ↔ value lo + i): the total probability of values no more likely than the
 * observed one, with a relative tolerance of 1e-7 for ties (the convention of R's exact tests).
 */
export function pointProbabilityTwoSided(logPmf: readonly number[], observedIndex: number): Probability {
  const threshold = logPmf[observedIndex] + Math.log1p(1e-7);
  const kept = logPmf.filter((lp) => lp <= threshold);
  return probabilityFromLog(Math.min(0, logSumExp(kept)));
}

/** ln k! for k = 0..n, as a running sum of ln k with Neumaier compensation (error about one ulp of ln n!). */
export function logFactorialTable(n: number): Float64Array {
  const lf = new Float64Array(n + 1);
  let sum = 0;
  let compensation = 0;
  for (let i = 2; i <= n; i++) {
    const term = Math.log(i);
    const t = sum + term;
    compensation += Math.abs(sum) >= term ? sum - t + term : term - t + sum;
    sum = t;
    lf[i] = sum + compensation;
  }
  return lf;
}

/** ln Σ exp(terms) accumulated one term at a time, rescaled as larger terms arrive. */
export class LogSumAccumulator {
  private max = -Infinity;
  private scaled = 0;

  add(logTerm: number): void {
    if (logTerm === -Infinity) return;
    if (logTerm <= this.max) this.scaled += Math.exp(logTerm - this.max);
    else {
      this.scaled = this.scaled * Math.exp(this.max - logTerm) + 1;
      this.max = logTerm;
    }
  }

  get log(): number {
    return this.max === -Infinity ? -Infinity : this.max + Math.log(this.scaled);
  }
}
