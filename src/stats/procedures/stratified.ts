/**
 * Stratified tables: the same two variables cross-classified within each of K strata (clinics, shifts, sites).
 *
 * 2×2×K:
 * - Cochran–Mantel–Haenszel test (Cochran 1954; Mantel & Haenszel 1959), with or without the continuity
 *   correction min(½, |Σa − ΣE(a)|) (as in R's mantelhaen.test).
 * - Exact conditional test: the distribution of Σa_k given all margins is the convolution of K hypergeometric
 *   distributions; two-sided p sums the values no more probable than the observed one (tolerance 1e-7).
 *   The conditional maximum-likelihood common odds ratio goes with it.
 * - Mantel–Haenszel common odds ratio with the Robins, Breslow & Greenland (1986) variance of its log.
 * - Breslow–Day (1980) test of homogeneous odds ratios, with Tarone's (1985) adjustment.
 * R×C×K: the generalized CMH statistics of Landis, Heyman & Koch (1978): general association
 * (df (R−1)(C−1)), row mean scores differ (df R−1), and nonzero correlation (df 1).
 */
import { InputError } from '../../errors';
import { chiSquareCore, chiSquareLine, info, labelsOr, pLine, requireCountTable, sum, testResult } from './advanced-common';
import { describeAlpha, describeP, independenceAssumption, nameOf, requireCountTotal, requireLevel } from './assumptions';
import { hypergeometricSupport, logHypergeometricPmf, logSumExp, pointProbabilityTwoSided } from '../distributions/discrete';
import { normalUpperQuantile } from '../distributions/normal';
import type { Estimate, Interval, Notice, StatisticLine, TestResult } from '../result';

export interface StratifiedOptions {
  readonly alpha?: number;
  readonly confidence?: number;
  /** Continuity correction of the 2×2×K CMH statistic. Default false. */
  readonly correction?: boolean;
  /** 'exact' makes the exact conditional test the main p-value (2×2×K only). Default 'asymptotic'. */
  readonly method?: 'asymptotic' | 'exact';
  readonly stratumLabels?: readonly string[];
  readonly rowLabels?: readonly string[];
  readonly columnLabels?: readonly string[];
  /** Scores for the correlation and row-mean-score statistics (R×C×K). Default 1, 2, … */
  readonly rowScores?: readonly number[];
  readonly columnScores?: readonly number[];
  /** What the rows classify (e.g. `shift`); named in the conclusion. */
  readonly rowVariable?: string;
  /** What the columns classify (e.g. `defect`); named in the conclusion. */
  readonly columnVariable?: string;
}

export interface Stratum {
  readonly label: string;
  readonly table: number[][];
  readonly n: number;
}

function readStrata(strata: unknown, options: StratifiedOptions): { strata: Stratum[]; notices: Notice[]; r: number; c: number } {
  if (!Array.isArray(strata) || strata.length === 0) {
    throw new InputError('strata: expected an array of tables (one per stratum), found none', { argument: { name: 'strata' } }, 'no-strata');
  }
  const labels = labelsOr(options.stratumLabels, strata.length, 'stratum ', 'stratumLabels');
  const tables = strata.map((t, k) => requireCountTable(t, { name: 'strata', at: [k] }, `stratum ${k + 1} (${labels[k]})`));
  const r = tables[0].length;
  const c = tables[0][0].length;
  tables.forEach((t, k) => {
    if (t.length !== r || t[0].length !== c) {
      throw new InputError(`strata[${k}] (${labels[k]}): expected a ${r}×${c} table like the first stratum, found ${t.length}×${t[0].length}`, { argument: { name: 'strata', at: [k] } }, 'wrong-shape');
    }
  });
  if (r < 2 || c < 2) throw new InputError(`strata: each stratum must be at least 2×2, found ${r}×${c}`, { argument: { name: 'strata' } }, 'wrong-shape');
  const notices: Notice[] = [];
  const kept: Stratum[] = [];
  const dropped: string[] = [];
  tables.forEach((table, k) => {
    const n = sum(table.flat());
    if (n < 2) dropped.push(labels[k]);
    else kept.push({ label: labels[k], table, n });
  });
  if (dropped.length > 0) {
    notices.push(info('strata-dropped', `Strata with fewer than 2 units carry no information and were left out: ${dropped.join(', ')}.`));
  }
  if (kept.length === 0) throw new InputError('strata: every stratum has fewer than 2 units', { argument: { name: 'strata' } }, 'no-strata');
  requireCountTotal(sum(kept.map((x) => x.n)), 'strata', { name: 'strata' });
  return { strata: kept, notices, r, c };
}

