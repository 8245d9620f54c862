import { strict as assert } from 'node:assert';
import { independenceTest } from '../../../../src/stats/procedures/table';
import { assertClose } from '../../tolerance';
import { errorOf } from '../../fixtures';
import { independenceFixture, type TableCase } from './independence-fixture';
import { argumentNamed } from '../argument';

const { versions } = independenceFixture;

function total(table: number[][]): number {
  return table.flat().reduce((s, x) => s + x, 0);
}


describe('independence test on r×c tables', () => {
  describe(`against scipy ${versions.scipy}, statsmodels ${versions.statsmodels} and mpmath ${versions.mpmath}`, () => {
    for (const c of independenceFixture.cases) {
      const huge = total(c.table) > 1e8;
      it(`matches X², G² and the Cressie–Read statistic with their p-values for "${c.name}"`, () => {
        const result = independenceTest(c.table);
        assert.equal(result.df, c.df);
        assertClose(result.statistic, c.highPrecision.pearson, { rel: 1e-12, abs: 1e-12 }, `${c.name}: X² vs mpmath`);
        assertClose(result.statistic, c.pearson.statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: X² vs scipy chi2_contingency`);
        assertClose(result.pValue.value, c.pearson.pValue, { rel: 1e-9, abs: 1e-300 }, `${c.name}: p vs scipy`);
        assertClose(result.pValue.log10, c.highPrecision.pearsonLog10, { rel: 1e-9, abs: 1e-11 }, `${c.name}: log10 p vs mpmath`);
        const g = result.otherStatistics.find((s) => s.id === 'likelihood-ratio')!;
        assertClose(g.statistic, c.highPrecision.likelihoodRatio, { rel: 1e-12, abs: 1e-12 }, `${c.name}: G² vs mpmath`);
        // scipy's o·ln(o/e) sum cancels for counts near 1e9 (it is off in the 7th digit there); mpmath is the reference.
        if (!huge) assertClose(g.statistic, c.likelihoodRatio.statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: G² vs scipy`);
        assertClose(g.pValue.log10, c.highPrecision.likelihoodRatioLog10, { rel: 1e-9, abs: 1e-11 }, `${c.name}: log10 p of G² vs mpmath`);
        c.highPrecision.cressieRead.forEach((cr, i) => {
          const r = independenceTest(c.table, { statistic: 'cressie-read', lambda: cr.lambda });
          assertClose(r.statistic, cr.statistic, { rel: 1e-12, abs: 1e-12 }, `${c.name}: λ = ${cr.lambda} vs mpmath`);
          if (!huge) assertClose(r.statistic, c.cressieRead[i].statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: λ = ${cr.lambda} vs scipy`);
        });
      });

      it(`matches expected counts, residuals and Cramér's V for "${c.name}"`, () => {
        const result = independenceTest(c.table);
        const grid = result.grid!;
        grid.expected.forEach((row, i) =>
          row.forEach((e, j) => {
            assertClose(e, c.expected[i][j], { rel: 1e-14 }, `${c.name}: expected[${i}][${j}]`);
            assertClose(grid.pearsonResiduals[i][j], c.pearsonResiduals[i][j], { rel: 1e-9, abs: 1e-9 }, `${c.name}: Pearson residual[${i}][${j}]`);
            assertClose(grid.adjustedResiduals[i][j], c.adjustedResiduals[i][j], { rel: 1e-9, abs: 1e-9 }, `${c.name}: adjusted residual[${i}][${j}]`);
          }),
        );
        assertClose(result.effectSizes.find((e) => e.id === 'cramersV')!.value, c.cramersV, { rel: 1e-9, abs: 1e-12 }, `${c.name}: Cramér's V vs scipy association`);
        assertClose(result.effectSizes.find((e) => e.id === 'cramersVCorrected')!.value, c.cramersVCorrected, { rel: 1e-9, abs: 1e-12 }, `${c.name}: bias-corrected V (Bergsma 2013 formula in the fixture script)`);
      });

      if (c.yates) {
        const { yates, oddsRatio, relativeRisk, phi } = c as Required<TableCase>;
        it(`matches Yates' corrected X², phi, and the odds ratio and relative risk with intervals for "${c.name}"`, () => {
          const result = independenceTest(c.table, { correction: true });
          assertClose(result.statistic, yates.statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: Yates X² vs scipy chi2_contingency(correction=True)`);
          assertClose(result.pValue.value, yates.pValue, { rel: 1e-9, abs: 1e-300 }, `${c.name}: Yates p vs scipy`);
          assertClose(result.effectSizes.find((e) => e.id === 'phi')!.value, phi, { rel: 1e-9, abs: 1e-12 }, `${c.name}: phi`);
          for (const [id, want] of [['oddsRatio', oddsRatio], ['relativeRisk', relativeRisk]] as const) {
            const got = result.estimates.find((e) => e.id === id)!;
            assertClose(got.value, want.value, { rel: 1e-10 }, `${c.name}: ${id} vs statsmodels Table2x2`);
            assertClose(got.interval!.lower, want.lower, { rel: 1e-9 }, `${c.name}: ${id} lower vs statsmodels`);
            assertClose(got.interval!.upper, want.upper, { rel: 1e-9 }, `${c.name}: ${id} upper vs statsmodels`);
          }
        });
      }
    }
  });

  it("reproduces Agresti's aspirin table: X² = 25.01, odds ratio 1.832 (1.440, 2.331)", () => {
    // Physicians' Health Study as tabulated by Agresti (An Introduction to Categorical Data Analysis): placebo 189
    // heart attacks and 10,845 without (group of 11,034), aspirin 104 and 10,933 (group of 11,037). So 10,845 is
    // the "no heart attack" count, not the group total. Values from memory, confirmed by scipy and statsmodels above.
    const result = independenceTest([[189, 10845], [104, 10933]], { rowLabels: ['placebo', 'aspirin'], columnLabels: ['heart attack', 'no heart attack'] });
    assertClose(result.statistic, 25.01, { rel: 0, abs: 0.005 }, 'aspirin X²');
    const or = result.estimates.find((e) => e.id === 'oddsRatio')!;
    assertClose(or.value, 1.832, { rel: 0, abs: 0.0005 }, 'aspirin odds ratio');
    assertClose(or.interval!.lower, 1.44, { rel: 0, abs: 0.0005 }, 'aspirin OR lower');
    assertClose(or.interval!.upper, 2.331, { rel: 0, abs: 0.0005 }, 'aspirin OR upper');
    assert.equal(result.grid!.rowTotals[0], 11034);
  });

  it('gives a Yates-corrected statistic of 0 and p = 1 for [[1573, 3], [4, 0]]', () => {
    // A past failure of a reference library: subtracting 0.5 from |o − e| < 0.5 must give 0, not a positive value.
    const result = independenceTest([[1573, 3], [4, 0]], { correction: true });
    assert.equal(result.statistic, 0);
    assert.equal(result.pValue.value, 1);
    assert.equal(result.details!.correctionApplied, true);
    // Effect sizes still come from the uncorrected statistic.
    const uncorrected = result.otherStatistics.find((s) => s.id === 'pearson')!.statistic;
    assertClose(result.effectSizes.find((e) => e.id === 'cramersV')!.value, Math.sqrt(uncorrected / 1580), { rel: 1e-14 }, 'V from uncorrected X²');
    assert.ok(uncorrected > 0);
  });

  it('says whether the continuity correction was applied, and applies it only when asked', () => {
    assert.equal(independenceTest([[12, 5], [3, 9]]).details!.correctionApplied, false);
    assert.equal(independenceTest([[12, 5], [3, 9]], { correction: true }).details!.correctionApplied, true);
    const wide = independenceTest([[12, 5, 4], [3, 9, 8]], { correction: true });
    assert.equal(wide.details!.correctionApplied, false);
    assert.ok(wide.notices.some((n) => n.code === 'correction-not-applied'));
  });

  it('adds Fisher\'s exact test to a 2×2 result and marks the expected-count rule failed when counts are small', () => {
    const result = independenceTest([[3, 1], [1, 3]]);
    const fisher = result.otherStatistics.find((s) => s.id === 'fisher-exact')!;
    // Fisher (1935), the lady tasting tea: two-sided p = 0.4857 (= 34/70).
    assertClose(fisher.pValue.value, 34 / 70, { rel: 1e-12 }, 'tea two-sided');
    const assumption = result.assumptions.find((a) => a.id === 'expected-counts')!;
    assert.equal(assumption.status, 'failed');
    assert.equal(assumption.alternative, "Fisher's exact test");
    assert.ok(result.notices.some((n) => n.code === 'small-expected' && /row 1 × column 1/.test(n.message)));
  });

  it('drops rows and columns whose total is 0, naming them', () => {
    const result = independenceTest([[5, 0, 7], [0, 0, 0], [9, 0, 2]], { rowLabels: ['oven A', 'oven B', 'oven C'], columnLabels: ['burnt', 'raw', 'fine'] });
    assert.deepEqual(result.grid!.rowLabels, ['oven A', 'oven C']);
    assert.deepEqual(result.grid!.columnLabels, ['burnt', 'fine']);
    assert.ok(result.notices.some((n) => n.code === 'dropped-empty-row' && /oven B/.test(n.message)));
    assert.ok(result.notices.some((n) => n.code === 'dropped-empty-column' && /raw/.test(n.message)));
  });

  it('refuses a table smaller than 2×2 after dropping empty rows and columns', () => {
    const e = errorOf(() => independenceTest([[5, 0], [7, 0]]));
    assert.equal(e.code, 'table-too-small');
    assert.match(e.message, /2×1 after leaving out/);
  });

  it('refuses negative, fractional and non-numeric counts with the row and column', () => {
    const e = errorOf(() => independenceTest([[5, 2], [7, -1]], { rowLabels: ['day', 'night'], columnLabels: ['late', 'on time'] }));
    assert.match(e.message, /row 2 \(`night`\), column 2 \(`on time`\).*found -1/);
    assert.equal(argumentNamed(e), 'table[1][1]');
    assert.match(errorOf(() => independenceTest([[5, 2.5], [7, 1]])).message, /row 1 .*column 2 .*found 2\.5/);
    assert.match(errorOf(() => independenceTest([[5, 2], [7, NaN]])).message, /found NaN/);
  });

  it('refuses a ragged table naming the row', () => {
    const e = errorOf(() => independenceTest([[5, 2, 1], [7, 1]]));
    assert.equal(e.code, 'ragged-row');
    assert.match(e.message, /row 2: expected 3 counts/);
  });

  it('adds 0.5 to every cell for the odds ratio when a cell is 0, and says so', () => {
    const result = independenceTest([[0, 5], [7, 3]]);
    assert.ok(result.notices.some((n) => n.code === 'haldane-anscombe'));
    assertClose(result.estimates.find((e) => e.id === 'oddsRatio')!.value, (0.5 * 3.5) / (5.5 * 7.5), { rel: 1e-14 }, 'Haldane–Anscombe OR');
  });

  it('keeps precision with counts of 1e9: expected counts exact and residuals finite', () => {
    const big = 1e9;
    const result = independenceTest([[big, big + 40000], [big + 30000, big]]);
    const n = 4 * big + 70000;
    assert.equal(result.grid!.total, n);
    assertClose(result.grid!.expected[0][0], ((2 * big + 40000) * (2 * big + 30000)) / n, { rel: 1e-15 }, 'expected at 1e9');
    assert.ok(result.grid!.adjustedResiduals.flat().every(Number.isFinite));
  });

  it('names the row and column variables in the conclusion when they are known, and stays generic otherwise', () => {
    // Agresti's aspirin table (X² = 25.01, p < .001): associated at any usual level.
    const aspirin = [[189, 10845], [104, 10933]];
    const named = independenceTest(aspirin, { rowVariable: 'treatment', columnVariable: 'outcome' });
    assert.match(named.conclusion, /^`treatment` and `outcome` are associated: the mix of `outcome` differs between the `treatment` groups by more than chance would explain at the 5% level \(p ≈ [\d.]+ × 10\^-7\)\.$/);
    assert.doesNotMatch(named.conclusion, /row and column variables/);
    const rowOnly = independenceTest(aspirin, { rowVariable: 'treatment' });
    assert.match(rowOnly.conclusion, /^`treatment` and the column variable are associated: the spread over the columns differs between the `treatment` groups/);
    const columnOnly = independenceTest(aspirin, { columnVariable: 'outcome' });
    assert.match(columnOnly.conclusion, /^The row variable and `outcome` are associated: the mix of `outcome` differs between the rows/);
    assert.match(independenceTest(aspirin, { rowVariable: ' ' }).conclusion, /^The row and column variables are associated: how counts spread over the columns differs between rows/);
    // Not significant: X² = N(ad − bc)²/(r1·r2·c1·c2) = 36·75²/(17·19·21·15) = 1.990 by hand, below the 5% critical
    // value 3.841 for df 1 (NIST/SEMATECH e-Handbook §1.3.6.7.4).
    const none = independenceTest([[12, 5], [9, 10]], { rowVariable: 'oven', columnVariable: 'defect' });
    assert.equal(none.statistic.toFixed(3), '1.990');
    assert.equal(none.significant, false);
    assert.match(none.conclusion, /^The data do not show an association between `oven` and `defect` at the 5% level: the differences in the mix of `defect` between the `oven` groups are within what chance would produce \(p = 0\.\d{3}\)\.$/);
    assert.match(independenceTest([[12, 5], [9, 10]]).conclusion, /^The data do not show an association between the row and column variables at the 5% level: the differences between rows are within/);
  });

  it('reports the sampling design as an assumption that cannot be checked', () => {
    assert.equal(independenceTest([[12, 5], [3, 9]]).assumptions.find((a) => a.id === 'sampling-design')!.status, 'unchecked');
  });
});
