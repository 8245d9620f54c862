// Shape inference on the demo's own files: the misreads that gave silently wrong answers (N = 3 on the
// germination table, N = 20 on the bike-share long counts, a numeric column dropped for one stray word)
// are refused or read right. Totals are the sums of the numbers printed in the files, added by hand.
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseDelimited } from '../../../src/data/delimited';
import { isInputError } from '../../../src/errors';
import { offerFromText } from '../../../src/planner/offer';
import { plan } from '../../../src/planner/plan';
import { english } from '../../../src/planner/questions';
import { inferShape, profileColumns } from '../../../src/planner/profile';
import { ScriptedQuestions } from './fakeQuestions';
import { demo, fileOffer, fileOfferAt, planAndRun, settings } from './helpers';

async function refusal(work: () => Promise<unknown>, code: string, pattern: RegExp): Promise<void> {
  try {
    await work();
  } catch (e) {
    assert.ok(isInputError(e), `expected an InputError, got ${String(e)}`);
    assert.equal(e.code, code, e.message);
    assert.match(e.message, pattern);
    return;
  }
  assert.fail(`expected the refusal ${code}`);
}

const germinationTable = (): string => readFileSync(join(demo, 'data', 'germination.md'), 'utf8').split('\n').filter((l) => l.startsWith('|')).join('\n');

