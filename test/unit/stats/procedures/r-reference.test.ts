import { strict as assert } from 'node:assert';
import { fisherExact2x2 } from '../../../../src/stats/procedures/fisher2x2';
import { independenceTest } from '../../../../src/stats/procedures/table';
import { assertClose } from '../../tolerance';
import { loadFixture } from '../../fixtures';

interface RCase {
  name: string;
  table: number[][];
  pearson: { statistic: number; pValue: number; df: number };
  yates?: { statistic: number; pValue: number };
  fisher?: { twoSided: number; greater: number; less: number; conditionalOddsRatio: number };
}

// R's chisq.test and fisher.test (test/fixtures/R/independence.json, written by scripts/fixtures/procedures.R):
// a second reference, independent of scipy, for the same procedures.
const fixture = loadFixture<RCase>('R', 'independence.json');

describe(`independence and Fisher's exact test against ${fixture.versions.R}`, () => {
  for (const c of fixture.cases) {
    it(`matches chisq.test${c.yates ? ' with and without correction, and fisher.test,' : ''} for "${c.name}"`, () => {
      const plain = independenceTest(c.table);
      assert.equal(plain.df, c.pearson.df);
      assertClose(plain.statistic, c.pearson.statistic, { rel: 1e-10, abs: 1e-12 }, `${c.name}: X² vs chisq.test`);
      assertClose(plain.pValue.value, c.pearson.pValue, { rel: 1e-10 }, `${c.name}: p vs chisq.test`);
      if (c.yates && c.fisher) {
        const corrected = independenceTest(c.table, { correction: true });
        // R subtracts min(0.5, |o − e|), which leaves rounding residue (1e-24) where we give exactly 0.
        assertClose(corrected.statistic, c.yates.statistic, { rel: 1e-10, abs: 1e-20 }, `${c.name}: Yates X² vs chisq.test(correct = TRUE)`);
        assertClose(corrected.pValue.value, c.yates.pValue, { rel: 1e-10, abs: 1e-11 }, `${c.name}: Yates p vs chisq.test`);
        const fisher = fisherExact2x2(c.table);
        assertClose(fisher.twoSided.value, c.fisher.twoSided, { rel: 1e-10 }, `${c.name}: two-sided p vs fisher.test`);
        assertClose(fisher.greater.value, c.fisher.greater, { rel: 1e-10 }, `${c.name}: greater p vs fisher.test`);
        assertClose(fisher.less.value, c.fisher.less, { rel: 1e-10 }, `${c.name}: less p vs fisher.test`);
        // fisher.test finds its estimate with uniroot at a tolerance near 1e-4, so only that many digits agree
        // (the mpmath fixture checks the same estimate to 1e-9).
        assertClose(fisher.conditionalOddsRatio, c.fisher.conditionalOddsRatio, { rel: 1e-4, abs: 1e-4 }, `${c.name}: conditional odds ratio vs fisher.test`);
      }
    });
  }
});
