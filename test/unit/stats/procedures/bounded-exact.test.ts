// The exact network algorithm counts its work inside the allocation loop, so a single node with a huge number
// of allocations (a 20×20 table of ones: C(39, 19) ≈ 7e10 splits of the first column) stops at the limit.
import { strict as assert } from 'node:assert';
import { fisherExactRxC } from '../../../../src/stats/procedures/exact';
import { runSpec } from '../../../../src/savedtest/run';
import type { TestResult } from '../../../../src/stats/result';

const ones = (k: number): number[][] => Array.from({ length: k }, () => new Array<number>(k).fill(1));
const noReaders = { aggregateFile: async () => assert.fail('no file expected') };

describe('exact test work limit, checked inside the allocation loop', () => {
  it('stops a 10×10 table of ones at its work limit instead of finishing the first node (C(19,9) = 92378 splits)', () => {
    const out = fisherExactRxC(ones(10), { workLimit: 1000 });
    assert.equal(out.completed, false);
    assert.ok(out.work <= 1001, `work ${out.work} should stop at the limit 1000`);
  });

  it('stops a 20×20 table of ones at the limit used beside the chi-square p (a node has ≈7e10 splits)', () => {
    const out = fisherExactRxC(ones(20), { workLimit: 1e6 });
    assert.equal(out.completed, false);
    assert.ok(out.work <= 1e6 + 1, `work ${out.work}`);
  });

  it('gives up on the exact p beside the chi-square one for a 20×20 table of ones, and says so', async () => {
    const run = await runSpec({ test: 'independence', table: ones(20) }, { readers: noReaders, specPath: '/w/s.countercheck.json' });
    const result = run.result as TestResult;
    assert.ok(Number.isFinite(result.statistic));
    assert.ok(!result.otherStatistics.some((l) => l.id === 'fisher-exact'));
    const notice = result.notices.find((n) => n.code === 'exact-beside-skipped');
    assert.ok(notice, `notices: ${result.notices.map((n) => n.code).join(', ')}`);
    assert.match(notice.message, /work limit/);
  });
});
