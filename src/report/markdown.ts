/**
 * A result as a markdown block: for pasting into a report and for living report blocks. Tables of
 * observed and expected counts with residuals, the APA line, effect sizes, notes and the caution.
 * Deterministic (no dates, no versions) so that a refreshed report only changes when the result does. Pure.
 */
import type { CellGrid, CategoryRow, DistributionResult, PowerResult, Result, TestResult } from '../stats/result';
import { DEFAULT_FORMAT, formatCount, formatDf, formatEstimate, formatEstimateInterval, formatEstimateWithLog, formatNumber, formatPExact, formatProbability } from './format';
import { presentedTest, testHeadline, type Headline } from './headline';
import { CAUTION, POWER_CAUTION, apaLine, estimateText, intervalText, mainIntervalAndEstimates, statisticLineText, type ReportOptions } from './text';
import { evidenceLines } from './evidence';

/**
 * Escapes text for a markdown table cell or inline text, so that it reads as the same plain text and nothing
 * else: every line break (CR, CRLF, LF: CommonMark ends a line at a lone CR too) becomes a space; characters
 * that open markup anywhere (\\ | * _ ` [ ] ~, < before a tag or autolink, & before an entity) are
 * backslash-escaped, and so are those that open a block only at the start (# > + = - and an ordered-list number's
 * dot or parenthesis); leading spaces and tabs, which a paragraph drops and which from four on would open a code
 * block, are removed. Checked against markdown-it by a property test.
 */
export function escapeMarkdown(text: string, atLineStart = true): string {
  const inline = text
    .replace(/\r\n|\r|\n/g, ' ')
    .replace(/[\\|*_`[\]~]/g, '\\$&')
    .replace(/<(?=[A-Za-z/!?])/g, '\\<')
    .replace(/&(?=#?[A-Za-z0-9]+;)/g, '\\&');
  // Text that continues a line (after a code span) keeps its spaces; only a line's start can open a block.
  if (!atLineStart) return inline;
  return inline
    .replace(/^[ \t]+/, '')
    .replace(/^([#>+=-])/, '\\$1')
    .replace(/^(\d+)([.)])/, '$1\\$2');
}

/**
 * Inline text in which names given as code spans (`fill_ml`) stay code spans: everything else is escaped,
 * and the name itself is fenced with enough backticks to hold any it contains.
 */
export function markdownWithNames(text: string): string {
  return text.split(/(`[^`]+`)/).map((part, i) => (/^`[^`]+`$/.test(part) ? codeSpan(part.slice(1, -1)) : escapeMarkdown(part, i === 0))).join('');
}

/** A code span holding `text` verbatim (CommonMark: a longer fence than any backtick run inside). */
export function codeSpan(text: string): string {
  const longest = Math.max(0, ...(text.match(/`+/g) ?? []).map((r) => r.length));
  const fence = '`'.repeat(longest + 1);
  const pad = text.startsWith('`') || text.endsWith('`') ? ' ' : '';
  return `${fence}${pad}${text}${pad}${fence}`;
}

/** The headline in markdown: the answer with names as code spans, then the failed assumption in bold (the effect size is the next line). */
export function headlineMarkdown(h: Headline, conclusion: string): string {
  return [markdownWithNames(conclusion), ...(h.assumption ? [`**${escapeMarkdown(h.assumption)}**`] : [])].join(' ');
}

/**
 * The folder beside a report (or document) that holds its plot files: "report.md" → "report.plots". One
 * folder per document, so plots of several documents in one folder never collide.
 */
export function plotFolderName(documentPath: string): string {
  const base = documentPath.split(/[\\/]/).pop() ?? 'report';
  return `${base.replace(/\.[^.]+$/, '') || 'report'}.plots`;
}

/** The markdown followed by an image link per plot (relative links, URL-encoded, alt text escaped). */
export function withPlotLinks(markdown: string, plots: readonly { readonly link: string; readonly alt: string }[]): string {
  if (plots.length === 0) return markdown;
  const images = plots.map((p) => `![${escapeMarkdown(p.alt)}](${p.link.split('/').map(encodeURIComponent).join('/')})`).join('\n\n');
  return `${markdown.replace(/\n*$/, '')}\n\n${images}\n`;
}

/** A pipe table; numeric columns are right-aligned. */
export function markdownTable(header: readonly string[], rows: readonly (readonly string[])[], numericFrom = 1): string {
  const align = header.map((_, j) => (j >= numericFrom ? '---:' : '---'));
  const line = (cells: readonly string[]): string => `| ${cells.join(' | ')} |`;
  return [line(header.map((cell) => escapeMarkdown(cell))), line(align), ...rows.map((r) => line(r.map((c, j) => (j < numericFrom ? escapeMarkdown(c) : c))))].join('\n');
}

/** "+2.25", "-3.25": signed with ASCII signs (pasted markdown is read by other programs). */
function plusSigned(x: number, decimals: number): string {
  return `${x > 0 ? '+' : ''}${formatNumber(x, decimals)}`;
}

/** Categories in our reading order: deviation, standardized residual z, share of the statistic, then the counts. */
function categoryTable(rows: readonly CategoryRow[], options: ReportOptions): string {
  const total = rows.reduce((a, r) => a + r.contribution, 0);
  return markdownTable(
    ['Category', 'Observed − expected', 'z', 'Share of χ²', 'Observed', 'Expected'],
    rows.map((r) => [
      r.label,
      plusSigned(r.observed - r.expected, options.decimals),
      plusSigned(r.standardizedResidual, options.decimals),
      total > 0 ? `${formatNumber((100 * r.contribution) / total, 1)} %` : '–',
      formatCount(r.observed, options.decimals),
      formatNumber(r.expected, options.decimals),
    ]),
  );
}

