/**
 * The planner: from what a source offers to a saved test. It infers what can be inferred (the shape of the
 * table, a weight column, the columns that fit), proposes the procedures that fit, asks the rest through the
 * injected `Questions`, refuses misread shapes in words, and returns the spec that `runSpec` runs. Pure: the
 * host renders the questions and runs the spec; nothing here shows, reads files or runs a test.
 */
import * as path from 'node:path';
import { aggregateRecords } from '../data/aggregate';
import type { Records } from '../data/records';
import { InputError } from '../errors';
import { askField, parseNumberList } from './ask';
import { checkCategoryColumns, checkMeasurementColumns, checkNotOnePerRow } from './guards';
import { inlineFromRecords } from './inline';
import type { Offer } from './offer';
import { english, tableText, text, verbatim, type Choice, type Questions, type Shown } from './questions';
import { describeView, sum, viewOf, type ColumnInfo, type DataFacts, type Role, type View } from './view';
import { namesRows } from './profile';
import { PROCEDURES, procedureFor, type DataShape } from '../savedtest/procedures/index';

/** Answers given beforehand (keybindings, tests) or remembered from the last run on the same source. */
export interface Answers {
  readonly test?: string;
  readonly columns?: readonly string[];
  /** A frequency-weight column; null: count each record once even when a count column was found. */
  readonly weight?: string | null;
  /** Goodness of fit: 'equal' or one number per category. */
  readonly proportions?: 'equal' | readonly number[];
  /** Any other field of the saved test (sigma0, alternative, family, method…). */
  readonly [field: string]: unknown;
}

export interface PlanSettings {
  readonly alpha: number;
  /** Yates' correction by default on 2×2 tables. */
  readonly correction: boolean;
  readonly missingValues: readonly string[];
  readonly monteCarloResamples: number;
}

export interface PlanRequest {
  readonly offer: Offer;
  readonly questions: Questions;
  readonly settings: PlanSettings;
  readonly given?: Answers;
  readonly remembered?: Answers;
  /** Folder the saved test would live in: a file source's path is written relative to it. */
  readonly specFolder: string;
}

export interface Plan {
  readonly spec: Readonly<Record<string, unknown>>;
  readonly test: string;
  /** "Independence of two categorical columns — demo/data/bakery.csv". */
  readonly title: string;
  /** What was asked or given, to remember for the next run on this source. */
  readonly answers: Answers;
  /** What was inferred and why ("`riders` is used as the frequency weight: …"), for the output log (`english` reads it). */
  readonly notes: readonly Shown[];
}

/** One line of the "Which test?" list. */
interface Proposal {
  readonly test: string;
  /** From the procedure's planning declaration (English; the host translates it). */
  readonly label: string;
  readonly detail: string;
  /** Fields the choice sets (a p-value method). */
  readonly preset?: Readonly<Record<string, unknown>>;
  /** Columns to choose, for data given as columns. */
  readonly roles?: readonly Role[];
  /** The procedure needs no data (power, the distribution). */
  readonly anything?: boolean;
}

/**
 * For a table whose columns are the same categories as its rows (in any order), the column index of each row's
 * category; otherwise undefined.
 */
function columnOrderAsRows(t: { readonly rowLabels: readonly string[]; readonly columnLabels: readonly string[] }): number[] | undefined {
  if (t.rowLabels.length !== t.columnLabels.length || new Set(t.rowLabels).size !== t.rowLabels.length) return undefined;
  const order = t.rowLabels.map((l) => t.columnLabels.indexOf(l));
  return order.every((j) => j >= 0) ? order : undefined;
}

/** Which shapes a view offers: a procedure is proposed when it accepts one of them. */
function shapesOf(view: View): DataShape[] {
  switch (view.form) {
    case 'table':
      // Square for a paired test only when rows and columns are the same categories: a 3×3 of markets × seed
      // treatments is not one classification made twice.
      return columnOrderAsRows(view.table) ? ['counted-table', 'square-table', 'anything'] : ['counted-table', 'anything'];
    case 'categories':
      return ['category-counts', 'anything'];
    case 'values':
      return ['values', 'anything'];
    case 'columns':
      return ['categorical-columns', 'numeric-column', 'anything'];
    case 'nothing':
      return ['anything'];
  }
}

