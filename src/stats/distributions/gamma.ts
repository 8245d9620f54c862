/**
 * The gamma function family on which the chi-square distribution stands:
 * log Γ, log n!, log C(n, k), and the regularised incomplete gamma functions
 * P(a, x) = γ(a, x) / Γ(a) and Q(a, x) = Γ(a, x) / Γ(a), each tail computed directly
 * (never as 1 − the other tail when the other tail is near 1) and each with a natural-log form
 * that stays finite far below the double range.
 *
 * Domain (all functions): NaN in → NaN out. P and Q need a ≥ 0 and x ≥ 0 … see each function.
 */

const EPS = 2.220446049250313e-16;
const LN_SQRT_2PI = 0.918938533204672741780329736406;
const LN_PI = 1.1447298858494001741434273513531;
const EULER_GAMMA = 0.57721566490153286060651209008240;

// (−1)^k (ζ(k) − 1) / k for k = 2, 3, …  (values of ζ(k) from mpmath 1.2.1 at 40 digits).
const ZETA_MINUS_ONE = [
  6.4493406684822644e-1, 2.0205690315959429e-1, 8.2323233711138192e-2, 3.6927755143369926e-2, 1.734306198444914e-2,
  8.3492773819228268e-3, 4.0773561979443394e-3, 2.0083928260822144e-3, 9.9457512781808534e-4, 4.9418860411946456e-4,
  2.460865533080483e-4, 1.2271334757848915e-4, 6.1248135058704829e-5, 3.0588236307020494e-5, 1.5282259408651872e-5,
  7.6371976378997623e-6, 3.8172932649998399e-6, 1.9082127165539389e-6, 9.5396203387279611e-7, 4.7693298678780646e-7,
  2.3845050272773299e-7, 1.1921992596531107e-7,
];
const LOG_GAMMA_TWO_COEFFS = ZETA_MINUS_ONE.map((z, i) => ((i % 2 === 0 ? 1 : -1) * z) / (i + 2));

// Taylor coefficients of ln Γ(3/2 + ε): ψ^(k−1)(3/2) / k!  (mpmath 1.2.1 at 40 digits).
const LOG_GAMMA_THREE_HALVES = [
  -0.12078223763524522, 0.036489973978576521, 0.46740110027233965, -0.13813277403905333, 0.058712126416768218,
  -0.028952081888893543, 0.0154354841700493, -0.008622603929171287, 0.0049657288094758177, -0.0029209704586679519,
  0.00174503557579013, -0.001054915693867632, 0.00064370298303814858, -0.00039577153964650777,
  0.00024487119048294412, -0.00015231593814270081, 9.5179396625025875e-5, -5.9713623362337704e-5,
  3.7594909269612194e-5, -2.3743185469209343e-5, 1.5036983408359217e-5, -9.5471511921481872e-6,
  6.0754064744846896e-6, -3.8741518300097702e-6,
];

function horner(coeffs: readonly number[], x: number): number {
  let s = 0;
  for (let i = coeffs.length - 1; i >= 0; i--) s = s * x + (coeffs[i] as number);
  return s;
}

/** ln Γ(2 + ε) for |ε| ≤ 0.25: ε(1 − γ) + Σ_{k≥2} (−1)^k (ζ(k) − 1) ε^k / k (Abramowitz & Stegun 6.1.33). */
function logGammaTwoPlus(e: number): number {
  return e * (1 - EULER_GAMMA) + e * e * horner(LOG_GAMMA_TWO_COEFFS, e);
}

/** ln Γ(x) for x in [0.75, 2.25] without cancellation near the zeros at 1 and 2. */
function logGammaCore(r: number): number {
  if (r < 1.25) return logGammaTwoPlus(r - 1) - Math.log1p(r - 1);
  if (r < 1.75) return horner(LOG_GAMMA_THREE_HALVES, r - 1.5);
  return logGammaTwoPlus(r - 2);
}

/** Stirling's series for ln Γ(x) − [(x − ½) ln x − x + ½ ln 2π], x ≥ 10 (Bernoulli numbers B2…B16). */
function stirlingCorrection(x: number): number {
  const r = 1 / x;
  const r2 = r * r;
  return (
    r *
    (1 / 12 +
      r2 *
        (-1 / 360 +
          r2 * (1 / 1260 + r2 * (-1 / 1680 + r2 * (1 / 1188 + r2 * (-691 / 360360 + r2 * (1 / 156 + r2 * (-3617 / 122400))))))))
  );
}

/**
 * ln |Γ(x)|, absolute error about 1e-15 (relative near the zeros at x = 1 and 2).
 * x a non-positive integer → +Infinity (pole); x < 0 otherwise by the reflection formula.
 */
