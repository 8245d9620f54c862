// Documented limits of inline data, each at the limit and just past it: categories, table rows and columns
// (MAX_CATEGORIES) and Monte Carlo resamples (MAX_RESAMPLES). Past the limit, validation names the field.
import { strict as assert } from 'node:assert';
import { MAX_CATEGORIES, MAX_RESAMPLES } from '../../../src/savedtest/procedures/shared';
import { validateSpec } from '../../../src/savedtest/validate';

const ones = (k: number): number[] => new Array<number>(k).fill(1);

function refusedAt(spec: object, path: string, message: RegExp): void {
  const problems = validateSpec(spec);
  assert.ok(problems.some((p) => p.path === path && message.test(p.message)), `expected a problem at ${path}; got ${JSON.stringify(problems.slice(0, 3))}`);
}

describe('limits of inline data', () => {
  it(`"observed": ${MAX_CATEGORIES} categories accepted, ${MAX_CATEGORIES + 1} refused`, () => {
    assert.deepEqual(validateSpec({ test: 'goodness-of-fit', observed: ones(MAX_CATEGORIES) }), []);
    refusedAt({ test: 'goodness-of-fit', observed: ones(MAX_CATEGORIES + 1) }, '$.observed', /at most 10000 items/);
  });

  it(`"table": ${MAX_CATEGORIES} columns accepted, ${MAX_CATEGORIES + 1} refused, for every test that takes a table`, () => {
    for (const test of ['independence', 'post-hoc', 'trend']) {
      assert.deepEqual(validateSpec({ test, table: [ones(MAX_CATEGORIES), ones(MAX_CATEGORIES)] }), [], test);
      refusedAt({ test, table: [ones(MAX_CATEGORIES + 1), ones(MAX_CATEGORIES + 1)] }, '$.table[0]', /at most 10000 items/);
    }
  });

  it(`"table": ${MAX_CATEGORIES} rows accepted, ${MAX_CATEGORIES + 1} refused`, () => {
    const rows = (k: number) => Array.from({ length: k }, () => [1, 2]);
    assert.deepEqual(validateSpec({ test: 'independence', table: rows(MAX_CATEGORIES) }), []);
    refusedAt({ test: 'independence', table: rows(MAX_CATEGORIES + 1) }, '$.table', /at most 10000 items/);
  });

  it(`"resamples": ${MAX_RESAMPLES} accepted, ${MAX_RESAMPLES + 1} refused`, () => {
    const spec = { test: 'independence', table: [[1, 2], [3, 4]], method: 'monte-carlo' };
    assert.deepEqual(validateSpec({ ...spec, resamples: MAX_RESAMPLES }), []);
    refusedAt({ ...spec, resamples: MAX_RESAMPLES + 1 }, '$.resamples', /10000000/);
  });
});
