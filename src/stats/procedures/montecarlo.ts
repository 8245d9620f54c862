/**
 * Monte Carlo p-values with a seed.
 *
 * - r×c tables: random tables with the observed row and column totals, drawn cell by cell as in Patefield
 *   (1981, Applied Statistics 30:91–97, algorithm AS 159): given what is left of a row and of the columns,
 *   each cell is hypergeometric. Each hypergeometric draw is an inversion search that starts at the mode and
 *   walks outwards by the ratio of neighbouring probabilities.
 * - goodness of fit: multinomial samples drawn as a chain of binomials, each by the same kind of search.
 *
 * The p-value is p = (1 + x) / (B + 1), x the resamples at least as extreme out of B, which is never 0 and is a
 * valid p-value (Davison & Hinkley 1997, §4.2). Its Monte Carlo standard error is √(p(1 − p)/B) with that same
 * p, not with p̂ = x/B: it is the error of the number reported, and it stays above 0 when x = 0 (with p̂ it would be
 * 0 and claim an exact p); the two differ only by O(1/B). The 99% interval is the Wilson score interval for the
 * proportion x/B of extreme resamples.
 */
import { InputError } from '../../errors';
import { dropEmptyMargins, requireCountTable } from './advanced-common';
import { logFactorialTable } from '../distributions/discrete';
import { divergenceTerm } from './divergence';
import { probabilityFromValue } from '../distributions/probability';
import { DEFAULT_SEED, Xoshiro128, type UniformSource } from '../random';
import type { Notice, StatisticLine } from '../result';

/** The statistic ordering the tables: larger is more extreme. */
export type ResamplingStatistic = 'pearson' | 'likelihood-ratio' | 'cressie-read' | 'probability';

export interface MonteCarloOptions {
  readonly statistic: ResamplingStatistic;
  /** Cressie–Read λ (only for 'cressie-read'; default 2/3). */
  readonly lambda?: number;
  /** Number of random tables (default 100,000). */
  readonly resamples?: number;
  readonly seed?: number;
  /** Called about every 1% of the work with the fraction done. */
  readonly onProgress?: (fraction: number) => void;
  /** Polled with the progress calls; returning true stops early with the resamples done so far. */
  readonly shouldCancel?: () => boolean;
}

export interface MonteCarloOutcome {
  readonly statistic: number;
  readonly pValue: number;
  readonly standardError: number;
  /** 99% Wilson interval for the p-value. */
  readonly interval99: { readonly lower: number; readonly upper: number };
  readonly resamples: number;
  readonly requestedResamples: number;
  readonly extremeCount: number;
  readonly seed: number;
  readonly cancelled: boolean;
}

export const DEFAULT_RESAMPLES = 100_000;
/** Largest total count for resampling: the tables of ln k! it needs grow with n (8 bytes per unit). */
export const MAX_RESAMPLING_TOTAL = 10_000_000;

/** Refuses totals whose lookup tables would not fit in memory; at such sizes the chi-square approximation is the tool. */
export function requireResamplingTotal(n: number, argument: 'table' | 'observed'): void {
  if (n > MAX_RESAMPLING_TOTAL) {
    throw new InputError(
      `${argument}: the total count ${n} is above ${MAX_RESAMPLING_TOTAL.toExponential(0)}, too large for exact or Monte Carlo p-values here; with counts this large the chi-square approximation is accurate unless some expected counts are tiny — use "asymptotic"`,
      { argument: { name: argument } },
      'too-large-for-resampling',
    );
  }
}
const Z_995 = 2.5758293035489004; // upper 0.5% point of the standard normal

/** The statistic for a vector of counts (a flattened table) against fixed expected counts. */
export function statisticEvaluator(
  expected: readonly number[],
  statistic: ResamplingStatistic,
  maxCount: number,
  lambda = 2 / 3,
): (counts: ArrayLike<number>) => number {
  const k = expected.length;
  const total = expected.reduce((a, b) => a + b, 0);
  if (statistic === 'pearson') {
    const inverse = expected.map((e) => 1 / e);
    return (x) => {
      let s = 0;
      for (let i = 0; i < k; i++) s += x[i] * x[i] * inverse[i];
      return s - total;
    };
  }
  if (statistic === 'likelihood-ratio') {
    const xLogX = new Float64Array(maxCount + 1);
    for (let i = 1; i <= maxCount; i++) xLogX[i] = i * Math.log(i);
    const logE = expected.map((e) => Math.log(e));
    return (x) => {
      let s = 0;
      for (let i = 0; i < k; i++) if (x[i] > 0) s += xLogX[x[i]] - x[i] * logE[i];
      return 2 * s;
    };
  }
  if (statistic === 'cressie-read') {
    // divergenceTerm carries the limits at λ = 0 and λ = −1 and the infinite term of an empty cell for λ ≤ −1,
    // where the closed form 2/(λ(λ+1)) · Σ o[(o/e)^λ − 1] gives NaN or ∞ for every table.
    return (x) => {
      let s = 0;
      for (let i = 0; i < k; i++) s += divergenceTerm(x[i], expected[i], lambda);
      return s;
    };
  }
  // Probability ordering: −ln P(x) up to a constant, Σ (ln x! − x ln e). Given fixed margins the x ln e part is
  // constant for tables, so the same form serves the multinomial and the multiple hypergeometric.
  const lf = logFactorialTable(maxCount);
  const logE = expected.map((e) => Math.log(e));
  return (x) => {
    let s = 0;
    for (let i = 0; i < k; i++) s += lf[x[i]] - x[i] * logE[i];
    return s;
  };
}