export function logGamma(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x === Infinity) return Infinity;
  if (x <= 0) {
    if (Number.isInteger(x)) return Infinity;
    // Reflection: Γ(x) Γ(1 − x) = π / sin(πx); reduce the argument of sin exactly first.
    const f = x - 2 * Math.round(x / 2);
    return LN_PI - Math.log(Math.abs(Math.sin(Math.PI * f))) - logGamma(1 - x);
  }
  if (x >= 10) return (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI + stirlingCorrection(x);
  if (x < 0.25) return logGammaTwoPlus(x) - Math.log1p(x) - Math.log(x);
  if (x < 0.75) return logGammaCore(x + 1) - Math.log(x);
  if (x <= 2.25) return logGammaCore(x);
  let product = 1;
  let r = x;
  while (r > 2.25) {
    r -= 1;
    product *= r;
  }
  return Math.log(product) + logGammaCore(r);
}

/** ln Γ(1 + a), accurate also when a is tiny (then ≈ −γ a). */
export function logGamma1p(a: number): number {
  if (Math.abs(a) <= 0.25) return logGammaTwoPlus(a) - Math.log1p(a);
  return logGamma(1 + a);
}

/** ln n! for real n ≥ 0 (ln Γ(n + 1)); NaN for n < 0. */
export function logFactorial(n: number): number {
  if (!(n >= 0)) return NaN;
  return logGamma1p(n);
}

/** ln C(n, k) = ln n! − ln k! − ln (n − k)!; −Infinity when k < 0 or k > n (the coefficient is 0). */
export function logChoose(n: number, k: number): number {
  if (Number.isNaN(n) || Number.isNaN(k) || n < 0) return NaN;
  if (k < 0 || k > n) return -Infinity;
  return logFactorial(n) - logFactorial(k) - logFactorial(n - k);
}

/**
 * Stirling's error: ln Γ(a + 1) − [a ln a − a + ½ ln(2πa)], a > 0. From a = 10 the series (error below 2e-18);
 * below, by difference from ln Γ(a + 1) (absolute error about 2e-15, as ln 9! ≈ 12.8).
 */
export function stirlingError(a: number): number {
  if (a >= 10) return stirlingCorrection(a);
  return logGamma1p(a) - (a + 0.5) * Math.log(a) + a - LN_SQRT_2PI;
}

// ---- double-double arithmetic (Dekker 1971; Knuth, TAOCP vol. 2 §4.2.2) ----
// The exponent of x^a e^(−x)/Γ(a+1) reaches ±700 in the far tails, where one rounding of it in double
// costs up to 8e-14 of relative accuracy in the probability; carrying it as hi + lo keeps ~1e-16.
// Results go to two registers instead of a returned pair, so the hot path allocates nothing.

let ddHi = 0;
let ddLo = 0;

function twoSum(a: number, b: number): void {
  const s = a + b;
  const bb = s - a;
  ddHi = s;
  ddLo = a - (s - bb) + (b - bb);
}

function twoProduct(a: number, b: number): void {
  const p = a * b;
  let c = 134217729 * a; // 2^27 + 1 (Veltkamp split)
  const ah = c - (c - a);
  const al = a - ah;
  c = 134217729 * b;
  const bh = c - (c - b);
  const bl = b - bh;
  ddHi = p;
  ddLo = ah * bh - p + ah * bl + al * bh + al * bl;
}

const LN2_HI = 6.9314718036912381649e-1; // 32 significant bits: k·LN2_HI is exact for |k| < 2^21
const LN2_LO = 1.90821492927058770002e-10;

