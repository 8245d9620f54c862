import { strict as assert } from 'node:assert';
import { wordResult } from '../../../../src/report/words/result';
import { InputError } from '../../../../src/errors';
import { powerAnalysis } from '../../../../src/stats/procedures/power';
import type { Alternative } from '../../../../src/stats/result';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

const SM = fixture<{
  statsmodels: string;
  chiSquarePower: { w: number; n: number; alpha: number; df: number; power: number }[];
  chiSquareSampleSize: { w: number; power: number; alpha: number; df: number; nReal: number; n: number }[];
}>('statsmodels', 'advanced');
const R = fixture<{
  rVersion: string;
  variancePower: { n: number; sigmaRatio: number; alpha: number; alternative: Alternative; power: number }[];
  varianceSampleSize: { sigmaRatio: number; alpha: number; alternative: Alternative; power: number; n: number }[];
}>('R', 'advanced');

describe('power of chi-square tests (Cohen’s w, noncentral chi-square)', () => {
  for (const c of SM.chiSquarePower) {
    it(`matches statsmodels GofChisquarePower for w = ${c.w}, n = ${c.n}, df = ${c.df}, α = ${c.alpha}`, () => {
      const r = wordResult(powerAnalysis({ target: 'goodness-of-fit', effectSize: c.w, n: c.n, df: c.df, alpha: c.alpha }));
      closeTo(r.power, c.power, 1e-8, `power (statsmodels ${SM.statsmodels})`, c);
    });
  }

  for (const c of SM.chiSquareSampleSize) {
    it(`finds the smallest n reaching power ${c.power} for w = ${c.w}, df = ${c.df} (statsmodels solve_power, rounded up)`, () => {
      const r = wordResult(powerAnalysis({ target: 'independence', effectSize: c.w, power: c.power, df: c.df, alpha: c.alpha }));
      assert.equal(r.n, c.n, `statsmodels real n ${c.nReal}, rounded up ${c.n}, got ${r.n}`);
      assert.ok(r.power >= c.power);
      assert.equal(r.solvedFor, 'n');
      assert.ok(r.notices.some((x) => x.code === 'power-df' && /\(r − 1\)\(c − 1\)/.test(x.message)));
    });
  }

  it('returns curve points that rise with n and include the answer', () => {
    const r = wordResult(powerAnalysis({ target: 'goodness-of-fit', effectSize: 0.3, power: 0.8, df: 3, alpha: 0.05 }));
    assert.ok(r.curve.some((p) => p.n === r.n));
    for (let i = 1; i < r.curve.length; i++) assert.ok(r.curve[i].power >= r.curve[i - 1].power);
  });

  it('refuses both n and power, or neither', () => {
    assert.throws(() => wordResult(powerAnalysis({ target: 'goodness-of-fit', effectSize: 0.3, df: 2, n: 50, power: 0.8 })), InputError);
    assert.throws(() => wordResult(powerAnalysis({ target: 'goodness-of-fit', effectSize: 0.3, df: 2 })), InputError);
  });
});

describe('power of the test for one variance (σ1/σ0)', () => {
  for (const c of R.variancePower) {
    it(`matches R pchisq/qchisq for n = ${c.n}, σ1/σ0 = ${c.sigmaRatio}, ${c.alternative}`, () => {
      const r = wordResult(powerAnalysis({ target: 'variance', sigmaRatio: c.sigmaRatio, n: c.n, alpha: c.alpha, alternative: c.alternative }));
      closeTo(r.power, c.power, 1e-10, `power (R ${R.rVersion})`, c);
      assert.equal(r.df, c.n - 1);
    });
  }
  for (const c of R.varianceSampleSize) {
    it(`finds n = ${c.n} for σ1/σ0 = ${c.sigmaRatio}, ${c.alternative}, power ${c.power} (R direct search)`, () => {
      const r = wordResult(powerAnalysis({ target: 'variance', sigmaRatio: c.sigmaRatio, power: c.power, alpha: c.alpha, alternative: c.alternative }));
      assert.equal(r.n, c.n);
    });
  }
});
