/**
 * Turns a result into what the results panel shows: every number formatted here with the same functions as
 * the text and markdown reports (./format), the plain text and markdown themselves, and plot geometry
 * (./plots). The webview only renders. Pure: the host passes its string translator (vscode.l10n.t) and the
 * time; nothing here touches the editor.
 */
import type { PanelPayload, ResultTable } from '../protocol';
import type { DistributionResult, Result, TestResult } from '../stats/result';
import { formatCount, formatDf, formatEstimate, formatEstimateInterval, formatEstimateWithLog, formatNumber, formatPercent, formatProbability, signedNumber, superscriptExponents, type FormatOptions } from './format';
import { resultMarkdown } from './markdown';
import { plotsForResult, residualShade } from './plots';
import { plotDescription, renderPlotSvg } from './svg';
import { explain, explanationText } from './explanations';
import { keyEstimate, pLabel, presentedTest, reportedPMethod, testHeadline } from './headline';
import { apaLine, CAUTION, estimateText, POWER_CAUTION, resultText, statisticLineText } from './text';
import { evidenceLines, familyMembershipLine, type FamilyMembership } from './evidence';

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
  /** The result's place in a family of tests (a folder of saved tests, a report's blocks), when it has one. */
  readonly membership?: FamilyMembership;
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
    // Our reading order: how far each category is from its expectation, how unusual that is, how much of the
    // statistic it makes, and only then the counts themselves.
    const total = result.categories.reduce((a, c) => a + c.contribution, 0);
    tables.push({
      caption: t('Each category against its expectation: deviation, standardized residual z (▲ above, ▼ below), share of {0}, counts', result.statisticSymbol),
      header: [t('Category'), t('Observed − expected'), t('z'), t('Share of {0}', result.statisticSymbol), t('Observed'), t('Expected')],
      headerExplain: ['', '', explained('standardized residual').explain ?? '', explained('Share of χ²').explain ?? '', '', ''],
      rows: result.categories.map((c) => ({
        label: c.label,
        cells: [
          { text: signedNumber(c.observed - c.expected, f.decimals) },
          { text: signedNumber(c.standardizedResidual, f.decimals), shade: residualShade(c.standardizedResidual), signText: signText(c.standardizedResidual, t) },
          { text: total > 0 ? `${formatNumber((100 * c.contribution) / total, 1)} %` : '–' },
          { text: formatCount(c.observed, f.decimals) },
          { text: formatNumber(c.expected, f.decimals) },
        ],
      })),
    });
  }
  if (result.grid) {
    const g = result.grid;
    tables.push({
      caption: t('Observed count (expected) and adjusted residual per cell; tint grows with |residual|, ▲/▼ gives its sign'),
      headerExplain: [explained('adjusted residual').explain ?? ''],
      header: ['', ...g.columnLabels, t('Total')],
      rows: [
        ...g.rowLabels.map((label, i) => ({
          label,
          cells: [
            ...g.observed[i].map((o, j) => {
              const r = g.adjustedResiduals[i][j];
              return {
                text: `${formatCount(o, f.decimals)} (${formatNumber(g.expected[i][j], f.decimals)}) ${Number.isFinite(r) ? signedNumber(r, f.decimals) : ''}`,
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

/** The explanation of a key, as tooltip text; undefined when the glossary has none. */
/** The explanation key of each evidence line's name (src/report/evidence.ts). */
const EVIDENCE_TERMS: Readonly<Record<string, string>> = {
  Fragility: 'fragility',
  'Fragility index': 'fragility',
  'Reverse fragility index': 'reverseFragility',
  'Bayes factor': 'bayesFactor',
  Equivalence: 'equivalence',
  'Non-inferiority': 'nonInferiority',
  Family: 'family',
};

function explained(...keys: (string | undefined)[]): { explain?: string } {
  for (const key of keys) {
    const e = explain(key);
    if (e) return { explain: explanationText(e) };
  }
  return {};
}

function keyFigures(result: TestResult, f: FormatOptions, t: Translate): { label: string; value: string; explain?: string }[] {
  const method = reportedPMethod(result);
  const figures = [
    { label: result.statisticSymbol, value: formatNumber(result.statistic, f.decimals), ...explained(result.statisticSymbol, String(result.details?.mainStatistic ?? '')) },
    ...(result.df !== null ? [{ label: t('Degrees of freedom'), value: formatDf(result.df, f.decimals), ...explained('df') }] : []),
    { label: method === 'asymptotic' ? t('p-value') : t('{0}-value', pLabel(method)), value: formatProbability(result.pValue), ...explained(method === 'asymptotic' ? 'p-value' : pLabel(method)) },
    ...(result.n !== null ? [{ label: 'N', value: formatCount(result.n, 0), ...explained('N') }] : []),
    { label: 'α', value: String(result.alpha), ...explained('α') },
  ];
  for (const e of result.effectSizes) figures.push({ label: e.name, value: formatEstimate(e.value, f) + (e.interval ? ` ${formatEstimateInterval(e.interval.lower, e.interval.upper, f)}` : ''), ...explained(e.id) });
  if (result.confidenceInterval) {
    const ci = result.confidenceInterval;
    figures.push({ label: `${formatPercent(ci.level)} ${ci.parameter}`, value: formatEstimateInterval(ci.lower, ci.upper, f), ...explained(ci.parameter === 'σ²' ? 'variance' : ci.parameter === 'σ' ? 'sd' : undefined) });
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
    insert: t('Insert into document'), saveSpec: t('Save as test file'), rerun: t('Re-run'), openNew: t('Open in new panel'),
    otherStatistics: t('Other statistics on the same data'), assumptions: t('Assumptions'),
    met: t('checked, met'), failed: t('checked, not met'), unchecked: t('cannot be checked from the data'),
    alternative: t('Consider instead'), usedHere: t('Used here'), observed: t('observed'), expected: t('expected'),
    observedMarked: t('Observed statistic marked at'), tailShaded: t('shaded area: the tail the p-value counts'), criticalDashed: t('dashed: critical value at α'),
    insideInterval: t('inside the interval'), outsideInterval: t('outside the interval'),
    savePlot: t('Save plot…'), savePlotHint: t('Save this plot as an SVG or PNG file'),
    comparison: t('Compared with the recorded result'), conclusionFlipped: t('the conclusion flipped'), recorded: t('Recorded'), now: t('Now'), changedMark: t('(changed)'),
    copyTable: t('Copy table'), copyTableHint: t('Copy as tab-separated cells: pastes into a spreadsheet as cells'),
  };
}

/**
 * How the categories of a result are ordered, said in words (so the reader knows whether an order is data or
 * chance): the order the spec gives, sorted, or the order first seen in the file. Undefined when the data come
 * as a table or list in the spec itself (their order is the spec's).
 */
export function categoryOrderText(spec: Readonly<Record<string, unknown>>, t: Translate = untranslated): string | undefined {
  const source = spec.source as { categories?: unknown } | undefined;
  if (!source || typeof source !== 'object') return undefined;
  const given = ['categories', 'rowLabels', 'columnLabels', 'labels'].filter((k) => Array.isArray(spec[k]));
  if (given.length > 0) return t('Categories in the order the test lists them ({0}).', given.join(', '));
  if (source.categories === 'sorted') return t('Categories sorted (numerically when every label is a number).');
  return t('Categories in the order first seen in the data; list them in the test, or set "categories": "sorted", to fix the order.');
}

/** Payload fields that travel as plain text or data (copied, saved, re-run): their exponents stay in caret form. */
const VERBATIM = new Set(['text', 'markdown', 'result', 'origin', 'strings', 'id', 'computedAt']);

/** Every string the panel displays, with exponents as superscripts ("10⁻⁵"); copied text keeps "10^-5". */
export function withSuperscripts(payload: PanelPayload): PanelPayload {
  const deep = (value: unknown): unknown => {
    if (typeof value === 'string') return superscriptExponents(value);
    if (Array.isArray(value)) return value.map(deep);
    if (typeof value === 'object' && value !== null) return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, deep(v)]));
    return value;
  };
  return Object.fromEntries(Object.entries(payload).map(([k, v]) => [k, VERBATIM.has(k) ? v : deep(v)])) as unknown as PanelPayload;
}

/** Everything the panel shows for a result. `t` translates the panel's own strings (the host passes vscode.l10n.t). */
export function buildPanelPayload(result: Result, options: PayloadOptions, t: Translate = untranslated): PanelPayload {
  const payload = withSuperscripts(payloadFor(result, options, t));
  return {
    ...payload,
    plotSvgs: payload.plots.map((plot, i) => renderPlotSvg(plot, { mode: 'panel', idPrefix: `${options.id}-p${i}` })),
    plotDescriptions: payload.plots.map(plotDescription),
  };
}

function payloadFor(result: Result, options: PayloadOptions, t: Translate): PanelPayload {
  const f: FormatOptions = { decimals: options.decimals };
  const common = {
    id: options.id,
    title: options.title,
    sourceDescription: options.sourceDescription,
    caution: result.kind === 'test' ? CAUTION : result.kind === 'power' ? POWER_CAUTION : '',
    text: resultText(result, { ...f, title: options.title }),
    markdown: resultMarkdown(result, { ...f, title: options.title }),
    result,
    canSave: options.canSave,
    canRerun: options.canRerun,
    strings: panelStrings(t),
    computedAt: options.computedAt ?? new Date().toISOString(),
  };
  if (result.kind === 'test') {
    const presented = presentedTest(result);
    const headline = testHeadline(presented, f, t);
    const key = keyEstimate(presented);
    return {
      ...common,
      headline: headline.answer,
      ...(headline.effect && key !== presented.effectSizes[0] ? { headlineEffect: headline.effect } : {}),
      ...(headline.assumption ? { headlineAssumption: headline.assumption } : {}),
      ...(key ? { keyEstimate: { label: key.name, value: estimateText(key, f).slice(key.name.length + 3), ...explained(key.id) } } : {}),
      apaLine: apaLine(result, f),
      ...(options.membership && options.membership.size > 1 ? { familyLine: familyMembershipLine(options.membership, result) } : {}),
      significant: result.significant,
      keyFigures: keyFigures(result, f, t),
      tables: testTables(result, f, t),
      plots: plotsForResult(result, f.decimals),
      assumptions: presented.assumptions.map((a) => ({ ...a, ...explained(a.id) })),
      notices: presented.notices.map((n) => ({ severity: n.severity, message: n.message, ...explained(n.code) })),
      otherStatistics: [
        ...result.otherStatistics.map((s) => ({ name: s.name, value: statisticLineText(s, result.n, f).replace(`${s.name}: `, ''), ...(s.note ? { note: s.note } : {}), ...explained(s.id, s.symbol) })),
        ...result.estimates.filter((e) => e !== key).map((e) => ({ name: e.name, value: estimateText(e, f).replace(`${e.name} = `, ''), ...(e.note ? { note: e.note } : {}), ...explained(e.id) })),
        // Fragility, Bayes factor, equivalence and family: each line is "Name: reading".
        ...evidenceLines(result, f).map((line) => {
          const name = line.slice(0, line.indexOf(': '));
          return { name, value: line.slice(line.indexOf(': ') + 2), ...explained(EVIDENCE_TERMS[name.replace(/ \(.*\)$/, '')] ?? name) };
        }),
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
      plots: plotsForResult(result, f.decimals),
      assumptions: [],
      notices: result.notices.map((n) => ({ severity: n.severity, message: n.message, ...explained(n.code) })),
      otherStatistics: [],
    };
  }
  return {
    ...common,
    headline: t('Power {0} at n = {1}', formatEstimate(result.power, f), formatCount(result.n, 0)),
    apaLine: '',
    significant: null,
    keyFigures: [{ label: result.effectSize.name, value: formatEstimate(result.effectSize.value, f), ...explained(result.effectSize.id) }, { label: 'df', value: formatDf(result.df, f.decimals), ...explained('df') }, { label: 'α', value: String(result.alpha), ...explained('α') }],
    tables: [],
    plots: plotsForResult(result, f.decimals),
    assumptions: [],
    notices: result.notices.map((n) => ({ severity: n.severity, message: n.message, ...explained(n.code) })),
    otherStatistics: [],
  };
}