const BITS = new Float64Array(1);
const WORDS = new Uint32Array(BITS.buffer);
const HIGH = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0; // index of the high word
// ln(1 + i/64), i = 0…64, as double-doubles (mpmath 1.2.1 at 50 digits, printed by
// `scripts/fixtures/mpmath_distribution.py logtable`): the table that brings the
// argument of the atanh series below 1/256 (Tang 1990, "Table-driven implementation of the logarithm").
const LOG_TABLE_HI = [
  0.0, 0.015504186535965254, 0.030771658666753687, 0.0458095360312942, 0.06062462181643484,
  0.07522342123758753, 0.08961215868968714, 0.10379679368164356, 0.11778303565638346, 0.13157635778871926,
  0.1451820098444979, 0.15860503017663857, 0.17185025692665923, 0.184922338494012, 0.19782574332991987,
  0.21056476910734964, 0.22314355131420976, 0.2355660713127669, 0.24783616390458127, 0.25995752443692605,
  0.27193371548364176, 0.2837681731306446, 0.2954642128938359, 0.3070250352949119, 0.3184537311185346,
  0.329753286372468, 0.3409265869705932, 0.3519764231571782, 0.3629054936893685, 0.37371640979358406,
  0.38441169891033206, 0.394993808240869, 0.4054651081081644, 0.415827895143711, 0.4260843953109001,
  0.43623676677491807, 0.44628710262841953, 0.4562374334815876, 0.46608972992459924, 0.4758459048699639,
  0.4855078157817008, 0.4950772667978515, 0.5045560107523953, 0.5139457511022343, 0.5232481437645479,
  0.5324647988694718, 0.5415972824327444, 0.5506471179526623, 0.5596157879354227, 0.5685047353526688,
  0.5773153650348236, 0.5860490450035782, 0.5947071077466928, 0.6032908514380843, 0.6118015411059929,
  0.6202404097518576, 0.6286086594223741, 0.6369074622370692, 0.6451379613735847, 0.6533012720127457,
  0.661398482245365, 0.6694306539426292, 0.6773988235918061, 0.6853040030989194, 0.6931471805599453,
];
const LOG_TABLE_LO = [
  0.0, -3.278321022892429e-19, 1.0431732029005968e-18, 1.902959866474257e-18, 2.6424025938726934e-18,
  -5.930604196293241e-18, -5.4268129336647135e-18, 5.47772415726659e-18, -1.1971685747593677e-18, 1.1123000879729588e-17,
  8.242418783022475e-18, 1.1257003872182592e-17, -6.0224538210113705e-18, 3.0236614153574064e-18, 1.2821194372980142e-17,
  -4.249405314729895e-18, -9.091270597324799e-18, -2.3943371495187355e-18, -1.2432209578702523e-17, 2.069806938978935e-17,
  7.83319637697442e-19, -2.032665581126656e-17, -2.16461086040599e-17, -1.2319916200101964e-17, 2.7114779367326236e-17,
  2.122020616196946e-18, 1.7467136443544747e-17, -1.2953893030191963e-17, -2.1492361455310972e-17, 2.1836211281198184e-17,
  -1.612149700764673e-17, -1.5113724418336168e-17, -2.8811380259626426e-18, -2.48753990369597e-17, -2.499176776547466e-17,
  -1.8379648230620457e-18, -1.8182541194649598e-17, 2.122222784062318e-17, -1.4116523239904406e-17, -6.181952722542219e-18,
  -1.6618350693852048e-17, -8.307950959627356e-18, -2.4888518873597905e-17, 3.397548559332142e-17, -3.1833882216350925e-17,
  -9.149239241180804e-19, -3.748764246125639e-17, -2.239429485856908e-17, 2.685492580212308e-17, -5.4267346029482773e-17,
  -8.903591846974013e-18, -3.058363205263577e-17, 1.3751689964323675e-17, 9.9400563470175e-18, -3.7397759448726e-17,
  -3.989161064307651e-17, 4.3538742607970387e-17, 5.422955873465247e-17, 9.346960920120906e-19, -4.306892322029408e-17,
  -7.603333785634003e-18, 2.823733943928343e-17, -2.0978183882652005e-18, 4.893484946270261e-17, 2.3190468138462996e-17,
];

/**
 * ln y into (ddHi, ddLo), y > 0 finite, to about 1e-30 relative: y = m·2^k with m in [1, 2) read from
 * the bits, c = 1 + i/64 the nearest table point, ln m = ln c + 2 atanh((m − c)/(m + c)), the leading
 * terms carried exactly.
 */
function logDoubleDouble(y: number): void {
  let k = 0;
  if (y < 2.2250738585072014e-308) {
    y *= 18014398509481984; // 2^54, out of the subnormal range
    k = -54;
  }
  BITS[0] = y;
  const hi = WORDS[HIGH] as number;
  k += ((hi >>> 20) & 0x7ff) - 1023;
  WORDS[HIGH] = (hi & 0x000fffff) | 0x3ff00000;
  const m = BITS[0] as number;
  const i = Math.round((m - 1) * 64);
  const c = 1 + i / 64;
  const num = m - c; // exact (Sterbenz)
  twoSum(m, c);
  const s = ddHi;
  const se = ddLo;
  const u = num / s;
  twoProduct(u, s);
  const uLo = (num - ddHi - ddLo - u * se) / s;
  const u2 = u * u;
  const tail = u * u2 * (2 / 3 + u2 * (2 / 5 + u2 * (2 / 7))); // |u| ≤ 1/256
  twoSum(k * LN2_HI, LOG_TABLE_HI[i] as number);
  const e1 = ddLo;
  twoSum(ddHi, 2 * u);
  const e2 = ddLo;
  twoSum(ddHi, e1 + e2 + (k * LN2_LO + (LOG_TABLE_LO[i] as number) + 2 * uLo + tail));
}

/** Σ_{j≥1} 2a v^(2j+1)/(2j+1): the part of Loader's bd0 series after its first term. */
function devianceSeriesRest(a: number, v: number): number {
  let ej = 2 * a * v;
  const v2 = v * v;
  let rest = 0;
  for (let j = 1; j < 1000; j++) {
    ej *= v2;
    const next = rest + ej / (2 * j + 1);
    if (next === rest) break;
    rest = next;
  }
  return rest;
}

/**
 * a ln(a/x) + x − a ≥ 0 into (ddHi, ddLo), without cancellation (Loader 2000, "Fast and accurate
 * computation of binomial probabilities": the bd0 term, by its series in v = (a − x)/(a + x) when a and
 * x are within a factor 3 — the series' terms share a sign or shrink by |v|/3 — else by the logarithm).
 * Where the result is below 8 one rounding costs < 2e-15, so plain double arithmetic is kept.
 */
