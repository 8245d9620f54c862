/**
 * Plot geometry for the results panel, in data units. Pure: the webview only maps these numbers to
 * pixels and draws SVG, so every choice about what a plot shows (which tail is shaded, where the axis
 * ends, how strongly a cell is tinted) is made and unit-tested here.
 */
import type { DensityPlot, DeviationPlot, IntervalPlot, Plot, PlotPoint, PowerCurvePlot, ResidualGridPlot, ResidualShade } from '../protocol';
import { chiSquareDensity, chiSquareQuantile, chiSquareUpperQuantile } from '../stats/distributions/chisquare';
import { normalDensity, normalQuantile, normalUpperQuantile } from '../stats/distributions/normal';
import type { Alternative, CategoryRow, CellGrid, DistributionResult, PowerResult, Result, TestResult } from '../stats/result';
import { formatCount, formatEstimate, formatNumber, signedNumber } from './format';

/** Two-sided 5 %, 1 % and 0.1 % points of the standard normal (|z| bands for residual shading). */
export const RESIDUAL_BANDS: readonly number[] = [normalUpperQuantile(0.025), normalUpperQuantile(0.005), normalUpperQuantile(0.0005)];

/** Round, human tick positions covering [min, max] (about `count` of them): steps of 1, 2 or 5 × 10^k. */
export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max) || max <= min) return Number.isFinite(min) ? [min] : [];
  const raw = (max - min) / Math.max(1, count);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let t = Math.ceil(min / step) * step; t <= max + step * 1e-9; t += step) ticks.push(Number(t.toPrecision(12)));
  return ticks;
}

/**
 * Labels for ticks from niceTicks: each with the decimals its step needs (steps of 0.05 show "0.05", "0.10";
 * steps of 5 show "5", "10"), so neighbouring labels differ and none carries digits the step does not have.
 * A tick within rounding of zero is written as 0.
 */
export function tickLabels(ticks: readonly number[]): string[] {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : 0;
  const decimals = step > 0 ? Math.min(12, Math.max(0, -Math.floor(Math.log10(step) + 1e-9))) : 0;
  return ticks.map((t) => formatNumber(step > 0 && Math.abs(t) < step * 1e-6 ? 0 : t, decimals));
}

/** The text in a residual-grid cell: "+" or "−" and |r| with the decimals setting; "–" when r is not a number. */
export function residualLabel(residual: number, decimals = 2): string {
  if (!Number.isFinite(residual)) return '–';
  const shade = residualShade(residual);
  const mark = shade.sign === 'above' ? '+' : shade.sign === 'below' ? '−' : '';
  return `${mark}${formatNumber(Math.abs(residual), decimals)}`;
}

/** Upper end of a count axis: the next "nice" value at or above the largest value. */
function niceCeiling(value: number): number {
  if (!(value > 0)) return 1;
  const power = 10 ** Math.floor(Math.log10(value));
  return ([1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10].map((m) => m * power).find((c) => c >= value) ?? 10 * power);
}

/** Shade of one adjusted residual: sign, band (normal points at 5 %, 1 %, 0.1 % two-sided) and a tint strength. */
export function residualShade(residual: number): ResidualShade {
  if (!Number.isFinite(residual) || Math.abs(residual) < 1e-12) return { sign: 'none', level: 0, strength: 0 };
  const size = Math.abs(residual);
  const level = (RESIDUAL_BANDS.filter((b) => size >= b).length) as 0 | 1 | 2 | 3;
  // A faint tint below the 5 % point keeps the direction visible; the tint then grows by band.
  const strength = [0.08, 0.3, 0.5, 0.7][level];
  return { sign: residual > 0 ? 'above' : 'below', level, strength };
}

interface Reference {
  density(x: number): number;
  lowerQuantile(p: number): number;
  upperQuantile(q: number): number;
  support: 'positive' | 'real';
}

function chiSquareReference(df: number): Reference {
  return {
    density: (x) => chiSquareDensity(x, df),
    lowerQuantile: (p) => chiSquareQuantile(p, df),
    upperQuantile: (q) => chiSquareUpperQuantile(q, df),
    support: 'positive',
  };
}

const normalReference: Reference = { density: normalDensity, lowerQuantile: normalQuantile, upperQuantile: normalUpperQuantile, support: 'real' };

/** Which tails the p-value counts, as x-intervals. Two-sided: the observed tail and the mirror tail of equal probability. */
export function testedTails(ref: Reference, statistic: number, alternative: Alternative, lowerTail: number, upperTail: number, xMin: number, xMax: number): [number, number][] {
  const clamp = (x: number) => Math.min(xMax, Math.max(xMin, x));
  if (alternative === 'greater') return [[clamp(statistic), xMax]];
  if (alternative === 'less') return [[xMin, clamp(statistic)]];
  if (ref.support === 'real') {
    const z = Math.abs(statistic);
    return [[xMin, clamp(-z)], [clamp(z), xMax]];
  }
  if (lowerTail < upperTail) return [[xMin, clamp(statistic)], [clamp(ref.upperQuantile(Math.max(lowerTail, 1e-300))), xMax]];
  return [[xMin, clamp(ref.lowerQuantile(Math.max(upperTail, 1e-300)))], [clamp(statistic), xMax]];
}

