// Every procedure of the registry is offered and runs from a data file, from a selection and from the palette,
// through the one planner, with a scripted stand-in for the editor's questions.
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { offerFromText, type Offer } from '../../../src/planner/offer';
import { plan } from '../../../src/planner/plan';
import { PROCEDURES, TEST_NAMES } from '../../../src/savedtest/procedures/index';
import { assertValidSpec } from '../../../src/savedtest/validate';
import { ScriptedQuestions } from './fakeQuestions';
import { demo, fileOffer, fileOfferAt, planAndRun, settings } from './helpers';

/** The label to pick for each procedure, and the columns of the bakery defect log to use. */
const SCRIPTS: Record<string, Record<string, string | boolean | readonly string[]>> = {
  independence: { 'Which test?': 'Independence of two categorical variables', 'Choose the rows': 'oven', 'Choose the columns': 'defect' },
  'goodness-of-fit': { 'Which test?': 'Goodness of fit of one categorical variable', 'Choose the column': 'oven', 'Expected distribution': 'Equal proportions' },
  variance: { 'Which test?': 'Variance of one numeric variable', 'Choose the column': 'weight_g', 'Hypothesised standard deviation σ0': '10', 'Alternative hypothesis': 'σ differs from σ0' },
  'distribution-fit': { 'Which test?': 'Fit of a distribution to the values', 'Choose the column': 'weight_g', 'Distribution family': 'normal' },
  'post-hoc': { 'Which test?': 'Post-hoc comparisons', 'Choose the rows': 'oven', 'Choose the columns': 'defect', 'What to compare': 'Cells (adjusted residuals)', 'Multiplicity adjustment': 'Holm' },
  trend: { 'Which test?': 'Trend across ordered groups', 'Choose the outcome (rows)': 'shift', 'Choose the ordered groups (columns)': 'oven', 'Outcome levels of `shift`, the event first': '#1', 'Order of the groups of `oven`': '#1' },
  // The defect log has no classification made twice, so the paired test reads the café panel's before and after.
  paired: { 'Which test?': 'Paired classifications', 'Choose the first classification': 'before', 'Choose the second classification': 'after' },
  stratified: { 'Which test?': 'Stratified tables (Cochran–Mantel–Haenszel)', 'Choose the strata': 'oven', 'Choose the rows': 'shift', 'Choose the columns': 'defect' },
  power: { 'Which test?': 'Power or sample size', 'Which test the power is for': 'independence', "Effect size (Cohen's w)": '0.3', 'Degrees of freedom': '4', 'What to give': 'Target power', 'Target power': '0.8' },
  distribution: { 'Which test?': 'Chi-square distribution', 'Degrees of freedom': '3', 'What to give': 'Critical value for α', 'Critical value for α': '0.05' },
};

function selectionOffer(test?: string): Offer {
  if (test === 'paired') return offerFromText(readFileSync(cafePanel, 'utf8'), { file: 'cafe-panel.csv', description: 'selection in cafe-panel.csv' });
  const text = readFileSync(join(demo, 'data', 'bakery-defects.csv'), 'utf8').split('\n').slice(0, 401).join('\n');
  return offerFromText(text, { file: 'bakery-defects.csv', description: 'selection in bakery-defects.csv' });
}

const cafePanel = join(demo, 'advanced', 'data', 'cafe-panel.csv');

/** The demo file each procedure is tried on: the defect log, except the paired test (the café panel). */
async function fileOfferFor(test?: string): Promise<Offer> {
  return test === 'paired' ? fileOfferAt(cafePanel, 'advanced/data/cafe-panel.csv') : fileOffer('bakery-defects.csv');
}