/** Inversion from the mode for a distribution on [lo, hi] given its probability at the mode and neighbour ratios. */
function searchFromMode(
  u0: number,
  mode: number,
  modeProbability: number,
  lo: number,
  hi: number,
  upRatio: (x: number) => number,
  downRatio: (x: number) => number,
): number {
  let u = u0 - modeProbability;
  if (u < 0) return mode;
  let up = mode;
  let down = mode;
  let pUp = modeProbability;
  let pDown = modeProbability;
  while (up < hi || down > lo) {
    if (up < hi) {
      pUp *= upRatio(up);
      up++;
      u -= pUp;
      if (u < 0) return up;
    }
    if (down > lo) {
      pDown *= downRatio(down);
      down--;
      u -= pDown;
      if (u < 0) return down;
    }
  }
  return mode; // only reached through rounding in the last few ulps
}

/** A hypergeometric draw: marked items among `draws` taken from `population` of which `marked` are marked. */
export function drawHypergeometric(rng: UniformSource, marked: number, draws: number, population: number, lf: Float64Array): number {
  if (draws === 0 || marked === 0) return 0;
  if (marked === population) return draws;
  if (draws === population) return marked;
  const lo = Math.max(0, draws + marked - population);
  const hi = Math.min(draws, marked);
  const unmarked = population - marked;
  const offset = unmarked - draws; // P(x+1)/P(x) = (marked − x)(draws − x) / ((x + 1)(offset + x + 1))
  const mode = Math.floor(((draws + 1) * (marked + 1)) / (population + 2));
  const modeProbability = Math.exp(
    lf[marked] - lf[mode] - lf[marked - mode] + lf[unmarked] - lf[draws - mode] - lf[offset + mode] - lf[population] + lf[draws] + lf[population - draws],
  );
  return searchFromMode(
    rng.next(),
    mode,
    modeProbability,
    lo,
    hi,
    (x) => ((marked - x) * (draws - x)) / ((x + 1) * (offset + x + 1)),
    (x) => (x * (offset + x)) / ((marked - x + 1) * (draws - x + 1)),
  );
}

/** A binomial draw. */
export function drawBinomial(rng: UniformSource, trials: number, p: number, lf: Float64Array): number {
  if (trials === 0 || p <= 0) return 0;
  if (p >= 1) return trials;
  const q = 1 - p;
  const mode = Math.min(trials, Math.floor((trials + 1) * p));
  const logMode = lf[trials] - lf[mode] - lf[trials - mode] + mode * Math.log(p) + (trials - mode) * Math.log1p(-p);
  const odds = p / q;
  return searchFromMode(
    rng.next(),
    mode,
    Math.exp(logMode),
    0,
    trials,
    (x) => ((trials - x) / (x + 1)) * odds,
    (x) => (x / (trials - x + 1)) / odds,
  );
}

/**
 * Fills `out` (row-major, r·c) with a random table with the given margins (Patefield 1981).
 * `columnWork` is scratch space of length c.
 */
export function randomTable(
  rng: UniformSource,
  rowTotals: readonly number[],
  columnTotals: readonly number[],
  lf: Float64Array,
  out: Int32Array,
  columnWork: Int32Array,
): void {
  const r = rowTotals.length;
  const c = columnTotals.length;
  let remaining = 0;
  for (let j = 0; j < c; j++) {
    columnWork[j] = columnTotals[j];
    remaining += columnTotals[j];
  }
  for (let i = 0; i < r - 1; i++) {
    let rowLeft = rowTotals[i];
    let pool = remaining; // items in columns j..c−1 among rows i..r−1
    for (let j = 0; j < c - 1; j++) {
      const x = rowLeft === 0 ? 0 : drawHypergeometric(rng, columnWork[j], rowLeft, pool, lf);
      out[i * c + j] = x;
      pool -= columnWork[j];
      columnWork[j] -= x;
      rowLeft -= x;
    }
    out[i * c + c - 1] = rowLeft;
    columnWork[c - 1] -= rowLeft;
    remaining -= rowTotals[i];
  }
  for (let j = 0; j < c; j++) out[(r - 1) * c + j] = columnWork[j];
}

