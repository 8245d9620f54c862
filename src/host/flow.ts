// From a table (a file, or records from a selection or a cell output) to a spec: infer the shape and the
// test, ask only what is left with QuickPicks, remember the answers per source, then run and show.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { aggregateRecords } from '../data/aggregate';
import type { Records } from '../data/records';
import type { AggregateRequest } from '../data/types';
import { InputError } from '../errors';
import type { Alternative } from '../stats/result';
import { describeColumn, inferShape, profileColumns, testForColumns, type ColumnProfile } from './infer';
import { Cancelled, settings, type Services } from './services';

const t = vscode.l10n.t;

/** Pre-filled answers: a command given these asks nothing (used by keyboard users' keybindings and by tests). */
export interface Answers {
  test?: 'independence' | 'goodness-of-fit' | 'variance';
  columns?: string[];
  /** 'equal' or one number per category. */
  proportions?: 'equal' | number[];
  sigma0?: number;
  alternative?: Alternative;
  correction?: boolean;
  /** A workbook's sheet and range (.xlsx); skip the sheet pick when given. */
  sheet?: string;
  range?: string;
}

export type TableSource =
  /** `complete`: the preview holds the whole file (so level counts seen are all there are). */
  | { readonly kind: 'file'; readonly file: string; readonly preview: Records; readonly complete: boolean; readonly selection?: { readonly sheet?: string; readonly range?: string } }
  | { readonly kind: 'records'; readonly records: Records; readonly description: string; readonly documentUri?: string }
  /** Data already in a test's shape (a counted table, category counts, a list of values): only options are asked. */
  | {
      readonly kind: 'inline';
      readonly test: 'independence' | 'goodness-of-fit' | 'variance';
      readonly data: Readonly<Record<string, unknown>>;
      readonly levels?: readonly string[];
      readonly hasExpectation?: boolean;
      readonly description: string;
      readonly documentUri?: string;
    };

const TESTS = {
  independence: { label: () => t('Independence of two categorical columns'), detail: () => t('Pearson χ² on their cross-tabulation') },
  'goodness-of-fit': { label: () => t('Goodness of fit of one categorical column'), detail: () => t('Observed level counts against expected proportions') },
  variance: { label: () => t('Variance of one numeric column'), detail: () => t('χ² test of σ against a hypothesised σ0, with a confidence interval') },
} as const;

function cancelled(): never {
  throw new Cancelled(t('Cancelled'));
}

async function pick<T extends vscode.QuickPickItem>(items: T[], title: string, placeHolder: string, remembered?: (item: T) => boolean): Promise<T> {
  const qp = vscode.window.createQuickPick<T>();
  qp.title = title;
  qp.placeholder = placeHolder;
  qp.items = items;
  const active = remembered ? items.find(remembered) : undefined;
  if (active) qp.activeItems = [active];
  qp.matchOnDetail = true;
  const chosen = await new Promise<T | undefined>((resolve) => {
    qp.onDidAccept(() => { resolve(qp.selectedItems[0] ?? qp.activeItems[0]); qp.hide(); });
    qp.onDidHide(() => resolve(undefined));
    qp.show();
  });
  qp.dispose();
  return chosen ?? cancelled();
}

async function askNumber(title: string, prompt: string, value: string | undefined, check: (n: number) => string | undefined): Promise<number> {
  const text = await vscode.window.showInputBox({
    title, prompt, value,
    validateInput: (v) => { const n = Number(v); return v.trim() === '' || !Number.isFinite(n) ? t('Enter a number') : check(n); },
  });
  if (text === undefined) cancelled();
  return Number(text);
}

async function askColumns(profiles: readonly ColumnProfile[], count: number, title: string, remembered: readonly string[] = []): Promise<string[]> {
  const chosen: string[] = [];
  for (let k = 0; k < count; k++) {
    const which = count === 2 ? (k === 0 ? t('rows') : t('columns')) : t('the column');
    const items = profiles.filter((p) => !chosen.includes(p.name)).map((p) => ({ label: p.name, description: p.numeric ? t('numbers') : t('categories'), detail: describeColumn(p) }));
    const item = await pick(items, title, t('Choose {0}', which), (i) => i.label === remembered[k]);
    chosen.push(item.label);
  }
  return chosen;
}

