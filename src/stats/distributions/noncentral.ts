/**
 * The noncentral chi-square distribution χ²(df, ncp), for power and sample-size calculations:
 * a Poisson(ncp/2) mixture of central χ²(df + 2j). Each tail is summed directly (never as 1 − the other).
 *
 * Method (after Ding 1992 and Benton & Krishnamoorthy 2003, rearranged so every recurrence adds
 * positive terms): with a = df/2, h = x/2, m = ncp/2, w_j the Poisson weights and
 * D(b, h) = h^b e^(−h)/Γ(b+1),
 *   lower tail  L = Σ w_j P(a+j, h), P(b−1, h) = P(b, h) + D(b−1, h), summed downward from beyond the
 *               Poisson bulk, where P is evaluated once directly;
 *   upper tail  U = Σ w_j Q(a+j, h), Q(b+1, h) = Q(b, h) + D(b, h), summed upward from below the bulk.
 * The products t_j = w_j·P(a+j) (or w_j·Q(a+j)) are carried with their own recurrences and a power-of-two
 * scale, so tails far below the double range keep their logarithm. Terms are summed until they fall
 * below 1e-18 of the total past the mode of the terms.
 *
 * Domain: df ≥ 0 (df = 0 has an atom e^(−ncp/2) at 0), ncp ≥ 0 (0 gives the central distribution);
 * negative, infinite or NaN parameters → NaN. x < 0 → lower 0, upper 1; x = ∞ → lower 1, upper 0.
 */
import {
  gammaPrefactor,
  logGamma,
  logGammaPrefactor,
  logRegularizedGammaLower,
  logRegularizedGammaUpper,
  regularizedGammaLower,
  regularizedGammaUpper,
} from './gamma';
import {
  chiSquareDensity,
  chiSquareLog10Density,
  chiSquareLogLowerTail,
  chiSquareLogUpperTail,
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperQuantile,
  chiSquareUpperTail,
} from './chisquare';

const RELATIVE_NEGLIGIBLE = 1e-18;
const RESCALE_ABOVE = 2 ** 600;
const RESCALE_FACTOR = 2 ** -600;
const MAX_TERMS = 10_000_000;

/** A sum kept as sum · 2^k. */
interface ScaledSum {
  readonly sum: number;
  readonly k: number;
}

function scaledValue(s: ScaledSum): number {
  if (s.k === 0) return s.sum;
  const half = Math.trunc(s.k / 2);
  return s.sum * 2 ** half * 2 ** (s.k - half);
}

function scaledLog(s: ScaledSum): number {
  return Math.log(s.sum) + s.k * Math.LN2;
}

/**
 * Starting products (w·tail, w·D): directly from the values when both are comfortably inside the
 * double range, else at a common power-of-two scale chosen from their logarithms.
 */
function startingTerms(
  direct: () => [number, number],
  logs: () => [number, number],
): { t: number; e: number; k: number } {
  const [t, e] = direct();
  if (t > 1e-300 && e > 1e-300 && t < 1e300 && e < 1e300) return { t, e, k: 0 };
  const [lnT, lnE] = logs();
  const k = Math.floor(Math.max(lnT, lnE) / Math.LN2);
  return { t: Math.exp(lnT - k * Math.LN2), e: Math.exp(lnE - k * Math.LN2), k };
}

/**
 * Index of the largest term w_j·tail(a+j), approximately: j(a + j) = m·h (where the ratio of
 * consecutive terms crosses 1 in both far tails).
 */
function termMode(a: number, h: number, m: number): number {
  return Math.max(0, (-a + Math.sqrt(a * a + 4 * m * h)) / 2);
}

/**
 * Where to start the downward sum for the lower tail. Beyond j the terms shrink at least by
 * r_j = m·h/((j+1)(a+j+1)), since P(b+1, h)/P(b, h) ≤ h/(b+1); so walking up from the mode until the
 * product of these ratios is below 1e-20 bounds the rest. The Poisson bound m + 10√m + 40 caps it.
 */
