import { strict as assert } from 'node:assert';
import { wordResult } from '../../../../src/report/words/result';
import { InputError, isInstance } from '../../../../src/errors';
import { adjustPValues, postHocTest, type CellTest, type PairwiseComparison } from '../../../../src/stats/procedures/posthoc';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

const R = fixture<{
  rVersion: string;
  adjust: { p: number[]; bonferroni: number[]; holm: number[]; bh: number[] };
  posthoc: { table: number[][]; pairStatistics: number[]; pairP: number[]; pairHolm: number[]; adjustedResiduals: number[]; cellP: number[]; cellBH: number[] };
}>('R', 'advanced');

describe('multiple-comparison adjustments', () => {
  for (const [method, key] of [['bonferroni', 'bonferroni'], ['holm', 'holm'], ['benjamini-hochberg', 'bh']] as const) {
    it(`${method} matches R p.adjust`, () => {
      const got = adjustPValues(R.adjust.p, method);
      got.forEach((g, i) => closeTo(g, R.adjust[key][i], 1e-14, `${method}[${i}] (R ${R.rVersion} p.adjust)`, R.adjust.p));
    });
  }
});

describe('post-hoc comparisons on an r×c table', () => {
  const c = R.posthoc;
  it('pairwise row tests match R chisq.test on each pair, with Holm adjustment (R p.adjust)', () => {
    const r = wordResult(postHocTest(c.table, { compare: 'rows', adjustment: 'holm', rowLabels: ['Day', 'Evening', 'Night'] }));
    const pairs = r.details!.pairs as PairwiseComparison[];
    pairs.forEach((p, k) => {
      closeTo(p.statistic, c.pairStatistics[k], 1e-12, `pair ${p.first} vs ${p.second} X²`, c.table);
      closeTo(p.pValue, c.pairP[k], 1e-10, 'pair p', c.table);
      closeTo(p.adjustedPValue, c.pairHolm[k], 1e-10, 'Holm-adjusted p', c.table);
    });
    assert.equal(r.otherStatistics[0].name, 'Rows Day vs Evening');
  });

  it('cell-wise adjusted residuals match R chisq.test()$stdres, with BH adjustment (R p.adjust)', () => {
    const r = wordResult(postHocTest(c.table, { compare: 'cells', adjustment: 'benjamini-hochberg' }));
    const cells = r.details!.cells as CellTest[];
    cells.forEach((cell, k) => {
      closeTo(cell.adjustedResidual, c.adjustedResiduals[k], 1e-12, `residual ${cell.rowLabel} × ${cell.columnLabel}`, c.table);
      closeTo(cell.pValue, c.cellP[k], 1e-9, 'cell p (R 2·pnorm)', c.table);
      closeTo(cell.adjustedPValue, c.cellBH[k], 1e-9, 'BH-adjusted cell p', c.table);
    });
    assert.equal(r.otherStatistics[0].id, 'cell-1-1');
  });

  it('checks the expected counts of the overall table and names the small cells (common practice rule)', () => {
    // Row totals 6, 30 and column totals 18, 18 of 36: the first row's expected counts are 3 (2 of 4 cells below 5).
    const small = wordResult(postHocTest([[1, 5], [17, 13]], { rowLabels: ['night', 'day'], columnLabels: ['late', 'on time'] }));
    assert.equal(small.assumptions.find((a) => a.id === 'expected-counts')?.status, 'failed');
    assert.ok(small.notices.some((n) => n.code === 'small-expected' && n.message.includes('night × late')));
    const large = wordResult(postHocTest([[20, 25], [30, 15]]));
    assert.equal(large.assumptions.find((a) => a.id === 'expected-counts')?.status, 'met');
  });

  it('refuses an empty row with its label', () => {
    assert.throws(() => wordResult(postHocTest([[1, 2], [0, 0], [3, 4]], { rowLabels: ['a', 'b', 'c'] })), (e: unknown) => isInstance(e, InputError) && /"b"/.test(e.message));
  });

  it('words a single flagged pair in the singular', () => {
    // Pairs of rows as 2×2 Pearson tests (worked by hand): a vs c X² = 8.33, p = .0039, Holm × 3 = .012 (flagged);
    // b vs c X² = 4.20, p = .040, Holm × 2 = .081; a vs b X² = 0.72. Exactly one pair differs.
    const r = wordResult(postHocTest([[50, 50], [56, 44], [70, 30]], { compare: 'rows', adjustment: 'holm', rowLabels: ['a', 'b', 'c'] }));
    assert.equal(r.conclusion, 'After Holm adjustment, 1 pair of rows differs at the 5% level: a vs c.');
  });
});