async function askAlternative(remembered?: Alternative): Promise<Alternative> {
  const items: (vscode.QuickPickItem & { value: Alternative })[] = [
    { label: t('σ differs from σ0'), description: t('two-sided'), value: 'two-sided' },
    { label: t('σ is larger than σ0'), description: t('one-sided, greater'), value: 'greater' },
    { label: t('σ is smaller than σ0'), description: t('one-sided, less'), value: 'less' },
  ];
  return (await pick(items, t('Alternative hypothesis'), t('What would you like to detect?'), (i) => i.value === remembered)).value;
}

async function askProportions(levels: readonly string[], remembered?: 'equal' | number[]): Promise<'equal' | number[]> {
  const items: (vscode.QuickPickItem & { value: 'equal' | 'enter' })[] = [
    { label: t('Equal proportions'), detail: t('Every level is expected equally often ({0} levels)', levels.length), value: 'equal' },
    { label: t('Enter proportions or ratios…'), detail: t('One number per level, in order: {0}', levels.join(', ')), value: 'enter' },
  ];
  const choice = await pick(items, t('Expected distribution'), t('What does the null hypothesis expect?'), (i) => (remembered === 'equal' ? i.value === 'equal' : remembered ? i.value === 'enter' : false));
  if (choice.value === 'equal') return 'equal';
  const text = await vscode.window.showInputBox({
    title: t('Expected proportions'),
    prompt: t('{0} numbers separated by commas, for {1} (ratios such as 9:3:3:1 also work)', levels.length, levels.join(', ')),
    value: Array.isArray(remembered) ? remembered.join(', ') : undefined,
    validateInput: (v) => {
      const parts = v.split(/[,:;\s]+/).filter(Boolean).map(Number);
      if (parts.length !== levels.length) return t('Expected {0} numbers, found {1}', levels.length, parts.length);
      if (parts.some((n) => !Number.isFinite(n) || n < 0)) return t('Every number must be ≥ 0');
      return undefined;
    },
  });
  if (text === undefined) cancelled();
  return text.split(/[,:;\s]+/).filter(Boolean).map(Number);
}

/** Completes the answers: infers what it can, asks the rest. */
export async function completeAnswers(records: Records, given: Answers, remembered: Answers, missing: readonly string[]): Promise<{ answers: Answers; shape: ReturnType<typeof inferShape>; profiles: ColumnProfile[] }> {
  const profiles = profileColumns(records, missing);
  const shape = inferShape(records, profiles);
  const answers: Answers = { ...given };
  if (!given.columns && !given.test && shape.kind === 'counted-table') return { answers: { ...answers, test: 'independence' }, shape, profiles };
  if (!given.columns && !given.test && shape.kind === 'category-counts') {
    answers.test = 'goodness-of-fit';
    answers.columns = [shape.labelColumn];
  }
  if (!answers.test) {
    const categorical = profiles.filter((p) => !p.numeric || p.levels.length <= 12).length;
    const numericCols = profiles.filter((p) => p.numeric && p.levels.length > 12).length;
    const order = (['independence', 'goodness-of-fit', 'variance'] as const).filter((k) => (k === 'independence' ? categorical >= 2 : k === 'goodness-of-fit' ? categorical >= 1 : numericCols >= 1));
    if (order.length === 0) throw new InputError(t('found no column to test: expected categorical columns or a numeric column'), { file: records.file }, 'nothing-to-test');
    const item = order.length === 1 ? { key: order[0] } : await pick(order.map((k) => ({ key: k, label: TESTS[k].label(), detail: TESTS[k].detail() })), t('Which test?'), t('Countercheck inferred these from the columns'), (i) => i.key === remembered.test);
    answers.test = item.key;
  }
  if (!answers.columns) {
    const count = answers.test === 'independence' ? 2 : 1;
    const eligible = answers.test === 'variance' ? profiles.filter((p) => p.numeric) : profiles;
    answers.columns = await askColumns(eligible, count, TESTS[answers.test].label(), remembered.test === answers.test ? remembered.columns : undefined);
  }
  for (const c of answers.columns) {
    if (!records.columns.includes(c)) throw new InputError(t('column "{0}" not found; the columns are {1}', c, records.columns.join(', ')), { file: records.file, line: records.lines[0] ? records.lines[0] - 1 : 1 }, 'unknown-column');
  }
  if (testForColumns(answers.columns.map((c) => profiles.find((p) => p.name === c)!)) === undefined) throw new InputError(t('choose one or two columns'), {}, 'column-count');
  if (answers.test === 'goodness-of-fit' && answers.proportions === undefined) {
    const prof = profiles.find((p) => p.name === answers.columns![0])!;
    const levels = shape.kind === 'category-counts' ? records.rows.map((r) => r[records.columns.indexOf(shape.labelColumn)]) : prof.levels.map((l) => l.label);
    answers.proportions = await askProportions(levels, remembered.proportions);
  }
  if (answers.test === 'variance') {
    if (answers.sigma0 === undefined) answers.sigma0 = await askNumber(t('Hypothesised standard deviation σ0'), t('σ0 in the units of "{0}" (for example a specification or a historical value)', answers.columns[0]), remembered.sigma0 !== undefined ? String(remembered.sigma0) : undefined, (n) => (n > 0 ? undefined : t('σ0 must be greater than 0')));
    if (answers.alternative === undefined) answers.alternative = await askAlternative(remembered.alternative);
  }
  return { answers, shape, profiles };
}

