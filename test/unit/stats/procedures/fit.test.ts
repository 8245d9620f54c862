import { strict as assert } from 'node:assert';
import { wordResult } from '../../../../src/report/words/result';
import { goodnessOfFit, type GoodnessOfFitOptions } from '../../../../src/stats/procedures/fit';
import { assertClose, type FixtureNumber } from '../../tolerance';
import { errorOf, type HighPrecision, loadFixture } from '../../fixtures';

interface Tail {
  statistic: FixtureNumber;
  pValue: FixtureNumber;
}
interface FitCase {
  name: string;
  observed: number[];
  estimatedParameters: number;
  df: number;
  given: { expected?: number[]; proportions?: number[]; ratios?: number[] };
  expected: number[];
  pearson: Tail;
  likelihoodRatio: Tail;
  cressieRead: { lambda: number; statistic: FixtureNumber; pValue: FixtureNumber }[];
  pearsonResiduals: number[];
  standardizedResiduals: number[];
  pearsonContributions: number[];
  cohensW: number;
  highPrecision: HighPrecision;
}

// scipy 1.10 stats.chisquare / power_divergence, and the same statistics at 40 digits in mpmath
// (test/fixtures/scipy/goodness-of-fit.json, written by scripts/fixtures/procedures.py).
const fixture = loadFixture<FitCase>('scipy', 'goodness-of-fit.json');

function optionsFor(c: FitCase): GoodnessOfFitOptions {
  return { ...c.given, estimatedParameters: c.estimatedParameters };
}

function huge(c: FitCase): boolean {
  return c.observed.reduce((s, x) => s + x, 0) > 1e8;
}

function codeOf(fn: () => unknown): string {
  const e = errorOf(fn);
  return `${e.code}: ${e.message}`;
}