/** The procedures that fit the view, from each procedure's own planning declaration, in registry order of data first. */
function proposalsFor(view: View, offer: Offer, settings: PlanSettings): Proposal[] {
  const shapes = shapesOf(view);
  const categorical = view.form === 'columns' ? view.columns.filter((c) => c.categorical).length : 0;
  const measurement = view.form === 'columns' ? view.columns.filter((c) => c.measurement).length : 0;
  const list: Proposal[] = [];
  for (const handler of PROCEDURES) {
    const planning = handler.planning;
    if (!planning) continue;
    const accepted = planning.accepts.filter((a) => shapes.includes(a));
    if (accepted.length === 0) continue;
    const shape = accepted[0];
    let roles: Role[] | undefined;
    if (view.form === 'columns' && shape === 'categorical-columns') {
      const names = planning.roles ?? [];
      // Counts written inline (a procedure without a `source` field) cannot come from a database.
      if (names.length > categorical || (!handler.fields.source && offer.kind === 'catalogue')) continue;
      roles = names.map((name) => ({ name: tableText(name), kind: 'categorical' }));
    } else if (view.form === 'columns' && shape === 'numeric-column') {
      if (measurement === 0) continue;
      roles = [{ name: text('the column'), kind: 'measurement' }];
    }
    const base = { test: handler.test, roles, anything: shape === 'anything' };
    list.push({ ...base, label: planning.label, detail: planning.detail });
    for (const v of planning.variants ?? []) {
      const preset = v.preset.method === 'monte-carlo' ? { ...v.preset, resamples: settings.monteCarloResamples } : v.preset;
      list.push({ ...base, label: v.label, detail: v.detail, preset });
    }
  }
  // Procedures on the data first; those that need none (power, the distribution) last.
  return [...list.filter((p) => !p.anything), ...list.filter((p) => p.anything)];
}

function relativePath(specFolder: string, file: string): string {
  return path.relative(specFolder, file).split(path.sep).join('/');
}

/** Plans one saved test for the offer: proposes, asks, checks, builds. */
export async function plan(request: PlanRequest): Promise<Plan> {
  const { offer, questions, settings } = request;
  const given = request.given ?? {};
  const remembered = request.remembered ?? {};
  const notes: Shown[] = [];
  let view = viewOf(offer, settings, notes);
  if ((view.form === 'table' || view.form === 'categories') && offer.kind === 'records' && offer.file && !offer.file.complete) {
    // Counted data seen only in part: count the whole file, never the preview.
    view = viewOf({ ...offer, records: await allRecords(offer), file: { ...offer.file, complete: true } }, settings, []);
  }
  const proposals = proposalsFor(view, offer, settings);
  const proposal = await chooseProposal(proposals, given, remembered, questions, view);
  const test = proposal.test;
  const answers: Record<string, unknown> = { ...given, test };
  const remember = remembered.test === test ? remembered : {};
  const fields: Record<string, unknown> = { version: 1, test };
  if (test !== 'distribution' && test !== 'power') fields.alpha = settings.alpha;
  Object.assign(fields, proposal.preset);
  if (proposal.preset?.method !== undefined) answers.method = proposal.preset.method;

  // The data part of the spec.
  let data: DataFacts;
  if (view.form === 'columns') {
    data = await columnsData(request, view, proposal, answers, remember, notes);
  } else {
    data = viewData(view, test);
    const file = offer.kind === 'records' ? offer.file : undefined;
    if (file && view.form === 'table' && (test === 'independence' || test === 'post-hoc')) {
      // A counted table in a file: the saved test reads the file, so a re-run sees its changes.
      data = { ...data, fields: { source: { path: relativePath(request.specFolder, file.path), ...file.source } } };
    } else if (file && view.form === 'categories' && test === 'goodness-of-fit' && view.labelColumn && view.countColumn) {
      data = { ...data, fields: { source: { path: relativePath(request.specFolder, file.path), ...file.source, columns: [view.labelColumn], weight: view.countColumn } } };
    }
  }
  Object.assign(fields, data.fields);

  // The options each procedure needs, asked in the terms of its field table.
  await askOptions(test, fields, data, answers, given, remember, questions, settings);
  const label = proposal.label;
  return { spec: fields, test, title: `${label} — ${offer.description}`, answers, notes };
}

