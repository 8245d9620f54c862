// Distribution fits whose support is huge (binomial trials 1e9, Poisson or geometric values of 1e9 and 1e15):
// the tails whose expected counts would be pooled anyway are gathered first, so the work is bounded by
// MAX_DISCRETE_BINS whatever the values. Gathering is checked against binning value by value (singleBinsUpTo: 0
// against the default) on data where both are possible; the value-by-value bins are checked against scipy in
// distfit.test.ts.
import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { distributionFitTest, MAX_DISCRETE_BINS, type FitFamily } from '../../../../src/stats/procedures/distfit';
import { closeTo } from '../../tolerance';
import { argumentNamed } from '../argument';

/** Deterministic values spread like the family (a fixed linear congruential sequence, not a reference). */
function spread(n: number, centre: number, width: number): number[] {
  let s = 12345;
  return Array.from({ length: n }, () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return Math.max(0, Math.round(centre + width * ((s / 2147483648) * 2 - 1)));
  });
}

function refusedWith(run: () => unknown, code: string, argument: string): InputError {
  let error: unknown;
  try {
    run();
  } catch (e) {
    error = e;
  }
  assert.ok(isInstance(error, InputError), `expected an InputError, got ${String(error)}`);
  assert.equal(error.code, code, error.message);
  assert.equal(argumentNamed(error), argument);
  return error;
}

describe('distribution fits over a wide support', () => {
  const cases: { family: FitFamily; values: number[]; trials?: number }[] = [
    { family: 'poisson', values: spread(400, 30, 12) },
    { family: 'binomial', values: spread(400, 50, 15), trials: 120 },
    { family: 'geometric', values: spread(400, 4, 4) },
  ];
  for (const c of cases) {
    it(`gathering the tails first gives the same pooled groups and X² as value-by-value bins (${c.family})`, () => {
      const plain = distributionFitTest(c.values, { family: c.family, trials: c.trials });
      const gathered = distributionFitTest(c.values, { family: c.family, trials: c.trials, singleBinsUpTo: 0 });
      assert.deepEqual(gathered.categories!.map((g) => g.observed), plain.categories!.map((g) => g.observed));
      gathered.categories!.forEach((g, i) => closeTo(g.expected, plain.categories![i].expected, 1e-9, `expected count of group ${i}`, c));
      closeTo(gathered.statistic, plain.statistic, 1e-9, 'X²', c);
      assert.equal(gathered.df, plain.df);
    });
  }

  it('fits a binomial with 1e9 trials (values around 5e8) without a bin per trial', () => {
    const values = spread(300, 5e8, 4e4);
    const r = distributionFitTest(values, { family: 'binomial', trials: 1e9 });
    assert.ok(Number.isFinite(r.statistic) && (r.df ?? 0) >= 1);
    assert.equal(r.categories!.reduce((a, g) => a + g.observed, 0), 300);
    closeTo(r.categories!.reduce((a, g) => a + g.expected, 0), 300, 1e-9, 'expected counts total n', 'binomial 1e9');
  });

  it('refuses a Poisson fit whose values include 1e9 with a located message (too few bins), not an out-of-memory crash', () => {
    refusedWith(() => distributionFitTest([1, 2, 3, 1e9], { family: 'poisson' }), 'too-few-bins', 'values');
  });

  it('refuses a geometric fit whose values include 1e15 with a located message, not "Invalid array length"', () => {
    refusedWith(() => distributionFitTest([1, 2, 3, 1e15], { family: 'geometric' }), 'too-few-bins', 'values');
  });

  it(`refuses a fit whose distribution spreads over more than ${MAX_DISCRETE_BINS} values that matter, and accepts a narrower one`, () => {
    // Geometric with mean 4e4: about 4e4·ln(n/5) values carry an expected count worth a bin.
    const wide = spread(2000, 2e5, 2e5);
    const e = refusedWith(() => distributionFitTest(wide, { family: 'geometric' }), 'too-many-bins', 'values');
    assert.match(e.message, /100000 bins/);
    const inside = spread(2000, 2e4, 2e4);
    assert.ok(Number.isFinite(distributionFitTest(inside, { family: 'geometric' }).statistic));
  });

  it('refuses binomial trials above 2^53 − 1 and a count value above it', () => {
    refusedWith(() => distributionFitTest([1, 2, 3], { family: 'binomial', trials: 2 ** 54 }), 'invalid-trials', 'trials');
    refusedWith(() => distributionFitTest([1, 2, 1e16], { family: 'poisson' }), 'invalid-value', 'values[2]');
  });
});
