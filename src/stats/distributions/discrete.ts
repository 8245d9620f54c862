/**
 * Binomial and hypergeometric probabilities in log space, for exact tests (McNemar, exact
 * conditional CMH, exact multinomial goodness of fit). Tails are sums of point probabilities,
 * summed relative to their largest term so that tails far below the double range keep a log10.
 */
import { deviance, logChoose, stirlingError } from './gamma';
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
  const lc = stirlingError(n) - stirlingError(k) - stirlingError(n - k) - deviance(k, n * p) - deviance(n - k, n * q);
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
 * P(X ≤ k), X ~ Binomial(n, p), in O(1) memory: summed from the start of the tail outwards (from k down when k is
 * at or below the mode, else the upper tail from k + 1 up, complemented), by the ratio of successive terms,
 * re-anchored on the exact log term every 1024 steps, until a term no longer changes the sum. The cost is
 * about 9 standard deviations of terms at most (≈ 2e8 for n = 2e15), whatever k is; n ≤ 2^53 − 1.
 */
export function binomialLowerTail(k: number, n: number, p: number): Probability {
  const top = Math.min(Math.floor(k), n);
  if (top < 0) return probabilityFromLog(-Infinity);
  if (top >= n) return probabilityFromLog(0);
  const q = 1 - p;
  const mode = Math.min(n, Math.floor((n + 1) * p));
  if (top <= mode) return probabilityFromLog(Math.min(0, logBinomialTailFrom(top, n, p, q, -1)));
  return probabilityFromLog(Math.min(0, log1mExp(logBinomialTailFrom(top + 1, n, p, q, 1))));
}

/** ln Σ P(X = i) for i from `start` outwards (step −1 or +1), where the terms do not increase. */
function logBinomialTailFrom(start: number, n: number, p: number, q: number, step: 1 | -1): number {
  const logStart = logBinomialPmf(start, n, p, q);
  if (logStart === -Infinity) return -Infinity;
  const odds = p / q;
  let sum = 0;
  let w = 1;
  for (let i = start, done = 0; i >= 0 && i <= n; i += step, done++) {
    if ((done & 1023) === 0 && done > 0) w = Math.exp(logBinomialPmf(i, n, p, q) - logStart);
    sum += w;
    if (w <= 1e-17 * sum) break;
    // P(i − 1)/P(i) = i / ((n − i + 1)·odds); P(i + 1)/P(i) = (n − i)·odds / (i + 1)
    w *= step === -1 ? i / ((n - i + 1) * odds) : ((n - i) * odds) / (i + 1);
  }
  return logStart + Math.log(sum);
}

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
