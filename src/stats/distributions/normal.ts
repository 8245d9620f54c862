/**
 * The standard normal distribution: density, both tails computed directly (never 1 − the other when
 * that is near 1), natural-log tails, and the quantile from either tail (also from a log probability).
 * Domain: NaN → NaN; z = ±∞ give the limits.
 */
import { logRegularizedGammaUpper, regularizedGammaLower, regularizedGammaUpper } from './gamma';
import { log1mExp, probabilityFromBoth } from './probability';
import type { Probability } from '../result';

const INV_SQRT_2PI = 0.398942280401432677939946059934;

/**
 * e^(−z²/2) with z² split so that rounding z² does not cost relative accuracy for large |z|
 * (z = z1 + z2, z1 with 16 fractional bits so z1² is exact).
 */
function expHalfSquare(z: number): number {
  const a = Math.abs(z);
  const z1 = Math.round(a * 65536) / 65536;
  const z2 = a - z1;
  return Math.exp(-0.5 * z1 * z1) * Math.exp((-0.5 * z2 - z1) * z2);
}

/** φ(z) = e^(−z²/2)/√(2π). */
export function normalDensity(z: number): number {
  if (Number.isNaN(z)) return NaN;
  if (!Number.isFinite(z)) return 0;
  return INV_SQRT_2PI * expHalfSquare(z);
}

/**
 * z²/2 is rounded in double: an absolute error of up to |z|²·2^−54, which e^(−z²/2) turns into a
 * relative error of the same size (4e-14 at z = 37). With z = z1 + z2, z1 carrying 16 fractional bits,
 * z1² is exact and the rounding δ = (z1²/2 − h) + (z2/2 + z1)·z2 is known; Q(½, h + δ) = Q(½, h)·e^(−δ·λ)
 * with λ the hazard of Q, ≈ 1 + 1/(2h) (its error matters only at δ/h², far below one ulp).
 */
function roundingOfHalfSquare(z: number, h: number): number {
  const a = Math.abs(z);
  if (a > 1e9 || h === 0) return 0;
  const z1 = Math.round(a * 65536) / 65536;
  const z2 = a - z1;
  return 0.5 * z1 * z1 - h + (0.5 * z2 + z1) * z2;
}

/** ½ Q(½, z²/2) = P(Z > |z|), corrected for the rounding of z²/2. */
function smallerTail(z: number, h: number): number {
  return 0.5 * regularizedGammaUpper(0.5, h) * (1 - roundingOfHalfSquare(z, h) * (1 + 0.5 / Math.max(h, 1)));
}

/** P(Z > z) = ½ Q(½, z²/2) for z ≥ 0 (erfc as an incomplete gamma function, A&S 6.5.17), ½(1 + P(½, z²/2)) for z < 0. */
export function normalUpperTail(z: number): number {
  if (Number.isNaN(z)) return NaN;
  const h = 0.5 * z * z;
  if (z < 0) return 0.5 + 0.5 * regularizedGammaLower(0.5, h);
  if (h === Infinity) return 0;
  return smallerTail(z, h);
}

/** P(Z ≤ z). */
export function normalLowerTail(z: number): number {
  return normalUpperTail(-z);
}

/** ln P(Z > z), finite for any finite z (e.g. about −1.6e5 at z = 565). */
export function normalLogUpperTail(z: number): number {
  if (Number.isNaN(z)) return NaN;
  const h = 0.5 * z * z;
  if (z < 0) return Math.log1p(-smallerTail(z, h));
  if (h === Infinity) return -Infinity;
  return Math.log(0.5) + logRegularizedGammaUpper(0.5, h) - roundingOfHalfSquare(z, h) * (1 + 0.5 / Math.max(h, 1));
}

/** ln P(Z ≤ z). */
export function normalLogLowerTail(z: number): number {
  return normalLogUpperTail(-z);
}

/** P(Z > z) as a value and a power of ten. */
export function normalUpperProbability(z: number): Probability {
  return probabilityFromBoth(normalUpperTail(z), normalLogUpperTail(z));
}

/** P(Z ≤ z) as a value and a power of ten. */
export function normalLowerProbability(z: number): Probability {
  return probabilityFromBoth(normalLowerTail(z), normalLogLowerTail(z));
}

// Wichura 1988, Algorithm AS 241 (PPND16), Applied Statistics 37, 477–484.
const A = [3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125,
  45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727];
const B = [1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867,
  39307.89580009271061, 28729.085735721942674, 5226.495278852854561];
const C = [1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504,
  1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833, 7.7454501427834140764e-4];
const D = [1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455, 0.14810397642748007459,
  0.0151986665636164571966, 5.475938084995344946e-4, 1.05075007164441684324e-9];
const E = [6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123,
  0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5, 2.01033439929228813265e-7];
const F = [1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525, 7.868691311456132591e-4,
  1.8463183175100546818e-5, 1.4215117583164458887e-7, 2.04426310338993978564e-15];

function ratio(num: readonly number[], den: readonly number[], r: number): number {
  let n = 0;
  let d = 0;
  for (let i = num.length - 1; i >= 0; i--) {
    n = n * r + (num[i] as number);
    d = d * r + (den[i] as number);
  }
  return n / d;
}

/**
 * z with P(Z ≤ z) = p, given p for the central part and ln of the smaller tail for the tails
 * (so tails below the double range work). `lowerTailSmaller` tells which tail lnTail belongs to.
 */
function wichura(p: number, lnTail: number, lowerTailSmaller: boolean): number {
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return q * ratio(A, B, r);
  }
  let r = Math.sqrt(-lnTail);
  let z: number;
  if (r <= 5) {
    r -= 1.6;
    z = ratio(C, D, r);
  } else {
    r -= 5;
    z = ratio(E, F, r);
  }
  return lowerTailSmaller ? -z : z;
}

/** z with P(Z ≤ z) = p. p = 0 → −∞, p = 1 → ∞, p outside [0, 1] or NaN → NaN. */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  return p <= 0.5 ? wichura(p, Math.log(p), true) : wichura(p, Math.log1p(-p), false);
}

/** z with P(Z > z) = q (by symmetry −z_q), so q = 1e-300 gives z ≈ 37.0 without forming 1 − q. */
export function normalUpperQuantile(q: number): number {
  return -normalQuantile(q);
}

/** z with ln P(Z ≤ z) = lnP, for lower tails far below the double range. lnP > 0 or NaN → NaN. */
export function normalQuantileFromLog(lnP: number): number {
  if (!(lnP <= 0)) return NaN;
  if (lnP === -Infinity) return -Infinity;
  if (lnP === 0) return Infinity;
  const p = Math.exp(lnP);
  return lnP < -Math.LN2 ? wichura(p, lnP, true) : wichura(p, log1mExp(lnP), false);
}

/** z with ln P(Z > z) = lnQ. */
export function normalUpperQuantileFromLog(lnQ: number): number {
  return -normalQuantileFromLog(lnQ);
}
