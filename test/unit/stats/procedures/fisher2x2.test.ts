import { strict as assert } from 'node:assert';
import { fisherExact2x2 } from '../../../../src/stats/procedures/fisher2x2';
import { assertClose } from '../../tolerance';
import { independenceFixture } from './independence-fixture';

describe("Fisher's exact test for 2×2 tables", () => {
  describe('against scipy fisher_exact, and exact mpmath sums for counts near 1e9', () => {
    for (const c of independenceFixture.cases.filter((k) => k.fisher)) {
      const fisher = c.fisher!;
      it(`matches the two-sided and both one-sided p-values for "${c.name}" (${fisher.reference})`, () => {
        const table = c.table.filter((_, i) => c.kept.rows[i]).map((row) => row.filter((_, j) => c.kept.columns[j]));
        const got = fisherExact2x2(table);
        for (const side of ['twoSided', 'greater', 'less'] as const) {
          const want = fisher[side];
          assertClose(got[side].value, want.value, { rel: 1e-10, abs: 1e-300 }, `${c.name}: ${side} p`);
          if (want.log10 !== undefined) assertClose(got[side].log10, want.log10, { rel: 1e-10, abs: 1e-12 }, `${c.name}: ${side} log10 p`);
        }
      });
      if (typeof fisher.conditionalOddsRatio === 'number') {
        it(`matches the conditional maximum-likelihood odds ratio for "${c.name}" (mpmath findroot)`, () => {
          const table = c.table.filter((_, i) => c.kept.rows[i]).map((row) => row.filter((_, j) => c.kept.columns[j]));
          assertClose(fisherExact2x2(table).conditionalOddsRatio, fisher.conditionalOddsRatio as number, { rel: 1e-9 }, `${c.name}: conditional MLE`);
        });
      }
    }
  });

  it("reproduces Fisher's tea-tasting experiment: one-sided p = 0.2429, two-sided p = 0.4857", () => {
    // Fisher (1935), The Design of Experiments, ch. 2: 8 cups, 3 of 4 milk-first cups identified. Exact: 17/70, 34/70.
    const result = fisherExact2x2([[3, 1], [1, 3]]);
    assertClose(result.greater.value, 17 / 70, { rel: 1e-13 }, 'tea one-sided');
    assertClose(result.twoSided.value, 34 / 70, { rel: 1e-13 }, 'tea two-sided');
    assert.equal(result.greater.value.toFixed(4), '0.2429');
    assert.equal(result.twoSided.value.toFixed(4), '0.4857');
  });

  it('counts tables exactly as likely as the observed one in both tails (ties within 1e-7)', () => {
    // Symmetric margins: the table [[1, 4], [4, 1]] has the same probability as [[4, 1], [1, 4]].
    // Hypergeometric(5, 5, 5): P(1) = P(4) = 25/252, P(0) = P(5) = 1/252, so p = 52/252.
    assertClose(fisherExact2x2([[1, 4], [4, 1]]).twoSided.value, 52 / 252, { rel: 1e-13 }, 'tied tails');
  });

  it('gives a conditional odds ratio of 0 or infinity at the edge of the support', () => {
    assert.equal(fisherExact2x2([[1573, 3], [4, 0]]).conditionalOddsRatio, 0);
    assert.equal(fisherExact2x2([[10, 0], [0, 12]]).conditionalOddsRatio, Infinity);
  });

  it('gives p = 1 when the observed table is the most likely one', () => {
    assert.equal(fisherExact2x2([[5, 5], [5, 5]]).twoSided.value, 1);
  });

  it('reports a p-value below the double range through its logarithm', () => {
    const result = fisherExact2x2([[2000, 0], [0, 2000]]);
    assert.equal(result.twoSided.value, 0);
    // Only the two extreme tables are as unlikely: p = 2 / C(4000, 2000), with log10 C(4000, 2000) = Σ log10((2000 + i)/i).
    let log10Choose = 0;
    for (let i = 1; i <= 2000; i++) log10Choose += Math.log10((2000 + i) / i);
    assertClose(result.twoSided.log10, Math.log10(2) - log10Choose, { rel: 1e-11 }, 'log10 p by direct product');
  });

  it('estimates the conditional maximum-likelihood odds ratio, which solves E[X] = a', () => {
    // For [[3, 1], [1, 3]] R's fisher.test gives 6.408309 (from memory); R's root finder stops at a tolerance near
    // 1e-4, so it agrees only to about 2e-6. The defining equation is the tight check.
    const psi = fisherExact2x2([[3, 1], [1, 3]]).conditionalOddsRatio;
    const support = [0, 1, 2, 3, 4];
    const choose = (n: number, k: number): number => (k < 0 || k > n ? 0 : support.slice(0, k).reduce((p, i) => (p * (n - i)) / (i + 1), 1));
    const weights = support.map((x) => choose(4, x) * choose(4, 4 - x) * psi ** x);
    const mean = support.reduce((s, x, i) => s + x * weights[i], 0) / weights.reduce((s, w) => s + w, 0);
    assertClose(mean, 3, { rel: 1e-10 }, 'E[X] at the conditional MLE');
    assertClose(psi, 6.408309, { rel: 1e-5 }, 'conditional MLE odds ratio (from memory)');
  });
});