function devianceParts(a: number, x: number, difference?: number): void {
  if (Math.abs(a - x) < 0.5 * (a + x)) {
    const d0 = difference ?? a - x;
    const v0 = d0 / (a + x);
    const plain = d0 * v0 + devianceSeriesRest(a, v0);
    if (plain < 8) {
      ddHi = plain;
      ddLo = 0;
      return;
    }
  }
  // Large deviance: double-double. The series' tail after its first term is kept in double, which
  // is harmless only while it is small (|v| < 0.1: under 7% of the total); beyond, the logarithm
  // form in double-double has no cancellation worth the name.
  if (Math.abs(a - x) < 0.1 * (a + x)) {
    twoSum(a, -x);
    const d = difference ?? ddHi;
    const de = difference === undefined ? ddLo : 0;
    twoSum(a, x);
    const s = ddHi;
    const se = ddLo;
    const v = d / s;
    twoProduct(v, s);
    const vLo = (d - ddHi - ddLo + de - v * se) / s;
    twoProduct(d, v);
    const t = ddHi;
    const lo = ddLo + d * vLo + de * v;
    twoSum(t, devianceSeriesRest(a, v));
    const e = ddLo;
    twoSum(ddHi, e + lo);
    return;
  }
  logDoubleDouble(a);
  const la = ddHi;
  const lae = ddLo;
  logDoubleDouble(x);
  const lx = ddHi;
  const lxe = ddLo;
  twoSum(la, -lx);
  const l = ddHi;
  const le = ddLo;
  twoProduct(a, l);
  const m = ddHi;
  const me = ddLo;
  twoSum(x, -a);
  const dx = ddHi;
  const dxe = ddLo;
  twoSum(m, dx);
  const e = ddLo;
  twoSum(ddHi, e + me + a * (le + lae - lxe) + dxe);
}

/** The rounding error of the product a·b: a·b − fl(a·b), exactly (Dekker's two-product). */
export function productError(a: number, b: number): number {
  twoProduct(a, b);
  return ddLo;
}

/** a ln(a/x) + x − a (Loader's bd0), for a, x > 0. */
export function deviance(a: number, x: number): number {
  devianceParts(a, x);
  return ddHi + ddLo;
}

/**
 * The same with a − x given as `difference`, for callers that know it more precisely than a − x rounds: above 2^52
 * a double holds no fraction, yet a = base + offset at a fractional offset has a − x = (base − x) + offset exactly
 * enough. Where a and x differ by 10% or more the rounding of a no longer matters and the difference is not used.
 */
export function devianceWithDifference(a: number, x: number, difference: number): number {
  devianceParts(a, x, difference);
  return ddHi + ddLo;
}

// A small cache: callers evaluate many x at a few shapes (quantile iterations, the noncentral mixture
// alternating between the Poisson index and the chi-square shape, tables of one df).
const SHAPE_CACHE_SIZE = 4;
const cachedShapes = new Float64Array(SHAPE_CACHE_SIZE).fill(NaN);
const cachedShapeTerms = new Float64Array(SHAPE_CACHE_SIZE);
let nextShapeSlot = 0;

/** ln Γ(a+1) for a < 10, or ½ln(2πa) + stirlingError(a) for a ≥ 10. */
function shapeTerm(a: number): number {
  for (let i = 0; i < SHAPE_CACHE_SIZE; i++) if (cachedShapes[i] === a) return cachedShapeTerms[i] as number;
  const value = a < 10 ? logGamma1p(a) : LN_SQRT_2PI + 0.5 * Math.log(a) + stirlingError(a);
  cachedShapes[nextShapeSlot] = a;
  cachedShapeTerms[nextShapeSlot] = value;
  nextShapeSlot = (nextShapeSlot + 1) % SHAPE_CACHE_SIZE;
  return value;
}

/** ln[x^a e^(−x)/Γ(a + 1)] into (ddHi, ddLo); x > 0 finite, a ≥ 0. */
function logPrefactorParts(a: number, x: number): void {
  if (a < 10) {
    const t = a * Math.log(x);
    if (Math.abs(t) < 12) {
      // a·ln x is small, so its roundings cost < 2e-15; −x is exact, and twoSum keeps the rounding of
      // the sum, so a large x (the far upper tail of a small df) costs nothing.
      twoSum(t - shapeTerm(a), -x);
      return;
    }
    logDoubleDouble(x);
    const ll = ddLo;
    twoProduct(a, ddHi);
    const pl = ddLo;
    twoSum(ddHi, -x);
    const e = ddLo;
    twoSum(ddHi, e + pl + a * ll - shapeTerm(a));
    return;
  }
  // −bd0 − ½ln(2πa) − stirlingError(a), with ln Γ(a+1) = a ln a − a + ½ln(2πa) + stirlingError(a).
  devianceParts(a, x);
  const be = ddLo;
  twoSum(-ddHi, -be - shapeTerm(a));
}

/**
 * ln[x^a e^(−x) / Γ(a + 1)], the common factor of both incomplete gamma tails (the Poisson
 * probability at a, in continuous a), accurate to about 1e-16 absolute even when it is near −700
 * or when a and x are both huge (Loader 2000).
 */