/** CMH for 2×2×K, or the generalized CMH statistics for R×C×K, according to the table size. */
export function stratifiedTest(strata: readonly (readonly (readonly number[])[])[], options: StratifiedOptions = {}): TestResult {
  const read = readStrata(strata, options);
  return read.r === 2 && read.c === 2 ? cmh2x2(read.strata, read.notices, options) : generalizedCmh(read.strata, read.notices, read.r, read.c, options);
}

export interface BreslowDay {
  readonly breslowDay: StatisticLine;
  readonly tarone: StatisticLine;
}

/** Expected a_k under a common odds ratio ψ with the stratum's margins (the root of the quadratic in the support). */
function expectedUnderOddsRatio(table: readonly (readonly number[])[], psi: number): number {
  const [[a, b], [c, d]] = table;
  const n1 = a + b;
  const n2 = c + d;
  const m1 = a + c;
  const lo = Math.max(0, m1 - n2);
  const hi = Math.min(n1, m1);
  if (lo === hi) return lo;
  // (1 − ψ)A² + (n2 − m1 + ψ(n1 + m1))A − ψ n1 m1 = 0
  const qa = 1 - psi;
  const qb = n2 - m1 + psi * (n1 + m1);
  const qc = -psi * n1 * m1;
  if (Math.abs(qa) < 1e-12) return -qc / qb;
  const disc = Math.sqrt(Math.max(0, qb * qb - 4 * qa * qc));
  // Numerically stable pair of roots.
  const q = -0.5 * (qb + Math.sign(qb || 1) * disc);
  const roots = [q / qa, qc / q];
  const inside = roots.filter((x) => x >= lo - 1e-9 && x <= hi + 1e-9);
  return inside.length > 0 ? Math.min(hi, Math.max(lo, inside[0])) : roots[0];
}

/**
 * Breslow–Day (and Tarone) on K* − 1 df, K* the strata whose a_k can vary given their margins. With fewer than two
 * such strata there is nothing to compare, so there is no test: the result is null.
 */
export function breslowDay(tables: readonly (readonly (readonly number[])[])[], psi: number): BreslowDay | null {
  let bd = 0;
  let sumA = 0;
  let sumE = 0;
  let sumV = 0;
  let informative = 0;
  for (const t of tables) {
    const [[a, b], [c, d]] = t;
    const n1 = a + b;
    const n2 = c + d;
    const m1 = a + c;
    const e = expectedUnderOddsRatio(t, psi);
    const v = 1 / (1 / e + 1 / (n1 - e) + 1 / (m1 - e) + 1 / (n2 - m1 + e));
    if (!(v > 0) || !Number.isFinite(v)) continue; // a stratum with a fixed a_k (a zero margin) adds nothing
    informative++;
    bd += ((a - e) * (a - e)) / v;
    sumA += a;
    sumE += e;
    sumV += v;
  }
  if (informative < 2) return null;
  const df = informative - 1;
  const tarone = bd - ((sumA - sumE) * (sumA - sumE)) / sumV;
  return {
    breslowDay: chiSquareLine('breslow-day', 'Breslow–Day test of homogeneous odds ratios', 'X²', bd, df),
    tarone: chiSquareLine('breslow-day-tarone', "Breslow–Day test with Tarone's adjustment", 'X²', tarone, df),
  };
}

/**
 * Cost model of the exact conditional test: the convolution costs Σ_k (length so far × support of stratum k)
 * steps, and the estimate and interval about 600 passes over the final support. Beyond either limit (about half a
 * second each) the exact line is left out, or refused when it was asked for.
 */
