/**
 * Tables that travel: a panel table as tab-separated cells (a spreadsheet pastes them as cells), and a
 * result as CSV for `countercheck run --format csv`. Cells are the numbers as the reports format them,
 * without thousands separators (a spreadsheet would read "1,768" as text or as two cells). Pure.
 */
import type { ResultTable } from '../protocol';
import type { Result } from '../stats/result';
import { log10Of } from './json';

/** One cell for a spreadsheet: no thousands separators, exponents (caret or superscript) as E notation, a true minus sign as "-". */
export function spreadsheetCell(text: string): string {
  const cleaned = text.replace(/[\t\r\n]+/g, ' ').trim();
  const number = cleaned.replace(/−/g, '-').replace(/10([⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)/g, (_w, e: string) => `10^${[...e].map((c) => String('⁰¹²³⁴⁵⁶⁷⁸⁹'.indexOf(c)).replace('-1', c === '⁻' ? '-' : '+')).join('')}`);
  if (/^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$/.test(number)) return number.replace(/,/g, '');
  const scientific = /^([+-]?\d+(?:\.\d+)?) × 10(?:\^|)([+-]?\d+)$/.exec(number);
  if (scientific) return `${scientific[1]}E${scientific[2]}`;
  if (/^[+-]?\d+(\.\d+)?$/.test(number)) return number;
  return cleaned;
}

/** The table as tab-separated lines: the header, then each row (its label first). */
export function tableToTsv(table: ResultTable): string {
  const lines = [table.header.map(spreadsheetCell), ...table.rows.map((r) => [r.label, ...r.cells.map((c) => c.text)].map(spreadsheetCell))];
  return lines.map((l) => l.join('\t')).join('\n') + '\n';
}

/** RFC 4180 quoting: a field with a comma, quote or line break is quoted, quotes doubled. */
export function csvField(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  const text = typeof value === 'number' ? (Number.isFinite(value) ? String(value) : value > 0 ? 'Infinity' : value < 0 ? '-Infinity' : 'NaN') : String(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** The header of the long-form CSV. */
export const CSV_HEADER = 'file,section,name,row,column,value';

/**
 * A result as CSV in long form, one quantity per line: `section,name,row,column,value` with full double
 * precision (not the display decimals), so a pipeline can read every number without parsing prose.
 */
export function resultToCsv(result: Result, file = ''): string {
  const lines: (string | number | boolean | null)[][] = [CSV_HEADER.split(',')];
  const add = (section: string, name: string, value: string | number | boolean | null, row = '', column = '') => lines.push([file, section, name, row, column, value]);
  if (result.kind === 'test') {
    add('result', 'test', result.test);
    add('result', 'procedure', result.procedure);
    add('result', 'statistic', result.statistic);
    add('result', 'statisticSymbol', result.statisticSymbol);
    add('result', 'df', result.df);
    add('result', 'n', result.n);
    add('result', 'pValue', result.pValue.value);
    add('result', 'pValueLog10', log10Of(result.pValue));
    add('result', 'alpha', result.alpha);
    add('result', 'significant', result.significant);
    for (const e of [...result.effectSizes, ...result.estimates]) {
      add('estimate', e.id, e.value);
      if (e.interval) {
        add('estimate', `${e.id}.lower`, e.interval.lower);
        add('estimate', `${e.id}.upper`, e.interval.upper);
        add('estimate', `${e.id}.level`, e.interval.level);
      }
    }
    for (const s of result.otherStatistics) {
      add('other', `${s.id}.statistic`, s.statistic);
      add('other', `${s.id}.df`, s.df);
      add('other', `${s.id}.pValue`, s.pValue.value);
    }
    for (const c of result.categories ?? []) {
      add('category', 'observed', c.observed, c.label);
      add('category', 'expected', c.expected, c.label);
      add('category', 'standardizedResidual', c.standardizedResidual, c.label);
      add('category', 'contribution', c.contribution, c.label);
    }
    const g = result.grid;
    if (g) {
      g.rowLabels.forEach((r, i) => g.columnLabels.forEach((c, j) => {
        add('cell', 'observed', g.observed[i][j], r, c);
        add('cell', 'expected', g.expected[i][j], r, c);
        add('cell', 'adjustedResidual', g.adjustedResiduals[i][j], r, c);
      }));
    }
    for (const n of result.notices) add('notice', n.code, n.message);
    for (const a of result.assumptions) add('assumption', a.id, a.status);
  } else if (result.kind === 'distribution') {
    add('result', 'test', 'distribution');
    add('result', 'df', result.df);
    for (const p of result.points) {
      const row = String(p.x);
      add('point', 'lower', p.lower.value, row);
      add('point', 'upper', p.upper.value, row);
      add('point', 'upperLog10', log10Of(p.upper), row);
      add('point', 'density', p.density, row);
    }
    for (const c of result.critical) {
      const row = String(c.p);
      add('critical', 'lower', c.lower, row);
      add('critical', 'upper', c.upper, row);
      add('critical', 'twoSidedLower', c.twoSided.lower, row);
      add('critical', 'twoSidedUpper', c.twoSided.upper, row);
    }
  } else {
    add('result', 'test', 'power');
    add('result', 'target', result.target);
    add('result', result.effectSize.id, result.effectSize.value);
    add('result', 'df', result.df);
    add('result', 'alpha', result.alpha);
    add('result', 'n', result.n);
    add('result', 'power', result.power);
    for (const p of result.curve) add('curve', 'power', p.power, String(p.n));
  }
  return lines.map((l) => l.map(csvField).join(',')).join('\n') + '\n';
}