export function logGammaPrefactor(a: number, x: number): number {
  if (x === 0) return a === 0 ? 0 : -Infinity;
  if (x === Infinity) return -Infinity;
  logPrefactorParts(a, x);
  return ddHi + ddLo;
}

/** x^a e^(−x) / Γ(a + 1) with a relative error of a few units in the last place. */
export function gammaPrefactor(a: number, x: number): number {
  if (x === 0) return a === 0 ? 1 : 0;
  if (x === Infinity) return 0;
  logPrefactorParts(a, x);
  return Math.exp(ddHi) * (1 + ddLo);
}

/**
 * The gamma(a, 1) density x^(a−1) e^(−x)/Γ(a) = a·prefactor/x, with the exponent carried in
 * double-double so that it keeps full precision where the prefactor alone would underflow.
 */
export function gammaDensity(a: number, x: number): number {
  if (x === Infinity) return 0;
  if (x === 0) return a < 1 ? Infinity : a === 1 ? 1 : 0;
  logPrefactorParts(a, x);
  if (ddHi > -700 && ddHi < 700 && x > 1e-300) return (Math.exp(ddHi) * (1 + ddLo) * a) / x;
  const h = ddHi;
  const l = ddLo;
  logDoubleDouble(x);
  const lx = ddHi;
  const lxe = ddLo;
  twoSum(h, -lx);
  const e = ddLo;
  twoSum(ddHi, e + l - lxe + Math.log(a));
  return Math.exp(ddHi) * (1 + ddLo);
}

/** Σ_{n≥0} x^n / ((a+1)…(a+n)), so that P(a, x) = prefactor · sum (series for γ(a, x); Abramowitz & Stegun 6.5.29). */
function lowerSeriesSum(a: number, x: number): number {
  let sum = 1;
  let term = 1;
  for (let n = 1; n < 100000; n++) {
    term *= x / (a + n);
    sum += term;
    if (term < sum * EPS * 0.25) break;
  }
  return sum;
}

/**
 * Legendre's continued fraction for Γ(a, x), evaluated by the modified Lentz method
 * (Lentz 1976; Thompson & Barnett 1986): Q(a, x) = x^a e^(−x)/Γ(a) · h.
 */
function upperContinuedFraction(a: number, x: number): number {
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 100000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) <= EPS) break;
  }
  return h;
}

/**
 * Q(a, x) for a < 1 and small x, as [1 − x^a/Γ(a+1)] − x^a/Γ(a+1) · Σ_{n≥1} (−1)^n a x^n / (n! (a+n)),
 * the first bracket by expm1 (DiDonato & Morris 1986, §2, the small-a case).
 */
function upperSmallShape(a: number, x: number): number {
  const t = a * Math.log(x) - logGamma1p(a);
  const u = -Math.expm1(t);
  let term = 1;
  let sum = 0;
  for (let n = 1; n < 1000; n++) {
    term *= -x / n;
    const add = term / (a + n);
    sum += add;
    if (Math.abs(add) <= Math.abs(sum) * EPS * 0.25) break;
  }
  return u - Math.exp(t) * a * sum;
}

