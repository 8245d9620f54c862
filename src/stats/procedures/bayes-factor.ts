/**
 * Bayes factors beside the p-value, computed in logarithms throughout (ln Γ sums), so tables with counts of 1e9
 * neither overflow nor underflow; BF₁₀ itself is reported as a double (Infinity or 0 beyond the double range) and
 * log₁₀ BF₁₀ always.
 *
 * Contingency tables: Gunel & Dickey (1974, Biometrika 61:545) conjugate Bayes factors for independence, with
 * the parameterisation of Jamil, Ly, Morey, Love, Marsman & Wagenmakers (2017, Behav Res Methods 49:638): under
 * H₁ every cell has a Dirichlet (or gamma) prior of concentration a (default 1); under H₀ the row and column
 * probabilities have the compatible Dirichlet priors of concentration ξ = J·a − J + 1 (rows) and I·a − I + 1
 * (columns). Four sampling plans:
 *   - joint multinomial (N fixed):      BF₁₀ = [D(y + a)/D(a)] / ([D(r + ξr)/D(ξr)]·[D(c + ξc)/D(ξc)])
 *   - independent multinomial, rows fixed: BF₁₀ = Πᵢ[D(yᵢ + a)/D(a)] / [D(c + ξc)/D(ξc)]  (columns: transposed)
 *   - Poisson (nothing fixed): the joint-multinomial factor times the ratio of the two priors' predictive
 *     probabilities of N, with gamma priors on the total of shapes IJa and IJa − (I−1)(J−1) and rate b = IJa/N
 *   - hypergeometric (both margins fixed, 2×2): the rows-fixed H₁ marginal conditioned on the column totals,
 *     against the (parameter-free) hypergeometric probability under H₀, by summing over every table with the margins.
 *   D(α) = Π Γ(αₖ) / Γ(Σ αₖ).
 * Goodness of fit: the Dirichlet–multinomial Bayes factor of H₁ (proportions ~ Dirichlet(a, …, a)) against the point
 * null of the stated proportions p: BF₁₀ = [D(y + a)/D(a)] / Π pₖ^yₖ (the multinomial coefficient cancels).
 */
import { InputError } from '../../errors';
import { logGamma } from '../distributions/gamma';

export type SamplingPlan = 'poisson' | 'joint-multinomial' | 'rows-fixed' | 'columns-fixed' | 'hypergeometric';
export const SAMPLING_PLANS: readonly SamplingPlan[] = ['poisson', 'joint-multinomial', 'rows-fixed', 'columns-fixed', 'hypergeometric'];

export interface BayesFactor {
  readonly bf10: number;
  readonly log10Bf10: number;
  /** Absent for goodness of fit (no plan needed). */
  readonly samplingPlan?: SamplingPlan;
  readonly priorConcentration: number;
}

/** ln D(α) = Σ ln Γ(αₖ) − ln Γ(Σ αₖ). */
function logDirichletNorm(alpha: readonly number[]): number {
  let s = 0;
  let total = 0;
  for (const x of alpha) {
    s += logGamma(x);
    total += x;
  }
  return s - logGamma(total);
}

/** ln [D(y + a) / D(a)] for counts y and a common concentration a. */
function logDirichletRatio(y: readonly number[], a: number): number {
  return logDirichletNorm(y.map((v) => v + a)) - logDirichletNorm(y.map(() => a));
}

function logDirichletRatioVector(y: readonly number[], alpha: readonly number[]): number {
  return logDirichletNorm(y.map((v, i) => v + alpha[i])) - logDirichletNorm(alpha);
}

function requireConcentration(a: number): void {
  if (!(typeof a === 'number' && Number.isFinite(a) && a > 0)) {
    throw new InputError(`priorConcentration: expected a number greater than 0, found ${JSON.stringify(a)}`, { argument: { name: 'priorConcentration' } }, 'invalid-prior-concentration');
  }
}

function fromLn(ln: number, a: number, plan?: SamplingPlan): BayesFactor {
  return { bf10: Math.exp(ln), log10Bf10: ln / Math.LN10, ...(plan ? { samplingPlan: plan } : {}), priorConcentration: a };
}

function margins(y: readonly (readonly number[])[]): { rows: number[]; cols: number[]; n: number } {
  const rows = y.map((r) => r.reduce((s, x) => s + x, 0));
  const cols = y[0].map((_, j) => y.reduce((s, r) => s + r[j], 0));
  return { rows, cols, n: rows.reduce((s, x) => s + x, 0) };
}

/** ln BF₁₀ under the joint multinomial plan. */
function lnJoint(y: readonly (readonly number[])[], a: number): number {
  const I = y.length;
  const J = y[0].length;
  const { rows, cols } = margins(y);
  const h1 = logDirichletRatio(y.flat(), a);
  const h0 = logDirichletRatio(rows, J * a - J + 1) + logDirichletRatio(cols, I * a - I + 1);
  return h1 - h0;
}

/** ln BF₁₀ with the row totals fixed. */
function lnRowsFixed(y: readonly (readonly number[])[], a: number): number {
  const I = y.length;
  const { cols } = margins(y);
  let h1 = 0;
  for (const row of y) h1 += logDirichletRatio(row, a);
  return h1 - logDirichletRatio(cols, I * a - I + 1);
}

