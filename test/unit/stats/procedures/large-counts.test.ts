// Counts from 1e3 to 2^53 − 1, and beyond 2^53. Tails at these sizes are checked against 60-digit mpmath
// (scripts/fixtures/mpmath_large_tails.py: term sums, the incomplete beta integral and Euler–Maclaurin sums; versions
// in the fixture's source) and base R's pbinom and phyper (scripts/fixtures/large_counts.R; version in the fixture's
// rVersion); counts a double cannot hold exactly are refused with the cell named.
import { strict as assert } from 'node:assert';
import { wordResult } from '../../../../src/report/words/result';
import { InputError, isInstance } from '../../../../src/errors';
import { binomialLowerTail } from '../../../../src/stats/distributions/discrete';
import { fisherExact2x2 } from '../../../../src/stats/procedures/fisher2x2';
import { mcnemarStatistics, mcnemarTest } from '../../../../src/stats/procedures/paired';
import { stratifiedTest } from '../../../../src/stats/procedures/stratified';
import { independenceTest } from '../../../../src/stats/procedures/table';
import { goodnessOfFit } from '../../../../src/stats/procedures/fit';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

interface McNemarCase { b: number; c: number; lnExactP: number; lnMidP: number }
interface FisherCase { table: number[][]; lnGreater: number; lnLess: number }
interface BinomTestCase { b: number; c: number; pValue: number }
interface FisherTestCase { table: number[][]; pValue: number; greater: number; less: number }
const R = fixture<{ rVersion: string; mcnemar: McNemarCase[]; fisher: FisherCase[]; binomTest: BinomTestCase[]; fisherTest: FisherTestCase[] }>('R', 'large-counts');

/** A fixture field that the check compares: present and a number, or the test fails. */
function field<T extends object>(entry: T, key: keyof T & string): number {
  const v = entry[key];
  assert.equal(typeof v, 'number', `fixture entry ${JSON.stringify(entry)} lacks the number ${key}`);
  return v as number;
}

function refused(run: () => unknown, code: string, argument: string, message: RegExp): void {
  assert.throws(run, (e: unknown) => {
    assert.ok(isInstance(e, InputError), `expected an InputError, got ${String(e)}`);
    assert.equal(e.code, code);
    assert.equal(argumentNamed(e), argument);
    assert.match(e.message, message);
    return true;
  });
}

const LN10 = Math.LN10;

describe('counts from 1e7 to 1e15', function () {
  // A hang guard, not a speed check (figures are in npm run bench -- hardening).
  this.timeout(60_000);
  assert.ok(R.mcnemar.length >= 7 && R.fisher.length >= 3, 'fixture has its cases');
  for (const c of R.mcnemar) {
    it(`McNemar exact and mid-p for b = ${c.b}, c = ${c.c} match R pbinom (O(1) memory, no term list)`, () => {
      const s = mcnemarStatistics(c.b, c.c);
      closeTo(s.exact.pValue.log10 * LN10, field(c, 'lnExactP'), 1e-9, `ln exact p (R ${R.rVersion})`, c, 1e-12);
      closeTo(s.midP.pValue.log10 * LN10, field(c, 'lnMidP'), 1e-9, `ln mid-p (R ${R.rVersion})`, c, 1e-12);
    });
  }
  for (const c of R.fisher) {
    it(`Fisher 2×2 one-sided tails for ${JSON.stringify(c.table)} match R phyper`, () => {
      const f = fisherExact2x2(c.table);
      closeTo(f.greater.log10 * LN10, field(c, 'lnGreater'), 1e-8, `ln P(X ≥ a) (R ${R.rVersion})`, c.table, 1e-12);
      closeTo(f.less.log10 * LN10, field(c, 'lnLess'), 1e-8, `ln P(X ≤ a) (R ${R.rVersion})`, c.table, 1e-12);
    });
  }
});

