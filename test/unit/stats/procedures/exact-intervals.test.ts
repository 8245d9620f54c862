// Exact conditional intervals against base R (scripts/fixtures/exact_intervals.R; version in the fixture):
// the 2×2 conditional maximum-likelihood odds ratio with fisher.test's conf.int, and McNemar's b/c with
// binom.test's Clopper–Pearson interval mapped by π/(1 − π).
import { strict as assert } from 'node:assert';
import { fisherExact2x2 } from '../../../../src/stats/procedures/fisher2x2';
import { mcnemarTest } from '../../../../src/stats/procedures/paired';
import { independenceTest } from '../../../../src/stats/procedures/table';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

type Bound = number | 'Infinity';
interface FisherCase { table: number[][]; level: number; estimate: Bound; lower: number; upper: Bound }
interface McNemarCase { b: number; c: number; level: number; piLower: number; piUpper: number; ratioLower: number; ratioUpper: Bound }
const R = fixture<{ rVersion: string; fisher: FisherCase[]; mcnemar: McNemarCase[] }>('R', 'exact-intervals');
const bound = (x: Bound): number => (x === 'Infinity' ? Infinity : x);

function present(entry: object, keys: string[]): void {
  for (const k of keys) assert.ok((entry as Record<string, unknown>)[k] !== undefined, `fixture entry ${JSON.stringify(entry)} lacks ${k}`);
}

describe(`exact conditional intervals against R ${R.rVersion}`, () => {
  assert.ok(R.fisher.length >= 20 && R.mcnemar.length >= 20, 'fixture has its cases');
  for (const c of R.fisher) {
    it(`2×2 conditional odds ratio and its ${c.level} interval for ${JSON.stringify(c.table)} (fisher.test)`, () => {
      present(c, ['table', 'level', 'estimate', 'lower', 'upper']);
      const f = fisherExact2x2(c.table, c.level);
      // fisher.test finds both by uniroot at its default tolerance (.Machine$double.eps^0.25 ≈ 1.2e-4 on its
      // search scale), so R's values carry about 4 digits; mpmath checks the bounds to 1e-9 below.
      const estimate = bound(c.estimate);
      if (estimate === 0 || estimate === Infinity) assert.equal(f.conditionalOddsRatio, estimate);
      else closeTo(f.conditionalOddsRatio, estimate, 2e-3, 'conditional MLE', c.table);
      assert.ok(f.conditionalInterval, 'interval present');
      // uniroot searches ψ on [0, 1] and 1/ψ on [0, 1], each to an absolute 1.2e-4: allowed 2.5e-4 on that scale.
      const withinUniroot = (got: number, want: number, what: string): void => {
        if (want === 0 || want === Infinity) return assert.equal(got, want, what);
        const [g, w] = want <= 1 ? [got, want] : [1 / got, 1 / want];
        assert.ok(Math.abs(g - w) <= 2.5e-4, `${what}: R ${want}, ours ${got} (compared on R's search scale, tolerance 2.5e-4)`);
      };
      withinUniroot(f.conditionalInterval.lower, c.lower, 'lower bound');
      withinUniroot(f.conditionalInterval.upper, bound(c.upper), 'upper bound');
    });
  }
  const MP = fixture<{ mpmath: string; cases: { table: number[][]; level: number; lower: number; upper: Bound }[] }>('mpmath', 'fisher_interval');
  for (const c of MP.cases) {
    it(`2×2 exact odds-ratio interval at ${c.level} for ${JSON.stringify(c.table)} matches mpmath ${MP.mpmath} to 1e-9`, () => {
      present(c, ['table', 'level', 'lower', 'upper']);
      const ci = fisherExact2x2(c.table, c.level).conditionalInterval!;
      if (c.lower === 0) assert.equal(ci.lower, 0);
      else closeTo(ci.lower, c.lower, 1e-9, 'lower bound (mpmath bisection at 40 digits)', c);
      if (bound(c.upper) === Infinity) assert.equal(ci.upper, Infinity);
      else closeTo(ci.upper, bound(c.upper), 1e-9, 'upper bound (mpmath bisection at 40 digits)', c);
    });
  }
  for (const c of R.mcnemar) {
    it(`McNemar b/c = ${c.b}/${c.c} and its ${c.level} exact interval (binom.test)`, () => {
      present(c, ['b', 'c', 'level', 'ratioLower', 'ratioUpper']);
      const r = mcnemarTest([[10, c.b], [c.c, 10]], { confidence: c.level });
      const e = r.estimates.find((x) => x.id === 'discordantOddsRatio');
      assert.ok(e?.interval, 'interval present');
      closeTo(e.interval.lower, c.ratioLower, 1e-9, 'lower bound of b/c', c, 1e-300);
      if (bound(c.ratioUpper) === Infinity) assert.equal(e.interval.upper, Infinity);
      else closeTo(e.interval.upper, bound(c.ratioUpper), 1e-9, 'upper bound of b/c', c);
    });
  }
  it('the independence test reports the conditional odds ratio with its exact interval', () => {
    const c = R.fisher.find((x) => x.level === 0.95 && x.table[0][0] === 12)!;
    const r = independenceTest(c.table);
    const e = r.estimates.find((x) => x.id === 'conditionalOddsRatio');
    assert.ok(e?.interval);
    assert.ok(Math.abs(e.interval.lower - c.lower) <= 2.5e-4, `lower: R ${c.lower}, ours ${e.interval.lower}`);
  });
});