export const EXACT_STRATIFIED_WORK_LIMIT = 2e7;
export const EXACT_STRATIFIED_SUPPORT_LIMIT = 20_000;

/** The convolution's work and final support length, without doing it. */
function convolutionCost(tables: readonly (readonly (readonly number[])[])[]): { work: number; support: number } {
  let length = 1;
  let work = 0;
  for (const t of tables) {
    const [[a, b], [c, d]] = t;
    const [klo, khi] = hypergeometricSupport(a + c, a + b, a + b + c + d);
    const span = khi - klo + 1;
    work += length * span;
    length += span - 1;
  }
  return { work, support: length };
}

/** Exact conditional distribution of Σa_k under a common odds ratio of 1: ln P over [lo, hi]. */
function convolvedLogPmf(tables: readonly (readonly (readonly number[])[])[]): { lo: number; logPmf: number[] } {
  let lo = 0;
  let logPmf = [0];
  for (const t of tables) {
    const [[a, b], [c]] = t;
    const n1 = a + b;
    const m1 = a + c;
    const n = t[0][0] + t[0][1] + t[1][0] + t[1][1];
    const [klo, khi] = hypergeometricSupport(m1, n1, n);
    const stratum: number[] = [];
    for (let x = klo; x <= khi; x++) stratum.push(logHypergeometricPmf(x, m1, n1, n));
    const next = new Array<number>(logPmf.length + stratum.length - 1).fill(-Infinity);
    for (let i = 0; i < logPmf.length; i++) {
      for (let j = 0; j < stratum.length; j++) {
        const v = logPmf[i] + stratum[j];
        const cur = next[i + j];
        next[i + j] = cur === -Infinity ? v : Math.max(cur, v) + Math.log1p(Math.exp(-Math.abs(cur - v)));
      }
    }
    logPmf = next;
    lo += klo;
  }
  return { lo, logPmf };
}

/** The monotone function f(ln ψ) solved by bisection on [−50, 50] (ψ from about 2e-22 to 5e21). */
function solveLogPsi(increasing: (logPsi: number) => number, target: number): number {
  let a = -50;
  let b = 50;
  for (let it = 0; it < 200 && b - a > 1e-12; it++) {
    const mid = (a + b) / 2;
    if (increasing(mid) < target) a = mid;
    else b = mid;
  }
  return Math.exp((a + b) / 2);
}

/** ln of the weights P(S = s)·ψ^s normalised, for the noncentral (ψ ≠ 1) conditional distribution. */
function tiltedLogPmf(lo: number, logPmf: readonly number[], logPsi: number): number[] {
  const w = logPmf.map((lp, i) => lp + (lo + i) * logPsi);
  const z = logSumExp(w);
  return w.map((x) => x - z);
}

/** Conditional MLE of the common odds ratio: solves E_ψ[Σa] = observed Σa. */
function conditionalMle(lo: number, logPmf: readonly number[], observed: number): number {
  const hi = lo + logPmf.length - 1;
  if (observed <= lo) return 0;
  if (observed >= hi) return Infinity;
  return solveLogPsi((logPsi) => tiltedLogPmf(lo, logPmf, logPsi).reduce((acc, lw, i) => acc + (lo + i) * Math.exp(lw), 0), observed);
}

/**
 * Exact conditional interval for the common odds ratio (Cornfield-type, as R's mantelhaen.test with exact = TRUE):
 * the ψ at which P_ψ(S ≥ s) = (1 − level)/2 (lower) and P_ψ(S ≤ s) = (1 − level)/2 (upper).
 */
