/**
 * Machine output (`--json`): stable field names for pipelines. Every result has `test`, `statistic`,
 * `df`, `pValue` and `pValueLog10` at the top (null where they do not apply); tests add `expected`,
 * `residuals`, `effectSize`, `confidenceInterval` ({lower, upper, level}) and `warnings` where they
 * apply, and everything else in named fields. Infinite interval ends (one-sided bounds) are written
 * as null. Pure.
 */
import type { DistributionResult, Estimate, Interval, PowerResult, Probability, Result, StatisticLine, TestResult } from '../stats/result';
import { evidenceJson } from './evidence';

export type JsonOutput = Record<string, unknown>;

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** The base-10 logarithm of a probability, for p-values below the double range (null for p = 0 exactly). */
export function log10Of(p: Probability): number | null {
  return finiteOrNull(Number.isFinite(p.log10) ? p.log10 : Math.log10(p.value));
}

export function intervalJson(i: Interval): JsonOutput {
  return { lower: finiteOrNull(i.lower), upper: finiteOrNull(i.upper), level: i.level, parameter: i.parameter, method: i.method };
}

function estimateJson(e: Estimate): JsonOutput {
  return { id: e.id, name: e.name, value: finiteOrNull(e.value), ...(e.interval ? { confidenceInterval: intervalJson(e.interval) } : {}), ...(e.note ? { note: e.note } : {}) };
}

function statisticJson(s: StatisticLine): JsonOutput {
  return {
    id: s.id,
    name: s.name,
    statistic: finiteOrNull(s.statistic),
    df: s.df,
    pValue: s.pValue.value,
    pValueLog10: log10Of(s.pValue),
    ...(s.standardError !== undefined ? { standardError: s.standardError } : {}),
    ...(s.note ? { note: s.note } : {}),
  };
}

export function testJson(r: TestResult): JsonOutput {
  const out: JsonOutput = {
    test: r.test,
    procedure: r.procedure,
    statisticSymbol: r.statisticSymbol,
    statistic: finiteOrNull(r.statistic),
    df: r.df,
    pValue: r.pValue.value,
    pValueLog10: log10Of(r.pValue),
    n: r.n,
    alternative: r.alternative,
    alpha: r.alpha,
    significant: r.significant,
    conclusion: r.conclusion,
  };
  if (r.categories) {
    out.categories = r.categories.map((c) => c.label);
    out.observed = r.categories.map((c) => c.observed);
    out.expected = r.categories.map((c) => c.expected);
    out.residuals = { pearson: r.categories.map((c) => c.pearsonResidual), standardized: r.categories.map((c) => c.standardizedResidual) };
    out.contributions = r.categories.map((c) => c.contribution);
  }
  if (r.grid) {
    const g = r.grid;
    out.rowLabels = g.rowLabels;
    out.columnLabels = g.columnLabels;
    out.observed = g.observed;
    out.expected = g.expected;
    out.residuals = { pearson: g.pearsonResiduals, adjusted: g.adjustedResiduals };
    out.contributions = g.contributions;
  }
  if (r.effectSizes.length) {
    out.effectSize = estimateJson(r.effectSizes[0]);
    out.effectSizes = r.effectSizes.map(estimateJson);
  }
  if (r.confidenceInterval) out.confidenceInterval = intervalJson(r.confidenceInterval);
  if (r.estimates.length) out.estimates = r.estimates.map(estimateJson);
  if (r.otherStatistics.length) out.otherStatistics = r.otherStatistics.map(statisticJson);
  out.warnings = r.notices.filter((n) => n.severity === 'warning').map((n) => n.message);
  out.notes = r.notices.filter((n) => n.severity !== 'warning').map((n) => n.message);
  out.notices = r.notices;
  out.assumptions = r.assumptions;
  if (r.details) out.details = r.details;
  Object.assign(out, evidenceJson(r));
  return out;
}

export function distributionJson(r: DistributionResult): JsonOutput {
  const first = r.points[0];
  return {
    test: r.test,
    statistic: first ? first.x : null,
    df: r.df,
    pValue: first ? first.upper.value : null,
    pValueLog10: first ? log10Of(first.upper) : null,
    noncentrality: r.noncentrality,
    points: r.points.map((p) => ({
      x: p.x,
      upper: p.upper.value,
      upperLog10: log10Of(p.upper),
      lower: p.lower.value,
      lowerLog10: log10Of(p.lower),
      density: p.density,
      ...(p.densityLog10 !== undefined ? { densityLog10: p.densityLog10 } : {}),
    })),
    critical: r.critical,
    warnings: r.notices.filter((n) => n.severity === 'warning').map((n) => n.message),
    notices: r.notices,
  };
}

export function powerJson(r: PowerResult): JsonOutput {
  return {
    test: r.test,
    statistic: null,
    df: r.df,
    pValue: null,
    pValueLog10: null,
    target: r.target,
    effectSize: r.effectSize,
    alpha: r.alpha,
    n: r.n,
    power: r.power,
    solvedFor: r.solvedFor,
    curve: r.curve,
    warnings: r.notices.filter((n) => n.severity === 'warning').map((n) => n.message),
    notices: r.notices,
    ...(r.details ? { details: r.details } : {}),
  };
}

export function resultJson(result: Result): JsonOutput {
  switch (result.kind) {
    case 'test':
      return testJson(result);
    case 'distribution':
      return distributionJson(result);
    case 'power':
      return powerJson(result);
  }
}