function lnPoisson(y: readonly (readonly number[])[], a: number): number {
  const I = y.length;
  const J = y[0].length;
  const { n } = margins(y);
  const shape1 = I * J * a;
  const shape0 = shape1 - (I - 1) * (J - 1);
  const b = shape1 / n;
  // ln of the gamma–Poisson predictive probability of N with shape s and rate b, without the 1/N! both share.
  const lnPredictive = (s: number): number => logGamma(n + s) - logGamma(s) + s * Math.log(b / (1 + b)) - n * Math.log1p(b);
  return lnJoint(y, a) + lnPredictive(shape1) - lnPredictive(shape0);
}

function lnHypergeometric(y: readonly (readonly number[])[], a: number): number {
  if (y.length !== 2 || y[0].length !== 2) {
    throw new InputError(`samplingPlan: "hypergeometric" is implemented for 2×2 tables only, found ${y.length}×${y[0].length}; choose "rows-fixed" or "joint-multinomial"`, { argument: { name: 'samplingPlan' } }, 'hypergeometric-not-2x2');
  }
  const { rows, cols, n } = margins(y);
  // Tables with these margins: x = y[0][0] from lo to hi.
  const lo = Math.max(0, cols[0] - rows[1]);
  const hi = Math.min(rows[0], cols[0]);
  const lnFact = (k: number): number => logGamma(k + 1);
  // ln of the rows-fixed H₁ marginal probability (multinomial coefficients included) of the table with y[0][0] = x.
  const lnH1 = (x: number): number => {
    const t = [[x, rows[0] - x], [cols[0] - x, rows[1] - cols[0] + x]];
    let s = 0;
    for (let i = 0; i < 2; i++) s += lnFact(rows[i]) - lnFact(t[i][0]) - lnFact(t[i][1]) + logDirichletRatioVector(t[i], [a, a]);
    return s;
  };
  // Terms by the ratio of consecutive ones, re-anchored on the exact ln every 64 steps: a table with margins of a
  // million sums a million terms in a few milliseconds.
  const ratio = (x: number): number => {
    // term(x + 1) / term(x): row 1 gains one in column 1, row 2 loses one in column 1.
    const t00 = x;
    const t01 = rows[0] - x;
    const t10 = cols[0] - x;
    const t11 = rows[1] - cols[0] + x;
    return ((t01 / (t00 + 1)) * ((t00 + a) / (t01 - 1 + a))) * ((t10 / (t11 + 1)) * ((t11 + a) / (t10 - 1 + a)));
  };
  const terms: number[] = [];
  let max = -Infinity;
  let current = 0;
  for (let x = lo, i = 0; x <= hi; x++, i++) {
    current = i % 64 === 0 ? lnH1(x) : current + Math.log(ratio(x - 1));
    terms.push(current);
    if (current > max) max = current;
  }
  let sum = 0;
  for (const t of terms) sum += Math.exp(t - max);
  const lnSum = max + Math.log(sum);
  const x = y[0][0];
  const lnHyper = lnFact(rows[0]) + lnFact(rows[1]) + lnFact(cols[0]) + lnFact(cols[1]) - lnFact(n) - lnFact(y[0][0]) - lnFact(y[0][1]) - lnFact(y[1][0]) - lnFact(y[1][1]);
  return lnH1(x) - lnSum - lnHyper;
}

/**
 * Gunel–Dickey Bayes factor for independence in an r×c table (counts validated by the caller; rows and columns
 * whose total is zero should already be removed — they carry no information and would change ξ).
 */
export function contingencyBayesFactor(table: readonly (readonly number[])[], samplingPlan: SamplingPlan, priorConcentration = 1): BayesFactor {
  requireConcentration(priorConcentration);
  if (table.length < 2 || table[0].length < 2) {
    throw new InputError(`table: the Bayes factor needs a table of at least 2×2, found ${table.length}×${table[0]?.length ?? 0}`, { argument: { name: 'table' } }, 'table-too-small');
  }
  const a = priorConcentration;
  switch (samplingPlan) {
    case 'joint-multinomial':
      return fromLn(lnJoint(table, a), a, samplingPlan);
    case 'rows-fixed':
      return fromLn(lnRowsFixed(table, a), a, samplingPlan);
    case 'columns-fixed':
      return fromLn(lnRowsFixed(transpose(table), a), a, samplingPlan);
    case 'poisson':
      return fromLn(lnPoisson(table, a), a, samplingPlan);
    case 'hypergeometric':
      return fromLn(lnHypergeometric(table, a), a, samplingPlan);
    default:
      throw new InputError(`samplingPlan: expected one of ${SAMPLING_PLANS.map((p) => `"${p}"`).join(', ')}, found ${JSON.stringify(samplingPlan)}`, { argument: { name: 'samplingPlan' } }, 'invalid-samplingPlan');
  }
}

/** Dirichlet–multinomial Bayes factor against the point null of the given proportions (which must sum to 1). */
export function goodnessOfFitBayesFactor(observed: readonly number[], proportions: readonly number[], priorConcentration = 1): BayesFactor {
  requireConcentration(priorConcentration);
  if (observed.length !== proportions.length || observed.length < 2) {
    throw new InputError(`proportions: expected one proportion per category (${observed.length}), found ${proportions.length}`, { argument: { name: 'proportions' } }, 'length-mismatch');
  }
  let lnNull = 0;
  for (let k = 0; k < observed.length; k++) {
    if (observed[k] > 0) lnNull += observed[k] * Math.log(proportions[k]);
  }
  return fromLn(logDirichletRatio(observed, priorConcentration) - lnNull, priorConcentration);
}

function transpose(t: readonly (readonly number[])[]): number[][] {
  return t[0].map((_, j) => t.map((row) => row[j]));
}