/** How far below the observed statistic a resample still counts as a tie (as extreme). */
export function tieTolerance(observed: number): number {
  // An infinite observed statistic (an empty cell with λ ≤ −1) is matched only by infinite ones.
  if (!Number.isFinite(observed)) return 0;
  return 1e-7 * Math.max(1, Math.abs(observed));
}

function summarise(
  statistic: number,
  extreme: number,
  done: number,
  requested: number,
  seed: number,
  cancelled: boolean,
): MonteCarloOutcome {
  const p = (1 + extreme) / (done + 1);
  const phat = extreme / Math.max(done, 1);
  const z2 = Z_995 * Z_995;
  const centre = (phat + z2 / (2 * done)) / (1 + z2 / done);
  const half = (Z_995 * Math.sqrt((phat * (1 - phat)) / done + z2 / (4 * done * done))) / (1 + z2 / done);
  return {
    statistic,
    pValue: Math.min(1, p),
    standardError: Math.sqrt((p * (1 - p)) / Math.max(done, 1)), // with p = (1 + x)/(B + 1), see the file comment
    interval99: { lower: Math.max(0, centre - half), upper: Math.min(1, centre + half) },
    resamples: done,
    requestedResamples: requested,
    extremeCount: extreme,
    seed,
    cancelled,
  };
}

/** A Monte Carlo run that can be advanced in slices, so a host can show progress and cancel between them. */
export interface ResamplingSession {
  readonly requested: number;
  readonly done: number;
  /** Draws up to `count` more resamples. */
  advance(count: number): void;
  outcome(cancelled: boolean): MonteCarloOutcome;
}

function createSession(options: MonteCarloOptions, observed: number, draw: () => number): ResamplingSession {
  const requested = options.resamples ?? DEFAULT_RESAMPLES;
  const seed = options.seed ?? DEFAULT_SEED;
  const cutoff = observed - tieTolerance(observed);
  let extreme = 0;
  let done = 0;
  return {
    requested,
    get done() {
      return done;
    },
    advance(count: number): void {
      const end = Math.min(requested, done + count);
      for (; done < end; done++) if (draw() >= cutoff) extreme++;
    },
    outcome: (cancelled) => summarise(observed, extreme, done, requested, seed, cancelled),
  };
}

/** Runs a session to the end (or until cancelled), reporting progress about every 1%. */
export function runSession(session: ResamplingSession, options: Pick<MonteCarloOptions, 'onProgress' | 'shouldCancel'>): MonteCarloOutcome {
  const step = Math.max(1, Math.floor(session.requested / 100));
  while (session.done < session.requested) {
    session.advance(step);
    options.onProgress?.(session.done / session.requested);
    if (session.done < session.requested && options.shouldCancel?.()) return session.outcome(true);
  }
  return session.outcome(false);
}

/**
 * Runs a session in slices, awaiting `pause` between them (the caller supplies it, e.g. a macrotask, so that an
 * editor stays responsive and a Cancel button is seen).
 */
export async function runSessionInSlices(
  session: ResamplingSession,
  options: Pick<MonteCarloOptions, 'onProgress' | 'shouldCancel'>,
  pause: () => Promise<void>,
): Promise<MonteCarloOutcome> {
  const step = Math.max(1, Math.floor(session.requested / 100));
  while (session.done < session.requested) {
    session.advance(step);
    options.onProgress?.(session.done / session.requested);
    await pause();
    if (session.done < session.requested && options.shouldCancel?.()) return session.outcome(true);
  }
  return session.outcome(false);
}

/** Monte Carlo p-value of a statistic for independence in an r×c table (margins fixed). */
export function monteCarloTable(table: readonly (readonly number[])[], options: MonteCarloOptions): MonteCarloOutcome {
  return runSession(tableSession(table, options), options);
}