function conditionalInterval(lo: number, logPmf: readonly number[], observed: number, level: number): Interval {
  const hi = lo + logPmf.length - 1;
  const tail = (1 - level) / 2;
  const upperTail = (logPsi: number): number => logSumExp(tiltedLogPmf(lo, logPmf, logPsi).slice(observed - lo));
  const lowerTail = (logPsi: number): number => -logSumExp(tiltedLogPmf(lo, logPmf, logPsi).slice(0, observed - lo + 1));
  const logTail = Math.log(tail);
  return {
    lower: observed <= lo ? 0 : solveLogPsi(upperTail, logTail),
    upper: observed >= hi ? Infinity : solveLogPsi(lowerTail, -logTail),
    level,
    parameter: 'common odds ratio',
    method: 'exact conditional (inverting the one-sided conditional tests)',
  };
}

/**
 * The conclusion in plain words, naming the row and column variables when they are known
 * ("Within strata, `shift` and `defect` are associated …"), generic otherwise.
 */
function stratifiedConclusion(significant: boolean, alpha: number, p: string, options: StratifiedOptions, extra = ''): string {
  const row = nameOf(options.rowVariable);
  const column = nameOf(options.columnVariable);
  const pair = row === undefined && column === undefined ? 'the row and column variables' : `${row ?? 'the row variable'} and ${column ?? 'the column variable'}`;
  return significant
    ? `Within strata, ${pair} are associated ${describeAlpha(alpha)} (${p})${extra}.`
    : `The data do not show an association between ${pair} within strata ${describeAlpha(alpha)} (${p}).`;
}

