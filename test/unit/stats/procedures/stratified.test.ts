import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { stratifiedTest } from '../../../../src/stats/procedures/stratified';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

interface Cmh {
  name: string; strata: number[][][]; corrected: number; correctedP: number; uncorrected: number; uncorrectedP: number;
  commonOddsRatio: number; ciLower: number; ciUpper: number; exactP: number; exactConditionalOddsRatio: number; exactLower: number; exactUpper: number;
}
interface Gcmh { name: string; strata: number[][][]; statistic: number; df: number; pValue: number }
interface Lbl { name: string; table: number[][]; rowScores: number[]; columnScores: number[]; statistic: number; rowMeanScores: number; rowMeanScoresDf: number }
const R = fixture<{ rVersion: string; cmh: Cmh[]; generalizedCmh: Gcmh[]; linearByLinear: Lbl[] }>('R', 'advanced');
interface Sm {
  name: string; strata: number[][][]; pooledOddsRatio: number; logOddsRatioSe: number; ciLower: number; ciUpper: number;
  breslowDay: number; breslowDayP: number; tarone: number; taroneP: number; cmh: number; cmhP: number; cmhCorrected: number;
}
const SM = fixture<{ statsmodels: string; stratified: Sm[] }>('statsmodels', 'advanced');

const other = (r: ReturnType<typeof stratifiedTest>, id: string) => r.otherStatistics.find((l) => l.id === id)!;

describe('Cochran–Mantel–Haenszel test (2×2×K)', () => {
  it("reproduces R's own help example, the penicillin and rabbits data: X² = 3.9286, p = 0.04747, OR 7 (1.026713, 47.725133)", () => {
    // Values printed by example(mantelhaen.test) in R 4.2.2 (data from Agresti 1990, pp. 231–237).
    const c = R.cmh.find((x) => x.name === 'rabbits')!;
    const r = stratifiedTest(c.strata, { correction: true });
    closeTo(r.statistic, 3.9286, 0, 'corrected X²', c.strata, 5e-5);
    closeTo(r.pValue.value, 0.04747, 0, 'p', c.strata, 5e-6);
    closeTo(r.estimates[0].value, 7, 1e-12, 'MH odds ratio', c.strata);
    closeTo(r.confidenceInterval!.lower, 1.026713, 0, 'lower', c.strata, 5e-7);
    closeTo(r.confidenceInterval!.upper, 47.725133, 0, 'upper', c.strata, 5e-6);
  });

  for (const c of R.cmh) {
    it(`matches R mantelhaen.test (asymptotic, corrected, exact) on ${c.name}`, () => {
      const src = `R ${R.rVersion} mantelhaen.test`;
      const plain = stratifiedTest(c.strata);
      const corrected = stratifiedTest(c.strata, { correction: true });
      const exact = stratifiedTest(c.strata, { method: 'exact' });
      closeTo(plain.statistic, c.uncorrected, 1e-10, `uncorrected (${src})`, c.strata);
      closeTo(plain.pValue.value, c.uncorrectedP, 1e-9, `uncorrected p (${src})`, c.strata);
      closeTo(corrected.statistic, c.corrected, 1e-10, `corrected (${src})`, c.strata);
      closeTo(corrected.pValue.value, c.correctedP, 1e-9, `corrected p (${src})`, c.strata);
      closeTo(plain.estimates[0].value, c.commonOddsRatio, 1e-12, `MH odds ratio (${src})`, c.strata);
      closeTo(plain.confidenceInterval!.lower, c.ciLower, 1e-9, `RBG lower (${src})`, c.strata);
      closeTo(plain.confidenceInterval!.upper, c.ciUpper, 1e-9, `RBG upper (${src})`, c.strata);
      closeTo(exact.pValue.value, c.exactP, 1e-9, `exact conditional p (${src}, exact = TRUE)`, c.strata);
      // R finds the conditional MLE with uniroot at its default tolerance (about 1.2e-4), so only 1e-4 is asked.
      closeTo(exact.estimates[1].value, c.exactConditionalOddsRatio, 1e-4, `conditional MLE (${src}, exact = TRUE)`, c.strata);
      // R solves for the interval ends with uniroot on ψ (ψ < 1) or 1/ψ (ψ > 1), absolute tolerance about 1.2e-4.
      const onRScale = (v: number): number => (v > 1 ? 1 / v : v);
      const interval = exact.estimates[1].interval!;
      closeTo(onRScale(interval.lower), onRScale(c.exactLower), 0, `exact lower (${src})`, c.strata, 2e-4);
      closeTo(onRScale(interval.upper), onRScale(c.exactUpper), 0, `exact upper (${src})`, c.strata, 2e-4);
    });
  }

  for (const c of SM.stratified) {
    it(`matches statsmodels ${SM.statsmodels} StratifiedTable on ${c.name} (RBG interval, Breslow–Day, Tarone)`, () => {
      const r = stratifiedTest(c.strata);
      closeTo(r.estimates[0].value, c.pooledOddsRatio, 1e-12, 'pooled OR', c.strata);
      closeTo(r.confidenceInterval!.lower, c.ciLower, 1e-9, 'RBG lower', c.strata);
      closeTo(r.confidenceInterval!.upper, c.ciUpper, 1e-9, 'RBG upper', c.strata);
      closeTo(other(r, 'breslow-day').statistic, c.breslowDay, 1e-7, 'Breslow–Day', c.strata);
      closeTo(other(r, 'breslow-day').pValue.value, c.breslowDayP, 1e-6, 'Breslow–Day p', c.strata);
      closeTo(other(r, 'breslow-day-tarone').statistic, c.tarone, 1e-7, 'Tarone', c.strata);
      closeTo(other(r, 'breslow-day-tarone').pValue.value, c.taroneP, 1e-6, 'Tarone p', c.strata);
      closeTo(r.statistic, c.cmh, 1e-10, 'CMH', c.strata);
      closeTo(stratifiedTest(c.strata, { correction: true }).statistic, c.cmhCorrected, 1e-10, 'CMH corrected', c.strata);
    });
  }

  it('names the row and column variables in the conclusion when they are known, and stays generic otherwise', () => {
    // Rabbits data: R 4.2.2 example(mantelhaen.test) gives corrected p = 0.04747, below 0.05 and above 0.01.
    const c = R.cmh.find((x) => x.name === 'rabbits')!;
    const named = { correction: true, rowVariable: 'delay', columnVariable: 'response' };
    const r = stratifiedTest(c.strata, named);
    assert.match(r.conclusion, /^Within strata, `delay` and `response` are associated at the 5% level \(p = 0\.047\); the common odds ratio is about 7\.00\.$/, r.conclusion);
    const strict = stratifiedTest(c.strata, { ...named, alpha: 0.01 });
    assert.match(strict.conclusion, /^The data do not show an association between `delay` and `response` within strata at the 1% level/, strict.conclusion);
    assert.match(stratifiedTest(c.strata, { correction: true }).conclusion, /^Within strata, the row and column variables are associated/);
    assert.match(stratifiedTest(c.strata, { correction: true, columnVariable: ' ' }).conclusion, /the row and column variables/);
    const general = R.generalizedCmh[0];
    const rc = stratifiedTest(general.strata, { rowVariable: 'shift', columnVariable: 'defect' });
    assert.match(rc.conclusion, /`shift` and `defect`/, rc.conclusion);
    assert.doesNotMatch(rc.conclusion, /row and column variables/);
  });

  it('warns when the odds ratios differ between strata', () => {
    const c = SM.stratified.find((x) => x.name === 'heterogeneous')!;
    assert.ok(stratifiedTest(c.strata).notices.some((n) => n.code === 'heterogeneous-odds-ratios'));
  });

  it('reports an infinite common odds ratio without a NaN interval, and says why', () => {
    const r = stratifiedTest([[[2, 0], [0, 3]], [[4, 0], [0, 2]]]);
    assert.equal(r.estimates[0].value, Infinity);
    assert.equal(r.confidenceInterval, undefined);
    assert.ok(r.notices.some((n) => n.code === 'odds-ratio-not-finite'));
    assert.ok(!r.otherStatistics.some((l) => l.id.startsWith('breslow-day')));
  });

  it('has no Breslow–Day test when only one stratum has a count that can vary, and says so', () => {
    // Hand-derived: the second stratum has a zero column total, so a_2 = 3 is fixed by its margins; one informative
    // stratum leaves K* − 1 = 0 degrees of freedom, i.e. nothing to test (the old code reported it on df 1).
    const r = stratifiedTest([[[5, 2], [3, 6]], [[3, 0], [2, 0]]]);
    assert.equal(r.estimates[0].value, 5); // (5·6/16) / (2·3/16), the second stratum adds 0 to both sums
    assert.ok(!r.otherStatistics.some((l) => l.id.startsWith('breslow-day')), JSON.stringify(r.otherStatistics.map((l) => [l.id, l.df])));
    assert.ok(r.notices.some((n) => n.code === 'homogeneity-not-tested'));
    assert.equal(r.assumptions.find((a) => a.id === 'common-odds-ratio')!.status, 'unchecked');
  });

  it('names the stratum with a bad count', () => {
    assert.throws(
      () => stratifiedTest([[[1, 2], [3, 4]], [[1, -2], [3, 4]]], { stratumLabels: ['north', 'south'] }),
      (e: unknown) => isInstance(e, InputError) && /south/.test(e.message) && argumentNamed(e) === 'strata[1][0][1]',
    );
  });

  it('refuses strata of different shapes', () => {
    assert.throws(() => stratifiedTest([[[1, 2], [3, 4]], [[1, 2, 3], [3, 4, 5]]]), (e: unknown) => isInstance(e, InputError) && e.code === 'wrong-shape');
  });
});

