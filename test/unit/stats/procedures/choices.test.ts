import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { postHocTest, type Comparison } from '../../../../src/stats/procedures/posthoc';
import type { Alternative } from '../../../../src/stats/result';
import { cochranArmitageTest, linearByLinearTest } from '../../../../src/stats/procedures/trend';
import { argumentNamed } from '../argument';

/** Expects an InputError with exactly this message, at this JSON path. */
function refuses(run: () => unknown, message: string, argument: string): void {
  assert.throws(run, (e: unknown) => {
    assert.ok(isInstance(e, InputError), String(e));
    assert.equal(e.message, message);
    assert.equal(argumentNamed(e), argument);
    return true;
  });
}

describe('option words outside their set are refused, naming the field and the choices', () => {
  const table = [[12, 5, 3], [4, 9, 11]];

  it('post-hoc compare: "colums" is not taken for "columns"', () => {
    refuses(() => postHocTest(table, { compare: 'colums' as Comparison }), 'compare: expected one of "rows", "columns", "cells", found "colums"', 'compare');
    assert.equal(postHocTest(table, { compare: 'columns' }).details?.compare, 'columns');
  });

  it('Cochran–Armitage alternative', () => {
    refuses(() => cochranArmitageTest(table, { alternative: 'increasing' as Alternative }), 'alternative: expected one of "two-sided", "greater", "less", found "increasing"', 'alternative');
  });

  it('linear-by-linear alternative', () => {
    refuses(() => linearByLinearTest(table, { alternative: 'two_sided' as Alternative }), 'alternative: expected one of "two-sided", "greater", "less", found "two_sided"', 'alternative');
  });
});