function cmh2x2(strata: readonly Stratum[], notices: Notice[], options: StratifiedOptions): TestResult {
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  const confidence = requireLevel(options.confidence ?? 0.95, 'confidence');
  const method = options.method ?? 'asymptotic';
  const tables = strata.map((s) => s.table);
  let sumA = 0;
  let sumE = 0;
  let sumV = 0;
  let rNum = 0; // Σ a d / n
  let sDen = 0; // Σ b c / n
  let pr = 0;
  let psqr = 0;
  let qs = 0;
  const perStratum: { label: string; oddsRatio: number; n: number }[] = [];
  for (const s of strata) {
    const [[a, b], [c, d]] = s.table;
    const n = s.n;
    const n1 = a + b;
    const n2 = c + d;
    const m1 = a + c;
    const m2 = b + d;
    sumA += a;
    sumE += (n1 * m1) / n;
    sumV += (n1 * n2 * m1 * m2) / (n * n * (n - 1));
    const rk = (a * d) / n;
    const sk = (b * c) / n;
    const pk = (a + d) / n;
    const qk = (b + c) / n;
    rNum += rk;
    sDen += sk;
    pr += pk * rk;
    psqr += pk * sk + qk * rk;
    qs += qk * sk;
    perStratum.push({ label: s.label, oddsRatio: b * c === 0 ? (a * d === 0 ? NaN : Infinity) : (a * d) / (b * c), n });
  }
  const delta = sumA - sumE;
  const uncorrected = sumV > 0 ? (delta * delta) / sumV : NaN;
  const yates = Math.min(0.5, Math.abs(delta));
  const corrected = sumV > 0 ? (Math.abs(delta) - yates) ** 2 / sumV : NaN;
  const uncorrectedLine = chiSquareLine('cmh', 'Cochran–Mantel–Haenszel chi-square', 'X²', uncorrected, 1);
  const correctedLine = chiSquareLine('cmh-corrected', 'Cochran–Mantel–Haenszel chi-square with continuity correction', 'X²', corrected, 1);

  const cost = convolutionCost(tables);
  const exactFits = cost.work <= EXACT_STRATIFIED_WORK_LIMIT && cost.support <= EXACT_STRATIFIED_SUPPORT_LIMIT;
  const limitText = `the exact conditional distribution of Σa here has ${cost.support} values and costs ${cost.work.toPrecision(3)} steps; the limits are ${EXACT_STRATIFIED_SUPPORT_LIMIT} values and ${EXACT_STRATIFIED_WORK_LIMIT.toPrecision(1)} steps`;
  if (!exactFits && method === 'exact') {
    throw new InputError(`method: ${limitText}, so the exact test is not computed for counts this large; use "asymptotic" (the chi-square approximation is accurate at these sizes)`, { argument: { name: 'method' } }, 'exact-too-large');
  }
  if (!exactFits) notices.push(info('exact-too-large', `The exact conditional test and the conditional estimate of the common odds ratio are left out: ${limitText}.`));
  const exact = exactFits ? convolvedLogPmf(tables) : null;
  const exactLine = exact ? pLine('cmh-exact', 'Exact conditional test (common odds ratio 1)', pointProbabilityTwoSided(exact.logPmf, sumA - exact.lo), `Σa = ${sumA}, given every stratum's margins`, sumA, 'Σa') : null;

  const oddsRatio = rNum / sDen;
  const variance = pr / (2 * rNum * rNum) + psqr / (2 * rNum * sDen) + qs / (2 * sDen * sDen);
  const z = normalUpperQuantile((1 - confidence) / 2);
  const se = Math.sqrt(variance);
  const finiteRatio = oddsRatio > 0 && Number.isFinite(oddsRatio);
  if (!finiteRatio) {
    notices.push(info('odds-ratio-not-finite', `The Mantel–Haenszel odds ratio is ${Number.isNaN(oddsRatio) ? 'undefined' : oddsRatio === 0 ? '0' : 'infinite'} (a zero in every stratum's ${oddsRatio === 0 ? 'a·d' : 'b·c'} product), so it has no interval and the homogeneity test is not computed; the tests of association are unaffected.`));
  }
  const interval: Interval = {
    lower: Math.exp(Math.log(oddsRatio) - z * se),
    upper: Math.exp(Math.log(oddsRatio) + z * se),
    level: confidence,
    parameter: 'common odds ratio',
    method: 'Robins–Breslow–Greenland variance of the log Mantel–Haenszel estimate',
  };
  const homogeneity = finiteRatio ? breslowDay(tables, oddsRatio) : null;
  if (strata.length < 2) notices.push(info('single-stratum', 'Only one stratum: the homogeneity test of odds ratios needs at least two.'));
  else if (finiteRatio && homogeneity === null) {
    notices.push(info('homogeneity-not-tested', 'Fewer than two strata have a count that can vary given their margins (the others have a zero row or column total), so there is no Breslow–Day test of homogeneous odds ratios.'));
  }
  const estimates: Estimate[] = [
    finiteRatio ? { id: 'mantelHaenszelOddsRatio', name: 'Mantel–Haenszel common odds ratio', value: oddsRatio, interval } : { id: 'mantelHaenszelOddsRatio', name: 'Mantel–Haenszel common odds ratio', value: oddsRatio },
  ];
  const conditionalOr = exact ? conditionalMle(exact.lo, exact.logPmf, sumA) : NaN;
  if (exact) {
    estimates.push({ id: 'conditionalOddsRatio', name: 'Common odds ratio, conditional maximum likelihood', value: conditionalOr, interval: conditionalInterval(exact.lo, exact.logPmf, sumA, confidence), note: 'The estimate and interval that go with the exact conditional test.' });
  }
  const main = method === 'exact' && exactLine ? exactLine : options.correction ? correctedLine : uncorrectedLine;
  const others = [uncorrectedLine, correctedLine, ...(exactLine ? [exactLine] : [])].filter((l) => l !== main);
  const homogeneityTested = homogeneity !== null;
  if (homogeneity !== null) others.push(homogeneity.breslowDay, homogeneity.tarone);
  const pValue = main.pValue;
  const significant = pValue.value < alpha;
  const heterogeneous = homogeneity !== null && homogeneity.tarone.pValue.value < alpha;
  if (heterogeneous && homogeneity !== null) {
    notices.push({ code: 'heterogeneous-odds-ratios', severity: 'warning', message: `The odds ratios differ between strata (Breslow–Day with Tarone's adjustment, ${describeP(homogeneity.tarone.pValue)}): a single common odds ratio summarises them poorly; look at the strata one by one.` });
  }
  return testResult(
    {
      test: 'stratified',
      procedure: method === 'exact' ? 'Exact conditional test of independence in 2×2×K tables' : `Cochran–Mantel–Haenszel test${options.correction ? ' with continuity correction' : ''}`,
      statisticSymbol: main.symbol,
      statistic: main.statistic,
      df: main.df,
      n: sum(strata.map((s) => s.n)),
      pValue,
      alternative: 'two-sided',
      reference: method === 'exact' ? { kind: 'none' } : { kind: 'chi-square', df: 1 },
      alpha,
      conclusion: stratifiedConclusion(significant, alpha, describeP(pValue), options, finiteRatio ? `; the common odds ratio is about ${oddsRatio.toPrecision(3)}` : ''),
    },
    {
      otherStatistics: others,
      estimates,
      effectSizes: [],
      ...(finiteRatio ? { confidenceInterval: interval } : {}),
      notices,
      assumptions: [
        independenceAssumption('counted unit'),
        {
          id: 'common-odds-ratio',
          title: 'A common odds ratio across strata',
          status: !homogeneityTested ? 'unchecked' : heterogeneous ? 'failed' : 'met',
          explanation: 'The CMH test is most powerful, and the pooled odds ratio meaningful, when the association has the same direction and size in every stratum. The Breslow–Day test checks this.',
          alternative: 'Report the strata separately',
        },
      ],
      details: {
        strata: perStratum,
        commonOddsRatio: finiteRatio ? { value: oddsRatio, logStandardError: se, interval } : { value: oddsRatio },
        homogeneity: homogeneity !== null ? { breslowDay: homogeneity.breslowDay, tarone: homogeneity.tarone } : null,
        exact: exactLine ? { pValue: exactLine.pValue, conditionalOddsRatio: conditionalOr } : null,
        correctionApplied: method === 'asymptotic' && options.correction === true,
      },
    },
  );
}