/** A resampling session of random tables with the margins of `table`. */
export function tableSession(table: readonly (readonly number[])[], options: MonteCarloOptions): ResamplingSession {
  const r = table.length;
  const c = table[0].length;
  const rowTotals = table.map((row) => row.reduce((a, b) => a + b, 0));
  const columnTotals = table[0].map((_, j) => table.reduce((a, row) => a + row[j], 0));
  const n = rowTotals.reduce((a, b) => a + b, 0);
  requireResamplingTotal(n, 'table');
  const expected: number[] = [];
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) expected.push((rowTotals[i] * columnTotals[j]) / n);
  const evaluate = statisticEvaluator(expected, options.statistic, n, options.lambda);
  const observed = evaluate(Int32Array.from(table.flat()));
  const lf = logFactorialTable(n);
  const rng = new Xoshiro128(options.seed ?? DEFAULT_SEED);
  const out = new Int32Array(r * c);
  const work = new Int32Array(c);
  return createSession(options, observed, () => {
    randomTable(rng, rowTotals, columnTotals, lf, out, work);
    return evaluate(out);
  });
}

/** Monte Carlo p-value for goodness of fit: multinomial samples of size Σobserved with the given probabilities. */
export function monteCarloMultinomial(observed: readonly number[], probabilities: readonly number[], options: MonteCarloOptions): MonteCarloOutcome {
  return runSession(multinomialSession(observed, probabilities, options), options);
}

/** A resampling session of multinomial samples. */
export function multinomialSession(observed: readonly number[], probabilities: readonly number[], options: MonteCarloOptions): ResamplingSession {
  const n = observed.reduce((a, b) => a + b, 0);
  requireResamplingTotal(n, 'observed');
  const k = observed.length;
  const pTotal = probabilities.reduce((a, b) => a + b, 0);
  const p = probabilities.map((x) => x / pTotal);
  const evaluate = statisticEvaluator(
    p.map((x) => x * n),
    options.statistic,
    n,
    options.lambda,
  );
  const lf = logFactorialTable(n);
  const rng = new Xoshiro128(options.seed ?? DEFAULT_SEED);
  // Conditional probabilities for the chain of binomials.
  const conditional = p.map((x, i) => {
    const rest = p.slice(i).reduce((a, b) => a + b, 0);
    return rest > 0 ? Math.min(1, x / rest) : 0;
  });
  const out = new Int32Array(k);
  return createSession(options, evaluate(Int32Array.from(observed)), () => {
    let left = n;
    for (let i = 0; i < k - 1; i++) {
      const x = drawBinomial(rng, left, conditional[i], lf);
      out[i] = x;
      left -= x;
    }
    out[k - 1] = left;
    return evaluate(out);
  });
}

/** A resampling or exact p-value ready to sit beside the asymptotic one in a TestResult. */
export interface ResamplingResult {
  readonly line: StatisticLine;
  readonly notices: readonly Notice[];
  readonly details: Readonly<Record<string, unknown>>;
}

const NAMES: Record<ResamplingStatistic, { name: string; symbol: string }> = {
  pearson: { name: 'Pearson chi-square', symbol: 'X²' },
  'likelihood-ratio': { name: 'Likelihood-ratio chi-square', symbol: 'G²' },
  'cressie-read': { name: 'Cressie–Read power divergence', symbol: 'CR' },
  probability: { name: 'Fisher’s exact test (tables ordered by probability)', symbol: '' },
};

function monteCarloResult(outcome: MonteCarloOutcome, statistic: ResamplingStatistic, df: number | null, what: string): ResamplingResult {
  const label = NAMES[statistic];
  const notices: Notice[] = [];
  if (outcome.cancelled) {
    notices.push({ code: 'monte-carlo-cancelled', severity: 'warning', message: `The Monte Carlo run was cancelled after ${outcome.resamples} of ${outcome.requestedResamples} resamples; the p-value uses those done.` });
  }
  const interval = { lower: outcome.interval99.lower, upper: outcome.interval99.upper, level: 0.99 };
  const line: StatisticLine = {
    id: `${statistic}-monte-carlo`,
    name: `${label.name}, Monte Carlo p-value`,
    symbol: label.symbol,
    statistic: statistic === 'probability' ? NaN : outcome.statistic,
    df,
    pValue: probabilityFromValue(outcome.pValue),
    standardError: outcome.standardError,
    note: `${outcome.resamples} random ${what} (seed ${outcome.seed}); Monte Carlo standard error ${outcome.standardError.toPrecision(2)}, 99% interval ${interval.lower.toPrecision(3)}–${interval.upper.toPrecision(3)}.`,
  };
  return {
    line,
    notices,
    details: {
      method: 'monte-carlo',
      statistic,
      resamples: outcome.resamples,
      requestedResamples: outcome.requestedResamples,
      seed: outcome.seed,
      extremeCount: outcome.extremeCount,
      pValue: outcome.pValue,
      standardError: outcome.standardError,
      interval99: interval,
      cancelled: outcome.cancelled,
      rule: '(1 + extreme resamples) / (resamples + 1); 99% Wilson interval',
    },
  };
}

