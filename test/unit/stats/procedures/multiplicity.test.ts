import { adjustPValues, MULTIPLICITY_METHODS } from '../../../../src/stats/multiplicity';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

const R = fixture<{ rVersion: string; pAdjust: { name: string; p: number[]; holm: number[]; bh: number[]; bonferroni: number[] }[] }>('R', 'bayesfactor');

describe('adjustPValues (multiplicity)', () => {
  for (const family of R.pAdjust) {
    for (const method of MULTIPLICITY_METHODS) {
      it(`${method} on the "${family.name}" family matches ${R.rVersion} p.adjust`, () => {
        const got = adjustPValues(family.p, method);
        got.forEach((g, i) => closeTo(g, family[method][i], 1e-14, `${method}[${i}] (R p.adjust)`, family.p));
      });
    }
  }
  it('"benjamini-hochberg" is the same method as "bh" (R p.adjust "BH")', () => {
    const family = R.pAdjust[0];
    adjustPValues(family.p, 'benjamini-hochberg').forEach((g, i) => closeTo(g, family.bh[i], 1e-14, 'BH', family.p));
  });
});
