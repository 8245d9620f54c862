/**
 * Turns a result into what the results panel shows: every number formatted here with the same functions as
 * the text and markdown reports (./format), the plain text and markdown themselves, and plot geometry
 * (./plots). The webview only renders. Pure: the host passes its string translator (vscode.l10n.t) and the
 * time; nothing here touches the editor.
 */
import type { PanelPayload, ResultTable } from '../protocol';
import type { DistributionResult, Result, TestResult } from '../stats/result';
import { formatCount, formatDf, formatEstimate, formatEstimateInterval, formatEstimateWithLog, formatNumber, formatPercent, formatProbability, type FormatOptions } from './format';
import { resultMarkdown } from './markdown';
import { plotsFor, residualShade } from './plots';
import { apaLine, CAUTION, estimateText, resultText, statisticLineText } from './text';
import { evidenceLines } from './evidence';

/** A string translator with `{0}`-style placeholders, as vscode.l10n.t. */
export type Translate = (message: string, ...args: (string | number | boolean)[]) => string;

/** The untranslated strings, placeholders filled in (the command line, tests, benchmarks). */
export const untranslated: Translate = (message, ...args) => message.replace(/\{(\d+)\}/g, (whole, i: string) => (Number(i) < args.length ? String(args[Number(i)]) : whole));


export interface PayloadOptions {
  readonly id: string;
  readonly title: string;
  readonly sourceDescription: string;
  readonly decimals: number;
  readonly canSave: boolean;
  readonly canRerun: boolean;
  /** ISO time the result was computed; default now. */
  readonly computedAt?: string;
}

function signText(residual: number, t: Translate): string {
  const shade = residualShade(residual);
  if (shade.sign === 'none') return '';
  const arrow = shade.sign === 'above' ? '▲' : '▼';
  const word = shade.sign === 'above' ? t('more than expected') : t('fewer than expected');
  return shade.level > 0 ? `${arrow} ${word}` : arrow;
}

function testTables(result: TestResult, f: FormatOptions, t: Translate): ResultTable[] {
  const tables: ResultTable[] = [];
  if (result.categories) {
    tables.push({
      caption: t('Observed and expected counts, with standardized residuals (▲ above, ▼ below expectation)'),
      header: [t('Category'), t('Observed'), t('Expected'), t('Std. residual'), t('Contribution to {0}', result.statisticSymbol)],
      rows: result.categories.map((c) => ({
        label: c.label,
        cells: [
          { text: formatCount(c.observed, f.decimals) },
          { text: formatNumber(c.expected, f.decimals) },
          { text: formatNumber(c.standardizedResidual, f.decimals), shade: residualShade(c.standardizedResidual), signText: signText(c.standardizedResidual, t) },
          { text: formatNumber(c.contribution, f.decimals) },
        ],
      })),
    });
  }
  if (result.grid) {
    const g = result.grid;
    tables.push({
      caption: t('Observed count (expected) and adjusted residual per cell; tint grows with |residual|, ▲/▼ gives its sign'),
      header: ['', ...g.columnLabels, t('Total')],
      rows: [
        ...g.rowLabels.map((label, i) => ({
          label,
          cells: [
            ...g.observed[i].map((o, j) => {
              const r = g.adjustedResiduals[i][j];
              return {
                text: `${formatCount(o, f.decimals)} (${formatNumber(g.expected[i][j], f.decimals)}) ${Number.isFinite(r) ? (r >= 0 ? '+' : '') + formatNumber(r, f.decimals) : ''}`,
                residual: r,
                shade: residualShade(r),
                signText: signText(r, t).split(' ')[0],
              };
            }),
            { text: formatCount(g.rowTotals[i], f.decimals) },
          ],
        })),
        { label: t('Total'), cells: [...g.columnTotals.map((c) => ({ text: formatCount(c, f.decimals) })), { text: formatCount(g.total, f.decimals) }] },
      ],
    });
  }
  return tables;
}

function keyFigures(result: TestResult, f: FormatOptions, t: Translate): { label: string; value: string }[] {
  const figures = [
    { label: result.statisticSymbol, value: formatNumber(result.statistic, f.decimals) },
    ...(result.df !== null ? [{ label: t('Degrees of freedom'), value: formatDf(result.df, f.decimals) }] : []),
    { label: t('p-value'), value: formatProbability(result.pValue) },
    ...(result.n !== null ? [{ label: 'N', value: formatCount(result.n, 0) }] : []),
    { label: 'α', value: String(result.alpha) },
  ];
  for (const e of result.effectSizes) figures.push({ label: e.name, value: formatEstimate(e.value, f) + (e.interval ? ` ${formatEstimateInterval(e.interval.lower, e.interval.upper, f)}` : '') });
  if (result.confidenceInterval) {
    const ci = result.confidenceInterval;
    figures.push({ label: `${formatPercent(ci.level)} ${ci.parameter}`, value: formatEstimateInterval(ci.lower, ci.upper, f) });
  }
  return figures;
}