function lowerStart(a: number, h: number, m: number): number {
  const poissonCap = Math.ceil(m + 10 * Math.sqrt(m) + 40);
  let j = Math.ceil(termMode(a, h, m));
  let logProduct = 0;
  while (j < poissonCap && logProduct > -46) {
    logProduct += Math.log((m * h) / ((j + 1) * (a + j + 1)));
    j++;
  }
  return Math.max(1, Math.min(j, poissonCap));
}

function lowerMixture(a: number, h: number, m: number): ScaledSum {
  const jHi = lowerStart(a, h, m);
  const b = a + jHi;
  const start = startingTerms(
    () => {
      const w = gammaPrefactor(jHi, m);
      return [w * regularizedGammaLower(b, h), w * gammaPrefactor(b - 1, h)];
    },
    () => {
      const lnW = logGammaPrefactor(jHi, m);
      return [lnW + logRegularizedGammaLower(b, h), lnW + logGammaPrefactor(b - 1, h)];
    },
  );
  let { t, e: f, k } = start;
  let sum = t;
  let previous = t;
  // t_{j−1} = (j/m)(t_j + f_j), f_j = w_j D(a+j−1, h), f_{j−1} = f_j · j (a+j−1) / (m h).
  for (let j = jHi; j >= 1; j--) {
    const r = j / m;
    const next = r * (t + f);
    f = (f * r * (a + j - 1)) / h;
    t = next;
    sum += t;
    if (sum > RESCALE_ABOVE || f > RESCALE_ABOVE) {
      t *= RESCALE_FACTOR;
      f *= RESCALE_FACTOR;
      sum *= RESCALE_FACTOR;
      previous *= RESCALE_FACTOR;
      k += 600;
    }
    if (j - 1 <= m && t < previous && t <= sum * RELATIVE_NEGLIGIBLE) break;
    previous = t;
  }
  return { sum, k };
}

/**
 * Where to start the upward sum for the upper tail. Below j the terms shrink at least by
 * j(a+j−1)/(m·h) per step while h > a+j−1, since Q(b−1, h)/Q(b, h) ≤ (b−1)/h there (from
 * Γ(b, h) ≤ h^b e^(−h)/(h − b + 1)); so walking down from the mode until the product of these ratios
 * is below 1e-20 bounds the rest. The Poisson bound m − 10√m − 40 is the floor.
 */
function upperStart(a: number, h: number, m: number): number {
  const poissonFloor = Math.max(0, Math.floor(m - 10 * Math.sqrt(m) - 40));
  let j = Math.floor(termMode(a, h, m));
  let logProduct = 0;
  while (j > poissonFloor && h > a + j - 1 && logProduct > -46) {
    logProduct += Math.log((j * (a + j - 1)) / (m * h));
    j--;
  }
  return logProduct <= -46 ? j : poissonFloor;
}

function upperMixture(a: number, h: number, m: number): ScaledSum {
  const jLo = upperStart(a, h, m);
  const b = a + jLo;
  const start = startingTerms(
    () => {
      const w = gammaPrefactor(jLo, m);
      return [w * regularizedGammaUpper(b, h), w * gammaPrefactor(b, h)];
    },
    () => {
      const lnW = logGammaPrefactor(jLo, m);
      return [lnW + logRegularizedGammaUpper(b, h), lnW + logGammaPrefactor(b, h)];
    },
  );
  let { t, e, k } = start;
  let sum = t;
  let previous = t;
  // t_{j+1} = (m/(j+1))(t_j + e_j), e_j = w_j D(a+j, h), e_{j+1} = e_j · m h / ((j+1)(a+j+1)).
  for (let j = jLo; j < jLo + MAX_TERMS; j++) {
    const r = m / (j + 1);
    const next = r * (t + e);
    e = (e * r * h) / (a + j + 1);
    t = next;
    sum += t;
    if (sum > RESCALE_ABOVE || e > RESCALE_ABOVE) {
      t *= RESCALE_FACTOR;
      e *= RESCALE_FACTOR;
      sum *= RESCALE_FACTOR;
      previous *= RESCALE_FACTOR;
      k += 600;
    }
    if (j + 1 >= m && t < previous && t <= sum * RELATIVE_NEGLIGIBLE) break;
    previous = t;
  }
  return { sum, k };
}

