// The numbers layer names the function argument at fault; runSpec turns it into the place in the saved test: the
// field of the same name, the field it came from under another name, or the source (and its file) for data read
// from one. Each place is written once: never "$.scores: scores: …".
import { strict as assert } from 'node:assert';
import type { Aggregate } from '../../../src/data/types';
import { InputError, isInputError } from '../../../src/errors';
import { locateArgument, withPlace } from '../../../src/savedtest/arguments';
import { parseJsonWithLocations } from '../../../src/savedtest/json-text';
import { describeRunError } from '../../../src/savedtest/living';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';

const noFiles: SpecReaders = { aggregateFile: async (): Promise<never> => assert.fail('inline specs read no file') };

async function refusal(spec: object, readers: SpecReaders = noFiles): Promise<InputError> {
  try {
    await runSpec(spec, { readers, specPath: '/w/s.countercheck.json' });
  } catch (e) {
    assert.ok(isInputError(e), String(e));
    return e;
  }
  return assert.fail('expected an InputError');
}

/** The place and the message a spec's refusal gives; the message starts with the place, named once. */
async function refusedAt(spec: object, jsonPath: string, problem: string, readers?: SpecReaders): Promise<InputError> {
  const e = await refusal(spec, readers);
  assert.equal(e.location.jsonPath, jsonPath, e.message);
  assert.equal(e.location.argument, undefined, 'the argument is mapped, not passed on');
  assert.equal(e.message, `${jsonPath}: ${problem}`);
  return e;
}

describe('errors of the numbers layer located in the saved test', () => {
  it('at the field of the same name, without repeating its name', async () => {
    await refusedAt({ test: 'trend', table: [[1, 2, 3], [3, 4, 5]], scores: [2, 2, 2] }, '$.scores', 'all scores are equal, so there is no order to test');
    await refusedAt({ test: 'variance', values: [1, 2, 3], sigma0: 1e-200 }, '$.sigma0', '1e-200, whose square is outside the range of double-precision numbers (about 2.2e-308 to 1.8e308); express the values and sigma0 in other units');
    await refusedAt(
      { test: 'goodness-of-fit', observed: [1, 2, 3], estimatedParameters: 2 },
      '$.estimatedParameters',
      'with 3 categories and 2 estimated parameter(s) the degrees of freedom would be 0; they must be at least 1',
    );
    await refusedAt(
      { test: 'independence', table: [[1, 0], [3, 0]] },
      '$.table',
      'a test of independence needs at least 2 rows and 2 columns with counts; this table is 2×1 after leaving out rows and columns whose total is 0',
    );
  });

  it('inside the field, with the index the argument names', async () => {
    await refusedAt({ test: 'distribution-fit', values: [1, 2, 2.5], family: 'poisson' }, '$.values[2]', 'expected a whole number from 0 to 2^53 − 1 (poisson counts), found 2.5');
    await refusedAt({ test: 'distribution-fit', values: [1, 2, 3, 4], family: 'normal', cuts: [3, 2] }, '$.cuts[1]', 'expected finite, strictly increasing cut points, found [3,2]');
    const zero = 'expected count is 0 but 1 observed; a category with expected 0 can never occur under the hypothesis. Give it a positive expected value or remove it.';
    await refusedAt({ test: 'goodness-of-fit', observed: [1, 2, 3], proportions: [0, 1, 1] }, '$.proportions[0]', `category \`category 1\`: ${zero}`);
  });

  it('at the field an argument comes from under another name', async () => {
    // Weights keyed by level: the level's member, in the order of "categories" (or of the object's keys).
    const zero = 'expected count is 0 but 2 observed; a category with expected 0 can never occur under the hypothesis. Give it a positive expected value or remove it.';
    await refusedAt({ test: 'goodness-of-fit', observed: [1, 2, 3], categories: ['a', 'b', 'c'], proportions: { c: 1, b: 0, a: 1 } }, '$.proportions.b', `category \`b\`: ${zero}`);
    const levels: Aggregate = {
      kind: 'categories',
      counts: { labels: ['x', 'y z', 'w'], counts: [1, 2, 3] },
      provenance: { description: 'data/levels.csv', sha256: 'f'.repeat(64), rows: 6, dropped: 0, columns: ['level'] },
    };
    await refusedAt(
      { test: 'goodness-of-fit', source: { path: 'data/levels.csv', columns: ['level'] }, ratios: { x: 1, 'y z': 0, w: 1 } },
      '$.ratios["y z"]',
      `category \`y z\`: ${zero}`,
      { aggregateFile: async () => levels },
    );
    // Cochran–Armitage takes its scores from "columnScores" when "scores" is not given.
    await refusedAt({ test: 'trend', table: [[1, 2, 3], [3, 4, 5]], columnScores: [1, 1, 1] }, '$.columnScores', 'all scores are equal, so there is no order to test');
    // The sections beside the p-value: their functions' arguments sit in "bayesFactor" and "equivalence".
    await refusedAt(
      { test: 'independence', table: [[1, 2, 3], [4, 5, 6]], bayesFactor: { samplingPlan: 'hypergeometric' } },
      '$.bayesFactor.samplingPlan',
      '"hypergeometric" is implemented for 2×2 tables only, found 2×3; choose "rows-fixed" or "joint-multinomial"',
    );
    await refusedAt({ test: 'variance', values: [1, 2, 3], sigma0: 1, equivalence: { lower: 2, upper: 1 } }, '$.equivalence.lower', 'expected a standard deviation below upper (1), found 2');
  });

  it('at "method" when the method the spec chose cannot run on these counts', async () => {
    const big = 1e7;
    const e = await refusal({ test: 'stratified', method: 'exact', strata: [[[big, 2 * big], [3 * big, 4 * big]], [[big, 2 * big], [3 * big, big]]] });
    assert.equal(e.location.jsonPath, '$.method');
    assert.match(e.message, /^\$\.method: the exact conditional distribution of Σa here has \d+ values/);
    const mc = await refusal({ test: 'independence', method: 'monte-carlo', table: [[6e6, 6e6], [1, 1]] });
    assert.equal(mc.location.jsonPath, '$.method');
    assert.equal(mc.code, 'too-large-for-resampling');
    assert.match(mc.message, /^\$\.method: the total count 12000002 is above 1e\+7, too large for exact or Monte Carlo p-values here/);
  });

  it('at the source, and the file it names, for data read from it', async () => {
    const provenance = { description: 'data/trays.csv', sha256: 'f'.repeat(64), rows: 3, dropped: 0, columns: ['tray', 'sprouted'] };
    const oneColumn: Aggregate = { kind: 'table', table: { rowLabels: ['a', 'b'], columnLabels: ['yes'], counts: [[2], [1]] }, provenance };
    const readers: SpecReaders = { aggregateFile: async () => oneColumn };
    const e = await refusedAt(
      { test: 'independence', source: { path: 'data/trays.csv', columns: ['tray', 'sprouted'] } },
      '$.source',
      'data/trays.csv: a test of independence needs at least 2 rows and 2 columns with counts; this table is 2×1',
      readers,
    );
    assert.equal(e.location.file, 'data/trays.csv');
    // Streamed moments: the variance test's argument is `moments`, read from the source's column.
    const moments: Aggregate = { kind: 'moments', moments: { n: 4, mean: 1, m2: -1, m3: NaN, m4: NaN, min: 0, max: 2 }, provenance: { ...provenance, description: 'sql:warehouse public.weights' } };
    const sql = { aggregateFile: async (): Promise<never> => assert.fail('no file'), aggregateSql: async () => moments };
    const m = await refusedAt(
      { test: 'variance', sigma0: 1, source: { sql: { connection: 'w', table: 'public.weights' }, columns: ['grams'] } },
      '$.source',
      'sql:warehouse public.weights: moments of grams: expected a finite sum of squared deviations ≥ 0, found -1',
      sql,
    );
    assert.equal(m.location.file, undefined, 'a database source names no file');
  });

  it('at the field the user would write when the spec leaves it out (its default was used)', async () => {
    // Default scores 1, 2, 3 with every unit in the first group: "scores" is where other scores would go.
    await refusedAt({ test: 'trend', table: [[1, 0, 0], [2, 0, 0]] }, '$.scores', 'all units fall in groups with the same score, so there is no order to test');
  });

  it('nowhere when the argument is no field of the procedure (a value derived from others): the message keeps its name', () => {
    // The probabilities of a resampled goodness of fit are derived from the expected counts: no field holds them.
    const e = new InputError('probabilities[1]: expected a finite number ≥ 0, found NaN', { argument: { name: 'probabilities', at: [1] } }, 'invalid-probability');
    const spec = { test: 'goodness-of-fit', observed: [1, 2] };
    assert.equal(locateArgument(e, { spec, places: {}, fields: ['observed', 'expected'], dataFields: ['observed', 'expected'] }), e);
  });
});