// Temme's uniform asymptotic expansion (Temme 1979, "The asymptotic expansion of the incomplete gamma
// functions"; as used by DiDonato & Morris 1986 and Gautschi 1979): with λ = x/a,
// η = sign(λ−1)·√(2(λ − 1 − ln λ)), Q(a, x) = ½erfc(η√(a/2)) + e^(−aη²/2)/√(2πa) · Σ_k C_k(η) a^(−k).
// Rows: C_0 … C_9 as Taylor series in η to degree 24, derived with exact rational arithmetic
// (series reversion of η²/2 = μ − ln(1+μ), C_0 = 1/μ − 1/η, C_k = η⁻¹ dC_{k−1}/dη + (−1)^k γ_k/μ) by
// `scripts/fixtures/mpmath_distribution.py temme`; the γ_k it finds are Stirling's (1/12, 1/288, −139/51840…).
// Measured truncation error ≤ 1.2e-16 relative for a ≥ 20, |x − a| ≤ 0.5a.
const TEMME_COEFFICIENTS: readonly (readonly number[])[] = [
  [-0.3333333333333333, 0.08333333333333333, -0.014814814814814815, 0.0011574074074074073, 0.0003527336860670194, -0.0001787551440329218, 3.919263178522438e-05, -2.185448510679992e-06, -1.85406221071516e-06, 8.296711340953087e-07, -1.7665952736826078e-07, 6.707853543401498e-09, 1.0261809784240309e-08, -4.382036018453353e-09, 9.14769958223679e-10, -2.5514193994946248e-11, -5.830772132550426e-11, 2.4361948020667415e-11, -5.0276692801141755e-12, 1.1004392031956135e-13, 3.371763262400985e-13, -1.392388722418162e-13, 2.8534893807047445e-14, -5.139111834242572e-16, -1.9752288294349442e-15],
  [-0.001851851851851852, -0.003472222222222222, 0.0026455026455026454, -0.0009902263374485596, 0.00020576131687242798, -4.018775720164609e-07, -1.8098550334489977e-05, 7.64916091608111e-06, -1.6120900894563446e-06, 4.647127802807434e-09, 1.378633446915721e-07, -5.752545603517705e-08, 1.1951628599778148e-08, -1.7543241719747647e-11, -1.0091543710600413e-09, 4.162792991842583e-10, -8.56390702649298e-11, 6.067215101604758e-14, 7.1624989648114856e-12, -2.933186643771437e-12, 5.996696365683689e-13, -2.1671786527323313e-16, -4.978339972369262e-14, 2.0291628823713425e-14, -4.13125571381061e-15],
  [0.004133597883597883, -0.0026813271604938273, 0.0007716049382716049, 2.0093878600823047e-06, -0.0001073665322636516, 5.2923448829120125e-05, -1.2760635188618728e-05, 3.423578734096138e-08, 1.3721957309062934e-06, -6.298992138380055e-07, 1.4280614206064242e-07, -2.0477098421990866e-10, -1.409252991086752e-08, 6.228974084922022e-09, -1.3670488396617114e-09, 9.428356159014678e-13, 1.2872252400089318e-10, -5.5645956134363323e-11, 1.197593554636698e-11, -4.1689782251838634e-15, -1.0940640427884595e-12, 4.662239946390136e-13, -9.905105763906907e-14, 1.8931876768373515e-17, 8.859221872591127e-15],
  [0.0006494341563786008, 0.00022947209362139917, -0.0004691894943952557, 0.00026772063206283885, -7.561801671883977e-05, -2.396505113867297e-07, 1.1082654115347302e-05, -5.6749528269915965e-06, 1.4230900732435883e-06, -2.7861080291528143e-11, -1.6958404091930278e-07, 8.099464905388083e-08, -1.9111168485973655e-08, 2.3928620439808118e-12, 2.0620131815488797e-09, -9.460496661855133e-10, 2.1541049775774907e-10, -1.388823336813903e-14, -2.1894761681963938e-11, 9.790998951171684e-12, -2.178219188018096e-12, 6.208819573407901e-17, 2.126978363279737e-13, -9.344688791517433e-14, 2.045367122678285e-14],
  [-0.0008618882909167117, 0.0007840392217200666, -0.0002990724803031902, -1.4638452578843418e-06, 6.641498215465122e-05, -3.968365047179435e-05, 1.1375726970678419e-05, 2.507497226237533e-10, -1.6954149536558305e-06, 8.907507532205309e-07, -2.292934834000805e-07, 2.956794137544049e-11, 2.8865829742708783e-08, -1.4189739437803219e-08, 3.4463580499464896e-09, -2.3024517174528067e-13, -3.9409233028046403e-10, 1.86023389685045e-10, -4.356323005056618e-11, 1.278600101629623e-15, 4.67927502665792e-12, -2.149246470613483e-12, 4.908815614809652e-13, -6.33859148489156e-18, -5.045332069080094e-14],
  [-0.00033679855336635813, -6.972813758365857e-05, 0.0002772753244959392, -0.00019932570516188847, 6.797780477937208e-05, 1.419062920643967e-07, -1.3594048189768693e-05, 8.018470256334202e-06, -2.291481176508095e-06, -3.252473551298454e-10, 3.4652846491085265e-07, -1.8447187191171344e-07, 4.8240967037894184e-08, -1.7989466721743514e-14, -6.306194500013523e-09, 3.162417628774568e-09, -7.840924253697429e-10, 5.192679165254041e-15, 9.358944242306784e-11, -4.513426216163278e-11, 1.0799129993116828e-11, -3.661886712685252e-17, -1.210902069055155e-12, 5.680743584990564e-13, -1.3249659916340829e-13],
  [0.0005313079364639922, -0.0005921664373536939, 0.0002708782096718045, 7.902353232660328e-07, -8.153969367561969e-05, 5.61168275310625e-05, -1.8329116582843375e-05, -3.0796134506033047e-09, 3.465155368803609e-06, -2.0291327396058603e-06, 5.788792863149004e-07, 2.338630673826657e-13, -8.828600746330484e-08, 4.7435958880408125e-08, -1.2545415020710383e-08, 8.649648858010293e-14, 1.6846058979264062e-09, -8.575492823577594e-10, 2.1598224929232125e-10, -7.613230520476153e-16, -2.6639822008536144e-11, 1.3065700536611057e-11, -3.1799163902367977e-12, 4.710976121367431e-18, 3.6902800842763465e-13],
  [0.00034436760689237765, 5.171790908260592e-05, -0.00033493161081142234, 0.0002812695154763237, -0.00010976582244684731, -1.2741009095484485e-07, 2.7744451511563645e-05, -1.8263488805711332e-05, 5.7876949497350525e-06, 4.93875893393627e-10, -1.0595367014026043e-06, 6.166714376110408e-07, -1.7562973359060463e-07, -1.297447328701544e-12, 2.695423606288966e-08, -1.4578352908731272e-08, 3.887645959386175e-09, -3.881002251019412e-17, -5.327994173877286e-10, 2.7437977643314844e-10, -6.995796092070568e-11, 2.589986387486848e-17, 8.856689099669639e-12, -4.403168815871311e-12, 1.0865561947091654e-12],
  [-0.0006526239185953094, 0.0008394987206720873, -0.000438297098541721, -6.969091458420552e-07, 0.00016644846642067547, -0.00012783517679769218, 4.629953263691304e-05, 4.557909867922708e-09, -1.0595271125805195e-05, 6.783342904865167e-06, -2.1075476666258803e-06, -1.7213731432817144e-11, 3.773587741611098e-07, -2.1867506700122867e-07, 6.220228804018927e-08, 6.597703826733e-16, -9.590386497425686e-09, 5.213214492280807e-09, -1.3991589583935709e-09, 5.382058999060575e-16, 1.9484714275467745e-10, -1.0127287556389682e-10, 2.6077347197254926e-11, -5.090418699993299e-18, -3.3721464474854593e-12],
  [-0.0005967612901927463, -7.204895416020011e-05, 0.0006782308837667328, -0.0006401475260262758, 0.00027750107634328704, 1.819700838046515e-07, -8.479507117068503e-05, 6.105192082501531e-05, -2.1073920183404862e-05, -8.858589014125599e-10, 4.5284535953805374e-06, -2.8427815022504407e-06, 8.708234177864641e-07, 3.6886101871706966e-12, -1.534469519070206e-07, 8.862466778790695e-08, -2.5184812301826817e-08, -1.0225912098215092e-14, 3.896947075815478e-09, -2.1267304792235634e-09, 5.737013552805138e-10, -1.8877498501697116e-19, -8.093153869465787e-11, 4.23827232834492e-11, -1.1002224534207725e-11],
];