/** The spec for the answers: a `source` for files, inline data for records held in memory. */
/** Counted data from a selection or a cell: the test is known; ask only its options. */
async function runOnInline(services: Services, source: Extract<TableSource, { kind: 'inline' }>, given: Answers): Promise<void> {
  const s = settings();
  const remembered = services.context.workspaceState.get<Answers>(answersKey(source.description)) ?? {};
  const answers: Answers = { ...given, test: source.test };
  const options: Record<string, unknown> = { alpha: s.alpha };
  if (source.test === 'goodness-of-fit' && !source.hasExpectation) {
    answers.proportions ??= await askProportions(source.levels ?? [], remembered.proportions);
    if (Array.isArray(answers.proportions)) options.proportions = answers.proportions;
  }
  if (source.test === 'variance') {
    answers.sigma0 ??= await askNumber(t('Hypothesised standard deviation σ0'), t('σ0 in the units of the values'), remembered.sigma0 !== undefined ? String(remembered.sigma0) : undefined, (n) => (n > 0 ? undefined : t('σ0 must be greater than 0')));
    answers.alternative ??= await askAlternative(remembered.alternative);
    Object.assign(options, { sigma0: answers.sigma0, alternative: answers.alternative });
  }
  if (source.test === 'independence' && (answers.correction ?? s.correction) && isTwoByTwo(source.data.table)) options.correction = true;
  await services.context.workspaceState.update(answersKey(source.description), answers);
  const spec = { version: 1, test: source.test, ...source.data, ...options };
  const folder = services.workspaceRootFor(source.documentUri ? vscode.Uri.parse(source.documentUri).fsPath : '');
  const specPath = path.join(folder, 'untitled.countercheck.json');
  const run = await services.run(spec, specPath, source.description);
  services.showResult(run.result, { spec, specPath, saved: false, documentUri: source.documentUri }, `${TESTS[source.test].label()} — ${source.description}`, source.description);
}

function isTwoByTwo(table: unknown): boolean {
  return Array.isArray(table) && table.length === 2 && table.every((r) => Array.isArray(r) && r.length === 2);
}