describe('the planner reaches every procedure', () => {
  it('every registered procedure declares how the editor offers it, and its questions name its own fields', () => {
    for (const h of PROCEDURES) {
      assert.ok(h.planning, `${h.test} has no planning declaration`);
      for (const q of h.planning.questions ?? []) assert.ok(h.fields[q.field], `${h.test} asks for "${q.field}", which is not one of its fields`);
    }
  });

  it('has a script for every procedure in the registry', () => {
    assert.deepEqual(Object.keys(SCRIPTS).sort(), [...TEST_NAMES].sort());
  });

  it('offers every procedure for a file with categorical and numeric columns', async () => {
    const questions = new ScriptedQuestions({ 'Which test?': false });
    await assert.rejects(plan({ offer: fileOffer('bakery-defects.csv'), questions, settings, specFolder: demo }));
    const offered = new Set(questions.asked[0].choices);
    for (const label of Object.values(SCRIPTS).map((s) => s['Which test?'] as string)) assert.ok(offered.has(label), `"${label}" offered: ${[...offered].join(' | ')}`);
  });

  for (const [where, offer] of [['a data file', fileOfferFor], ['a selection', selectionOffer]] as const) {
    for (const test of Object.keys(SCRIPTS)) {
      it(`${test} from ${where}: planned, valid, and run`, async () => {
        const { planned, run } = await planAndRun(await offer(test), { ...SCRIPTS[test] });
        assert.equal(planned.test, test);
        assertValidSpec(planned.spec);
        assert.ok(run.result.kind === 'test' || run.result.kind === 'power' || run.result.kind === 'distribution');
        if (run.result.kind === 'test') assert.equal(run.result.test, test);
      });
    }
  }

  it('from a database catalogue: procedures that read a source get a SQL source, trend its level orders from the server, stratified its three columns', async () => {
    const offer: Offer = {
      kind: 'catalogue',
      sql: { connection: 'bakery', table: 'public.trays' },
      columns: [{ name: 'shift', type: 'text', numeric: false }, { name: 'oven', type: 'text', numeric: false }, { name: 'defect', type: 'text', numeric: false }, { name: 'weight_g', type: 'double precision', numeric: true }],
      description: 'bakery: public.trays',
      levels: async (column) => (column === 'shift' ? ['early', 'late'] : ['A', 'B', 'C']),
    };
    const listing = new ScriptedQuestions({ 'Which test?': false });
    await assert.rejects(plan({ offer, questions: listing, settings, specFolder: demo }));
    assert.ok(listing.asked[0].choices!.includes(SCRIPTS.stratified['Which test?'] as string), 'stratified is counted on the server');
    for (const test of ['independence', 'goodness-of-fit', 'variance', 'distribution-fit', 'post-hoc', 'trend', 'paired', 'stratified']) {
      // The catalogue has no before/after pair; planning does not count, so any two columns show the SQL source.
      const script = test === 'paired' ? { ...SCRIPTS[test], 'Choose the first classification': 'shift', 'Choose the second classification': 'oven' } : SCRIPTS[test];
      const planned = await plan({ offer, questions: new ScriptedQuestions({ ...script }), settings, specFolder: demo, given: { where: "shift = 'late'" } });
      assertValidSpec(planned.spec);
      const source = planned.spec.source as { sql: unknown; where?: string };
      assert.deepEqual(source.sql, offer.sql, test);
      assert.equal(source.where, "shift = 'late'", test);
      if (test === 'trend') assert.deepEqual([planned.spec.rowLabels, planned.spec.columnLabels], [['early', 'late'], ['A', 'B', 'C']]);
      if (test === 'stratified') assert.deepEqual((planned.spec.source as { columns: unknown }).columns, ['oven', 'shift', 'defect']);
    }
  });

  it('refuses a paired test on two different variables (no category in common), naming both columns and their levels', async () => {
    // shift (early, late, night) and oven (A–D): every count off the diagonal, a meaningless "departure from symmetry".
    await assert.rejects(
      planAndRun(fileOffer('bakery-defects.csv'), { 'Which test?': 'Paired classifications', 'Choose the first classification': 'shift', 'Choose the second classification': 'oven' }),
      (e: Error & { code?: string }) => e.code === 'paired-no-common-category' && /`shift` \((early|late|night)(, (early|late|night)){2}\) and `oven` \([A-D](, [A-D]){3}\) share no category/.test(e.message) && /test of independence/.test(e.message),
    );
  });

  it('stratified is not offered for a database table with fewer than three categorical columns', async () => {
    const offer: Offer = {
      kind: 'catalogue',
      sql: { connection: 'bakery', table: 'public.ovens' },
      columns: [{ name: 'oven', type: 'text', numeric: false }, { name: 'defect', type: 'text', numeric: false }],
      description: 'bakery: public.ovens',
    };
    const listing = new ScriptedQuestions({ 'Which test?': false });
    await assert.rejects(plan({ offer, questions: listing, settings, specFolder: demo }));
    assert.ok(listing.asked[0].choices!.includes(SCRIPTS.independence['Which test?'] as string));
    assert.ok(!listing.asked[0].choices!.includes(SCRIPTS.stratified['Which test?'] as string));
  });

  it('power and distribution from the palette (no data)', async () => {
    for (const test of ['power', 'distribution']) {
      const { planned } = await planAndRun({ kind: 'nothing', description: 'palette' }, { ...SCRIPTS[test] });
      assertValidSpec(planned.spec);
    }
  });
});
