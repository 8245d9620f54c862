import { strict as assert } from 'node:assert';
import { MomentAccumulator } from '../../../../src/stats/moments';
import type { Alternative } from '../../../../src/stats/result';
import { type VarianceTestOptions, varianceTestFromMoments, varianceTestFromSummary, varianceTestFromValues } from '../../../../src/stats/procedures/variance';
import { assertClose, type FixtureNumber } from '../../tolerance';
import { errorOf, loadFixture } from '../../fixtures';
import { argumentNamed } from '../argument';

interface VarianceCase {
  name: string;
  alternative: Alternative;
  confidence: number;
  sigma0?: number;
  variance0?: number;
  values?: number[];
  summary?: { n: number; sd: number } | { n: number; variance: number };
  n: number;
  df: number;
  statistic: number;
  pValue: number;
  log10: number;
  sampleVariance: number;
  interval: [FixtureNumber, FixtureNumber];
  skewness?: number;
  excessKurtosis?: number;
  bonett?: [FixtureNumber, FixtureNumber];
}

// scipy 1.10 chi2.ppf / chi2.isf for the intervals, mpmath regularized gamma for the p-values, G1 and G2 at 40 digits
// (checked in the script against scipy skew/kurtosis with bias=False), and Bonett's interval from its published formula in mpmath with scipy's trim_mean
// (test/fixtures/scipy/variance.json, written by scripts/fixtures/procedures.py).
const fixture = loadFixture<VarianceCase>('scipy', 'variance.json');

function run(c: VarianceCase) {
  const options: VarianceTestOptions = {
    ...(c.sigma0 !== undefined ? { sigma0: c.sigma0 } : { variance0: c.variance0 }),
    alternative: c.alternative,
    confidence: c.confidence,
  };
  return c.values ? varianceTestFromValues(c.values, options) : varianceTestFromSummary(c.summary!, options);
}


