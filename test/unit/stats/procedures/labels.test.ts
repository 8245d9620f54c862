import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { mcnemarTest } from '../../../../src/stats/procedures/paired';
import { postHocTest } from '../../../../src/stats/procedures/posthoc';
import { stratifiedTest } from '../../../../src/stats/procedures/stratified';
import { cochranArmitageTest } from '../../../../src/stats/procedures/trend';
import { argumentNamed } from '../argument';

/** Expects an InputError with exactly this message, at this JSON path. */
function refuses(run: () => unknown, message: string, argument: string): void {
  assert.throws(run, (e: unknown) => {
    assert.ok(isInstance(e, InputError), String(e));
    assert.equal(e.message, message);
    assert.equal(argumentNamed(e), argument);
    assert.equal(e.code, 'length-mismatch');
    return true;
  });
}

describe('labels of the wrong length are refused, not replaced by defaults', () => {
  const table = [[12, 5, 3], [4, 9, 11]];

  it('post-hoc: rowLabels and columnLabels', () => {
    refuses(() => postHocTest(table, { rowLabels: ['oven A'] }), 'rowLabels: expected 2 labels (one per row), found 1', 'rowLabels');
    refuses(() => postHocTest(table, { columnLabels: ['burnt', 'fine'] }), 'columnLabels: expected 3 labels (one per column), found 2', 'columnLabels');
  });

  it('trend: columnLabels (one per ordered group)', () => {
    refuses(() => cochranArmitageTest(table, { columnLabels: ['low', 'mid', 'high', 'extra'] }), 'columnLabels: expected 3 labels (one per group), found 4', 'columnLabels');
  });

  it('stratified: stratumLabels', () => {
    refuses(() => stratifiedTest([[[5, 2], [3, 6]], [[4, 4], [2, 7]]], { stratumLabels: ['north'] }), 'stratumLabels: expected 2 labels (one per stratum), found 1', 'stratumLabels');
  });

  it('paired: labels', () => {
    refuses(() => mcnemarTest([[20, 6], [11, 30]], { labels: ['yes', 'no', 'unsure'] }), 'labels: expected 2 labels (one per category), found 3', 'labels');
  });

  it('labels of the right length are used as given', () => {
    const r = postHocTest(table, { rowLabels: ['oven A', 'oven B'], columnLabels: ['burnt', 'fine', 'pale'] });
    assert.ok(JSON.stringify(r).includes('oven B'));
  });
});