interface MpMcNemarCase { b: number; c: number; lnExactP: number; lnMidP: number; method: string }
interface MpFisherCase { table: number[][]; lnLess: number; lnGreater: number; lnTwoSided: number; method: string }
interface MpBinomialCase { k: number; n: number; p: number; lnLower: number }
const MP = fixture<{ source: string; binomial: MpBinomialCase[]; mcnemar: MpMcNemarCase[]; fisher: MpFisherCase[] }>('mpmath', 'large_tails');

describe('tails from 1e3 to 2^53 − 1 against 60-digit mpmath, central and far (ln p down to −1.4e15)', function () {
  this.timeout(60_000); // a hang guard; each case takes milliseconds (npm run bench -- hardening)
  it('has central, far and at-the-limit cases of both kinds, long tails among them', () => {
    assert.ok(MP.mcnemar.length >= 15 && MP.fisher.length >= 12 && MP.binomial.length >= 5);
    assert.ok(MP.mcnemar.some((c) => c.b + c.c === Number.MAX_SAFE_INTEGER));
    assert.ok(MP.fisher.some((c) => c.table.flat().reduce((a, b) => a + b, 0) === Number.MAX_SAFE_INTEGER));
    assert.ok(MP.mcnemar.some((c) => c.lnExactP < -1e6 * LN10) && MP.fisher.some((c) => c.lnGreater < -1e5 * LN10));
    assert.ok(MP.mcnemar.some((c) => c.method.startsWith('beta integral')) && MP.fisher.some((c) => c.method.includes('Euler')));
  });
  // Measured: at most 4e-15 relative on ln p (3e-14 for tails summed over ~1e5 terms).
  for (const c of MP.mcnemar) {
    it(`McNemar exact and mid-p for b = ${c.b}, c = ${c.c} (${c.method})`, () => {
      const s = mcnemarStatistics(c.b, c.c);
      closeTo(s.exact.pValue.log10 * LN10, field(c, 'lnExactP'), 1e-13, `ln exact p (${MP.source})`, c, 1e-14);
      closeTo(s.midP.pValue.log10 * LN10, field(c, 'lnMidP'), 1e-13, `ln mid-p (${MP.source})`, c, 1e-14);
    });
  }
  for (const c of MP.fisher) {
    it(`Fisher 2×2 tails for ${JSON.stringify(c.table)} (${c.method})`, () => {
      const f = fisherExact2x2(c.table);
      closeTo(f.less.log10 * LN10, field(c, 'lnLess'), 1e-13, `ln P(X ≤ a) (${MP.source})`, c.table, 1e-14);
      closeTo(f.greater.log10 * LN10, field(c, 'lnGreater'), 1e-13, `ln P(X ≥ a) (${MP.source})`, c.table, 1e-14);
      closeTo(f.twoSided.log10 * LN10, field(c, 'lnTwoSided'), 1e-13, `ln two-sided p (${MP.source})`, c.table, 1e-14);
    });
  }
  for (const c of MP.binomial) {
    it(`binomial P(X ≤ ${c.k}) for n = ${c.n}, p = ${c.p} (the tail the distribution fit and the b/c interval use)`, () => {
      // p other than ½: n·p is rounded, and the tail is right only because k − np is taken with its rounding error.
      closeTo(binomialLowerTail(c.k, c.n, c.p).log10 * LN10, field(c, 'lnLower'), 1e-13, `ln P(X ≤ k) (${MP.source})`, c, 1e-14);
    });
  }
  it('McNemar at the limit: b + c = 2^53 − 1 is computed, one more is refused', () => {
    const b = 2 ** 52 - 1;
    assert.equal(b + b + 1, Number.MAX_SAFE_INTEGER);
    const r = mcnemarTest([[0, b], [b + 1, 0]], { method: 'exact' });
    assert.ok(r.pValue.value > 0.99, String(r.pValue.value));
    refused(() => mcnemarTest([[0, b + 1], [b + 1, 0]]), 'count-too-large', 'table', /total/);
  });
});

