import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { cochranArmitageTest, linearByLinearTest } from '../../../../src/stats/procedures/trend';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

interface Trend { name: string; table: number[][]; scores: number[]; statistic: number; pValue: number; departure: number; departureDf: number }
interface Lbl { name: string; table: number[][]; rowScores: number[]; columnScores: number[]; statistic: number; pValue: number; correlation: number }
const R = fixture<{ rVersion: string; trend: Trend[]; linearByLinear: Lbl[] }>('R', 'advanced');

describe('Cochran–Armitage trend test', () => {
  it('gives z² ≈ 6.57, p ≈ 0.0104 on the infant malformation data with scores 0, 0.5, 1.5, 4, 7 (Agresti, Categorical Data Analysis)', () => {
    // Published values from memory; R prop.trend.test gives 6.5701, p = 0.01037 with these (midpoint) scores.
    const r = cochranArmitageTest([[48, 38, 5, 1, 1], [17066, 14464, 788, 126, 37]], { scores: [0, 0.5, 1.5, 4, 7] });
    closeTo(r.statistic, 6.57, 0, 'z²', 'malformation', 0.005);
    closeTo(r.pValue.value, 0.0104, 0, 'p', 'malformation', 0.00005);
  });

  for (const c of R.trend) {
    it(`matches R prop.trend.test on ${c.name}, and prop.test − trend for the departure`, () => {
      const r = cochranArmitageTest(c.table, { scores: c.scores });
      closeTo(r.statistic, c.statistic, 1e-10, `trend X² (R ${R.rVersion})`, c);
      closeTo(r.pValue.value, c.pValue, 1e-9, 'p', c);
      const dep = r.otherStatistics.find((l) => l.id === 'departure-from-trend')!;
      closeTo(dep.statistic, c.departure, 1e-8, 'departure from trend', c);
      assert.equal(dep.df, c.departureDf);
    });
  }

  it('uses 1, 2, …, k when no scores are given, and says so', () => {
    const c = R.trend.find((x) => x.name === 'malformation_equal')!;
    const r = cochranArmitageTest(c.table);
    closeTo(r.statistic, c.statistic, 1e-10, 'equally spaced scores (R prop.trend.test score = 1:5)', c);
    assert.ok(r.notices.some((n) => n.code === 'default-scores'));
  });

  it('gives z > 0 when the first row’s proportion rises with the score, and the one-sided p follows that direction', () => {
    const rising = R.trend.find((x) => x.name === 'dose')!;
    const up = cochranArmitageTest(rising.table, { scores: rising.scores, alternative: 'greater' });
    assert.ok(up.statistic > 0);
    // One-sided p is half the two-sided p when z points the way of the alternative.
    closeTo(up.pValue.value, rising.pValue / 2, 1e-9, 'one-sided p = two-sided / 2 (R prop.trend.test)', rising);
    const down = cochranArmitageTest(rising.table, { scores: rising.scores, alternative: 'less' });
    closeTo(down.pValue.value, 1 - rising.pValue / 2, 1e-9, 'opposite one-sided p', rising);
  });

  it('refuses a table that is not 2×k, and scores of the wrong length', () => {
    assert.throws(() => cochranArmitageTest([[1, 2], [3, 4], [5, 6]]), (e: unknown) => isInstance(e, InputError) && e.code === 'wrong-shape');
    assert.throws(() => cochranArmitageTest([[1, 2, 3], [3, 4, 5]], { scores: [1, 2] }), (e: unknown) => isInstance(e, InputError) && argumentNamed(e) === 'scores');
  });
});

describe('linear-by-linear association', () => {
  for (const c of R.linearByLinear) {
    it(`matches (N − 1) r² computed with R cor() on ${c.name}`, () => {
      const r = linearByLinearTest(c.table, { rowScores: c.rowScores, columnScores: c.columnScores });
      closeTo(r.statistic, c.statistic, 1e-10, `M² (R ${R.rVersion})`, c);
      closeTo(r.pValue.value, c.pValue, 1e-9, 'p', c);
      closeTo(r.estimates[0].value, c.correlation, 1e-12, 'r', c);
    });
  }
});
