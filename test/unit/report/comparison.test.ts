// A re-run beside its record: the before/after rows mark what changed and a conclusion that flipped, and the
// Testing view's diff sides are the same rows as text. Uses the record stored in a demo spec and a re-run of it
// on changed data (compareWithRecord is the saved-test layer's, checked in its own tests).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { compareRecorded, comparisonDiffTexts } from '../../../src/report/comparison';
import { demoFolder } from './demoResults';

const recorded = (JSON.parse(readFileSync(join(demoFolder, 'bottling-fill-spread.countercheck.json'), 'utf8')) as { recorded: Parameters<typeof compareRecorded>[0] }).recorded;

describe('re-run comparison', () => {
  it('the same numbers: nothing marked, nothing flipped', () => {
    const c = compareRecorded(recorded, recorded, 'reproduced');
    assert.equal(c.flipped, false);
    assert.deepEqual(c.rows.filter((r) => r.changed), []);
    assert.deepEqual(c.rows.map((r) => r.quantity), ['Data', 'Statistic', 'df', 'N', 'p-value', 'Variance ratio s²/σ0²', 'Conclusion']);
  });

  it('data changed and the conclusion flipped: rows marked, conclusion flagged, diff texts line up', () => {
    const current = { ...recorded, data: { ...recorded.data, rows: 950, sha256: 'f'.repeat(64) }, result: { ...recorded.result, statistic: 930.1, n: 950, df: 949, pValue: 0.31, significant: false } };
    const c = compareRecorded(recorded, current, 'data changed');
    assert.equal(c.flipped, true);
    const conclusion = c.rows.find((r) => r.quantity === 'Conclusion');
    assert.deepEqual({ before: conclusion?.before, after: conclusion?.after, flipped: conclusion?.flipped }, { before: 'significant at α = 0.05', after: 'not significant at α = 0.05', flipped: true });
    assert.deepEqual(c.rows.filter((r) => r.changed).map((r) => r.quantity), ['Data', 'Statistic', 'df', 'N', 'p-value', 'Conclusion']);
    const diff = comparisonDiffTexts(c);
    assert.match(diff.expected, /^Conclusion: significant at α = 0\.05$/m);
    assert.match(diff.actual, /^Conclusion: not significant at α = 0\.05$/m);
    assert.equal(diff.expected.split('\n').length, diff.actual.split('\n').length);
  });
});
