// Turns a result into what the panel shows: every number formatted here (through src/report), the
// plain text and markdown from src/report, and plot geometry from src/report/plots.
import * as vscode from 'vscode';
import type { PanelPayload, ResultTable } from '../protocol';
import { formatCount, formatEstimateInterval, formatNumber, formatProbability, type FormatOptions } from '../report/format';
import { resultMarkdown } from '../report/markdown';
import { plotsFor, residualShade } from '../report/plots';
import { apaLine, CAUTION, estimateText, resultText, statisticLineText } from '../report/text';
import type { Result, TestResult } from '../stats/result';

const t = vscode.l10n.t;

export interface PayloadOptions {
  readonly id: string;
  readonly title: string;
  readonly sourceDescription: string;
  readonly decimals: number;
  readonly canSave: boolean;
  readonly canRerun: boolean;
}

function signText(residual: number): string {
  const shade = residualShade(residual);
  if (shade.sign === 'none') return '';
  const arrow = shade.sign === 'above' ? '▲' : '▼';
  const word = shade.sign === 'above' ? t('more than expected') : t('fewer than expected');
  return shade.level > 0 ? `${arrow} ${word}` : arrow;
}

function testTables(result: TestResult, f: FormatOptions): ResultTable[] {
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
          { text: formatNumber(c.standardizedResidual, f.decimals), shade: residualShade(c.standardizedResidual), signText: signText(c.standardizedResidual) },
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
                signText: signText(r).split(' ')[0],
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

function keyFigures(result: TestResult, f: FormatOptions): { label: string; value: string }[] {
  const figures = [
    { label: result.statisticSymbol, value: formatNumber(result.statistic, f.decimals) },
    ...(result.df !== null ? [{ label: t('Degrees of freedom'), value: formatNumber(result.df, Number.isInteger(result.df) ? 0 : f.decimals) }] : []),
    { label: t('p-value'), value: formatProbability(result.pValue) },
    ...(result.n !== null ? [{ label: 'N', value: formatCount(result.n, 0) }] : []),
    { label: 'α', value: String(result.alpha) },
  ];
  for (const e of result.effectSizes) figures.push({ label: e.name, value: formatNumber(e.value, f.decimals + 1) + (e.interval ? ` ${formatEstimateInterval(e.interval.lower, e.interval.upper, f)}` : '') });
  if (result.confidenceInterval) {
    const ci = result.confidenceInterval;
    figures.push({ label: `${Math.round(ci.level * 100)} % ${ci.parameter}`, value: formatEstimateInterval(ci.lower, ci.upper, f) });
  }
  return figures;
}

export function panelStrings(): Record<string, string> {
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

export function buildPayload(result: Result, options: PayloadOptions): PanelPayload {
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
    strings: panelStrings(),
    computedAt: new Date().toISOString(),
  };
  if (result.kind === 'test') {
    return {
      ...common,
      headline: result.conclusion,
      apaLine: apaLine(result, f),
      significant: result.significant,
      keyFigures: keyFigures(result, f),
      tables: testTables(result, f),
      plots: plotsFor(result, f.decimals),
      assumptions: result.assumptions.map((a) => ({ ...a })),
      notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
      otherStatistics: [
        ...result.otherStatistics.map((s) => ({ name: s.name, value: statisticLineText(s, result.n, f).replace(`${s.name}: `, '') + (s.note ? ` — ${s.note}` : '') })),
        ...result.estimates.map((e) => ({ name: e.name, value: estimateText(e, f).replace(`${e.name} = `, '') })),
      ],
    };
  }
  if (result.kind === 'distribution') {
    return {
      ...common,
      headline: t('χ² distribution with {0} degrees of freedom', formatNumber(result.df, Number.isInteger(result.df) ? 0 : f.decimals)),
      apaLine: '',
      significant: null,
      keyFigures: [],
      tables: [
        ...(result.points.length ? [{
          caption: t('Tail probabilities'),
          header: ['x', t('P(X ≤ x)'), t('P(X > x)'), t('density')],
          rows: result.points.map((p) => ({ label: formatNumber(p.x, f.decimals), cells: [{ text: formatProbability(p.lower) }, { text: formatProbability(p.upper) }, { text: formatNumber(p.density, f.decimals + 2) }] })),
        }] : []),
        ...(result.critical.length ? [{
          caption: t('Critical values'),
          header: ['p', t('lower: P(X ≤ c) = p'), t('upper: P(X > c) = p'), t('two-sided')],
          rows: result.critical.map((c) => ({ label: String(c.p), cells: [{ text: formatNumber(c.lower, f.decimals + 2) }, { text: formatNumber(c.upper, f.decimals + 2) }, { text: `${formatNumber(c.twoSided.lower, f.decimals + 2)}, ${formatNumber(c.twoSided.upper, f.decimals + 2)}` }] })),
        }] : []),
      ],
      plots: [],
      assumptions: [],
      notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
      otherStatistics: [],
    };
  }
  return {
    ...common,
    headline: t('Power {0} at n = {1}', formatNumber(result.power, 3), formatCount(result.n, 0)),
    apaLine: '',
    significant: null,
    keyFigures: [{ label: result.effectSize.name, value: formatNumber(result.effectSize.value, f.decimals) }, { label: 'df', value: String(result.df) }, { label: 'α', value: String(result.alpha) }],
    tables: [],
    plots: [],
    assumptions: [],
    notices: result.notices.map((n) => ({ severity: n.severity, message: n.message })),
    otherStatistics: [],
  };
}