async function chooseProposal(proposals: readonly Proposal[], given: Answers, remembered: Answers, questions: Questions, view: View): Promise<Proposal> {
  if (given.test !== undefined) {
    const method = typeof given.method === 'string' ? given.method : undefined;
    const match = proposals.find((p) => p.test === given.test && (p.preset?.method ?? undefined) === method) ?? proposals.find((p) => p.test === given.test && !p.preset);
    if (!match) {
      const fits = [...new Set(proposals.map((p) => p.test))].join(', ');
      throw new InputError(`"${given.test}" does not fit this data (${english(describeView(view))}); what fits: ${fits}`, {}, 'test-does-not-fit');
    }
    return match;
  }
  const choices: Choice<Proposal>[] = proposals.map((p) => ({ label: tableText(p.label), detail: tableText(p.detail), value: p }));
  return questions.choose({
    title: text('Which test?'),
    placeholder: text('Countercheck inferred these from the data ({0})', describeView(view)),
    choices,
    remembered: (p) => p.test === remembered.test && !p.preset === (remembered.method === undefined),
  });
}

/** Data already counted, or values: inline fields for the test. */
function viewData(view: View, test: string): DataFacts {
  switch (view.form) {
    case 'table': {
      const t = view.table;
      const n = sum(t.counts.map((r) => sum(r)));
      const facts = { rows: t.rowLabels.length, columns: t.columnLabels.length, n };
      if (test === 'power' || test === 'distribution') return { fields: {}, ...facts };
      const order = test === 'paired' ? columnOrderAsRows(t) : undefined;
      if (order) return { fields: { table: t.counts.map((r) => order.map((j) => r[j])), rowLabels: t.rowLabels, columnLabels: t.rowLabels }, ...facts };
      return { fields: { table: t.counts, rowLabels: t.rowLabels, columnLabels: t.columnLabels }, ...facts };
    }
    case 'categories': {
      const n = sum(view.counts.counts);
      if (test === 'power' || test === 'distribution') return { fields: {}, levels: view.counts.labels, n };
      return { fields: { observed: view.counts.counts, categories: view.counts.labels, ...view.expectation }, levels: view.counts.labels, n, hasExpectation: view.expectation !== undefined };
    }
    case 'values':
      if (test === 'power' || test === 'distribution') return { fields: {}, n: view.values.length };
      return { fields: { values: view.values }, n: view.values.length };
    default:
      return { fields: {} };
  }
}

