import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { contingencyBayesFactor, goodnessOfFitBayesFactor, type SamplingPlan } from '../../../../src/stats/procedures/bayes-factor';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

/**
 * ln Γ of a count N is about N ln N and carries an absolute rounding error of about 1e-16 of that in any double
 * implementation; the Bayes factor is a difference of such terms. Tolerance on log10 BF: 1e-10 + 4e-16 · N ln N.
 */
function lnGammaTolerance(counts: readonly number[]): number {
  const n = counts.reduce((s, x) => s + x, 0);
  return 1e-10 + 4e-16 * n * Math.log(n + 1);
}

interface BfCase { name: string; table: number[][]; samplingPlan: SamplingPlan; priorConcentration: number; lnBf10: number }
const R = fixture<{ rVersion: string; BayesFactor: string; contingency: BfCase[] }>('R', 'bayesfactor');
const source = `R BayesFactor ${R.BayesFactor} contingencyTableBF`;

describe('Gunel–Dickey Bayes factors for contingency tables', () => {
  it(`match ${source} on every table, plan and prior (log10 BF10 within 1e-9 relative, or the ln Γ rounding of the table's N)`, () => {
    assert.ok(R.contingency.length >= 100, 'fixture has the tables');
    const plans = new Set(R.contingency.map((c) => c.samplingPlan));
    assert.deepEqual([...plans].sort(), ['columns-fixed', 'hypergeometric', 'joint-multinomial', 'poisson', 'rows-fixed']);
    let worst = 0;
    for (const c of R.contingency) {
      const got = contingencyBayesFactor(c.table, c.samplingPlan, c.priorConcentration);
      const expected = c.lnBf10 / Math.LN10;
      closeTo(got.log10Bf10, expected, 1e-9, `${c.name} ${c.samplingPlan} a=${c.priorConcentration} log10 BF10 (${source})`, c.table, lnGammaTolerance(c.table.flat()));
      if (Math.abs(expected) < 300) {
        const rel = Math.abs(got.bf10 - Math.exp(c.lnBf10)) / Math.exp(c.lnBf10);
        worst = Math.max(worst, rel);
      }
      assert.equal(got.samplingPlan, c.samplingPlan);
      assert.equal(got.priorConcentration, c.priorConcentration);
    }
    assert.ok(worst < 1e-8, `largest relative error of BF10 against ${source}: ${worst}`);
    console.log(`      largest relative error of BF10 against ${source}: ${worst.toExponential(2)} over ${R.contingency.length} cases`);
  });

  it('never overflows: a table of 4e9 counts gives a finite log10 BF10 (bf10 is Infinity beyond the double range)', () => {
    const got = contingencyBayesFactor([[1.2e9, 0.8e9], [1.0e9, 1.0e9]], 'joint-multinomial');
    assert.ok(Number.isFinite(got.log10Bf10) && got.log10Bf10 > 300, `log10 BF10 = ${got.log10Bf10}`);
    assert.equal(got.bf10, Infinity);
  });

  it('refuses a hypergeometric plan on a table larger than 2×2 and a non-positive concentration, naming the field', () => {
    assert.throws(() => contingencyBayesFactor([[1, 2, 3], [4, 5, 6]], 'hypergeometric'), (e: unknown) => isInstance(e, InputError) && argumentNamed(e) === 'samplingPlan');
    assert.throws(() => contingencyBayesFactor([[1, 2], [4, 5]], 'poisson', 0), (e: unknown) => isInstance(e, InputError) && /priorConcentration/.test(e.message));
  });
});

interface GofBf { observed: number[]; proportions: number[]; priorConcentration: number; log10Bf10: string }
const MP = fixture<{ mpmath: string; scipy: string; gofBayesFactor: GofBf[] }>('mpmath', 'evidence');

describe('Dirichlet–multinomial Bayes factor for goodness of fit', () => {
  it(`matches the 50-digit mpmath evaluation (mpmath ${MP.mpmath}; scipy dirichlet_multinomial where available)`, () => {
    assert.ok(MP.gofBayesFactor.length >= 10);
    for (const c of MP.gofBayesFactor) {
      const got = goodnessOfFitBayesFactor(c.observed, c.proportions, c.priorConcentration);
      closeTo(got.log10Bf10, Number(c.log10Bf10), 1e-10, `log10 BF10 a=${c.priorConcentration} (mpmath)`, c.observed, lnGammaTolerance(c.observed));
      assert.equal(got.samplingPlan, undefined);
    }
  });
});
