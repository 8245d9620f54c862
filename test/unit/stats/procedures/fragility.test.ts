import { strict as assert } from 'node:assert';
import { pearsonTable } from '../../../../src/stats/procedures/advanced-common';
import { chiSquareUpperProbability } from '../../../../src/stats/distributions/chisquare';
import { pairedTest } from '../../../../src/stats/procedures/paired';
import { stratifiedTest } from '../../../../src/stats/procedures/stratified';
import { categoryProblem, fragilityIndex2x2, generalizedFragility, strataProblem, tableProblem, type TwoByTwoTest } from '../../../../src/stats/procedures/fragility';
import { fixture } from '../../fixtures';

interface Outcome { significant: boolean; index: number | null }
const SP = fixture<{
  scipy: string;
  alpha: number;
  walsh: ({ table: number[][] } & Record<TwoByTwoTest, Outcome>)[];
  generalized: ({ table: number[][]; minLikelihood: number } & Outcome)[];
  goodnessOfFit: ({ observed: number[]; proportions: number[] } & Outcome)[];
  paired: ({ table: number[][] } & Outcome)[];
  stratified: ({ strata: number[][][] } & Outcome)[];
}>('scipy', 'fragility');
const source = `scipy ${SP.scipy} brute-force enumeration (scripts/fixtures/fragility.py)`;

/** Pearson X² of independence, rows and columns with total 0 left out; p = 1 when fewer than 2 remain. */
function pearsonLog10P(t: number[][]): number {
  const { statistic, df } = pearsonTable(t);
  return df > 0 ? chiSquareUpperProbability(statistic, df).log10 : 0;
}

function fitLog10P(proportions: readonly number[]) {
  return (o: number[]): number => {
    const n = o.reduce((s, x) => s + x, 0);
    const x2 = o.reduce((s, x, k) => s + (x - n * proportions[k]) ** 2 / (n * proportions[k]), 0);
    return chiSquareUpperProbability(x2, o.length - 1).log10;
  };
}

describe('fragility index of a 2×2 table (Walsh et al. 2014)', () => {
  for (const test of ['fisher', 'pearson', 'yates'] as const) {
    it(`agrees with ${source} on ${SP.walsh.length} tables by ${test}`, () => {
      let matches = 0;
      const misses: string[] = [];
      for (const c of SP.walsh) {
        const got = fragilityIndex2x2(c.table, { test, alpha: SP.alpha });
        assert.equal(got.reverse, !c[test].significant, `reverse flag for ${JSON.stringify(c.table)}`);
        if (got.index === c[test].index) matches++;
        else misses.push(`${JSON.stringify(c.table)}: expected ${c[test].index}, got ${got.index}`);
      }
      assert.equal(matches, SP.walsh.length, `matches ${matches}/${SP.walsh.length}\n${misses.join('\n')}`);
    });
  }

  it('reports the changed cells and the quotient: the group with fewer events gains events (definition, Walsh et al. 2014)', () => {
    // 1 of 50 against 9 of 50 events: Fisher p = 0.0157 (significant).
    const got = fragilityIndex2x2([[1, 49], [9, 41]]);
    assert.equal(got.reverse, false);
    assert.ok(got.index !== null && got.index >= 1);
    assert.equal(got.quotient, got.index! / 100);
    assert.deepEqual(got.changes, [{ cell: [0, 0], from: 1, to: 1 + got.index! }, { cell: [0, 1], from: 49, to: 49 - got.index! }]);
  });
});