const SQRT_PI = 1.7724538509055160273;
const SQRT_2PI = 2.5066282746310005024;

/** erfcx(t) = e^(t²) erfc(t) for t ≥ 0, from the incomplete gamma identity erfc(t) = Q(½, t²). */
function erfcxNonNegative(t: number): number {
  const x = t * t;
  if (x < 1.5) return Math.exp(x) * regularizedGammaUpper(0.5, x);
  return (t * upperContinuedFraction(0.5, x)) / SQRT_PI;
}

/** Σ_k C_k(η) a^(−k), summing each C_k and the outer series only while the terms matter. */
function temmeSum(a: number, eta: number): number {
  let total = 0;
  let aPower = 1;
  for (const row of TEMME_COEFFICIENTS) {
    let ck = 0;
    let etaPower = 1;
    for (let n = 0; n < row.length; n++) {
      const term = (row[n] as number) * etaPower;
      ck += term;
      if (n > 2 && Math.abs(term) < 1e-18 * Math.abs(ck)) break;
      etaPower *= eta;
    }
    const contribution = ck * aPower;
    total += contribution;
    if (Math.abs(contribution) < 1e-18 * Math.abs(total)) break;
    aPower /= a;
  }
  return total;
}

let temmeLogSmall = 0;

/**
 * The smaller tail by Temme's expansion — Q when x ≥ a, P when x < a — written as
 * e^(−bd0)·[½erfcx(√bd0) ± Σ/√(2πa)] (bd0 = aη²/2) so that it never underflows early;
 * also leaves its natural log in temmeLogSmall.
 */
function temmeSmallTail(a: number, x: number): number {
  devianceParts(a, x);
  const b = ddHi;
  const bl = ddLo;
  const bd0 = b + bl;
  const t = Math.sqrt(bd0);
  const eta = (x >= a ? 1 : -1) * Math.sqrt((2 * bd0) / a);
  const r = temmeSum(a, eta) / (SQRT_2PI * Math.sqrt(a));
  const bracket = 0.5 * erfcxNonNegative(t) + (x >= a ? r : -r);
  temmeLogSmall = -b - bl + Math.log(bracket);
  return Math.exp(-b) * (1 - bl) * bracket;
}

type Method = 'series' | 'fraction' | 'small-shape' | 'temme';

function chooseMethod(a: number, x: number): Method {
  if (a >= 20 && Math.abs(x - a) < 0.4 * a) return 'temme';
  if (x < a) return 'series';
  if (a < 1 && x < 1.5) return 'small-shape';
  return 'fraction';
}

/** Invalid arguments (NaN, a < 0, x NaN) → true. */
function badArguments(a: number, x: number): boolean {
  return Number.isNaN(a) || Number.isNaN(x) || a < 0 || a === Infinity;
}

/**
 * Regularised lower incomplete gamma P(a, x) = γ(a, x)/Γ(a).
 * Domain: a > 0 real; a = 0 is the point mass at 0 (P = 1 for x ≥ 0); x < 0 → 0; x = ∞ → 1;
 * a < 0, a = ∞ or NaN → NaN.
 */