/** Columns chosen for the roles of the procedure, then the spec's data: a source (file, database) or inline counts. */
async function columnsData(request: PlanRequest, view: Extract<View, { form: 'columns' }>, proposal: Proposal, answers: Record<string, unknown>, remembered: Answers, notes: Shown[]): Promise<DataFacts> {
  const { offer, questions } = request;
  const given = request.given ?? {};
  const roles = proposal.roles ?? [];
  if (roles.length === 0) return { fields: {} };
  const columns = given.columns ? [...given.columns] : await chooseColumns(questions, view.columns, roles, proposal.label, remembered.columns);
  if (columns.length !== roles.length) throw new InputError(`${proposal.test} needs ${roles.length} column${roles.length === 1 ? '' : 's'} (${roles.map((r) => english(r.name)).join(', ')}); found ${columns.length}`, {}, 'column-count');
  // A database checks the names itself (and says which it has); records are checked here.
  for (const c of offer.kind === 'catalogue' ? [] : columns) {
    if (!view.columns.some((x) => x.name === c)) {
      const records = view.records;
      throw new InputError(`column "${c}" not found; the columns are ${view.columns.map((x) => x.name).join(', ')}`, { file: records?.file, line: records?.lines[0] ? records.lines[0] - 1 : 1, column: c }, 'unknown-column');
    }
  }
  answers.columns = columns;
  const shape = view.shape;
  let weight = given.weight === null ? undefined : (given.weight ?? (shape.kind === 'long-counts' ? shape.weightColumn : undefined));
  const measured = roles.some((r) => r.kind === 'measurement');
  if (measured || (weight !== undefined && columns.includes(weight))) weight = undefined;
  if (weight !== undefined && shape.kind === 'long-counts' && weight === shape.weightColumn) notes.push(text('`{0}` is the frequency weight: {1}', weight, shape.reason));
  await checkCategoryColumns(view, roles, columns, weight, questions);
  await checkMeasurementColumns(view, roles, columns, questions);
  if (view.records && !measured) checkNotOnePerRow(view.records, columns, weight, proposal.test, view.columns, offer.description);

  const source = offer.kind === 'records' && offer.file ? { path: relativePath(request.specFolder, offer.file.path), ...offer.file.source } : offer.kind === 'catalogue' ? { sql: offer.sql } : undefined;
  const decimal = columns.map((c) => view.columns.find((x) => x.name === c)?.profile?.decimal).find((d) => d === ',');
  const sourceWith = () => ({ ...source, columns, ...(weight ? { weight } : {}), ...(decimal ? { decimal } : {}), ...(offer.kind === 'catalogue' && given.where ? { where: given.where } : {}) });
  // A procedure whose field table has a `source` reads the file or the database itself when run.
  const hasSourceField = procedureFor(proposal.test)?.fields.source !== undefined;
  const facts: { variable?: string } = { variable: columns[0] };
  const seenLevels = (c: string): string[] | undefined => view.columns.find((x) => x.name === c)?.profile?.levels.map((l) => l.label);
  const serverLevels = offer.kind === 'catalogue' ? offer.levels : undefined;
  // Levels for questions that list them: from the records, or counted by the database when it can.
  const levelsOf = async (c: string): Promise<readonly string[] | undefined> => seenLevels(c) ?? (serverLevels ? serverLevels(c) : undefined);

  if (proposal.test === 'trend') {
    const givenOrder = (key: 'rowLabels' | 'columnLabels') => (Array.isArray(given[key]) ? (given[key] as string[]) : undefined);
    const outcome = givenOrder('rowLabels') ?? (await askOrder(questions, await levelsOf(columns[0]), text('Outcome levels of `{0}`, the event first', columns[0]), remembered.rowLabels));
    const groups = givenOrder('columnLabels') ?? (await askOrder(questions, await levelsOf(columns[1]), text('Order of the groups of `{0}`', columns[1]), remembered.columnLabels));
    answers.rowLabels = outcome;
    answers.columnLabels = groups;
    if (source && hasSourceField) return { fields: { source: sourceWith(), ...(outcome ? { rowLabels: outcome } : {}), ...(groups ? { columnLabels: groups } : {}) }, ...facts };
    const records = await allRecords(offer);
    const table = aggregateRecords(records, { kind: 'crosstab', rowColumn: columns[0], columnColumn: columns[1], weight }, { description: offer.description, categories: { rowLevels: outcome, columnLevels: groups } });
    if (table.kind !== 'table') throw new Error('expected a table');
    return { fields: { table: table.table.counts, rowLabels: table.table.rowLabels, columnLabels: table.table.columnLabels }, ...facts };
  }
  if (source && hasSourceField) {
    return {
      fields: { source: sourceWith() },
      levels: proposal.test === 'goodness-of-fit' && ((offer.kind === 'records' && offer.file?.complete) || serverLevels) ? await levelsOf(columns[0]) : undefined,
      rows: seenLevels(columns[0])?.length,
      columns: columns[1] ? seenLevels(columns[1])?.length : undefined,
      ...facts,
    };
  }
  if (offer.kind === 'catalogue') throw new InputError(`${proposal.label} needs the counts in the saved test; it is not available on a database source`, {}, 'not-on-database');
  const records = await allRecords(offer);
  return { ...inlineFromRecords(records, proposal.test, columns, weight, offer.description), ...facts };
}

