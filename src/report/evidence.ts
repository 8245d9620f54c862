/**
 * Words for the sections that say how sure a conclusion is: fragility, the Bayes factor (with a plain-words reading
 * and the prior stated), equivalence, and the family of tests. Lines shared by the text and markdown reports, and the
 * JSON of each section exactly as the format promises. Pure.
 */
import type { BayesFactor } from '../stats/procedures/bayes-factor';
import type { FragilityChange } from '../stats/procedures/fragility';
import type { TestResult } from '../stats/result';
import { DEFAULT_FORMAT, formatNumber, formatPApa, formatPercent, type FormatOptions } from './format';

const PLAN_WORDS: Readonly<Record<string, string>> = {
  poisson: 'Poisson sampling (no total fixed in advance)',
  'joint-multinomial': 'joint multinomial sampling (the total fixed)',
  'rows-fixed': 'independent multinomial sampling (row totals fixed)',
  'columns-fixed': 'independent multinomial sampling (column totals fixed)',
  hypergeometric: 'hypergeometric sampling (both margins fixed)',
};

const BASIS_WORDS: Readonly<Record<string, string>> = {
  reported: 'the reported test',
  fisher: "Fisher's exact test",
  pearson: "Pearson's X² without correction",
  yates: "Pearson's X² with Yates' correction",
  asymptotic: 'the chi-square approximation of the reported statistic (the reported exact or Monte Carlo p-value is not recomputed for each change)',
  'post-hoc-family': 'the family conclusion of the comparisons: whether at least one of them is significant after the adjustment (its smallest adjusted p-value), not each comparison on its own',
};

/**
 * How strongly the data favour one hypothesis: the bands of Jeffreys (1961) as relabelled by Lee & Wagenmakers
 * (2013): 1–3 anecdotal, 3–10 moderate, 10–30 strong, 30–100 very strong, above 100 extreme.
 */
export function bayesFactorReading(bf: BayesFactor): string {
  const log10 = bf.log10Bf10;
  const favoured = log10 >= 0 ? 'an association (H₁) over no association (H₀)' : 'no association (H₀) over an association (H₁)';
  const size = Math.abs(log10);
  const strength = size < Math.log10(3) ? 'only anecdotal' : size < 1 ? 'moderate' : size < Math.log10(30) ? 'strong' : size < 2 ? 'very strong' : 'extreme';
  if (size < 1e-12) return 'The data favour neither hypothesis.';
  return `The data give ${strength} evidence for ${favoured}.`;
}

function fitReading(bf: BayesFactor): string {
  return bayesFactorReading(bf).replace('an association (H₁) over no association (H₀)', 'proportions other than the stated ones (H₁) over the stated proportions (H₀)').replace('no association (H₀) over an association (H₁)', 'the stated proportions (H₀) over other proportions (H₁)');
}

/** BF as a number, or as a power of ten beyond the double range. */
function formatBf(log10: number, format: FormatOptions): string {
  if (Math.abs(log10) < 4) return formatNumber(10 ** log10, format.decimals);
  return `10^${formatNumber(log10, 1)}`;
}

function cellName(cell: FragilityChange['cell'], result: TestResult): string {
  if (typeof cell === 'string') return `"${cell}"`;
  const [i, j] = cell;
  const row = result.grid?.rowLabels[i];
  const column = result.grid?.columnLabels[j];
  return row !== undefined && column !== undefined ? `${row} × ${column}` : `row ${i + 1}, column ${j + 1}`;
}