// ---------------------------------------------------------------------------------------- R×C×K

type Matrix = number[][];

function kron(a: Matrix, b: Matrix): Matrix {
  const out: Matrix = [];
  for (const ra of a) for (const rb of b) out.push(ra.flatMap((x) => rb.map((y) => x * y)));
  return out;
}

function multiply(a: Matrix, b: Matrix): Matrix {
  return a.map((row) => b[0].map((_, j) => row.reduce((acc, x, k) => acc + x * b[k][j], 0)));
}

function transpose(a: Matrix): Matrix {
  return a[0].map((_, j) => a.map((row) => row[j]));
}

/** Solves S x = g for a symmetric positive definite S (Gaussian elimination with partial pivoting). */
function solve(s: Matrix, g: number[]): number[] | null {
  const n = g.length;
  const m = s.map((row, i) => [...row, g[i]]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let i = col + 1; i < n; i++) if (Math.abs(m[i][col]) > Math.abs(m[pivot][col])) pivot = i;
    if (Math.abs(m[pivot][col]) < 1e-12 * Math.max(1, Math.abs(m[col][col]))) return null;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    for (let i = col + 1; i < n; i++) {
      const f = m[i][col] / m[col][col];
      for (let j = col; j <= n; j++) m[i][j] -= f * m[col][j];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let acc = m[i][n];
    for (let j = i + 1; j < n; j++) acc -= m[i][j] * x[j];
    x[i] = acc / m[i][i];
  }
  return x;
}

/** Covariance of multinomial proportions, diag(p) − p pᵀ. */
function proportionCovariance(p: readonly number[]): Matrix {
  return p.map((pi, i) => p.map((pj, j) => (i === j ? pi : 0) - pi * pj));
}

function identityBlock(size: number): Matrix {
  // [I_{size−1}, 0]: contrasts that drop the last category
  return Array.from({ length: size - 1 }, (_, i) => Array.from({ length: size }, (_, j) => (i === j ? 1 : 0)));
}

