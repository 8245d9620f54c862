import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { bowkerTest, mcnemarTest, pairedTest } from '../../../../src/stats/procedures/paired';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

interface McN {
  name: string; table: number[][]; difference: number; waldLower: number; waldUpper: number; agrestiMinLower: number; agrestiMinUpper: number;
  corrected: number; correctedP: number; uncorrected: number; uncorrectedP: number; exactP: number; midP: number;
}
interface Bow { name: string; table: number[][]; statistic: number; df: number; pValue: number }
const R = fixture<{ rVersion: string; mcnemar: McN[]; bowker: Bow[] }>('R', 'advanced');
const SM = fixture<{ statsmodels: string; mcnemar: { table: number[][]; exactP: number; uncorrected: number; uncorrectedP: number; corrected: number; correctedP: number }[] }>('statsmodels', 'advanced');

describe("McNemar's test", () => {
  it('reproduces the presidential-approval example (Agresti, Introduction to Categorical Data Analysis): X² = 17.36, difference 0.04 (0.021, 0.059)', () => {
    // Published values from memory, confirmed by R mcnemar.test in the fixture.
    const r = mcnemarTest([[794, 150], [86, 570]]);
    closeTo(r.statistic, 17.36, 0, 'X²', 'approval', 0.005);
    closeTo(r.confidenceInterval!.lower, 0.021, 0, 'Wald lower', 'approval', 0.0005);
    closeTo(r.confidenceInterval!.upper, 0.059, 0, 'Wald upper', 'approval', 0.0005);
  });

  for (const c of R.mcnemar) {
    it(`matches R (mcnemar.test, binom.test, pbinom) on ${c.name}`, () => {
      const plain = mcnemarTest(c.table);
      const corrected = mcnemarTest(c.table, { correction: true });
      const exact = mcnemarTest(c.table, { method: 'exact' });
      const mid = mcnemarTest(c.table, { method: 'mid-p' });
      const src = `R ${R.rVersion}`;
      closeTo(plain.statistic, c.uncorrected, 1e-12, `uncorrected X² (${src})`, c.table);
      closeTo(plain.pValue.value, c.uncorrectedP, 1e-10, `uncorrected p (${src})`, c.table);
      closeTo(corrected.statistic, c.corrected, 1e-12, `corrected X² (${src})`, c.table);
      closeTo(corrected.pValue.value, c.correctedP, 1e-10, `corrected p (${src})`, c.table);
      closeTo(exact.pValue.value, c.exactP, 1e-10, `exact binomial p (${src} binom.test)`, c.table);
      closeTo(mid.pValue.value, c.midP, 1e-10, `mid-p (${src} pbinom/dbinom)`, c.table);
      closeTo(plain.estimates[0].value, c.difference, 1e-12, 'difference', c.table);
      closeTo(plain.confidenceInterval!.lower, c.waldLower, 1e-10, 'Wald lower (R arithmetic)', c.table);
      closeTo(plain.confidenceInterval!.upper, c.waldUpper, 1e-10, 'Wald upper (R arithmetic)', c.table);
      closeTo(plain.estimates[1].interval!.lower, c.agrestiMinLower, 1e-10, 'Agresti–Min lower (R arithmetic)', c.table);
      closeTo(plain.estimates[1].interval!.upper, c.agrestiMinUpper, 1e-10, 'Agresti–Min upper (R arithmetic)', c.table);
    });
  }

  for (const c of SM.mcnemar) {
    it(`matches statsmodels ${SM.statsmodels} mcnemar on ${JSON.stringify(c.table)}`, () => {
      closeTo(mcnemarTest(c.table, { method: 'exact' }).pValue.value, c.exactP, 1e-10, 'exact p (statsmodels)', c.table);
      closeTo(mcnemarTest(c.table).pValue.value, c.uncorrectedP, 1e-10, 'uncorrected p (statsmodels)', c.table);
      closeTo(mcnemarTest(c.table, { correction: true }).statistic, c.corrected, 1e-12, 'corrected X² (statsmodels)', c.table);
    });
  }

  it('keeps every version side by side in otherStatistics', () => {
    const r = mcnemarTest([[10, 5], [1, 12]]);
    assert.deepEqual(r.otherStatistics.map((l) => l.id), ['mcnemar-corrected', 'mcnemar-exact', 'mcnemar-mid-p']);
  });

  it('keeps the exact p-value below the double range as a power of ten: 2·2^−2000 for b = 0, c = 2000 (closed form)', () => {
    const r = mcnemarTest([[10, 0], [2000, 10]], { method: 'exact' });
    assert.equal(r.pValue.value, 0);
    closeTo(r.pValue.log10, (1 - 2000) * Math.log10(2), 1e-12, 'log10 p = log10(2) − 2000·log10(2)', 'b = 0, c = 2000');
  });

  const MID = fixture<{ rVersion: string; cases: { b: number; c: number; log10MidP: number; midP: number }[] }>('R', 'mcnemar-midp-log');
  for (const c of MID.cases) {
    it(`keeps log10 of the mid-p value for b = ${c.b}, c = ${c.c} (R ${MID.rVersion} pbinom/dbinom with log.p, summed in logs)`, () => {
      const r = mcnemarTest([[15, c.b], [c.c, 9]], { method: 'mid-p' });
      // R ${MID.rVersion}: ln(2·pbinom(low − 1, m, ½) + dbinom(low, m, ½)) from log.p = TRUE / log = TRUE terms.
      // Relative 1e-14: each ln pmf term comes from Loader's saddle-point form, so no ln m! of size 1e4 cancels
      // (measured ≤ 1.5e-15 relative; with ln C(m, k) + k ln ½ + … it was 1.1e-12 at b = 1200, c = 1300).
      closeTo(r.pValue.log10, c.log10MidP, 1e-14, 'log10 mid-p', c, 1e-14);
      closeTo(r.pValue.value, c.midP, 1e-13, 'mid-p value', c);
    });
  }

  it('the mid-p for b = 0 is P(X = 0) = 2^−3000 (closed form), log10 = −3000·log10 2', () => {
    const r = mcnemarTest([[15, 0], [3000, 9]], { method: 'mid-p' });
    assert.equal(r.pValue.value, 0);
    closeTo(r.pValue.log10, -3000 * Math.log10(2), 1e-13, 'log10 mid-p', 'b = 0, c = 3000');
  });

  it('reports p = 1 with a warning when no pair changed', () => {
    const r = mcnemarTest([[5, 0], [0, 7]]);
    assert.equal(r.pValue.value, 1);
    assert.ok(r.notices.some((n) => n.code === 'no-discordant-pairs'));
  });

  it('refuses a non-square table and names the shape', () => {
    assert.throws(() => pairedTest([[1, 2, 3], [4, 5, 6]]), (e: unknown) => isInstance(e, InputError) && /2×3/.test(e.message));
  });
});

describe("Bowker's test of symmetry", () => {
  for (const c of R.bowker) {
    it(`matches R mcnemar.test on the ${c.table.length}×${c.table.length} table ${c.name}`, () => {
      const r = pairedTest(c.table);
      closeTo(r.statistic, c.statistic, 1e-12, `Bowker X² (R ${R.rVersion})`, c.table);
      assert.equal(r.df, c.df);
      closeTo(r.pValue.value, c.pValue, 1e-10, 'Bowker p', c.table);
    });
  }

  it('leaves pairs of categories with no moves out of the degrees of freedom and says so', () => {
    const r = bowkerTest([[5, 0, 3], [0, 6, 1], [1, 4, 7]]);
    assert.equal(r.df, 2);
    assert.ok(r.notices.some((n) => n.code === 'empty-pairs-dropped'));
  });
});