describe('a located message names its field once', () => {
  const cases: readonly [message: string, jsonPath: string, shown: string][] = [
    ['method: the exact test is too large here', '$.method', '$.method: the exact test is too large here'],
    ['summary.sd: expected a finite number ≥ 0, found -2', '$.summary.sd', '$.summary.sd: expected a finite number ≥ 0, found -2'],
    ['lower: expected a standard deviation below upper (1), found 2', '$.equivalence.lower', '$.equivalence.lower: expected a standard deviation below upper (1), found 2'],
    ['observed[0]: expected a count', '$.observed[0]', '$.observed[0]: expected a count'],
    ['table: the total count is too large', '$.table[1][0]', '$.table[1][0]: the total count is too large'],
    ['$.source: gave no records', '$.source', '$.source: gave no records'],
    // Not the field's name: kept whole.
    ['row 2: expected an array of counts', '$.table[1]', '$.table[1]: row 2: expected an array of counts'],
    ['methods: unrelated', '$.method', '$.method: methods: unrelated'],
  ];
  for (const [message, jsonPath, shown] of cases) {
    it(`${JSON.stringify(message)} at ${jsonPath}`, () => {
      assert.equal(withPlace(message, jsonPath), shown);
    });
  }

  it('as the command line and the living report show it: file, line, column, then the place once', () => {
    const text = '{\n  "test": "stratified",\n  "method": "exact"\n}';
    const e = new InputError('method: the exact conditional test is available for 2×2×K strata only', { jsonPath: '$.method' }, 'method-unavailable');
    assert.equal(
      describeRunError(e, 'oven.countercheck.json', parseJsonWithLocations(text)),
      'oven.countercheck.json:3:3: $.method: the exact conditional test is available for 2×2×K strata only',
    );
  });
});