async function allRecords(offer: Offer): Promise<Records> {
  if (offer.kind !== 'records') throw new Error('records expected');
  if (!offer.file || offer.file.complete) return offer.records;
  if (!offer.file.readAll) throw new InputError(`${offer.description} is larger than the preview, and this place cannot read it whole`, { file: offer.file.path }, 'file-too-large');
  return offer.file.readAll();
}

/** A column different on every row (a row number 1, 2, 3, … or a unit's name such as M1001, M1002, …). */
function labelsRows(c: ColumnInfo): boolean {
  const p = c.profile;
  return p !== undefined && (p.rowNumber !== undefined || namesRows(p));
}

async function chooseColumns(questions: Questions, columns: readonly ColumnInfo[], roles: readonly Role[], title: string, remembered: readonly string[] | undefined): Promise<string[]> {
  const chosen: string[] = [];
  for (const [k, role] of roles.entries()) {
    // A column that numbers or names the rows is still offered, but last: it is rarely what anyone means to test.
    const eligible = columns
      .filter((c) => !chosen.includes(c.name) && (role.kind === 'measurement' ? c.measurement : c.categorical))
      .sort((a, b) => Number(labelsRows(a)) - Number(labelsRows(b)));
    if (eligible.length === 0) throw new InputError(`found no column left for ${english(role.name)}: expected ${role.kind === 'measurement' ? 'a numeric column' : 'a categorical column'}`, {}, 'nothing-to-test');
    const name = await questions.choose({
      title: tableText(title),
      placeholder: text('Choose {0}', role.name),
      choices: eligible.map((c) => ({ label: verbatim(c.name), description: c.description, detail: c.detail, value: c.name })),
      remembered: (v) => v === remembered?.[k],
    });
    chosen.push(name);
  }
  return chosen;
}

/** Level order for a trend test: as first seen, sorted, or reversed; asked only when there is more than one order. */
async function askOrder(questions: Questions, levels: readonly string[] | undefined, title: Shown, remembered: unknown): Promise<string[] | undefined> {
  if (!levels || levels.length < 2) return undefined;
  const seen = [...levels];
  const numeric = seen.every((l) => Number.isFinite(Number(l)));
  const sorted = [...seen].sort(numeric ? (a, b) => Number(a) - Number(b) : undefined);
  const orders = [seen, sorted, [...sorted].reverse()].filter((o, i, all) => all.findIndex((x) => x.join('\u0000') === o.join('\u0000')) === i);
  if (orders.length === 1) return orders[0];
  return questions.choose({
    title,
    placeholder: text('The order matters for a trend test'),
    choices: orders.map((o) => ({ label: verbatim(o.join(' < ')), value: o })),
    remembered: (o) => Array.isArray(remembered) && o.join('\u0000') === remembered.join('\u0000'),
  });
}

/**
 * Options each procedure needs: fixed by the data where it can be (df of a table, n), then the questions its
 * planning declaration lists, asked through its field table unless given. Goodness of fit asks for its expected
 * proportions with the levels in view; independence takes the Yates default from the settings.
 */
