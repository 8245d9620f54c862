/**
 * A re-run compared with the recorded result, as a before/after table: the data fingerprint, the statistic,
 * df, N, the p-value, the effect size and the conclusion at α, each row marked when it changed, and the
 * conclusion row marked when it flipped between significant and not. The same rows, one "name: value" line
 * each, are the expected and actual texts of the Testing view's diff. Pure; the recorded shape is taken
 * structurally, so this layer imports nothing from the saved-test layer.
 */
export type { Comparison, ComparisonRow };
import type { Comparison, ComparisonRow } from '../protocol';
import { formatCount, formatEstimate, formatNumber, type FormatOptions } from './format';

interface Numbers {
  readonly statistic: number | null;
  readonly df: number | null;
  readonly n: number | null;
  readonly pValue: number | null;
  readonly effectSize?: { readonly name: string; readonly value: number };
  readonly alpha?: number;
  readonly significant?: boolean;
  readonly power?: number;
}

export interface RecordedSide {
  readonly recordedAt: string;
  readonly data: { readonly sha256: string; readonly rows: number };
  readonly result: Numbers;
}

const shown = (x: number | null | undefined, f: FormatOptions, kind: 'number' | 'count' | 'p' = 'number'): string => {
  if (x === null || x === undefined) return '–';
  if (kind === 'count') return formatCount(x);
  if (kind === 'p') return x < 1e-4 ? x.toExponential(2) : x.toFixed(4);
  return formatNumber(x, f.decimals);
};

function conclusion(n: Numbers): string {
  if (n.significant === undefined) return '–';
  return `${n.significant ? 'significant' : 'not significant'}${n.alpha !== undefined ? ` at α = ${n.alpha}` : ''}`;
}

/** The before/after rows of a re-run. `statusText` is the review's status in words ("data changed"). */
export function compareRecorded(recorded: RecordedSide, current: RecordedSide, statusText: string, f: FormatOptions = { decimals: 2 }): Comparison {
  const r = recorded.result;
  const c = current.result;
  const row = (quantity: string, before: string, after: string, extra: Partial<ComparisonRow> = {}): ComparisonRow => ({ quantity, before, after, changed: before !== after, ...extra });
  const flipped = r.significant !== undefined && c.significant !== undefined && r.significant !== c.significant;
  const rows: ComparisonRow[] = [
    row('Data', `${formatCount(recorded.data.rows)} rows, sha256 ${recorded.data.sha256.slice(0, 12)}…`, `${formatCount(current.data.rows)} rows, sha256 ${current.data.sha256.slice(0, 12)}…`),
    row('Statistic', shown(r.statistic, f), shown(c.statistic, f)),
    row('df', r.df === null ? '–' : String(r.df), c.df === null ? '–' : String(c.df)),
    row('N', shown(r.n, f, 'count'), shown(c.n, f, 'count')),
    row('p-value', shown(r.pValue, f, 'p'), shown(c.pValue, f, 'p')),
    ...(r.effectSize || c.effectSize ? [row(r.effectSize?.name ?? c.effectSize?.name ?? 'Effect size', r.effectSize ? formatEstimate(r.effectSize.value, f) : '–', c.effectSize ? formatEstimate(c.effectSize.value, f) : '–')] : []),
    ...(r.power !== undefined || c.power !== undefined ? [row('Power', shown(r.power, f), shown(c.power, f))] : []),
    ...(r.significant !== undefined || c.significant !== undefined ? [row('Conclusion', conclusion(r), conclusion(c), flipped ? { flipped: true } : {})] : []),
  ];
  return { status: statusText, rows, flipped };
}

/** The two sides of the Testing view's diff: one "quantity: value" line per row. */
export function comparisonDiffTexts(comparison: Comparison): { readonly expected: string; readonly actual: string } {
  return {
    expected: comparison.rows.map((r) => `${r.quantity}: ${r.before}`).join('\n') + '\n',
    actual: comparison.rows.map((r) => `${r.quantity}: ${r.after}`).join('\n') + '\n',
  };
}