/** Q = Gᵀ V⁻¹ G for contrasts A = rowPart ⊗ columnPart summed over strata. */
function cmhQuadratic(strata: readonly Stratum[], rowPart: Matrix, columnPart: Matrix): { statistic: number; df: number } {
  const a = kron(rowPart, columnPart);
  const q = a.length;
  const g = new Array<number>(q).fill(0);
  const v: Matrix = Array.from({ length: q }, () => new Array<number>(q).fill(0));
  for (const s of strata) {
    const n = s.n;
    const rowTotals = s.table.map((row) => sum(row));
    const colTotals = s.table[0].map((_, j) => sum(s.table.map((row) => row[j])));
    const pr = rowTotals.map((x) => x / n);
    const pc = colTotals.map((x) => x / n);
    const observedMinusExpected = s.table.flatMap((row, i) => row.map((x, j) => x - n * pr[i] * pc[j]));
    const cov = kron(proportionCovariance(pr), proportionCovariance(pc)).map((row) => row.map((x) => (x * n * n) / (n - 1)));
    const av = multiply(a, cov);
    const avat = multiply(av, transpose(a));
    for (let i = 0; i < q; i++) {
      g[i] += a[i].reduce((acc, x, k) => acc + x * observedMinusExpected[k], 0);
      for (let j = 0; j < q; j++) v[i][j] += avat[i][j];
    }
  }
  const x = solve(v, g);
  if (x === null) return { statistic: NaN, df: q };
  return { statistic: g.reduce((acc, gi, i) => acc + gi * x[i], 0), df: q };
}

function scoresOr(scores: readonly number[] | undefined, count: number, what: 'rowScores' | 'columnScores'): number[] {
  if (scores === undefined) return Array.from({ length: count }, (_, i) => i + 1);
  if (scores.length !== count || scores.some((x) => !Number.isFinite(x))) {
    throw new InputError(`${what}: expected ${count} finite scores, found ${JSON.stringify(scores)}`, { argument: { name: what } }, 'invalid-scores');
  }
  return scores.slice();
}

/** The three generalized CMH statistics (Landis, Heyman & Koch 1978). */
export function generalizedCmhStatistics(
  strata: readonly Stratum[],
  r: number,
  c: number,
  rowScores: readonly number[],
  columnScores: readonly number[],
): { general: StatisticLine; rowMeans: StatisticLine; correlation: StatisticLine } {
  const general = cmhQuadratic(strata, identityBlock(r), identityBlock(c));
  const rowMeans = cmhQuadratic(strata, identityBlock(r), [columnScores.slice()]);
  const correlation = cmhQuadratic(strata, [rowScores.slice()], [columnScores.slice()]);
  return {
    general: chiSquareLine('cmh-general', 'Generalized CMH: general association', 'Q', general.statistic, general.df),
    rowMeans: chiSquareLine('cmh-row-means', 'Generalized CMH: row mean scores differ', 'Q', rowMeans.statistic, rowMeans.df, 'Uses the column scores.'),
    correlation: chiSquareLine('cmh-correlation', 'Generalized CMH: nonzero correlation', 'Q', correlation.statistic, correlation.df, 'Uses the row and column scores.'),
  };
}

function generalizedCmh(strata: readonly Stratum[], notices: Notice[], r: number, c: number, options: StratifiedOptions): TestResult {
  const alpha = requireLevel(options.alpha ?? 0.05, 'alpha');
  if (options.method === 'exact') {
    throw new InputError('method: the exact conditional test is available for 2×2×K strata only; use "asymptotic" for R×C×K', { argument: { name: 'method' } }, 'method-unavailable');
  }
  const rowScores = scoresOr(options.rowScores, r, 'rowScores');
  const columnScores = scoresOr(options.columnScores, c, 'columnScores');
  const s = generalizedCmhStatistics(strata, r, c, rowScores, columnScores);
  const main = s.general;
  const significant = main.pValue.value < alpha;
  return testResult(
    {
      ...chiSquareCore('stratified', 'Generalized Cochran–Mantel–Haenszel test', main, sum(strata.map((x) => x.n)), alpha),
      conclusion: stratifiedConclusion(significant, alpha, describeP(main.pValue), options),
    },
    {
      otherStatistics: [s.rowMeans, s.correlation],
      notices,
      assumptions: [independenceAssumption('counted unit')],
      details: { rowScores, columnScores, strata: strata.map((x) => ({ label: x.label, n: x.n })) },
    },
  );
}