export function specFor(source: TableSource, answers: Answers, shape: ReturnType<typeof inferShape>, alpha: number, specFolder: string): Record<string, unknown> {
  const options: Record<string, unknown> = { alpha };
  if (answers.test === 'goodness-of-fit' && Array.isArray(answers.proportions)) options.proportions = answers.proportions;
  if (answers.test === 'variance') Object.assign(options, { sigma0: answers.sigma0, alternative: answers.alternative ?? 'two-sided' });
  if (answers.test === 'independence' && answers.correction) options.correction = true;
  const test = answers.test!;

  if (source.kind === 'inline') return { version: 1, test: source.test, ...source.data, ...options };
  if (source.kind === 'file') {
    const rel = path.relative(specFolder, source.file).split(path.sep).join('/');
    const at = { path: rel, ...source.selection };
    if (shape.kind === 'counted-table' && !answers.columns) return { version: 1, test, source: at, ...options };
    if (shape.kind === 'category-counts' && test === 'goodness-of-fit' && answers.columns?.[0] === shape.labelColumn) {
      return { version: 1, test, source: { ...at, columns: [shape.labelColumn], weight: shape.countColumn }, ...options };
    }
    return { version: 1, test, source: { ...at, columns: answers.columns }, ...options };
  }

  const records = source.records;
  const request: AggregateRequest =
    shape.kind === 'counted-table' && !answers.columns ? { kind: 'counted-table' }
      : test === 'independence' ? { kind: 'crosstab', rowColumn: answers.columns![0], columnColumn: answers.columns![1] }
        : test === 'goodness-of-fit' ? { kind: 'categories', column: answers.columns![0], weight: shape.kind === 'category-counts' && answers.columns![0] === shape.labelColumn ? shape.countColumn : undefined }
          : { kind: 'numeric', column: answers.columns![0] };
  const aggregate = aggregateRecords(records, request, { file: records.file, keepValues: true, description: source.description });
  if (aggregate.kind === 'table') return { version: 1, test: 'independence', table: aggregate.table.counts, rowLabels: aggregate.table.rowLabels, columnLabels: aggregate.table.columnLabels, ...options };
  if (aggregate.kind === 'categories') return { version: 1, test: 'goodness-of-fit', observed: aggregate.counts.counts, categories: aggregate.counts.labels, ...options };
  if (!aggregate.values) throw new InputError(t('the numeric column could not be kept in memory'), {}, 'values-missing');
  return { version: 1, test: 'variance', values: aggregate.values, ...options };
}

function answersKey(id: string): string {
  return `answers:${id}`;
}

/** The whole flow for one table: ask, build the spec, run it, show the panel. */
export async function runOnTable(services: Services, source: TableSource, given: Answers): Promise<void> {
  if (source.kind === 'inline') return runOnInline(services, source, given);
  const key = source.kind === 'file' ? source.file : source.description;
  const s = settings();
  const records = source.kind === 'file' ? source.preview : source.records;
  const remembered = services.context.workspaceState.get<Answers>(answersKey(key)) ?? {};
  const { answers, shape, profiles } = await completeAnswers(records, given, remembered, s.missingValues);
  await services.context.workspaceState.update(answersKey(key), answers);
  const dataFolder = source.kind === 'file' ? path.dirname(source.file) : services.workspaceRootFor(source.documentUri ? vscode.Uri.parse(source.documentUri).fsPath : '');
  if (answers.test === 'independence' && answers.correction === undefined && s.correction && (source.kind === 'records' || source.complete)) {
    // The default correction applies to 2×2 tables only; it is known to be 2×2 only when every row was seen.
    const levels = answers.columns ? answers.columns.map((c) => profiles.find((p) => p.name === c)?.levels.length ?? 0) : [records.rows.length, records.columns.length - 1];
    if (levels.length === 2 && levels.every((n) => n === 2)) answers.correction = true;
  }
  const spec = specFor(source, answers, shape, s.alpha, dataFolder);
  const specPath = path.join(dataFolder, 'untitled.countercheck.json');
  const label = source.kind === 'file' ? vscode.workspace.asRelativePath(source.file) : source.description;
  const run = await services.run(spec, specPath, label);
  services.showResult(run.result, { spec, specPath, saved: false, documentUri: source.kind === 'records' ? source.documentUri : undefined }, `${TESTS[answers.test!].label()} — ${path.basename(label)}`, run.data.description === 'inline' ? label : run.data.description);
}