export function fragilityLines(result: TestResult): string[] {
  const f = result.fragility;
  if (!f) return [];
  const source = result.grid && result.grid.observed.length === 2 && result.grid.observed[0].length === 2 && f.basis !== 'reported' && f.basis !== 'post-hoc-family' ? 'Walsh et al. 2014' : 'Baer et al. 2021';
  const by = BASIS_WORDS[f.basis] ?? f.basis;
  const flip = f.reverse ? 'significant' : 'not significant';
  if (f.index === null && f.searchStopped) {
    const changes = f.lowerBound === 1 ? '1 change of a single outcome' : `${f.lowerBound} changes of single outcomes`;
    return [`Fragility: at least ${changes} would be needed to make the result ${flip}; the bounded search stopped at its work limit before finding ${f.lowerBound === 1 ? 'one' : 'them'} (${source}; by ${by}).`];
  }
  if (f.index === null) {
    return [`Fragility: no ${f.method === 'exact' ? '' : 'searched '}change of single outcomes makes the result ${flip} (${source}; by ${by}).`];
  }
  const count = f.method === 'exact' ? `${f.index}` : `at most ${f.index} (bounded search; at least ${f.lowerBound ?? 1})`;
  const name = f.reverse ? 'Reverse fragility index' : 'Fragility index';
  const quotient = f.quotient !== null ? `, quotient ${formatNumber(f.quotient, 4)}` : '';
  const changes = f.changes.map((c) => `${cellName(c.cell, result)} ${c.from} → ${c.to}`).join('; ');
  return [`${name}: ${count}${quotient} — changing ${f.index === 1 ? 'one outcome' : `${f.index} outcomes`} would make the result ${flip} (${source}; by ${by}). Changes: ${changes}.`];
}

export function bayesFactorLines(result: TestResult, format: FormatOptions = DEFAULT_FORMAT): string[] {
  const bf = result.bayesFactor;
  if (!bf) return [];
  const plan = bf.samplingPlan ? `, ${PLAN_WORDS[bf.samplingPlan] ?? bf.samplingPlan}` : '';
  const model = bf.samplingPlan ? 'Gunel–Dickey' : 'Dirichlet–multinomial against the stated proportions';
  const reading = bf.samplingPlan ? bayesFactorReading(bf) : fitReading(bf);
  return [
    `Bayes factor: BF₁₀ = ${formatBf(bf.log10Bf10, format)}, BF₀₁ = ${formatBf(-bf.log10Bf10, format)}, log₁₀ BF₁₀ = ${formatNumber(bf.log10Bf10, 3)} (${model}${plan}; Dirichlet prior with concentration a = ${bf.priorConcentration}). ${reading}`,
  ];
}

/** A limit the user wrote in the spec, shown as written (up to 6 significant digits). */
const given = (x: number): string => String(Number(x.toPrecision(6)));

export function equivalenceLines(result: TestResult, format: FormatOptions = DEFAULT_FORMAT): string[] {
  const e = result.equivalence;
  if (!e) return [];
  const p = formatPApa({ value: e.pValue, log10: e.pValueLog10 });
  const interval = `${formatPercent(e.interval.level)} interval ${formatNumber(e.interval.lower, format.decimals + 2)} to ${formatNumber(e.interval.upper, format.decimals + 2)}`;
  const verdict = e.equivalent ? 'shown' : 'not shown';
  if (e.form === 'goodness-of-fit') {
    return [`Equivalence (Wellek): distance ${formatNumber(e.distance ?? NaN, format.decimals + 2)} from the stated proportions against the margin ε = ${given(e.margin!)}, ${p}; ${interval} for the distance; equivalence ${verdict}.`];
  }
  if (e.form === 'non-inferiority') {
    return [`Non-inferiority: σ < ${given(e.upper!)}, one-sided chi-square test ${p}; ${interval} for σ; ${verdict}.`];
  }
  return [`Equivalence: σ within [${given(e.lower!)}, ${given(e.upper!)}], two one-sided chi-square tests ${p}; ${interval} for σ; equivalence ${verdict}.`];
}

const FAMILY_METHOD_WORDS: Readonly<Record<string, string>> = { holm: 'Holm', bh: 'Benjamini–Hochberg', bonferroni: 'Bonferroni' };