describe('generalized CMH (R×C×K)', () => {
  for (const c of R.generalizedCmh) {
    it(`general association matches R mantelhaen.test on ${c.name}`, () => {
      const r = stratifiedTest(c.strata);
      closeTo(r.statistic, c.statistic, 1e-9, `general association (R ${R.rVersion})`, c.strata);
      assert.equal(r.df, c.df);
      closeTo(r.pValue.value, c.pValue, 1e-8, 'p', c.strata);
    });
  }

  for (const c of R.linearByLinear) {
    it(`the correlation statistic with one stratum equals (N − 1)r² from R cor() on ${c.name}`, () => {
      const r = stratifiedTest([c.table], { rowScores: c.rowScores, columnScores: c.columnScores });
      closeTo(r.otherStatistics.find((l) => l.id === 'cmh-correlation')!.statistic, c.statistic, 1e-9, '(N − 1) r² (R cor)', c);
    });
    it(`the row-mean-scores statistic with one stratum equals (N − 1)·SSB/SST from R aov on ${c.name}`, () => {
      const r = stratifiedTest([c.table], { rowScores: c.rowScores, columnScores: c.columnScores });
      const line = r.otherStatistics.find((l) => l.id === 'cmh-row-means')!;
      closeTo(line.statistic, c.rowMeanScores, 1e-9, 'row mean scores (R aov)', c);
      assert.equal(line.df, c.rowMeanScoresDf);
    });
  }
});