function criticalValues(ref: Reference, alternative: Alternative, alpha: number): number[] {
  if (alternative === 'greater') return [ref.upperQuantile(alpha)];
  if (alternative === 'less') return [ref.lowerQuantile(alpha)];
  return [ref.lowerQuantile(alpha / 2), ref.upperQuantile(alpha / 2)];
}

/**
 * The x-range of a chi-square density: up to the 99.9 % point (or a little past the statistic, at most 1.6
 * times that point), and from 0 unless the bulk sits far from it (large df): then from the 0.1 % point, so the
 * curve is not a sliver at the right. A statistic below the bulk widens the range by at most as much again.
 */
function chiSquareRange(ref: Reference, statistic: number): { xMin: number; xMax: number } {
  const far = ref.upperQuantile(0.001);
  const xMax = Math.min(Math.max(far, statistic * 1.08), far * 1.6);
  const near = ref.lowerQuantile(0.001);
  if (!(near > 0.25 * far)) return { xMin: 0, xMax };
  const lowest = Math.max(0, near - (far - near) * 0.6);
  const xMin = Number.isFinite(statistic) && statistic < near ? Math.max(lowest, statistic - (far - near) * 0.05) : near;
  return { xMin: xMin < 0.1 * far ? 0 : xMin, xMax };
}

/**
 * The reference density with the observed statistic and the shaded tail(s) the p-value counts.
 * The axis reaches the 99.9 % point (or a little past the statistic), but never more than 1.6 times that
 * point: a statistic farther out is drawn at the edge and flagged `clipped`.
 */
export function densityPlot(result: TestResult, samples = 161, decimals = 2): DensityPlot | null {
  const { reference, statistic } = result;
  if (reference.kind === 'none' || !Number.isFinite(statistic)) return null;
  if (reference.kind === 'chi-square' && !(reference.df > 0)) return null;
  const ref = reference.kind === 'chi-square' ? chiSquareReference(reference.df) : normalReference;
  const details = result.details ?? {};
  const tailValue = (key: string) => {
    const t = details[key] as { value?: number } | undefined;
    return typeof t?.value === 'number' ? t.value : NaN;
  };
  // A chi-square statistic is read in its upper tail, even for a two-sided hypothesis tested by a squared
  // statistic (McNemar, CMH, the two-sided trend test). Only a test that records both tail probabilities (the
  // variance test) counts both tails; a stated one-sided alternative is drawn as stated.
  const stated: Alternative = result.alternative ?? (reference.kind === 'chi-square' ? 'greater' : 'two-sided');
  const bothTailsCounted = Number.isFinite(tailValue('lowerTail')) && Number.isFinite(tailValue('upperTail'));
  const alternative: Alternative = reference.kind === 'chi-square' && stated === 'two-sided' && !bothTailsCounted ? 'greater' : stated;

  let xMin: number;
  let xMax: number;
  if (ref.support === 'positive') {
    ({ xMin, xMax } = chiSquareRange(ref, statistic));
  } else {
    const far = Math.max(4, Math.abs(statistic) * 1.08);
    const limit = Math.min(far, 6.5);
    xMin = -limit;
    xMax = limit;
  }
  const clipped = statistic > xMax || statistic < xMin;

  // Densities with a pole at 0 (df < 2) start a little right of 0, and the y axis is capped so the curve stays readable.
  const start = ref.support === 'positive' && reference.kind === 'chi-square' && reference.df < 2 ? xMax * 0.004 : xMin;
  const curve: PlotPoint[] = [];
  for (let i = 0; i < samples; i++) {
    const x = start + ((xMax - start) * i) / (samples - 1);
    curve.push({ x, y: ref.density(x) });
  }
  let yMax = Math.max(...curve.map((p) => p.y));
  if (start > xMin) yMax = Math.min(yMax, ref.density(xMax * 0.04) * 1.25);
  const capped = curve.map((p) => ({ x: p.x, y: Math.min(p.y, yMax) }));

  const shaded = testedTails(ref, statistic, alternative, tailValue('lowerTail'), tailValue('upperTail'), start, xMax)
    .filter(([a, b]) => b > a)
    .map(([a, b]) => tailPolygon(ref, a, b, yMax));

  return {
    kind: 'density',
    title: reference.kind === 'chi-square' ? `χ² distribution, df = ${reference.df}` : 'Standard normal distribution',
    xLabel: result.statisticSymbol,
    xMin,
    xMax,
    yMax,
    curve: capped,
    shaded,
    observed: { x: Math.min(xMax, Math.max(xMin, statistic)), label: `${result.statisticSymbol} = ${formatNumber(statistic, decimals)}`, clipped },
    critical: criticalValues(ref, alternative, result.alpha).filter((c) => c >= xMin && c <= xMax),
    ...withTickLabels(niceTicks(xMin, xMax, 6)),
  };
}

