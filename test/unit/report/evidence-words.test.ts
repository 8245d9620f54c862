// The fragility line of a stopped search reads in the singular when one change is the proven lower bound.
import { strict as assert } from 'node:assert';
import { fragilityLines } from '../../../src/report/evidence';
import { wordResult } from '../../../src/report/words/result';
import { goodnessOfFit } from '../../../src/stats/procedures/fit';
import type { TestResult } from '../../../src/stats/result';

function stopped(lowerBound: number): TestResult {
  const base = wordResult(goodnessOfFit([1, 1, 1, 1, 1, 1, 1, 1, 1, 1], {})) as TestResult;
  return { ...base, fragility: { index: null, quotient: null, reverse: true, method: 'bounded-search', changes: [], lowerBound, tablesExamined: 751, searchStopped: true, basis: 'reported' } };
}

describe('fragility words', () => {
  it('a stopped search with a lower bound of one change says "1 change", not "1 changes"', () => {
    assert.deepEqual(fragilityLines(stopped(1)), [
      'Fragility: at least 1 change of a single outcome would be needed to make the result significant; the bounded search stopped at its work limit before finding one (Baer et al. 2021; by the reported test).',
    ]);
    assert.match(fragilityLines(stopped(3))[0], /at least 3 changes of single outcomes would be needed .* before finding them/);
  });
});