describe('R binom.test and fisher.test themselves, where R can compute them (counts up to 1e6)', () => {
  assert.ok(R.binomTest.length >= 5 && R.fisherTest.length >= 5, 'fixture has its cases');
  for (const c of R.binomTest) {
    it(`McNemar exact p for b = ${c.b}, c = ${c.c} is binom.test's`, () => {
      closeTo(mcnemarStatistics(c.b, c.c).exact.pValue.value, field(c, 'pValue'), 1e-12, `binom.test p (R ${R.rVersion})`, c);
    });
  }
  for (const c of R.fisherTest) {
    it(`Fisher 2×2 p-values for ${JSON.stringify(c.table)} are fisher.test's`, () => {
      const f = fisherExact2x2(c.table);
      closeTo(f.twoSided.value, field(c, 'pValue'), 1e-12, `fisher.test two-sided p (R ${R.rVersion})`, c.table);
      closeTo(f.greater.value, field(c, 'greater'), 1e-12, `fisher.test "greater" p (R ${R.rVersion})`, c.table);
      closeTo(f.less.value, field(c, 'less'), 1e-12, `fisher.test "less" p (R ${R.rVersion})`, c.table);
    });
  }
});

describe('counts beyond 2^53 are refused, not looped over', () => {
  const max = Number.MAX_SAFE_INTEGER;
  it('refuses a cell of 1e16 in an independence table, naming the cell', () => {
    refused(() => independenceTest([[1e16, 2e16], [3e16, 4e16]]), 'count-too-large', 'table[0][0]', /2\^53/);
  });
  it('refuses a table whose total passes 2^53 − 1 although every cell is below it', () => {
    refused(() => independenceTest([[4e15, 4e15], [4e15, 4e15]]), 'count-too-large', 'table', /total.*2\^53/);
  });
  it('accepts a table whose total is exactly 2^53 − 1', () => {
    const r = wordResult(independenceTest([[max - 3, 1], [1, 1]]));
    assert.ok(Number.isFinite(r.statistic));
  });
  it('refuses discordant counts whose sum passes 2^53 − 1 in McNemar’s test', () => {
    refused(() => mcnemarTest([[5, 1e16], [1e16, 5]]), 'count-too-large', 'table[0][1]', /2\^53/);
    refused(() => mcnemarTest([[0, 5e15], [5e15, 0]]), 'count-too-large', 'table', /total/);
  });
  it('refuses a stratum count of 1e16 and a goodness-of-fit count of 1e16', () => {
    refused(() => stratifiedTest([[[1e16, 1], [1, 1]], [[1, 1], [1, 1]]]), 'count-too-large', 'strata[0][0][0]', /2\^53/);
    refused(() => goodnessOfFit([1e16, 5]), 'count-too-large', 'observed[0]', /2\^53/);
  });
});

describe('stratified counts of 1e7 and 1e9', () => {
  const strata = (k: number): number[][][] => [[[k, 2 * k], [3 * k, 4 * k]], [[k, 2 * k], [3 * k, k]]];
  it('gives the asymptotic CMH test for counts of 1e9 and leaves out the exact line with a notice naming the limit', () => {
    const r = wordResult(stratifiedTest(strata(1e9)));
    assert.ok(Number.isFinite(r.statistic));
    assert.ok(!r.otherStatistics.some((l) => l.id === 'cmh-exact'));
    const n = r.notices.find((x) => x.code === 'exact-too-large');
    assert.ok(n, r.notices.map((x) => x.code).join(', '));
    assert.match(n.message, /limit/);
  });
  it('refuses "method": "exact" for counts of 1e7, naming the limit', () => {
    refused(() => stratifiedTest(strata(1e7), { method: 'exact' }), 'exact-too-large', 'method', /limit/);
  });
});