describe('generalized fragility index (Baer et al. 2021)', () => {
  it(`exact search agrees with ${source} on ${SP.generalized.length} r×c tables (Pearson X², some with q = 0.2)`, () => {
    let matches = 0;
    const misses: string[] = [];
    for (const c of SP.generalized) {
      const got = generalizedFragility(tableProblem(c.table, pearsonLog10P, SP.alpha, { minLikelihood: c.minLikelihood }));
      assert.equal(got.method, 'exact');
      if (got.index === c.index && got.reverse === !c.significant) matches++;
      else misses.push(`${JSON.stringify(c.table)} q=${c.minLikelihood}: expected ${c.index}, got ${got.index}`);
    }
    assert.equal(matches, SP.generalized.length, `matches ${matches}/${SP.generalized.length}\n${misses.join('\n')}`);
  });

  it(`exact search agrees with ${source} on ${SP.goodnessOfFit.length} goodness-of-fit samples (scipy chisquare)`, () => {
    for (const c of SP.goodnessOfFit) {
      const got = generalizedFragility(categoryProblem(c.observed, c.observed.map((_, k) => `c${k}`), fitLog10P(c.proportions), SP.alpha));
      assert.equal(got.index, c.index, `${JSON.stringify(c.observed)} against ${JSON.stringify(c.proportions)}`);
    }
  });

  it(`exact search with McNemar's test (our pairedTest) agrees with ${source} on ${SP.paired.length} paired 2×2 tables`, () => {
    const lp = (t: number[][]): number => (t[0][1] + t[1][0] === 0 ? 0 : pairedTest(t).pValue.log10);
    for (const c of SP.paired) {
      const got = generalizedFragility(tableProblem(c.table, lp, SP.alpha));
      assert.equal(got.index, c.index, `${JSON.stringify(c.table)}`);
      assert.equal(got.reverse, !c.significant);
    }
  });

  it(`exact search with the CMH test (our stratifiedTest) agrees with ${source} on ${SP.stratified.length} stratified 2×2×K tables`, () => {
    const lp = (s: number[][][]): number => {
      try {
        return stratifiedTest(s).pValue.log10;
      } catch {
        return 0; // a table the procedure refuses counts as not significant, as in src/savedtest/evidence.ts
      }
    };
    let matches = 0;
    const misses: string[] = [];
    for (const c of SP.stratified) {
      const got = generalizedFragility(strataProblem(c.strata, lp, SP.alpha, { maxTables: 1e6 }));
      if (got.index === c.index && got.reverse === !c.significant) matches++;
      else misses.push(`${JSON.stringify(c.strata)}: expected ${c.index}, got ${got.index}`);
    }
    assert.equal(matches, SP.stratified.length, misses.join('\n'));
  });

  it('a bounded search never reports fewer changes than the exact one, and says it is bounded', () => {
    for (const c of SP.generalized.filter((g) => g.index !== null && g.index >= 2).slice(0, 25)) {
      const bounded = generalizedFragility(tableProblem(c.table, pearsonLog10P, SP.alpha, { minLikelihood: c.minLikelihood, maxTables: 3 }));
      assert.equal(bounded.method, 'bounded-search');
      if (bounded.index !== null) assert.ok(bounded.index >= c.index!, `${JSON.stringify(c.table)}: bounded ${bounded.index} < exact ${c.index}`);
      assert.ok(bounded.lowerBound! <= c.index!, 'the proven lower bound is not above the exact index');
    }
  });

  it('names the changed cells: one observation of row 1 moved between columns gives two cells changed by one', () => {
    const table = [[12, 3], [4, 11]];
    const got = generalizedFragility(tableProblem(table, pearsonLog10P, 0.05));
    const moved = got.changes.reduce((s, ch) => s + Math.abs(ch.to - ch.from), 0);
    assert.equal(moved, 2 * got.index!);
    for (const ch of got.changes) {
      const [i, j] = ch.cell as readonly [number, number];
      assert.equal(table[i][j], ch.from);
    }
  });
});

describe('generalized fragility index: work limits', () => {
  it('stops the bounded search at its work limit and says so, keeping the proven lower bound', () => {
    // 5×5 with N = 1,000 and a strong association: far more than one change is needed.
    const table = [[80, 30, 30, 30, 30], [30, 80, 30, 30, 30], [30, 30, 80, 30, 30], [30, 30, 30, 80, 30], [30, 30, 30, 30, 80]];
    const got = generalizedFragility(tableProblem(table, pearsonLog10P, 0.05, { maxTables: 50, maxGreedyEvaluations: 100 }));
    assert.equal(got.method, 'bounded-search');
    assert.equal(got.index, null);
    assert.equal(got.searchStopped, true);
    assert.ok(got.lowerBound! >= 1);
  });

  it('bounds the work on thousands of categories: 2,000 categories of one count each (4 million moves per table)', () => {
    // Goodness of fit of a bottle number counted once per bottle: X² = 0, p = 1; making it significant needs many
    // changes. The default limits (500,000 / k tables, 1,000,000 / k greedy evaluations) stop the search early.
    const k = 2000;
    const observed = new Array<number>(k).fill(1);
    const pOf = (o: readonly number[]) => {
      const n = o.reduce((a, b) => a + b, 0);
      const e = n / o.length;
      return chiSquareUpperProbability(o.reduce((s, x) => s + (x - e) ** 2 / e, 0), o.length - 1).log10;
    };
    const got = generalizedFragility(categoryProblem(observed, observed.map((_, i) => `B${i}`), pOf, 0.05));
    assert.equal(got.method, 'bounded-search');
    assert.equal(got.searchStopped, true);
    assert.equal(got.index, null);
    assert.ok(got.tablesExamined <= 250 + 500 + 2, `examined ${got.tablesExamined} tables`);
  });
});
