import { strict as assert } from 'node:assert';
import { divergenceTerm, powerDivergence } from '../../../../src/stats/procedures/divergence';
import { assertClose } from '../../tolerance';

// The closed forms of Cressie & Read (1984), written out here independently of the code's series.
function closedForm(o: number, e: number, lambda: number): number {
  if (lambda === 0) return 2 * (o * Math.log(o / e) - o + e);
  if (lambda === -1) return 2 * (e * Math.log(e / o) + o - e);
  return (2 / (lambda * (lambda + 1))) * (o * ((o / e) ** lambda - 1) - lambda * (o - e));
}

describe('power-divergence terms', () => {
  for (const lambda of [1, 0, -1, 2 / 3, -0.5, 2.5, -2]) {
    it(`agrees with the closed form on both sides of the series cut-off at |r| = 0.1 for λ = ${lambda}`, () => {
      for (const r of [-0.3, -0.1001, -0.0999, -0.05, 0.05, 0.0999, 0.1001, 0.3]) {
        const e = 50;
        const o = e * (1 + r);
        assertClose(divergenceTerm(o, e, lambda), closedForm(o, e, lambda), { rel: 1e-12 }, `λ = ${lambda}, r = ${r}`);
      }
    });
  }

  it('keeps full relative precision when o is within a few parts per million of e', () => {
    // Pearson's term is exactly (o − e)²/e; the closed form for λ = 0 would lose about 10 digits here.
    const o = 1_000_003_000;
    const e = 1e9;
    assertClose(divergenceTerm(o, e, 1), (o - e) ** 2 / e, { rel: 1e-15 }, 'Pearson term near fit');
    // G² term: 2e[(1+r)ln(1+r) − r] = e(r² − r³/3 + r⁴/6 − …) with r = 3e-6.
    const r = 3e-6;
    assertClose(divergenceTerm(o, e, 0), 2 * e * (r * r / 2 - r ** 3 / 6 + r ** 4 / 12), { rel: 1e-14 }, 'G² term near fit');
  });

  it('gives contributions that are never negative and sum to the statistic', () => {
    const { statistic, contributions } = powerDivergence([12, 0, 7, 30], [10, 2, 9.5, 27.5], 0);
    assert.ok(contributions.every((c) => c >= 0));
    assertClose(statistic, contributions.reduce((a, b) => a + b, 0), { rel: 1e-15 }, 'sum of contributions');
  });
});