describe('shape inference on the demo files', () => {
  it('germination.md: "1,152" is a count, so the selected table is a counted 3×2 table with N = 2,950', async () => {
    const offer = offerFromText(germinationTable(), { file: 'germination.md', firstLine: 5, description: 'selection in germination.md' });
    assert.equal(offer.kind, 'records');
    const { planned, result } = await planAndRun(offer, { 'Which test?': 'Independence of two categorical variables' });
    assert.deepEqual(planned.spec.table, [[1152, 65], [474, 168], [972, 119]]);
    assert.deepEqual(planned.spec.rowLabels, ['coated', 'uncoated', 'pelleted']);
    assert.equal(result.n, 2950, '1,152 + 65 + 474 + 168 + 972 + 119');
    assert.equal(result.df, 2);
    assert.match(planned.notes.map(english).join(' '), /already counted/);
  });

  it('bike-share-survey.csv: `riders` is the weight (long counts), N = 1,300 not 20, and the wizard says why', async () => {
    const { planned, result, questions } = await planAndRun(fileOffer('bike-share-survey.csv'), { 'Which test?': 'Goodness of fit of one categorical variable', 'Choose the column': 'purpose', 'Expected distribution': 'Equal proportions' });
    assert.deepEqual(planned.spec.source, { path: 'data/bike-share-survey.csv', columns: ['purpose'], weight: 'riders' });
    assert.equal(result.n, 1300, 'sum of the riders column');
    assert.match(planned.notes.map(english).join(' '), /`riders` is the frequency weight: each combination of `area` × `purpose` appears once .*total 1,300 over 20 rows/);
    // The weight column is not offered as a category.
    const columnChoice = questions.asked.find((a) => a.placeholder === 'Choose the column');
    assert.ok(columnChoice && !columnChoice.choices!.includes('riders'), `offered ${columnChoice?.choices}`);
  });

  it('bike-share-survey.csv as a selection: area × purpose is cross-tabulated with the weights, N = 1,300', async () => {
    const text = readFileSync(join(demo, 'data', 'bike-share-survey.csv'), 'utf8');
    const { planned, result } = await planAndRun(offerFromText(text, { description: 'selection' }), { 'Which test?': 'Independence of two categorical variables', 'Choose the rows': 'area', 'Choose the columns': 'purpose' });
    assert.equal(result.n, 1300);
    assert.deepEqual((planned.spec.table as number[][])[0], [124, 37, 83, 27], 'Riverside: commute, errand, leisure, tourism');
  });

  it('bakery-defects.csv: `tray` numbers the rows (1 to 1,800, no gap), so it is offered last, said so, and confirmed before its spread is tested', async () => {
    const trays = readFileSync(join(demo, 'data', 'bakery-defects.csv'), 'utf8').split('\n').slice(2).filter(Boolean).map((l) => Number(l.split(',')[0]));
    assert.deepEqual([trays.length, Math.min(...trays), Math.max(...trays), new Set(trays).size], [1800, 1, 1800, 1800], 'read from the file');
    const ask = { 'Which test?': 'Variance of one numeric variable', 'Hypothesised standard deviation σ0': '10', 'Alternative hypothesis': 'σ differs from σ0' };
    const declined = new ScriptedQuestions({ ...ask, 'Choose the column': 'tray', 'A column that numbers the rows': false });
    await refusal(() => plan({ offer: fileOffer('bakery-defects.csv'), questions: declined, settings, specFolder: demo }), 'row-number-as-measurement', /`tray` numbers the rows/);
    const offered = declined.asked.find((a) => a.placeholder === 'Choose the column')!;
    assert.deepEqual(offered.choices, ['weight_g', 'tray'], 'the measurement first, the numbering last');
    assert.match(offered.details![1] ?? '', /numbers the rows: every value different, 1 to 1,800 with no gap/);
    assert.match(declined.asked.at(-1)!.placeholder ?? '', /1,800 different whole numbers from 1 to 1,800 with no gap/);
    // Accepted, it runs on the numbers as asked; the real measurement is asked without any confirmation.
    const { result } = await planAndRun(fileOffer('bakery-defects.csv'), { ...ask, 'Choose the column': 'tray', 'A column that numbers the rows': true });
    assert.equal(result.n, 1800);
    const weights = await planAndRun(fileOffer('bakery-defects.csv'), { ...ask, 'Choose the column': 'weight_g' });
    assert.ok(!weights.questions.asked.some((a) => a.title === 'A column that numbers the rows'));
  });

  it('advanced/data/filler-log.csv: the bottle number makes every row unique, so `line_speed` (210, 180, …) is not taken for a frequency weight', async () => {
    const file = join(demo, 'advanced', 'data', 'filler-log.csv');
    const records = parseDelimited(readFileSync(file, 'utf8'), { file });
    assert.equal(records.rows.length, 2000);
    assert.equal(inferShape(records, profileColumns(records, settings.missingValues)).kind, 'raw', 'one row per bottle');
    const offer = await fileOfferAt(file, 'advanced/data/filler-log.csv');
    // Counted per bottle, every cell is 1: refused, not weighted by the line speed.
    await refusal(() => planAndRun(offer, { 'Which test?': 'Goodness of fit of one categorical variable', 'Choose the column': 'bottle', 'Expected distribution': 'Equal proportions' }), 'one-per-row', /N = 2000, the number of rows/);
    const { planned, result } = await planAndRun(offer, { 'Which test?': 'Independence of two categorical variables', 'Choose the rows': 'line_speed', 'Choose the columns': 'fill_check' });
    assert.equal((planned.spec.source as { weight?: string }).weight, undefined);
    assert.equal(result.n, 2000, 'one bottle per row');
  });

  it('advanced/data/cafe-panel.csv: the member column (different on every row) is offered last for a category, with the reason', async () => {
    const offer = await fileOfferAt(join(demo, 'advanced', 'data', 'cafe-panel.csv'), 'advanced/data/cafe-panel.csv');
    const questions = new ScriptedQuestions({ 'Which test?': 'Goodness of fit of one categorical variable', 'Choose the column': false });
    await assert.rejects(plan({ offer, questions, settings, specFolder: demo }));
    const column = questions.asked.find((a) => a.placeholder === 'Choose the column')!;
    assert.deepEqual(column.choices, ['before', 'after', 'member']);
    assert.match(column.details![2] ?? '', /different on every row \(M1001, M1002, M1003, …\): names the rows/);
  });

  it('a short run or a run with a gap or a repeat is not a row numbering', () => {
    const numbering = (values: number[]) => profileColumns({ columns: ['x'], rows: values.map((v) => [String(v)]), lines: values.map((_, i) => i + 2) }, [])[0].rowNumber;
    assert.deepEqual(numbering(Array.from({ length: 10 }, (_, i) => 20001 + i)), { from: 20001, to: 20010 });
    assert.deepEqual(numbering([5, 3, 4, 1, 2, 10, 9, 8, 7, 6]), { from: 1, to: 10 }, 'order does not matter');
    assert.equal(numbering(Array.from({ length: 9 }, (_, i) => i + 1)), undefined, 'fewer than 10 values');
    assert.equal(numbering([1, 2, 3, 4, 5, 6, 7, 8, 9, 11]), undefined, 'a gap');
    assert.equal(numbering([1, 2, 3, 4, 5, 6, 7, 8, 9, 9]), undefined, 'a repeat');
    assert.equal(numbering([1, 2, 3, 4, 5, 6, 7, 8, 9, 10.5]), undefined, 'a fraction');
  });

  it('a numeric column with one stray word is offered for the variance test with the count and first line of the bad cells', async () => {
    const csv = 'dock,minutes\nPark,12.5\nPark,13.1\nHarbour,9.0\nHarbour,pending\n' + Array.from({ length: 20 }, (_, i) => `Quay,${10 + i / 7}`).join('\n') + '\n';
    const offer = offerFromText(csv, { file: 'trips.csv', description: 'trips.csv' });
    const questions = new ScriptedQuestions({ 'Which test?': 'Variance of one numeric variable', 'Choose the column': false });
    await assert.rejects(plan({ offer, questions, settings, specFolder: demo }));
    const asked = questions.asked.find((a) => a.placeholder === 'Choose the column')!;
    const k = asked.choices!.indexOf('minutes');
    assert.ok(k >= 0, `minutes is offered: ${asked.choices}`);
    assert.match(asked.details![k]!, /except 1 cell that is not \(first on line 5: "pending"\)/);
    // Chosen anyway, the stray cell stops the run with its place, rather than being dropped.
    await refusal(() => planAndRun(offer, { 'Hypothesised standard deviation σ0': '1', 'Alternative hypothesis': 'σ differs from σ0' }, { test: 'variance', columns: ['minutes'] }), 'not-a-number', /line 5.*pending/);
  });

  it('refuses in words a result where N equals the number of rows and every cell is 1', async () => {
    const offer = offerFromText('tray,batch\ncoated,A1\nuncoated,B2\npelleted,C3\n', { description: 'selection' });
    await refusal(
      () => planAndRun(offer, {}, { test: 'independence', columns: ['tray', 'batch'] }),
      'one-per-row',
      /every row of selection would count once and every cell would be 1 \(N = 3, the number of rows\)/,
    );
  });

  it('refuses a column of many different numbers as a category, and asks before using a count column as one', async () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${i % 2 ? 'early' : 'late'},${(800 + i * 1.7).toFixed(1)}`).join('\n');
    await refusal(() => planAndRun(offerFromText(`shift,weight_g\n${rows}\n`, { description: 'sel' }), {}, { test: 'goodness-of-fit', columns: ['weight_g'] }), 'numeric-as-category', /holds numbers with 30 different values/);
    await refusal(() => planAndRun(fileOffer('bike-share-survey.csv'), {}, { test: 'goodness-of-fit', columns: ['riders'], weight: null }), 'numeric-as-category', /`riders` holds numbers with 20 different values/);
    const questions = new ScriptedQuestions({ 'A numeric column as a category': false });
    const offer = offerFromText('colour,size,boxes\nred,S,5\nred,L,7\nblue,S,5\nblue,L,9\n', { description: 'sel' });
    await assert.rejects(plan({ offer, questions, settings, specFolder: demo, given: { test: 'goodness-of-fit', columns: ['boxes'] } }), (e: unknown) => isInputError(e) && e.code === 'numeric-as-category');
    assert.match(questions.asked[0].placeholder!, /`boxes` holds whole numbers \(total 26 over 4 rows\) that look like counts/);
  });

  it('takes small whole numbers repeated across rows (a dose 1, 2, 3) as a coded category without asking', async () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${i % 2 ? 'event' : 'none'},${1 + (i % 3)}`).join('\n');
    const { planned } = await planAndRun(offerFromText(`outcome,dose\n${rows}\n`, { description: 'sel' }), {}, { test: 'trend', columns: ['outcome', 'dose'], rowLabels: ['event', 'none'], columnLabels: ['1', '2', '3'] });
    assert.deepEqual(planned.spec.columnLabels, ['1', '2', '3']);
  });
});