function badParameters(x: number, df: number, ncp: number): boolean {
  return Number.isNaN(x) || !(df >= 0 && df < Infinity) || !(ncp >= 0 && ncp < Infinity);
}

type Edge = { lower: number } | null;

/** Lower-tail value at the edges of the support (x ≤ 0, x = ∞), or null inside. */
function edge(x: number, df: number, ncp: number): Edge {
  if (x < 0) return { lower: 0 };
  if (x === Infinity) return { lower: 1 };
  if (x === 0) return { lower: df === 0 ? Math.exp(-ncp / 2) : 0 };
  return null;
}

/** P(X ≤ x) for X ~ χ²(df, ncp). */
export function noncentralChiSquareLowerTail(x: number, df: number, ncp: number): number {
  if (badParameters(x, df, ncp)) return NaN;
  if (ncp === 0) return chiSquareLowerTail(x, df);
  const at = edge(x, df, ncp);
  if (at) return at.lower;
  return scaledValue(lowerMixture(df / 2, x / 2, ncp / 2));
}

/** P(X > x) for X ~ χ²(df, ncp), summed directly. */
export function noncentralChiSquareUpperTail(x: number, df: number, ncp: number): number {
  if (badParameters(x, df, ncp)) return NaN;
  if (ncp === 0) return chiSquareUpperTail(x, df);
  const at = edge(x, df, ncp);
  if (at) return 1 - at.lower;
  return scaledValue(upperMixture(df / 2, x / 2, ncp / 2));
}

/** ln P(X ≤ x). */
export function noncentralChiSquareLogLowerTail(x: number, df: number, ncp: number): number {
  if (badParameters(x, df, ncp)) return NaN;
  if (ncp === 0) return chiSquareLogLowerTail(x, df);
  const at = edge(x, df, ncp);
  if (at) return Math.log(at.lower);
  const lower = lowerMixture(df / 2, x / 2, ncp / 2);
  // Near 1, ln L = log1p(−U) keeps the relative accuracy that ln of a rounded L would lose.
  if (scaledValue(lower) > 0.5) return Math.log1p(-scaledValue(upperMixture(df / 2, x / 2, ncp / 2)));
  return scaledLog(lower);
}

/** ln P(X > x). */
export function noncentralChiSquareLogUpperTail(x: number, df: number, ncp: number): number {
  if (badParameters(x, df, ncp)) return NaN;
  if (ncp === 0) return chiSquareLogUpperTail(x, df);
  const at = edge(x, df, ncp);
  if (at) return Math.log1p(-at.lower);
  const upper = upperMixture(df / 2, x / 2, ncp / 2);
  if (scaledValue(upper) > 0.5) return Math.log1p(-scaledValue(lowerMixture(df / 2, x / 2, ncp / 2)));
  return scaledLog(upper);
}

/**
 * Root of the increasing function g on (0, ∞), by bracketing from a start and then the Illinois
 * variant of false position (Dowell & Jarratt 1971) in ln x, with bisection when it stalls.
 */
function solveIncreasing(g: (x: number) => number, start: number): number {
  let lo = start;
  let hi = start;
  let gLo = g(lo);
  let gHi = gLo;
  if (gLo === 0) return lo;
  for (let i = 0; i < 2000 && gLo > 0; i++) {
    hi = lo;
    gHi = gLo;
    lo = lo / 2;
    if (lo < 1e-300) return lo;
    gLo = g(lo);
  }
  for (let i = 0; i < 2000 && gHi < 0; i++) {
    lo = hi;
    gLo = gHi;
    hi = hi * 2;
    gHi = g(hi);
  }
  if (gLo === 0) return lo;
  if (gHi === 0) return hi;
  let u0 = Math.log(lo);
  let u1 = Math.log(hi);
  let g0 = gLo;
  let g1 = gHi;
  let side = 0;
  for (let i = 0; i < 300; i++) {
    let u = (u0 * g1 - u1 * g0) / (g1 - g0);
    if (!(u > u0 && u < u1)) u = 0.5 * (u0 + u1);
    const gu = g(Math.exp(u));
    if (gu === 0 || Number.isNaN(gu)) return Math.exp(u);
    if (gu < 0) {
      u0 = u;
      g0 = gu;
      if (side === -1) g1 /= 2;
      side = -1;
    } else {
      u1 = u;
      g1 = gu;
      if (side === 1) g0 /= 2;
      side = 1;
    }
    if (u1 - u0 <= 2e-16 * Math.max(1, Math.abs(u0))) break;
  }
  return Math.exp(0.5 * (u0 + u1));
}

