/**
 * The central chi-square distribution with real degrees of freedom df, as a gamma distribution with
 * shape df/2 and scale 2: F(x; df) = P(df/2, x/2), upper tail Q(df/2, x/2), each computed directly.
 *
 * Domain, for every function here:
 * - df > 0 real. df = 0 is the point mass at 0 (lower tail 1 and upper tail 0 for x ≥ 0; quantile 0).
 * - df < 0, df = ∞ or NaN → NaN (the functions never throw; procedures validate their own inputs).
 * - x < 0 → lower tail 0, upper tail 1, density 0. x = ∞ → lower 1, upper 0. x NaN → NaN.
 * - Probabilities outside [0, 1] (or log probabilities > 0) given to a quantile → NaN.
 */
import {
  gammaDensity,
  lastSlope,
  logGammaPrefactor,
  logTailWithSlope,
  logGamma1p,
  logRegularizedGammaLower,
  logRegularizedGammaUpper,
  regularizedGammaLower,
  regularizedGammaUpper,
} from './gamma';
import { normalQuantileFromLog, normalUpperQuantileFromLog } from './normal';
import { log1mExp, probabilityFromBoth } from './probability';
import type { Probability } from '../result';

function badDf(df: number): boolean {
  return !(df >= 0 && df < Infinity);
}

/** Density of χ²(df) at x. At x = 0: ∞ for df < 2, ½ for df = 2, 0 for df > 2; df = 0: ∞ at 0, else 0. */
export function chiSquareDensity(x: number, df: number): number {
  if (badDf(df) || Number.isNaN(x)) return NaN;
  if (x < 0 || x === Infinity) return 0;
  if (df === 0) return x === 0 ? Infinity : 0;
  const a = df / 2;
  if (x === 0) return a < 1 ? Infinity : a === 1 ? 0.5 : 0;
  // f(x) = ½ g(x/2), g the gamma(a, 1) density.
  return 0.5 * gammaDensity(a, x / 2);
}

/**
 * log10 of the density, finite where the density itself underflows to 0 (x = 2000, df = 1: about −436.3).
 * Where the double density is 0: ln f = ln[a · (x/2)^a e^(−x/2)/Γ(a + 1)] − ln(x/2) − ln 2 with a = df/2, the
 * bracket from Loader's (2000) saddle-point form (logGammaPrefactor), which keeps full precision at df = 1e8
 * where (a − 1)·ln(x/2) − x/2 − lnΓ(a) cancels terms of size 1e9 (9.5e-8 relative error before). −∞ where the
 * density is truly 0 (x < 0, x = ∞).
 */
export function chiSquareLog10Density(x: number, df: number): number {
  const density = chiSquareDensity(x, df);
  if (!(density === 0) || !(x > 0 && x < Infinity && df > 0)) return Math.log10(density);
  const a = df / 2;
  return (logGammaPrefactor(a, x / 2) + Math.log(a) - Math.log(x / 2) - Math.LN2) / Math.LN10;
}

/** P(X ≤ x) for X ~ χ²(df). */
export function chiSquareLowerTail(x: number, df: number): number {
  if (badDf(df)) return NaN;
  return regularizedGammaLower(df / 2, x / 2);
}

/** P(X > x) for X ~ χ²(df), computed directly (the upper tail at 161.13, df 4 is 8.35e-34, not 0). */
export function chiSquareUpperTail(x: number, df: number): number {
  if (badDf(df)) return NaN;
  return regularizedGammaUpper(df / 2, x / 2);
}

/** ln P(X ≤ x). */
export function chiSquareLogLowerTail(x: number, df: number): number {
  if (badDf(df)) return NaN;
  return logRegularizedGammaLower(df / 2, x / 2);
}

/** ln P(X > x); finite far below the double range (x = 2000, df = 1 gives about −1006.8, i.e. 10^−437.2). */
export function chiSquareLogUpperTail(x: number, df: number): number {
  if (badDf(df)) return NaN;
  return logRegularizedGammaUpper(df / 2, x / 2);
}

/** P(X ≤ x) as a value and a power of ten. */
export function chiSquareLowerProbability(x: number, df: number): Probability {
  return probabilityFromBoth(chiSquareLowerTail(x, df), chiSquareLogLowerTail(x, df));
}

