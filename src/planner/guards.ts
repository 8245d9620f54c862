/**
 * Refusals, in words, of the choices that give a meaningless result: every record counted once with every cell
 * 1, a column of many different numbers used as a category; and a question before the count column is used as one.
 */
import { aggregateRecords } from '../data/aggregate';
import type { Records } from '../data/records';
import type { AggregateRequest } from '../data/types';
import { InputError } from '../errors';
import { english, text, type Questions } from './questions';
import { sum, type ColumnInfo, type Role, type View } from './view';

/** Asks the question; a user who declines stops the plan with `stop`, which says why. */
async function confirmOrStop(questions: Questions, question: Parameters<Questions['confirm']>[0], stop: InputError): Promise<void> {
  if (!(await questions.confirm(question))) throw stop;
}

/** A categorical role given a column of measurements, or a count column, is refused or confirmed in words. */
export async function checkCategoryColumns(view: Extract<View, { form: 'columns' }>, roles: readonly Role[], columns: readonly string[], weight: string | undefined, questions: Questions): Promise<void> {
  for (const [k, role] of roles.entries()) {
    if (role.kind !== 'categorical') continue;
    const info = view.columns.find((c) => c.name === columns[k]);
    const p = info?.profile;
    if (!p) continue;
    if (p.numeric && p.levels.length > 12) {
      throw new InputError(
        `column \`${p.name}\` holds numbers with ${p.levels.length} different values; as a category each value would be a level of its own. Choose a categorical column for ${english(role.name)}, or test the numbers themselves (variance, distribution fit)`,
        { column: p.name },
        'numeric-as-category',
      );
    }
    // Small whole numbers repeated across rows are coded categories (a dose 1, 2, 3); the column the shape
    // took for the frequency weight is not, and saying so is worth a question.
    const looksLikeCounts = view.shape.kind === 'long-counts' && view.shape.weightColumn === p.name;
    if (looksLikeCounts && weight === undefined) {
      await confirmOrStop(
        questions,
        {
          title: text('A numeric column as a category'),
          message: text(
            '`{0}` holds whole numbers (total {1} over {2} rows) that look like counts; as a category each different number becomes a level and every row counts once. Use it as a category anyway?',
            p.name,
            p.total.toLocaleString('en-US'),
            p.present,
          ),
          accept: text('Use as a category'),
        },
        new InputError(`stopped: \`${p.name}\` looks like a count column, not a category`, { column: p.name }, 'numeric-as-category'),
      );
    }
  }
}

/** A measurement role given a column that numbers the rows (1, 2, 3, … with no gap) is confirmed in words first. */
export async function checkMeasurementColumns(view: Extract<View, { form: 'columns' }>, roles: readonly Role[], columns: readonly string[], questions: Questions): Promise<void> {
  for (const [k, role] of roles.entries()) {
    if (role.kind !== 'measurement') continue;
    const p = view.columns.find((c) => c.name === columns[k])?.profile;
    if (!p?.rowNumber) continue;
    const { from, to } = p.rowNumber;
    await confirmOrStop(
      questions,
      {
        title: text('A column that numbers the rows'),
        message: text(
          '`{0}` holds {1} different whole numbers from {2} to {3} with no gap: it looks like a row or unit number, and its spread and distribution would describe the numbering. Test its values anyway?',
          p.name,
          p.present.toLocaleString('en-US'),
          from.toLocaleString('en-US'),
          to.toLocaleString('en-US'),
        ),
        accept: text('Test the values anyway'),
      },
      new InputError(`stopped: \`${p.name}\` numbers the rows rather than measuring them`, { column: p.name }, 'row-number-as-measurement'),
    );
  }
}

/**
 * Refuses the misread that gives N = number of rows with every cell 1: each row was counted once, so the rows
 * were already counts (or labels), and any test on that table would be meaningless.
 */
export function checkNotOnePerRow(records: Records, columns: readonly string[], weight: string | undefined, test: string, infos: readonly ColumnInfo[], description: string): void {
  if (weight !== undefined || records.rows.length < 2) return;
  const request: AggregateRequest = columns.length === 1 ? { kind: 'categories', column: columns[0] } : { kind: 'crosstab', rowColumn: columns[columns.length - 2], columnColumn: columns[columns.length - 1] };
  const a = aggregateRecords(records, request, { description });
  const cells = a.kind === 'table' ? a.table.counts.flat() : a.kind === 'categories' ? [...a.counts.counts] : [];
  const n = sum(cells);
  if (n !== records.rows.length || !cells.every((c) => c === 0 || c === 1)) return;
  const counts = infos.filter((c) => c.profile?.counts && !columns.includes(c.name)).map((c) => `\`${c.name}\``);
  const hint = counts.length ? ` If ${counts.join(' or ')} holds how many times each row occurred, use it as the weight.` : ' Choose columns whose values repeat across rows, or give the counts as a table.';
  throw new InputError(
    `${test}: every row of ${description} would count once and every cell would be 1 (N = ${n}, the number of rows): the chosen columns label rows rather than classify observations, and the result would be meaningless.${hint}`,
    { file: records.file },
    'one-per-row',
  );
}