/** Patnaik (1949) two-moment approximation: χ²(df, ncp) ≈ c · χ²(ν). Used only as a starting point. */
function patnaikStart(p: number, upper: boolean, df: number, ncp: number): number {
  const c = (df + 2 * ncp) / (df + ncp);
  const nu = ((df + ncp) * (df + ncp)) / (df + 2 * ncp);
  const x = c * (upper ? chiSquareUpperQuantile(p, nu) : chiSquareQuantile(p, nu));
  return x > 0 && Number.isFinite(x) ? x : df + ncp;
}

function noncentralQuantile(p: number, df: number, ncp: number, upper: boolean): number {
  if (!(p >= 0 && p <= 1) || !(df >= 0 && df < Infinity) || !(ncp >= 0 && ncp < Infinity)) return NaN;
  if (ncp === 0) return upper ? chiSquareUpperQuantile(p, df) : chiSquareQuantile(p, df);
  const lowerP = upper ? 1 - p : p;
  if (df === 0 && lowerP <= Math.exp(-ncp / 2)) return 0;
  if (upper ? p === 1 : p === 0) return 0;
  if (upper ? p === 0 : p === 1) return Infinity;
  // Solve on the smaller tail, in logs, so that small probabilities keep their precision.
  const useUpper = upper ? p <= 0.5 : p > 0.5;
  const target = upper ? (useUpper ? p : 1 - p) : useUpper ? 1 - p : p;
  const lnTarget = Math.log(target);
  const start = patnaikStart(target, useUpper, df, ncp);
  const g = useUpper
    ? (x: number) => lnTarget - noncentralChiSquareLogUpperTail(x, df, ncp)
    : (x: number) => noncentralChiSquareLogLowerTail(x, df, ncp) - lnTarget;
  return solveIncreasing(g, start);
}

/** x with P(X ≤ x) = p for X ~ χ²(df, ncp). */
export function noncentralChiSquareQuantile(p: number, df: number, ncp: number): number {
  return noncentralQuantile(p, df, ncp, false);
}

/** x with P(X > x) = q for X ~ χ²(df, ncp). */
export function noncentralChiSquareUpperQuantile(q: number, df: number, ncp: number): number {
  return noncentralQuantile(q, df, ncp, true);
}

/**
 * Density of χ²(df, ncp): the Poisson(ncp/2) mixture Σ_j P(J = j)·f(x; df + 2j) of central densities, summed in
 * logs outwards from the Poisson mode until a term no longer changes the sum (Johnson, Kotz & Balakrishnan 1995,
 * ch. 29). ncp = 0 is the central density.
 */
export function noncentralChiSquareDensity(x: number, df: number, ncp: number): number {
  if (badParameters(x, df, ncp)) return NaN;
  if (ncp === 0) return chiSquareDensity(x, df);
  if (x < 0 || x === Infinity) return 0;
  const h = ncp / 2;
  const logTerm = (j: number): number => -h + j * Math.log(h) - logGamma(j + 1) + chiSquareLog10Density(x, df + 2 * j) * Math.LN10;
  const mode = Math.floor(h);
  const top = logTerm(mode);
  if (top === -Infinity) return 0;
  let sum = 1;
  for (let j = mode + 1; ; j++) {
    const t = Math.exp(logTerm(j) - top);
    sum += t;
    if (t <= 1e-17 * sum && j > mode + 2) break;
  }
  for (let j = mode - 1; j >= 0; j--) {
    const t = Math.exp(logTerm(j) - top);
    sum += t;
    if (t <= 1e-17 * sum) break;
  }
  return Math.exp(top) * sum;
}