describe('goodness of fit', () => {
  describe(`against scipy ${fixture.versions.scipy} and mpmath ${fixture.versions.mpmath}`, () => {
    for (const c of fixture.cases) {
      it(`matches the Pearson, likelihood-ratio and Cressie–Read statistics for "${c.name}"`, () => {
        const pearson = wordResult(goodnessOfFit(c.observed, optionsFor(c)));
        assert.equal(pearson.df, c.df);
        // mpmath at 40 digits: our terms are evaluated in a form that keeps precision when o ≈ e.
        assertClose(pearson.statistic, c.highPrecision.pearson, { rel: 1e-12, abs: 1e-12 }, `${c.name}: X² vs mpmath`);
        assertClose(pearson.statistic, c.pearson.statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: X² vs scipy chisquare`);
        assertClose(pearson.pValue.value, c.pearson.pValue, { rel: 1e-9, abs: 1e-300 }, `${c.name}: p vs scipy chisquare`);
        assertClose(pearson.pValue.log10, c.highPrecision.pearsonLog10, { rel: 1e-10, abs: 1e-12 }, `${c.name}: log10 p vs mpmath`);

        const g = wordResult(goodnessOfFit(c.observed, { ...optionsFor(c), statistic: 'likelihood-ratio' }));
        assertClose(g.statistic, c.highPrecision.likelihoodRatio, { rel: 1e-12, abs: 1e-12 }, `${c.name}: G² vs mpmath`);
        // scipy sums o·ln(o/e) directly, which cancels for counts near 1e9; compare with it only below that.
        if (!huge(c)) assertClose(g.statistic, c.likelihoodRatio.statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: G² vs scipy power_divergence`);
        assertClose(g.pValue.log10, c.highPrecision.likelihoodRatioLog10, { rel: 1e-9, abs: 1e-11 }, `${c.name}: log10 p of G² vs mpmath`);

        c.highPrecision.cressieRead.forEach((cr, i) => {
          const result = wordResult(goodnessOfFit(c.observed, { ...optionsFor(c), statistic: 'cressie-read', lambda: cr.lambda }));
          assertClose(result.statistic, cr.statistic, { rel: 1e-12, abs: 1e-12 }, `${c.name}: power divergence λ = ${cr.lambda} vs mpmath`);
          if (!huge(c)) assertClose(result.statistic, c.cressieRead[i].statistic, { rel: 1e-9, abs: 1e-12 }, `${c.name}: λ = ${cr.lambda} vs scipy`);
        });
      });

      it(`shows the Cressie–Read line at λ = 2/3 beside a Pearson result for "${c.name}"`, () => {
        const cr = c.highPrecision.cressieRead.find((x) => Math.abs(x.lambda - 2 / 3) < 1e-12);
        assert.ok(cr, `${c.name}: fixture has no λ = 2/3 case`);
        const line = wordResult(goodnessOfFit(c.observed, optionsFor(c))).otherStatistics.find((s) => s.id === 'cressie-read')!;
        // mpmath at 40 digits, power divergence with λ = 2/3
        assertClose(line.statistic, cr!.statistic, { rel: 1e-12, abs: 1e-12 }, `${c.name}: Cressie–Read side line vs mpmath`);
      });

      it(`matches expected counts, residuals, contributions and Cohen's w for "${c.name}"`, () => {
        const result = wordResult(goodnessOfFit(c.observed, optionsFor(c)));
        const rows = result.categories!;
        rows.forEach((row, i) => {
          assertClose(row.expected, c.expected[i], { rel: 1e-14 }, `${c.name}: expected[${i}]`);
          assertClose(row.pearsonResidual, c.pearsonResiduals[i], { rel: 1e-9, abs: 1e-12 }, `${c.name}: Pearson residual[${i}]`);
          assertClose(row.standardizedResidual, c.standardizedResiduals[i], { rel: 1e-9, abs: 1e-12 }, `${c.name}: standardized residual[${i}]`);
          assertClose(row.contribution, c.pearsonContributions[i], { rel: 1e-9, abs: 1e-12 }, `${c.name}: contribution[${i}]`);
        });
        assertClose(result.effectSizes.find((e) => e.id === 'cohensW')!.value, c.cohensW, { rel: 1e-9, abs: 1e-15 }, `${c.name}: Cohen's w`);
      });
    }
  });

  it("reproduces Mendel's dihybrid cross against 9:3:3:1 (X² = 0.470, p = 0.925)", () => {
    // Mendel (1866), round/yellow 315, round/green 108, wrinkled/yellow 101, wrinkled/green 32; values quoted in
    // most textbooks, e.g. Sokal & Rohlf, Biometry; the same numbers come out of scipy in the fixture above.
    const result = wordResult(goodnessOfFit([315, 108, 101, 32], { ratios: [9, 3, 3, 1], labels: ['round yellow', 'round green', 'wrinkled yellow', 'wrinkled green'] }));
    assertClose(result.statistic, 0.47, { rel: 0, abs: 0.0005 }, 'Mendel X²');
    assertClose(result.pValue.value, 0.925, { rel: 0, abs: 0.0005 }, 'Mendel p');
    assert.equal(result.df, 3);
    assert.equal(result.significant, false);
  });

  it('uses equal proportions when nothing is expected and says so in the conclusion', () => {
    const result = wordResult(goodnessOfFit([10, 20, 30]));
    assert.deepEqual(result.categories!.map((r) => r.expected), [20, 20, 20]);
    assert.match(result.conclusion, /equal proportions/);
    assert.equal(result.details!.expectedFrom, 'uniform');
  });

  it('names the counted variable in the conclusion when it is known', () => {
    // Mendel's dihybrid cross against 9:3:3:1 (published: p = 0.925), so the counts are consistent with the ratios.
    const named = wordResult(goodnessOfFit([315, 108, 101, 32], { ratios: [9, 3, 3, 1], variable: 'seed type' }));
    assert.match(named.conclusion, /^The observed counts of `seed type` are consistent with the expected proportions:.*\(p = 0\.925\)\.$/);
    const unnamed = wordResult(goodnessOfFit([315, 108, 101, 32], { ratios: [9, 3, 3, 1] }));
    assert.match(unnamed.conclusion, /^The observed counts are consistent with the expected proportions:/);
    const differs = wordResult(goodnessOfFit([10, 20, 60], { variable: 'nozzle' }));
    assert.match(differs.conclusion, /^The observed counts of `nozzle` differ from equal proportions in every category by more than chance/);
  });

  it('rescales expected counts whose total differs from the observed total, with a notice', () => {
    const result = wordResult(goodnessOfFit([30, 50, 20], { expected: [35, 45, 25] }));
    assertClose(result.categories![0].expected, (35 * 100) / 105, { rel: 1e-15 }, 'rescaled expected');
    assert.ok(result.notices.some((n) => n.code === 'rescaled-expected' && /105/.test(n.message)));
  });

  it('does not announce a rescaling when the expected counts already total the observed count', () => {
    const result = wordResult(goodnessOfFit([30, 50, 20], { expected: [25, 50, 25] }));
    assert.ok(!result.notices.some((n) => n.code === 'rescaled-expected'));
  });

  it('rescales proportions that do not sum to 1 within 1e-9, with a notice, and accepts those that do', () => {
    const off = wordResult(goodnessOfFit([18, 27, 41], { proportions: [0.2, 0.3, 0.4] }));
    assert.ok(off.notices.some((n) => n.code === 'rescaled-proportions'));
    const near = wordResult(goodnessOfFit([18, 27, 41], { proportions: [0.2, 0.3, 0.5 + 5e-10] }));
    assert.ok(!near.notices.some((n) => n.code === 'rescaled-proportions'));
  });

  it('refuses a category with expected 0 and observed > 0, naming the category', () => {
    const message = codeOf(() => wordResult(goodnessOfFit([4, 3, 2], { proportions: [0.5, 0.5, 0], labels: ['sourdough', 'rye', 'spelt'] })));
    assert.match(message, /^zero-expected: category `spelt`/);
  });

  it('leaves out a category with expected 0 and observed 0 from the degrees of freedom, with a notice', () => {
    const result = wordResult(goodnessOfFit([4, 3, 0, 5], { proportions: [0.3, 0.3, 0, 0.4] }));
    assert.equal(result.df, 2);
    assert.ok(result.notices.some((n) => n.code === 'dropped-zero-expected'));
  });

  it('refuses negative, fractional and NaN counts, naming the category', () => {
    assert.match(codeOf(() => wordResult(goodnessOfFit([4, -1, 2], { labels: ['a', 'b', 'c'] }))), /category `b`.*found -1/);
    assert.match(codeOf(() => wordResult(goodnessOfFit([4, 1.5, 2]))), /category `category 2`.*found 1\.5/);
    assert.match(codeOf(() => wordResult(goodnessOfFit([NaN, 1, 2]))), /category `category 1`.*found NaN/);
    assert.match(codeOf(() => wordResult(goodnessOfFit([1, 2], { proportions: [0.5, NaN] }))), /category `category 2`: proportions/);
  });

  it('refuses degrees of freedom below 1 from too many estimated parameters', () => {
    assert.match(codeOf(() => wordResult(goodnessOfFit([5, 6, 7], { estimatedParameters: 2 }))), /^no-degrees-of-freedom/);
    assert.equal(wordResult(goodnessOfFit([5, 6, 7, 9], { estimatedParameters: 2 })).df, 1);
  });

  it('refuses conflicting or mismatched expectations with the field named', () => {
    assert.match(codeOf(() => wordResult(goodnessOfFit([1, 2], { proportions: [0.5, 0.5], ratios: [1, 1] }))), /^conflicting-expected/);
    assert.match(codeOf(() => wordResult(goodnessOfFit([1, 2, 3], { ratios: [1, 1] }))), /ratios: expected 3 values/);
    assert.match(codeOf(() => wordResult(goodnessOfFit([0, 0, 0]))), /^empty-observed/);
  });

  it('warns about small expected counts by name (common practice: any below 1, or more than 20% below 5)', () => {
    const result = wordResult(goodnessOfFit([3, 1, 0, 1, 15], { proportions: [0.05, 0.05, 0.05, 0.05, 0.8], labels: ['a', 'b', 'c', 'd', 'e'] }));
    const notice = result.notices.find((n) => n.code === 'small-expected');
    assert.ok(notice, 'small-expected notice');
    assert.match(notice.message, /below 5: a, b, c, d/);
    assert.equal(result.assumptions.find((a) => a.id === 'expected-counts')!.status, 'failed');
    // 1 of 5 categories below 5 (20%, not more) and none below 1: the rule holds.
    const fine = wordResult(goodnessOfFit([4, 10, 10, 10, 10], { proportions: [0.08, 0.23, 0.23, 0.23, 0.23] }));
    assert.equal(fine.assumptions.find((a) => a.id === 'expected-counts')!.status, 'met');
  });

  it('reports an infinite statistic, not NaN, when λ ≤ −1 meets an empty category, and says why', () => {
    const result = wordResult(goodnessOfFit([0, 5, 7], { statistic: 'cressie-read', lambda: -1 }));
    assert.equal(result.statistic, Infinity);
    assert.equal(result.pValue.value, 0);
    assert.ok(result.notices.some((n) => n.code === 'infinite-statistic'));
  });

  it('reports the chosen statistic as the main one and the others beside it', () => {
    const result = wordResult(goodnessOfFit([22, 17, 25, 13, 20, 23], { statistic: 'likelihood-ratio' }));
    assert.equal(result.statisticSymbol, 'G²');
    assert.deepEqual(result.otherStatistics.map((s) => s.id).sort(), ['cressie-read', 'pearson']);
  });
});