export function regularizedGammaLower(a: number, x: number): number {
  if (badArguments(a, x)) return NaN;
  if (x < 0) return 0;
  if (a === 0) return 1;
  if (x === 0) return 0;
  if (x === Infinity) return 1;
  switch (chooseMethod(a, x)) {
    case 'temme':
      return x < a ? temmeSmallTail(a, x) : 1 - temmeSmallTail(a, x);
    case 'series':
      return gammaPrefactor(a, x) * lowerSeriesSum(a, x);
    case 'small-shape':
      return 1 - upperSmallShape(a, x);
    case 'fraction':
      return 1 - a * gammaPrefactor(a, x) * upperContinuedFraction(a, x);
  }
}

/**
 * Regularised upper incomplete gamma Q(a, x) = Γ(a, x)/Γ(a), computed directly.
 * Domain as for regularizedGammaLower: a = 0 → 0 for x ≥ 0; x < 0 → 1; x = ∞ → 0; bad input → NaN.
 */
export function regularizedGammaUpper(a: number, x: number): number {
  if (badArguments(a, x)) return NaN;
  if (x < 0) return 1;
  if (a === 0) return 0;
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  switch (chooseMethod(a, x)) {
    case 'temme':
      return x >= a ? temmeSmallTail(a, x) : 1 - temmeSmallTail(a, x);
    case 'series':
      return 1 - gammaPrefactor(a, x) * lowerSeriesSum(a, x);
    case 'small-shape':
      return upperSmallShape(a, x);
    case 'fraction':
      return a * gammaPrefactor(a, x) * upperContinuedFraction(a, x);
  }
}

/** ln P(a, x), finite far below the double range (e.g. for P ≈ 1e-400). Same domain as regularizedGammaLower. */
export function logRegularizedGammaLower(a: number, x: number): number {
  if (badArguments(a, x)) return NaN;
  if (x < 0) return -Infinity;
  if (a === 0) return 0;
  if (x === 0) return -Infinity;
  if (x === Infinity) return 0;
  switch (chooseMethod(a, x)) {
    case 'temme': {
      const small = temmeSmallTail(a, x);
      return x < a ? temmeLogSmall : Math.log1p(-small);
    }
    case 'series':
      return logGammaPrefactor(a, x) + Math.log(lowerSeriesSum(a, x));
    case 'small-shape':
      return Math.log1p(-upperSmallShape(a, x));
    case 'fraction':
      return Math.log1p(-a * gammaPrefactor(a, x) * upperContinuedFraction(a, x));
  }
}

/** ln Q(a, x), finite far below the double range (e.g. the chi-square upper tail at x = 2000, df = 1). */
export function logRegularizedGammaUpper(a: number, x: number): number {
  if (badArguments(a, x)) return NaN;
  if (x < 0) return 0;
  if (a === 0) return -Infinity;
  if (x === 0) return 0;
  if (x === Infinity) return -Infinity;
  switch (chooseMethod(a, x)) {
    case 'temme': {
      const small = temmeSmallTail(a, x);
      return x >= a ? temmeLogSmall : Math.log1p(-small);
    }
    case 'series':
      return Math.log1p(-gammaPrefactor(a, x) * lowerSeriesSum(a, x));
    case 'small-shape':
      return Math.log(upperSmallShape(a, x));
    case 'fraction':
      return Math.log(a) + logGammaPrefactor(a, x) + Math.log(upperContinuedFraction(a, x));
  }
}

let searchSlope = 0;

/**
 * For quantile searches: ln of the lower (upper = false) or upper tail T of gamma(a, 1) at x > 0,
 * leaving s = a·x^a e^(−x)/(Γ(a+1)·T) = |d ln T / d ln x| from the same evaluation for lastSlope().
 */
export function logTailWithSlope(a: number, x: number, upper: boolean): number {
  const method = chooseMethod(a, x);
  if (method === 'series' || method === 'fraction') {
    logPrefactorParts(a, x);
    const lnD = ddHi + ddLo;
    const d = Math.exp(ddHi) * (1 + ddLo);
    if (method === 'series') {
      const sum = lowerSeriesSum(a, x);
      if (!upper) {
        searchSlope = a / sum; // P = D·sum
        return lnD + Math.log(sum);
      }
      const q = 1 - d * sum;
      searchSlope = (a * d) / q;
      return Math.log1p(-d * sum);
    }
    const h = upperContinuedFraction(a, x);
    if (upper) {
      searchSlope = 1 / h; // Q = a·D·h
      return Math.log(a) + lnD + Math.log(h);
    }
    const p = 1 - a * d * h;
    searchSlope = (a * d) / p;
    return Math.log1p(-a * d * h);
  }
  const lnTail = upper ? logRegularizedGammaUpper(a, x) : logRegularizedGammaLower(a, x);
  searchSlope = Math.exp(Math.log(a) + logGammaPrefactor(a, x) - lnTail);
  return lnTail;
}

/** s = |d ln(tail)/d ln x| of the last logTailWithSlope call. */
export function lastSlope(): number {
  return searchSlope;
}