function gridTables(grid: CellGrid, options: ReportOptions): string {
  const observedExpected = markdownTable(
    ['', ...grid.columnLabels, 'Total'],
    [
      ...grid.rowLabels.map((label, i) => [
        label,
        ...grid.observed[i].map((o, j) => `${formatCount(o, options.decimals)} (${formatNumber(grid.expected[i][j], options.decimals)})`),
        formatCount(grid.rowTotals[i], options.decimals),
      ]),
      ['Total', ...grid.columnTotals.map((t) => formatCount(t, options.decimals)), formatCount(grid.total, options.decimals)],
    ],
  );
  const residuals = markdownTable(
    ['Adjusted residual', ...grid.columnLabels],
    grid.rowLabels.map((label, i) => [label, ...grid.adjustedResiduals[i].map((r) => formatNumber(r, options.decimals))]),
  );
  return `Observed (expected) counts:\n\n${observedExpected}\n\n${residuals}`;
}

function noticeBullets(result: { readonly notices: TestResult['notices'] }): string[] {
  return result.notices.map((n) => `- ${n.severity === 'warning' ? '**Warning:** ' : ''}${escapeMarkdown(n.message)}`);
}

export function testMarkdown(given: TestResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const result = presentedTest(given);
  const parts: string[] = [];
  parts.push(`**${escapeMarkdown(options.title ?? result.procedure)}**${options.title ? ` — ${escapeMarkdown(result.procedure)}` : ''}`);
  parts.push(headlineMarkdown(testHeadline(result, options), result.conclusion));
  const exact = formatPExact(result.pValue);
  const details = [apaLine(result, options) + (exact ? ` (${exact})` : ''), ...result.effectSizes.map((e) => estimateText(e, options))];
  const { main, interval, rest } = mainIntervalAndEstimates(result);
  if (main) details.push(estimateText(main, options));
  if (interval) details.push(intervalText(interval, options));
  parts.push(details.map((cell) => escapeMarkdown(cell)).join('; '));
  if (result.categories) parts.push(categoryTable(result.categories, options));
  if (result.grid) parts.push(gridTables(result.grid, options));
  const extra = [
    ...rest.map((e) => `- ${escapeMarkdown(estimateText(e, options))}`),
    ...result.otherStatistics.map((s) => `- ${escapeMarkdown(statisticLineText(s, result.n, options))}${s.note ? ` (${escapeMarkdown(s.note)})` : ''}`),
    ...evidenceLines(result, options).map((line) => `- ${escapeMarkdown(line)}`),
  ];
  if (extra.length) parts.push(extra.join('\n'));
  const notes = [
    ...noticeBullets(result),
    ...result.assumptions.filter((a) => a.status === 'failed').map((a) => `- **Assumption not met:** ${escapeMarkdown(a.title)}. ${escapeMarkdown(a.explanation)}`),
  ];
  if (notes.length) parts.push(notes.join('\n'));
  parts.push(`*${escapeMarkdown(CAUTION)}*`);
  return parts.join('\n\n') + '\n';
}

export function distributionMarkdown(result: DistributionResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const parts: string[] = [`**${escapeMarkdown(options.title ?? `Chi-square distribution, df = ${formatDf(result.df)}`)}**`];
  if (result.points.length) {
    parts.push(
      markdownTable(
        ['x', 'P(X > x)', 'P(X ≤ x)', 'Density'],
        result.points.map((p) => [formatNumber(p.x, options.decimals), formatProbability(p.upper, 3), formatProbability(p.lower, 3), formatEstimateWithLog(p.density, p.densityLog10, options)]),
        0,
      ),
    );
  }
  if (result.critical.length) {
    const d = { decimals: options.decimals + 1 };
    parts.push(
      markdownTable(
        ['p', 'Upper critical value', 'Lower critical value', 'Two-sided'],
        result.critical.map((c) => [
          String(c.p),
          formatEstimateWithLog(c.upper, c.upperLog10, d),
          formatEstimateWithLog(c.lower, c.lowerLog10, d),
          formatEstimateInterval(c.twoSided.lower, c.twoSided.upper, d, c.twoSided),
        ]),
        0,
      ),
    );
  }
  const notes = noticeBullets(result);
  if (notes.length) parts.push(notes.join('\n'));
  return parts.join('\n\n') + '\n';
}

export function powerMarkdown(result: PowerResult, options: ReportOptions = DEFAULT_FORMAT): string {
  const head = `**${escapeMarkdown(options.title ?? `Power of the chi-square ${result.target} test`)}**`;
  const body = `${escapeMarkdown(result.effectSize.name)} = ${formatEstimate(result.effectSize.value, options)}, df = ${formatDf(result.df)}, α = ${formatEstimate(result.alpha, options)}: n = ${formatCount(result.n)}, power = ${formatEstimate(result.power, options)}${result.solvedFor === 'n' ? ' (smallest n reaching the power asked)' : ''}`;
  const notes = noticeBullets(result);
  return [head, body, ...(notes.length ? [notes.join('\n')] : []), `*${escapeMarkdown(POWER_CAUTION)}*`].join('\n\n') + '\n';
}

export function resultMarkdown(result: Result, options: ReportOptions = DEFAULT_FORMAT): string {
  switch (result.kind) {
    case 'test':
      return testMarkdown(result, options);
    case 'distribution':
      return distributionMarkdown(result, options);
    case 'power':
      return powerMarkdown(result, options);
  }
}