function tailPolygon(ref: Reference, a: number, b: number, yMax: number): PlotPoint[] {
  const steps = 40;
  const points: PlotPoint[] = [{ x: a, y: 0 }];
  for (let i = 0; i <= steps; i++) {
    const x = a + ((b - a) * i) / steps;
    points.push({ x, y: Math.min(ref.density(x), yMax) });
  }
  points.push({ x: b, y: 0 });
  return points;
}

function withTickLabels(ticks: number[]): { ticks: number[]; tickLabels: string[] } {
  return { ticks, tickLabels: tickLabels(ticks) };
}

/**
 * Goodness of fit as deviations from the expectation: per category observed − expected over a band of ±1.96
 * standard deviations of the deviation under the hypothesis. The standard deviation is |O − E| / |standardized
 * residual| (so the band agrees with the residual the table shows), or sqrt(E·(1 − E/n)) when the deviation is 0.
 */
export function deviationPlot(categories: readonly CategoryRow[], decimals = 2): DeviationPlot {
  const n = categories.reduce((a, c) => a + c.expected, 0);
  const z = RESIDUAL_BANDS[0];
  const rows = categories.map((c) => {
    const deviation = c.observed - c.expected;
    const sd = Math.abs(c.standardizedResidual) > 1e-12 && Number.isFinite(c.standardizedResidual) ? Math.abs(deviation / c.standardizedResidual) : Math.sqrt(Math.max(0, c.expected * (1 - c.expected / (n || 1))));
    return {
      label: c.label,
      deviation,
      band: z * sd,
      residual: c.standardizedResidual,
      shade: residualShade(c.standardizedResidual),
      text: `${signedNumber(deviation, decimals)} (z = ${signedNumber(c.standardizedResidual, decimals)})`,
      observedText: formatCount(c.observed, decimals),
      expectedText: formatNumber(c.expected, decimals),
    };
  });
  const reach = Math.max(1e-9, ...rows.flatMap((r) => [Math.abs(r.deviation), r.band]).filter(Number.isFinite));
  const edge = niceCeiling(reach * 1.05);
  const ticks = niceTicks(-edge, edge, 6);
  return { kind: 'deviation', title: 'Deviation from the expected count, with the ±1.96 SD band', xLabel: 'observed − expected', xMin: -edge, xMax: edge, rows, ...withTickLabels(ticks) };
}

export function residualGridPlot(grid: CellGrid, decimals = 2): ResidualGridPlot {
  return {
    kind: 'residual-grid',
    title: 'Adjusted residuals',
    rowLabels: grid.rowLabels,
    columnLabels: grid.columnLabels,
    residuals: grid.adjustedResiduals,
    shades: grid.adjustedResiduals.map((row) => row.map(residualShade)),
    labels: grid.adjustedResiduals.map((row) => row.map((r) => residualLabel(r, decimals))),
  };
}

/**
 * The confidence interval for σ against σ0 (the scale people read; σ² in the result is converted by square root).
 * A one-sided bound keeps its open side at the axis edge.
 */
export function intervalPlot(result: TestResult, decimals = 2): IntervalPlot | null {
  const ci = result.confidenceInterval;
  const variance0 = Number(result.details?.variance0);
  const sampleVariance = Number(result.details?.sampleVariance);
  if (!ci || !(variance0 > 0) || !(sampleVariance >= 0)) return null;
  const onSd = ci.parameter === 'σ²';
  const lower = onSd ? Math.sqrt(ci.lower) : ci.lower;
  const upper = onSd ? Math.sqrt(ci.upper) : ci.upper;
  const reference = Math.sqrt(variance0);
  const estimateText = (x: number) => formatEstimate(x, { decimals });
  const estimate = Math.sqrt(sampleVariance);
  const finite = [lower, upper, reference, estimate].filter(Number.isFinite);
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const pad = (hi - lo) * 0.15 || hi * 0.15 || 1;
  const xMin = Math.max(0, lo - pad);
  const xMax = hi + pad;
  return {
    kind: 'interval',
    title: `${Math.round(ci.level * 100)} % ${Number.isFinite(upper) && !(lower === 0 && /bound/i.test(ci.method)) ? 'confidence interval' : 'one-sided bound'} for σ`,
    parameter: 'σ',
    xMin,
    xMax,
    lower: Number.isFinite(lower) ? lower : xMin,
    upper: Number.isFinite(upper) ? upper : xMax,
    estimate,
    reference,
    referenceInside: reference >= lower && reference <= upper,
    level: ci.level,
    ...(Number.isFinite(lower) && !(lower === 0 && /bound/i.test(ci.method)) ? {} : { openLower: true }),
    ...(Number.isFinite(upper) ? {} : { openUpper: true }),
    ...withTickLabels(niceTicks(xMin, xMax, 5)),
    // The ends as computed (an open side reads ∞), with the estimate rules the result table uses.
    texts: { lower: estimateText(lower), upper: estimateText(upper), estimate: estimateText(estimate), reference: `σ0 = ${estimateText(reference)}` },
  };
}