/** P(X > x) as a value and a power of ten (the p-value of an observed statistic x). */
export function chiSquareUpperProbability(x: number, df: number): Probability {
  return probabilityFromBoth(chiSquareUpperTail(x, df), chiSquareLogUpperTail(x, df));
}

const LN_HALF = -Math.LN2;

/**
 * The gamma(a, 1) quantile y with ln(tail) = lnTarget, where tail is the lower tail (upper = false)
 * or the upper tail (upper = true); the caller passes the smaller tail (lnTarget ≤ ln ½).
 * Start: Wilson & Hilferty (1931) cube-root normal approximation, or for a small lower tail the
 * leading term P ≈ y^a/Γ(a+1) (as in Best & Roberts 1975, AS 91). Refinement: Halley's method on
 * ln(tail) — in ln y for the lower tail, in y for the upper tail — inside a shrinking bracket; once a
 * step is below 1e-6 (relative) the cubic convergence leaves an error far below one ulp, so we stop.
 */
function gammaQuantile(a: number, lnTarget: number, upper: boolean, target = NaN): number {
  const df = 2 * a;
  const z = upper ? normalUpperQuantileFromLog(lnTarget) : normalQuantileFromLog(lnTarget);
  const c = 2 / (9 * df);
  const wh = (df * Math.pow(1 - c + z * Math.sqrt(c), 3)) / 2;
  let y = wh;
  if (!upper) {
    if (!(wh > 0) || df < -1.24 * lnTarget) {
      const small = (lnTarget + logGamma1p(a)) / a;
      if (small < -700) return Math.exp(small);
      y = Math.exp(small);
    }
  } else {
    if (a < 1) {
      // Tiny shapes put even the median far below the double range (df = 1e-10: x ≈ e^(−7e9)); there
      // the lower tail 1 − q ≈ y^a/Γ(a+1) gives the answer directly, and above it a start within a factor of
      // about 1 + y (df = 0.001, q = 0.25: y ≈ 1e-250, which bisection from y = a would not reach).
      const small = (Math.log(-Math.expm1(lnTarget)) + logGamma1p(a)) / a;
      if (small < -700) return Math.exp(small);
      if (small < 0 && (!(wh > 0) || Math.exp(small) < wh)) y = Math.exp(small);
    }
    if (!(y > 0)) y = a;
  }
  let lo = 0;
  let hi = Infinity;
  for (let iter = 0; iter < 100; iter++) {
    const lnTail = logTailWithSlope(a, y, upper);
    const g = lnTail - lnTarget;
    if (Number.isNaN(g)) return y;
    // The tail is decreasing in y for the upper tail, increasing for the lower tail.
    if ((g > 0) === upper) lo = y;
    else hi = y;
    // s = y · |d ln(tail)/dy| = a · prefactor / tail.
    const s = lastSlope();
    if (g === 0) return polish(a, y, upper, target, lnTarget, s);
    let next: number;
    let relativeStep: number;
    if (upper) {
      const h = s / y; // hazard f/Q
      const curvature = (a - 1) / y - 1 + h;
      const newton = g / h;
      const denominator = 1 + (g * curvature) / (2 * h);
      const step = denominator > 0.5 ? newton / denominator : newton;
      next = y + step;
      relativeStep = Math.abs(step) / y;
    } else {
      const newton = -g / s;
      const denominator = 1 - (g * (a - y - s)) / (2 * s);
      const step = denominator > 0.5 ? newton / denominator : newton;
      next = y * Math.exp(step);
      relativeStep = Math.abs(step);
    }
    if (relativeStep <= 1e-6 && next >= lo && next <= hi) return polish(a, next, upper, target, lnTarget, s);
    // Outside the bracket: bisect it, geometrically when it spans orders of magnitude (y can be 1e-300).
    if (!(next > lo && next < hi)) next = hi === Infinity ? 2 * lo + 1 : lo === 0 ? hi * 1e-8 : hi > 4 * lo ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
    y = next;
  }
  // Not converged in 100 steps: no answer rather than a wrong one.
  return NaN;
}

/**
 * The search above solves ln(tail) = ln(target), and ln(target) itself is rounded: an absolute error of
 * |ln target|·2^−53, which the problem's conditioning (1/s, s = |d ln tail / d ln y|) can turn into
 * 1e-13 of relative error in y (df 0.5, p = 1e-70). Where the target is a double we were given, one
 * Newton step on tail/target − 1, computed from the tail's value, removes it.
 */