/** Monte Carlo p-value for independence in an r×c table (empty rows and columns removed first). */
export function monteCarloIndependence(table: readonly (readonly number[])[], options: MonteCarloOptions): ResamplingResult {
  const counts = independenceInput(table, options);
  return independenceResult(runSession(tableSession(counts, options), options), counts, options);
}

/** The same, run in slices with `pause` awaited between them (progress and cancel in an editor). */
export async function monteCarloIndependenceInSlices(table: readonly (readonly number[])[], options: MonteCarloOptions, pause: () => Promise<void>): Promise<ResamplingResult> {
  const counts = independenceInput(table, options);
  return independenceResult(await runSessionInSlices(tableSession(counts, options), options, pause), counts, options);
}

function independenceInput(table: readonly (readonly number[])[], options: MonteCarloOptions): number[][] {
  const counts = dropEmptyMargins(requireCountTable(table, { name: 'table' }));
  if (counts.length < 2 || counts[0].length < 2) {
    throw new InputError('table: a Monte Carlo test of independence needs at least two non-empty rows and two non-empty columns', { argument: { name: 'table' } }, 'table-too-small');
  }
  requireResamples(options.resamples);
  return counts;
}

function independenceResult(outcome: MonteCarloOutcome, counts: readonly (readonly number[])[], options: MonteCarloOptions): ResamplingResult {
  return monteCarloResult(outcome, options.statistic, (counts.length - 1) * (counts[0].length - 1), 'tables with the observed margins');
}

/** Monte Carlo p-value for goodness of fit (multinomial samples with the hypothesised probabilities). */
export function monteCarloFit(observed: readonly number[], probabilities: readonly number[], options: MonteCarloOptions): ResamplingResult {
  return fitResult(runSession(fitSession(observed, probabilities, options), options), observed, options);
}

/** The same, run in slices with `pause` awaited between them. */
export async function monteCarloFitInSlices(observed: readonly number[], probabilities: readonly number[], options: MonteCarloOptions, pause: () => Promise<void>): Promise<ResamplingResult> {
  return fitResult(await runSessionInSlices(fitSession(observed, probabilities, options), options, pause), observed, options);
}

function fitSession(observed: readonly number[], probabilities: readonly number[], options: MonteCarloOptions): ResamplingSession {
  checkFitInput(observed, probabilities);
  requireResamples(options.resamples);
  // Categories with probability 0 have count 0 (checked by checkFitInput) and never vary.
  const kept = probabilities.map((_, i) => i).filter((i) => probabilities[i] > 0);
  return multinomialSession(kept.map((i) => observed[i]), kept.map((i) => probabilities[i]), options);
}

function fitResult(outcome: MonteCarloOutcome, observed: readonly number[], options: MonteCarloOptions): ResamplingResult {
  return monteCarloResult(outcome, options.statistic, observed.length - 1, 'samples from the hypothesised distribution');
}

function requireResamples(resamples: number | undefined): void {
  if (resamples !== undefined && !(Number.isInteger(resamples) && resamples >= 1 && resamples <= 1e9)) {
    throw new InputError(`resamples: expected a whole number from 1 to 1e9, found ${String(resamples)}`, { argument: { name: 'resamples' } }, 'invalid-resamples');
  }
}

/** Observed counts and probabilities of the same length; a category with probability 0 must have no count. */
export function checkFitInput(observed: readonly number[], probabilities: readonly number[]): void {
  if (observed.length !== probabilities.length || observed.length < 2) {
    throw new InputError(`observed: expected at least 2 categories and one probability per category, found ${observed.length} counts and ${probabilities.length} probabilities`, { argument: { name: 'observed' } }, 'length-mismatch');
  }
  observed.forEach((x, i) => {
    if (!(Number.isInteger(x) && x >= 0)) throw new InputError(`observed[${i}]: expected a count (a whole number ≥ 0), found ${String(x)}`, { argument: { name: 'observed', at: [i] } }, 'invalid-count');
    if (!(probabilities[i] >= 0 && Number.isFinite(probabilities[i]))) throw new InputError(`probability of category ${i + 1}: expected a finite number ≥ 0, found ${String(probabilities[i])}`, { argument: { name: 'probabilities', at: [i] } }, 'invalid-probability');
    if (probabilities[i] === 0 && x > 0) throw new InputError(`category ${i + 1}: probability 0 under the hypothesis but ${x} observed`, { argument: { name: 'observed', at: [i] } }, 'zero-expected');
  });
}