describe('number recognition in column profiles', () => {
  const profile = (csv: string) => profileColumns(parseDelimited(csv), settings.missingValues);

  it('reads signs, digit grouping, both decimal marks and percentages as numbers', () => {
    const [signed, grouped, comma, percent] = profile('signed;grouped;comma;percent\n-3;1,152;2,5;12.5%\n+2.5;474;3,75;40 %\n0;12,345.5;-1,25;7%\n');
    assert.equal(signed.numeric, true);
    assert.equal(signed.counts, false);
    assert.equal(grouped.numeric, true);
    assert.equal(comma.numeric, true);
    assert.equal(comma.decimal, ',');
    assert.equal(percent.numeric, true);
    assert.equal(percent.counts, false, 'a percentage is not a count');
  });

  it('reads "1,152", "474", "972" as counts with their total', () => {
    const [, sprouted] = profile('tray,sprouted\ncoated,"1,152"\nuncoated,474\npelleted,972\n');
    assert.equal(sprouted.counts, true);
    assert.equal(sprouted.total, 2598);
  });

  it('infers long counts only when every combination of the categories appears once', () => {
    const records = parseDelimited('area,purpose,riders\nA,commute,3\nA,errand,4\nB,commute,5\nB,errand,6\n');
    assert.equal(inferShape(records, profileColumns(records, [])).kind, 'long-counts');
    const repeated = parseDelimited('area,purpose,riders\nA,commute,3\nA,commute,4\nB,commute,5\nB,errand,6\n');
    assert.equal(inferShape(repeated, profileColumns(repeated, [])).kind, 'raw');
  });

  it('takes a year column as a category beside the count column, which has more different values', () => {
    const records = parseDelimited('year,region,count\n2019,N,10\n2019,S,12\n2020,N,9\n2020,S,15\n');
    const shape = inferShape(records, profileColumns(records, []));
    assert.equal(shape.kind, 'long-counts');
    assert.equal(shape.kind === 'long-counts' && shape.weightColumn, 'count');
    assert.deepEqual(shape.kind === 'long-counts' && shape.categoryColumns, ['year', 'region']);
  });

  it('infers no weight when a measurement sits beside the categories', () => {
    const records = parseDelimited(`dock,hour,minutes\n${Array.from({ length: 20 }, (_, i) => `D${i},${i % 24},${(10 + i * 1.37).toFixed(2)}`).join('\n')}\n`);
    assert.notEqual(inferShape(records, profileColumns(records, [])).kind, 'long-counts');
  });
});