export function familyLines(result: TestResult): string[] {
  const f = result.family;
  if (!f) return [];
  const p = formatPApa({ value: f.adjustedPValue, log10: Math.log10(f.adjustedPValue) });
  return [`Family: one of ${f.size} tests in this report; ${FAMILY_METHOD_WORDS[f.method] ?? f.method}-adjusted ${p} (own ${formatPApa(result.pValue)}).`];
}

/**
 * Words for the notices the evidence sections add (keyed by notice code). The numbers layer and the saved-test
 * layer only name the code; every output format prints these words.
 */
export const EVIDENCE_NOTICE_WORDS: Readonly<Record<string, string>> = {
  'bayes-factor-estimated-parameters':
    'No Bayes factor: the expected proportions use parameters estimated from these data, and the Dirichlet–multinomial Bayes factor is defined against proportions fixed in advance (a point null). Give the proportions themselves, or read the p-value alone.',
};

/** Where one result sits in its family: a saved test among the saved tests of its folder, or a block of a report. */
export interface FamilyMembership {
  /** 1-based position among the family's tests (file-name order in a folder, block order in a report). */
  readonly position: number;
  /** Number of hypothesis tests in the family (distribution lookups and power questions are not part of it). */
  readonly size: number;
  readonly kind: 'report' | 'folder';
}

/**
 * "2 of 3 tests in this folder", with the family's adjustment method and adjusted p when the result carries them
 * (a run with --adjust), else a reminder that the p-value stands alone.
 */
export function familyMembershipLine(membership: FamilyMembership, result: TestResult): string {
  const head = `${membership.position} of ${membership.size} tests in this ${membership.kind}`;
  const f = result.family;
  if (f) {
    const p = formatPApa({ value: f.adjustedPValue, log10: Math.log10(f.adjustedPValue) });
    return `${head}; ${FAMILY_METHOD_WORDS[f.method] ?? f.method}-adjusted ${p} (own ${formatPApa(result.pValue)})`;
  }
  const others = membership.size - 1;
  return `${head}; its p-value is not adjusted for the other ${others === 1 ? 'one' : others}`;
}

/** Every section's lines, in report order. */
export function evidenceLines(result: TestResult, format: FormatOptions = DEFAULT_FORMAT): string[] {
  return [...fragilityLines(result), ...bayesFactorLines(result, format), ...equivalenceLines(result, format), ...familyLines(result)];
}

/** The JSON of each section, with the field names the format promises. */
export function evidenceJson(result: TestResult): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  if (result.fragility) {
    const f = result.fragility;
    out.fragility = {
      index: f.index,
      quotient: f.quotient,
      reverse: f.reverse,
      method: f.method,
      changes: f.changes.map((c) => ({ cell: c.cell, from: c.from, to: c.to })),
      basis: f.basis,
      ...defined({ lowerBound: f.lowerBound, searchStopped: f.searchStopped }),
    };
  }
  if (result.bayesFactor) {
    const b = result.bayesFactor;
    out.bayesFactor = {
      bf10: Number.isFinite(b.bf10) ? b.bf10 : null,
      bf01: Number.isFinite(1 / b.bf10) ? 1 / b.bf10 : null,
      log10Bf10: b.log10Bf10,
      samplingPlan: b.samplingPlan ?? null,
      priorConcentration: b.priorConcentration,
    };
  }
  if (result.equivalence) {
    const e = result.equivalence;
    out.equivalence = {
      pValue: e.pValue,
      pValueLog10: e.pValueLog10,
      equivalent: e.equivalent,
      ...defined({ lower: e.lower, upper: e.upper, margin: e.margin }),
      interval: e.interval,
      form: e.form,
      ...defined({ distance: e.distance }),
    };
  }
  if (result.family) out.family = { size: result.family.size, method: result.family.method, adjustedPValue: result.family.adjustedPValue };
  return out;
}

/** The members whose value is not undefined. */
function defined(members: Record<string, unknown>): Record<string, unknown> {
  return Object.fromEntries(Object.entries(members).filter(([, v]) => v !== undefined));
}