describe('chi-square test for one variance', () => {
  describe(`against scipy ${fixture.versions.scipy} and mpmath ${fixture.versions.mpmath}`, () => {
    for (const c of fixture.cases) {
      it(`matches the statistic, p-value and interval for "${c.name}"`, () => {
        const result = run(c);
        assert.equal(result.df, c.df);
        assertClose(result.statistic, c.statistic, { rel: 1e-12 }, `${c.name}: statistic`);
        assertClose(result.pValue.value, c.pValue, { rel: 1e-11, abs: 1e-300 }, `${c.name}: p vs mpmath`);
        assertClose(result.pValue.log10, c.log10, { rel: 1e-10, abs: 1e-12 }, `${c.name}: log10 p vs mpmath`);
        assertClose(result.confidenceInterval!.lower, c.interval[0], { rel: 1e-10 }, `${c.name}: interval lower vs scipy chi2`);
        assertClose(result.confidenceInterval!.upper, c.interval[1], { rel: 1e-10 }, `${c.name}: interval upper vs scipy chi2`);
      });

      if (c.skewness !== undefined) {
        it(`matches skewness, excess kurtosis and Bonett's interval for "${c.name}"`, () => {
          const result = run(c);
          const estimate = (id: string) => result.estimates.find((e) => e.id === id);
          assertClose(estimate('skewness')!.value, c.skewness!, { rel: 1e-9, abs: 1e-12 }, `${c.name}: skewness vs mpmath G1`);
          assertClose(estimate('excessKurtosis')!.value, c.excessKurtosis!, { rel: 1e-9, abs: 1e-12 }, `${c.name}: excess kurtosis vs mpmath G2`);
          if (c.bonett) {
            const bonett = estimate('varianceBonett')!.interval!;
            assertClose(bonett.lower, c.bonett[0], { rel: 1e-9 }, `${c.name}: Bonett lower vs mpmath`);
            assertClose(bonett.upper, c.bonett[1], { rel: 1e-9 }, `${c.name}: Bonett upper vs mpmath`);
            assertClose(estimate('sdBonett')!.interval!.upper, Math.sqrt(bonett.upper), { rel: 1e-15 }, `${c.name}: Bonett σ from σ²`);
          }
        });
      }
    }
  });

  it("reproduces Montgomery & Runger's bottle-fill example: χ² = 29.07 on 19 df, p ≈ 0.065, upper bound 0.0287", () => {
    // Montgomery & Runger, Applied Statistics and Probability for Engineers (n = 20, s² = 0.0153, σ0² = 0.01),
    // values from memory, confirmed against scipy/mpmath in the fixture. The 0.0287 is the one-sided 95% UPPER
    // bound (s²·19/χ²₀.₉₅,₁₉ with the lower 5% point 10.117), so it goes with alternative 'less', not 'greater'.
    const greater = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'greater' });
    assertClose(greater.statistic, 29.07, { rel: 1e-12 }, 'bottle fill χ²');
    assert.equal(greater.df, 19);
    assertClose(greater.pValue.value, 0.065, { rel: 0, abs: 0.0005 }, 'bottle fill p');
    const upper = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'less' });
    assert.equal(upper.confidenceInterval!.lower, 0);
    assertClose(upper.confidenceInterval!.upper, 0.0287, { rel: 0, abs: 0.00005 }, 'bottle fill 95% upper bound for σ²');
    assert.equal(greater.confidenceInterval!.upper, Infinity);
  });

  it('gives the same result from values, from streamed moments and from a summary', () => {
    const values = [4.1, 5.3, 3.8, 6.0, 5.1, 4.4, 4.9, 5.6];
    const options: VarianceTestOptions = { sigma0: 0.5 };
    const fromValues = varianceTestFromValues(values, options);
    const fromMoments = varianceTestFromMoments(MomentAccumulator.of(values).summary(), options);
    const s = Math.sqrt(fromValues.estimates.find((e) => e.id === 'variance')!.value);
    const fromSummary = varianceTestFromSummary({ n: values.length, sd: s }, options);
    assertClose(fromMoments.statistic, fromValues.statistic, { rel: 1e-14 }, 'moments vs values');
    assertClose(fromSummary.statistic, fromValues.statistic, { rel: 1e-14 }, 'summary vs values');
    assertClose(fromMoments.pValue.value, fromValues.pValue.value, { rel: 1e-13 }, 'p moments vs values');
  });

  it("computes Bonett's interval from moments around the mean and says so", () => {
    const values = [4.1, 5.3, 3.8, 6.0, 5.1, 4.4, 4.9, 5.6, 9.8, 4.7];
    const result = varianceTestFromMoments(MomentAccumulator.of(values).summary(), { sigma0: 1 });
    const bonett = result.estimates.find((e) => e.id === 'varianceBonett')!;
    assert.match(bonett.note!, /around the mean rather than the trimmed mean/);
    // Same formula with γ4 = n·m4/m2² (Bonett 2006, untrimmed), evaluated here by hand.
    const n = values.length;
    const mean = values.reduce((a, b) => a + b, 0) / n;
    const m2 = values.reduce((a, x) => a + (x - mean) ** 2, 0);
    const m4 = values.reduce((a, x) => a + (x - mean) ** 4, 0);
    const z = 1.959963984540054;
    const c = n / (n - z);
    const se = c * Math.sqrt(((n * m4) / (m2 * m2) - (n - 3) / n) / (n - 1));
    assertClose(bonett.interval!.upper, Math.exp(Math.log((c * m2) / (n - 1)) + z * se), { rel: 1e-12 }, 'Bonett upper from moments');
  });

  it('states the two-sided convention: twice the smaller tail, capped at 1', () => {
    const result = varianceTestFromSummary({ n: 10, sd: 1 }, { sigma0: 1 });
    assert.ok(result.notices.some((n) => n.code === 'two-sided-convention' && /2 × the smaller tail/.test(n.message)));
    assert.ok(result.pValue.value <= 1);
  });

  it('warns plainly about non-normality and flags heavy tails in the normality assumption', () => {
    const heavy = fixture.cases.find((c) => c.name === 'raw heavy tails')!;
    const result = run(heavy);
    assert.ok(result.notices.some((n) => n.code === 'normality-sensitive' && /very sensitive/.test(n.message)));
    const normality = result.assumptions.find((a) => a.id === 'normality')!;
    assert.equal(normality.status, 'failed');
    assert.match(normality.alternative!, /Bonett/);
  });

  it('warns when the robust interval and the chi-square interval disagree about σ0', () => {
    // One far value: the chi-square test finds σ > 1, Bonett's interval (kurtosis 6) does not exclude 1.
    const values = [4.1, 5.3, 3.8, 6.0, 5.1, 4.4, 4.9, 5.6, 9.8, 4.7];
    const skewed = varianceTestFromValues(values, { sigma0: 1, alternative: 'greater' });
    assert.ok(skewed.confidenceInterval!.lower > 1 && skewed.estimates.find((e) => e.id === 'varianceBonett')!.interval!.lower < 1);
    assert.ok(skewed.notices.some((n) => n.code === 'robust-disagrees' && /excludes σ0 = 1, but Bonett's robust interval .* contains it/.test(n.message)));
    const calm = varianceTestFromValues([4.1, 5.3, 3.8, 6.0, 5.1, 4.4, 4.9, 5.6, 5.2, 4.7], { sigma0: 0.7 });
    assert.ok(!calm.notices.some((n) => n.code === 'robust-disagrees'));
  });

  it('leaves normality unchecked, saying why, when streamed moments carry no third and fourth moments', () => {
    const moments = { n: 500, mean: 3, m2: 998, m3: NaN, m4: NaN, min: NaN, max: NaN };
    const normality = varianceTestFromMoments(moments, { sigma0: 1.5 }).assumptions.find((a) => a.id === 'normality')!;
    assert.equal(normality.status, 'unchecked');
    assert.match(normality.explanation, /third and fourth moments were not available/);
  });

  it('leaves normality unchecked for a summary and independence unchecked always', () => {
    const result = varianceTestFromSummary({ n: 30, sd: 2 }, { sigma0: 2 });
    assert.equal(result.assumptions.find((a) => a.id === 'normality')!.status, 'unchecked');
    assert.equal(result.assumptions.find((a) => a.id === 'independence')!.status, 'unchecked');
  });

  it('writes a conclusion in plain words that names the direction', () => {
    const result = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'greater', alpha: 0.1 });
    assert.match(result.conclusion, /^The population variance is larger than σ0² = 0\.01 at the 10% level/);
    const not = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'greater' });
    assert.match(not.conclusion, /^The data do not show that the population variance exceeds/);
  });

  it('names the measured variable and its unit in the conclusion, squaring the unit for a variance', () => {
    // Montgomery & Runger bottle fill (n = 20, s² = 0.0153, σ0² = 0.01): significant at 10%, one-sided (p = 0.065).
    const byVariance = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'greater', alpha: 0.1, variable: 'fill volume', unit: 'L' });
    assert.match(byVariance.conclusion, /^The population variance of `fill volume` is larger than σ0² = 0\.01 L² at the 10% level \(s² = 0\.0153 L², p = 0\.065\)/);
    const bySd = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { sigma0: 0.1, alternative: 'greater', variable: 'fill volume', unit: 'L' });
    assert.match(bySd.conclusion, /^The data do not show that the population standard deviation of `fill volume` exceeds σ0 = 0\.1 L at the 5% level \(s = 0\.1237 L,/);
    const compound = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, unit: 'g/cm' });
    assert.match(compound.conclusion, /σ0² = 0\.01 \(g\/cm\)²/);
    // Blank names and units leave the generic wording.
    const generic = varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, variable: '  ', unit: '' });
    assert.match(generic.conclusion, /^The data do not show that the population variance differs from σ0² = 0\.01 at the 5% level \(s² = 0\.0153,/);
  });

  it('refuses bad input with the field named', () => {
    assert.match(errorOf(() => varianceTestFromValues([1, 2, NaN], { sigma0: 1 })).message, /value 3: expected a finite number, found NaN/);
    assert.equal(errorOf(() => varianceTestFromValues([1], { sigma0: 1 })).code, 'too-few-values');
    assert.equal(errorOf(() => varianceTestFromValues([1, 2], {})).code, 'invalid-hypothesis');
    assert.equal(errorOf(() => varianceTestFromValues([1, 2], { sigma0: 1, variance0: 1 })).code, 'invalid-hypothesis');
    assert.match(errorOf(() => varianceTestFromValues([1, 2], { sigma0: -1 })).message, /sigma0: expected a finite number > 0/);
    assert.equal(argumentNamed(errorOf(() => varianceTestFromSummary({ n: 5, sd: -2 }, { sigma0: 1 }))), 'summary.sd');
    assert.equal(errorOf(() => varianceTestFromSummary({ n: 2.5, sd: 2 }, { sigma0: 1 })).code, 'too-few-values');
    assert.equal(errorOf(() => varianceTestFromValues([1, 2, 3], { sigma0: 1, confidence: 95 })).code, 'invalid-confidence');
    assert.equal(errorOf(() => varianceTestFromValues([1, 2, 3], { sigma0: 1, alternative: 'up' as Alternative })).code, 'invalid-alternative');
    const moments = errorOf(() => varianceTestFromMoments({ ...MomentAccumulator.of([1, 2, 3]).summary(), m2: NaN }, { sigma0: 1, variable: 'fill_ml' }));
    assert.equal(moments.code, 'invalid-moments');
    assert.equal(moments.message, 'moments of fill_ml: expected a finite sum of squared deviations ≥ 0, found NaN');
    assert.equal(argumentNamed(moments), 'moments.m2');
  });
});