async function askOptions(test: string, fields: Record<string, unknown>, data: DataFacts, answers: Record<string, unknown>, given: Answers, remembered: Answers, questions: Questions, settings: PlanSettings): Promise<void> {
  if (test === 'independence') {
    const twoByTwo = data.rows === 2 && data.columns === 2;
    if (given.correction !== undefined) fields.correction = given.correction;
    else if (settings.correction && twoByTwo && fields.method === undefined) fields.correction = true;
  }
  if (test === 'goodness-of-fit' && !data.hasExpectation) {
    const proportions = given.proportions ?? (await askProportions(questions, data.levels, remembered.proportions));
    answers.proportions = proportions;
    if (Array.isArray(proportions)) fields.proportions = proportions;
  }
  if (test === 'power' || test === 'distribution') {
    // What the data fixes: the df of its table or categories, its size, and which test the power is for.
    const df = data.levels ? data.levels.length - 1 : data.rows && data.columns ? (data.rows - 1) * (data.columns - 1) : undefined;
    if (df !== undefined && given.df === undefined) fields.df = df;
    if (test === 'power') {
      const target = data.levels ? 'goodness-of-fit' : data.rows ? 'independence' : data.n !== undefined ? 'variance' : undefined;
      if (target && given.target === undefined) fields.target = target;
      if (data.n !== undefined && given.n === undefined && given.power === undefined) fields.n = data.n;
    }
  }
  for (const [k, v] of Object.entries(given)) if (!NOT_FIELDS.includes(k) && v !== undefined) fields[k] = v;
  const all = procedureFor(test)?.planning?.questions ?? [];
  // Fields whose value is asked after the others (`valueLater`), and rivals already decided against.
  const later: typeof all[number][] = [];
  const decided = new Set<string>();
  for (const q of all) {
    if (decided.has(q.field) || fields[q.field] !== undefined || (q.when && !q.when(fields))) continue;
    const rival = q.orElse !== undefined && fields[q.orElse] === undefined ? all.find((r) => r.field === q.orElse) : undefined;
    if (rival) {
      // Two fields that exclude each other (n or power, x or p): which one first, so no number is read as the other.
      const which = await questions.choose({
        title: text('What to give'),
        placeholder: text('{0}, or {1}?', tableText(q.title), tableText(rival.title)),
        choices: [q, rival].map((x) => ({ label: tableText(x.title), value: x })),
        remembered: (x) => remembered[x.field] !== undefined,
      });
      decided.add(q.field).add(rival.field);
      if (q.valueLater) later.push(which);
      else fields[which.field] = answers[which.field] = await askField(questions, test, which.field, which.title, { remembered: remembered[which.field] ?? which.preset, choiceLabels: which.choiceLabels });
      continue;
    }
    const unitsOf = q.field === 'sigma0' ? data.variable : undefined;
    fields[q.field] = answers[q.field] = await askField(questions, test, q.field, q.title, { remembered: remembered[q.field] ?? q.preset, choiceLabels: q.choiceLabels, unitsOf });
  }
  for (const q of later) fields[q.field] = answers[q.field] = await askField(questions, test, q.field, q.title, { remembered: remembered[q.field] ?? q.preset, choiceLabels: q.choiceLabels });
}

/** Answers that are not fields of the saved test. */
const NOT_FIELDS = ['test', 'columns', 'weight', 'proportions', 'where', 'sheet', 'range'];

async function askProportions(questions: Questions, levels: readonly string[] | undefined, remembered: unknown): Promise<'equal' | number[]> {
  const k = levels?.length;
  const choice = await questions.choose<'equal' | 'enter'>({
    title: text('Expected distribution'),
    placeholder: text('What does the null hypothesis expect?'),
    choices: [
      { label: text('Equal proportions'), detail: k ? text('Every level is expected equally often ({0} levels)', k) : text('Every level is expected equally often'), value: 'equal' },
      {
        label: text('Enter proportions or ratios…'),
        detail: levels ? text('One number per level, in order: {0}', levels.join(', ')) : text('One number per level, in the order the levels first appear'),
        value: 'enter',
      },
    ],
    remembered: (v) => (remembered === 'equal' ? v === 'equal' : Array.isArray(remembered) ? v === 'enter' : false),
  });
  if (choice === 'equal') return 'equal';
  const entered = await questions.enter({
    title: text('Expected proportions'),
    prompt: levels
      ? text('{0} numbers separated by commas, for {1} (ratios such as 9:3:3:1 also work)', levels.length, levels.join(', '))
      : text('Numbers separated by commas, one per level (ratios such as 9:3:3:1 also work)'),
    value: Array.isArray(remembered) ? remembered.join(', ') : undefined,
    validate: (v) => {
      const parts = parseNumberList(v);
      if (k !== undefined && parts.length !== k) return text('Expected {0} numbers, found {1}', k, parts.length);
      if (parts.length < 2) return text('Expected at least 2 numbers');
      if (parts.some((n) => !Number.isFinite(n) || n < 0)) return text('Every number must be ≥ 0');
      return undefined;
    },
  });
  return parseNumberList(entered);
}
