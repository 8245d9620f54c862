import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { distributionFitTest, poolAdjacent } from '../../../../src/stats/procedures/distfit';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

const SP = fixture<{
  scipy: string;
  poissonFit: { values: number[]; lambda: number; binCounts: number[]; binExpected: number[] };
  binomialFit: { values: number[]; trials: number; p: number; binExpected: number[] };
  geometricFit: { values: number[]; p: number; pmf: number[] };
  normalFit: { values: number[]; mean: number; sd: number; cuts: number[]; cdfAtCuts: number[] };
}>('statsmodels', 'advanced');

type RawBin = { label: string; observed: number; expected: number };
const rawBins = (r: ReturnType<typeof distributionFitTest>) => r.details!.bins as RawBin[];

describe('goodness of fit to a distribution with estimated parameters', () => {
  it(`Poisson: λ and the expected count of every bin match scipy ${SP.scipy} (poisson.pmf, last bin poisson.sf)`, () => {
    const c = SP.poissonFit;
    const r = distributionFitTest(c.values, { family: 'poisson' });
    closeTo(r.estimates[0].value, c.lambda, 1e-14, 'λ', c.values);
    rawBins(r).forEach((b, k) => {
      assert.equal(b.observed, c.binCounts[k]);
      closeTo(b.expected, c.binExpected[k], 1e-10, `expected in bin ${b.label}`, c.values);
    });
    assert.equal(r.df, r.categories!.length - 2);
    assert.ok(r.notices.some((n) => n.code === 'bins-pooled'));
  });

  it(`binomial with 5 trials: expected counts match scipy binom.pmf`, () => {
    const c = SP.binomialFit;
    const r = distributionFitTest(c.values, { family: 'binomial', trials: c.trials });
    closeTo(r.estimates[0].value, c.p, 1e-14, 'p', c.values);
    rawBins(r).forEach((b, k) => closeTo(b.expected, c.binExpected[k] , 1e-10, `bin ${b.label}`, c.values));
  });

  it('geometric (failures before the first success): bin probabilities match scipy geom.pmf(k + 1)', () => {
    const c = SP.geometricFit;
    const r = distributionFitTest(c.values, { family: 'geometric' });
    closeTo(r.estimates[0].value, c.p, 1e-14, 'p', c.values);
    const bins = rawBins(r);
    bins.slice(0, -1).forEach((b, k) => closeTo(b.expected / c.values.length, c.pmf[k], 1e-12, `P(X = ${k})`, c.values));
    // Last bin: the whole upper tail, 1 − Σ pmf below it.
    const below = c.pmf.slice(0, bins.length - 1).reduce((a, b) => a + b, 0);
    closeTo(bins[bins.length - 1].expected / c.values.length, 1 - below, 1e-12, 'upper tail', c.values);
  });

  it('normal with given cut points: μ, σ (divisor n) and bin probabilities match scipy norm.cdf', () => {
    const c = SP.normalFit;
    const r = distributionFitTest(c.values, { family: 'normal', cuts: c.cuts });
    closeTo(r.estimates[0].value, c.mean, 1e-13, 'μ', 'normal sample');
    closeTo(r.estimates[1].value, c.sd, 1e-13, 'σ', 'normal sample');
    const n = c.values.length;
    const cdf = [0, ...c.cdfAtCuts, 1];
    rawBins(r).forEach((b, k) => closeTo(b.expected / n, cdf[k + 1] - cdf[k], 1e-11, `P(bin ${b.label})`, c.cuts));
    assert.equal(r.df, r.categories!.length - 3);
  });

  it('normal without cut points uses equiprobable bins and says so', () => {
    const r = distributionFitTest(SP.normalFit.values, { family: 'normal' });
    assert.ok(r.notices.some((n) => n.code === 'equiprobable-bins'));
    const e = rawBins(r).map((b) => b.expected);
    e.forEach((x) => closeTo(x, e[0], 1e-9, 'equal expected counts', 'normal sample'));
  });

  it('pools adjacent bins left to right and folds a short last group into its neighbour', () => {
    const groups = poolAdjacent(
      [
        { label: '0', observed: 1, expected: 2 },
        { label: '1', observed: 4, expected: 4 },
        { label: '2', observed: 9, expected: 8 },
        { label: '3', observed: 2, expected: 3 },
        { label: '≥ 4', observed: 1, expected: 1 },
      ],
      5,
    );
    assert.deepEqual(groups.map((g) => g.label), ['0–1', '≥ 2']);
    assert.deepEqual(groups.map((g) => g.observed), [5, 12]);
  });

  it('refuses negative or fractional counts for a discrete family, naming the value', () => {
    assert.throws(() => distributionFitTest([1, 2, 2.5, 3], { family: 'poisson' }), (e: unknown) => isInstance(e, InputError) && argumentNamed(e) === 'values[2]');
    assert.throws(() => distributionFitTest([1, 2, 7], { family: 'binomial', trials: 5 }), (e: unknown) => isInstance(e, InputError) && /0 to 5/.test(e.message));
  });

  it('refuses data too few to leave a degree of freedom after pooling', () => {
    assert.throws(() => distributionFitTest([0, 1, 1, 2, 0, 1], { family: 'poisson' }), (e: unknown) => isInstance(e, InputError) && e.code === 'too-few-bins');
  });
});