/**
 * The distribution lookup's density: the first x asked marked with its upper tail shaded, or, for critical
 * values only, the upper tail beyond the first p's critical value shaded; critical values dashed.
 */
export function lookupDensityPlot(result: DistributionResult, samples = 161, decimals = 2): DensityPlot | null {
  if (!(result.df > 0) || result.noncentrality) return null;
  const ref = chiSquareReference(result.df);
  const x = result.points.find((p) => Number.isFinite(p.x))?.x;
  const critical = result.critical.map((c) => c.upper).filter((c) => Number.isFinite(c) && c > 0);
  const { xMin, xMax } = chiSquareRange(ref, x ?? critical[0] ?? ref.upperQuantile(0.5));
  const start = result.df < 2 ? Math.max(xMin, xMax * 0.004) : xMin;
  const curve: PlotPoint[] = [];
  for (let i = 0; i < samples; i++) {
    const at = start + ((xMax - start) * i) / (samples - 1);
    curve.push({ x: at, y: ref.density(at) });
  }
  let yMax = Math.max(...curve.map((p) => p.y));
  if (start > xMin || result.df < 2) yMax = Math.min(yMax, ref.density(xMax * 0.04) * 1.25);
  const from = x ?? critical[0];
  const tailStart = from === undefined ? undefined : Math.min(xMax, Math.max(start, from));
  return {
    kind: 'density',
    title: `χ² distribution, df = ${formatNumber(result.df, Number.isInteger(result.df) ? 0 : decimals)}`,
    xLabel: 'x',
    xMin,
    xMax,
    yMax,
    curve: curve.map((p) => ({ x: p.x, y: Math.min(p.y, yMax) })),
    shaded: tailStart !== undefined && tailStart < xMax ? [tailPolygon(ref, tailStart, xMax, yMax)] : [],
    observed: x === undefined ? null : { x: Math.min(xMax, Math.max(xMin, x)), label: `x = ${formatNumber(x, decimals)}`, clipped: x > xMax || x < xMin },
    critical: critical.filter((c) => c >= xMin && c <= xMax),
    ...withTickLabels(niceTicks(xMin, xMax, 6)),
  };
}

/** Power against n from the plan's curve, the plan's n marked. */
export function powerCurvePlot(result: PowerResult, decimals = 2): PowerCurvePlot | null {
  const curve = result.curve.filter((p) => Number.isFinite(p.n) && Number.isFinite(p.power)).map((p) => ({ x: p.n, y: p.power }));
  if (curve.length < 2) return null;
  const xMin = Math.min(...curve.map((p) => p.x));
  const xMax = Math.max(...curve.map((p) => p.x));
  const yTicks = [0, 0.2, 0.4, 0.6, 0.8, 1];
  return {
    kind: 'power-curve',
    title: `Power of the ${result.target} test against sample size (α = ${result.alpha})`,
    xLabel: 'n',
    xMin,
    xMax,
    curve,
    ...withTickLabels(niceTicks(xMin, xMax, 6)),
    yTicks,
    yTickLabels: yTicks.map((t) => t.toFixed(1)),
    marker: { x: result.n, y: result.power, label: `n = ${formatCount(result.n)}, power ${formatEstimate(result.power, { decimals })}` },
  };
}

/** Every plot that fits any result: tests, distribution lookups and power plans. */
export function plotsForResult(result: Result, decimals = 2): Plot[] {
  if (result.kind === 'test') return plotsFor(result, decimals);
  const plot = result.kind === 'distribution' ? lookupDensityPlot(result, 161, decimals) : powerCurvePlot(result, decimals);
  return plot ? [plot] : [];
}

/** Every plot that fits the result, in reading order. */
export function plotsFor(result: TestResult, decimals = 2): Plot[] {
  const plots: Plot[] = [];
  const density = densityPlot(result, 161, decimals);
  if (density) plots.push(density);
  if (result.categories && result.categories.length > 0) plots.push(deviationPlot(result.categories, decimals));
  if (result.grid) plots.push(residualGridPlot(result.grid, decimals));
  const interval = intervalPlot(result, decimals);
  if (interval) plots.push(interval);
  return plots;
}