function polish(a: number, y: number, upper: boolean, target: number, lnTarget: number, s: number): number {
  // Below |ln target| ≈ 2 the rounding of the log is no worse than that of the tail value: skip.
  if (!(target >= 1e-300) || Math.abs(lnTarget) < 2) return y;
  const tail = upper ? regularizedGammaUpper(a, y) : regularizedGammaLower(a, y);
  const r = tail / target - 1;
  // Lower tail: d ln P / d ln y = s; upper tail: d ln Q / d ln y = −s.
  return y * (upper ? 1 + r / s : 1 - r / s);
}

function validProbability(p: number): boolean {
  return p >= 0 && p <= 1;
}

/** x with P(X ≤ x) = p. p = 0 → 0, p = 1 → ∞; for p > ½ the upper tail 1 − p (exact there) is solved. */
export function chiSquareQuantile(p: number, df: number): number {
  if (badDf(df) || !validProbability(p)) return NaN;
  if (df === 0 || p === 0) return 0;
  if (p === 1) return Infinity;
  const a = df / 2;
  return 2 * (p <= 0.5 ? gammaQuantile(a, Math.log(p), false, p) : gammaQuantile(a, Math.log1p(-p), true, 1 - p));
}

/**
 * log10 of a quantile whose lower tail is exp(lnLower), for quantiles below the double range (a lower
 * critical value at p = 1e-300, df = 1 is about 1.6 × 10^-600). There P(X ≤ x) = (x/2)^a/Γ(a + 1)·(1 + O(x)),
 * so ln(x/2) = (lnLower + lnΓ(a + 1))/a with a relative error of order x itself. −∞ for a lower tail of 0.
 */
function log10QuantileFromLower(quantile: number, lnLower: number, df: number): number {
  if (!(quantile === 0) || !(df > 0) || lnLower === -Infinity || Number.isNaN(lnLower)) return Math.log10(quantile);
  const a = df / 2;
  return (Math.LN2 + (lnLower + logGamma1p(a)) / a) / Math.LN10;
}

/** log10 of chiSquareQuantile(p, df), finite where the quantile underflows to 0 but p > 0. */
export function chiSquareLog10Quantile(p: number, df: number): number {
  return log10QuantileFromLower(chiSquareQuantile(p, df), Math.log(p), df);
}

/** log10 of chiSquareUpperQuantile(q, df), finite where the quantile underflows to 0 but q < 1 (tiny df). */
export function chiSquareLog10UpperQuantile(q: number, df: number): number {
  return log10QuantileFromLower(chiSquareUpperQuantile(q, df), Math.log1p(-q), df);
}

/** x with P(X > x) = q, solved on the upper tail itself for q ≤ ½ (so q = 1e-300 works). q = 1 → 0, q = 0 → ∞. */
export function chiSquareUpperQuantile(q: number, df: number): number {
  if (badDf(df) || !validProbability(q)) return NaN;
  if (df === 0 || q === 1) return 0;
  if (q === 0) return Infinity;
  const a = df / 2;
  return 2 * (q <= 0.5 ? gammaQuantile(a, Math.log(q), true, q) : gammaQuantile(a, Math.log1p(-q), false, 1 - q));
}

/** x with ln P(X > x) = lnQ, for upper tails below the double range (e.g. lnQ = −7539 for 10^−3274). */
export function chiSquareUpperQuantileFromLog(lnQ: number, df: number): number {
  if (badDf(df) || !(lnQ <= 0)) return NaN;
  if (df === 0 || lnQ === 0) return 0;
  if (lnQ === -Infinity) return Infinity;
  const a = df / 2;
  return 2 * (lnQ <= LN_HALF ? gammaQuantile(a, lnQ, true) : gammaQuantile(a, log1mExp(lnQ), false));
}

/** x with ln P(X ≤ x) = lnP. */
export function chiSquareQuantileFromLog(lnP: number, df: number): number {
  if (badDf(df) || !(lnP <= 0)) return NaN;
  if (df === 0 || lnP === -Infinity) return 0;
  if (lnP === 0) return Infinity;
  const a = df / 2;
  return 2 * (lnP <= LN_HALF ? gammaQuantile(a, lnP, false) : gammaQuantile(a, log1mExp(lnP), true));
}