/**
 * The distribution lookup's two tables, as the text report writes them: densities and critical values that
 * underflowed to 0 are shown as their power of ten (from the result's log10 fields), never as 0.
 */
export function distributionTables(result: DistributionResult, f: FormatOptions, t: Translate = untranslated): ResultTable[] {
  const critical: FormatOptions = { decimals: f.decimals + 1 };
  return [
    ...(result.points.length ? [{
      caption: t('Tail probabilities'),
      header: ['x', t('P(X ≤ x)'), t('P(X > x)'), t('density')],
      rows: result.points.map((p) => ({
        label: formatNumber(p.x, f.decimals),
        cells: [{ text: formatProbability(p.lower, 3) }, { text: formatProbability(p.upper, 3) }, { text: formatEstimateWithLog(p.density, p.densityLog10, f) }],
      })),
    }] : []),
    ...(result.critical.length ? [{
      caption: t('Critical values'),
      header: ['p', t('lower: P(X ≤ c) = p'), t('upper: P(X > c) = p'), t('two-sided')],
      rows: result.critical.map((c) => ({
        label: String(c.p),
        cells: [
          { text: formatEstimateWithLog(c.lower, c.lowerLog10, critical) },
          { text: formatEstimateWithLog(c.upper, c.upperLog10, critical) },
          { text: formatEstimateInterval(c.twoSided.lower, c.twoSided.upper, critical, c.twoSided) },
        ],
      })),
    }] : []),
  ];
}

export function panelStrings(t: Translate = untranslated): Record<string, string> {
  return {
    plots: t('Plots'), actions: t('Actions'), copyText: t('Copy text'), copyMarkdown: t('Copy markdown'),
    insert: t('Insert into document'), saveSpec: t('Save as test file'), rerun: t('Re-run'),
    otherStatistics: t('Other statistics on the same data'), assumptions: t('Assumptions'),
    met: t('checked, met'), failed: t('checked, not met'), unchecked: t('cannot be checked from the data'),
    alternative: t('Consider instead'), observed: t('observed'), expected: t('expected'),
    observedMarked: t('Observed statistic marked at'), tailShaded: t('shaded area: the tail the p-value counts'), criticalDashed: t('dashed: critical value at α'),
    insideInterval: t('inside the interval'), outsideInterval: t('outside the interval'),
  };
}

/** Everything the panel shows for a result. `t` translates the panel's own strings (the host passes vscode.l10n.t). */
export function buildPanelPayload(result: Result, options: PayloadOptions, t: Translate = untranslated): PanelPayload {
  const f: FormatOptions = { decimals: options.decimals };
  const common = {
    id: options.id,
    title: options.title,
    sourceDescription: options.sourceDescription,
    caution: CAUTION,
    text: resultText(result, { ...f, title: options.title }),
    markdown: resultMarkdown(result, { ...f, title: options.title }),
    result,
    canSave: options.canSave,
    canRerun: options.canRerun,
    strings: panelStrings(t),
    computedAt: options.computedAt ?? new Date().toISOString(),
  };
  if (result.kind === 'test') {
    return {
      ...common,
      headline: result.conclusion,
      apaLine: apaLine(result, f),
      significant: result.significant,
      keyFigures: keyFigures(result, f, t),
      tables: testTables(result, f, t),
      plots: plotsFor(result, f.decimals),
      assumptions: result.assumptions.map((a) => ({ ...a })),
      notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
      otherStatistics: [
        ...result.otherStatistics.map((s) => ({ name: s.name, value: statisticLineText(s, result.n, f).replace(`${s.name}: `, '') + (s.note ? ` — ${s.note}` : '') })),
        ...result.estimates.map((e) => ({ name: e.name, value: estimateText(e, f).replace(`${e.name} = `, '') })),
        // Fragility, Bayes factor, equivalence and family: each line is "Name: reading".
        ...evidenceLines(result, f).map((line) => ({ name: line.slice(0, line.indexOf(': ')), value: line.slice(line.indexOf(': ') + 2) })),
      ],
    };
  }
  if (result.kind === 'distribution') {
    return {
      ...common,
      headline: t('χ² distribution with {0} degrees of freedom', formatDf(result.df, f.decimals)),
      apaLine: '',
      significant: null,
      keyFigures: [],
      tables: distributionTables(result, f, t),
      plots: [],
      assumptions: [],
      notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
      otherStatistics: [],
    };
  }
  return {
    ...common,
    headline: t('Power {0} at n = {1}', formatEstimate(result.power, f), formatCount(result.n, 0)),
    apaLine: '',
    significant: null,
    keyFigures: [{ label: result.effectSize.name, value: formatEstimate(result.effectSize.value, f) }, { label: 'df', value: formatDf(result.df, f.decimals) }, { label: 'α', value: String(result.alpha) }],
    tables: [],
    plots: [],
    assumptions: [],
    notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
    otherStatistics: [],
  };
}

