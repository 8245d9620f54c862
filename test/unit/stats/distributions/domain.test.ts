import assert from 'node:assert/strict';
import {
  chiSquareDensity,
  chiSquareLogLowerTail,
  chiSquareLogUpperTail,
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperQuantile,
  chiSquareUpperQuantileFromLog,
  chiSquareUpperTail,
} from '../../../../src/stats/distributions/chisquare';
import { regularizedGammaLower, regularizedGammaUpper } from '../../../../src/stats/distributions/gamma';
import { noncentralChiSquareLowerTail, noncentralChiSquareUpperTail } from '../../../../src/stats/distributions/noncentral';

describe('chi-square distribution: documented answers at the edges of the domain', () => {
  it('returns NaN for NaN input, negative df and infinite df', () => {
    for (const [x, df] of [[NaN, 3], [1, NaN], [1, -1], [1, Infinity]] as const) {
      assert.ok(Number.isNaN(chiSquareLowerTail(x, df)), `lower(${x}, ${df})`);
      assert.ok(Number.isNaN(chiSquareUpperTail(x, df)), `upper(${x}, ${df})`);
      assert.ok(Number.isNaN(chiSquareLogUpperTail(x, df)), `log upper(${x}, ${df})`);
      assert.ok(Number.isNaN(chiSquareDensity(x, df)), `density(${x}, ${df})`);
    }
    assert.ok(Number.isNaN(chiSquareQuantile(0.5, -2)));
    assert.ok(Number.isNaN(chiSquareQuantile(1.5, 2)));
    assert.ok(Number.isNaN(chiSquareUpperQuantile(-0.1, 2)));
    assert.ok(Number.isNaN(chiSquareUpperQuantileFromLog(0.1, 2)));
  });

  it('treats x < 0 as below the support: lower 0, upper 1, density 0', () => {
    assert.equal(chiSquareLowerTail(-3, 4), 0);
    assert.equal(chiSquareUpperTail(-3, 4), 1);
    assert.equal(chiSquareLogUpperTail(-3, 4), 0);
    assert.equal(chiSquareLogLowerTail(-3, 4), -Infinity);
    assert.equal(chiSquareDensity(-3, 4), 0);
  });

  it('treats x = Infinity as the end of the support: lower 1, upper 0', () => {
    assert.equal(chiSquareLowerTail(Infinity, 4), 1);
    assert.equal(chiSquareUpperTail(Infinity, 4), 0);
    assert.equal(chiSquareLogUpperTail(Infinity, 4), -Infinity);
  });

  it('treats df = 0 as the point mass at 0', () => {
    assert.equal(chiSquareLowerTail(0, 0), 1);
    assert.equal(chiSquareLowerTail(2.5, 0), 1);
    assert.equal(chiSquareUpperTail(2.5, 0), 0);
    assert.equal(chiSquareUpperTail(-1, 0), 1);
    assert.equal(chiSquareQuantile(0.3, 0), 0);
    assert.equal(chiSquareUpperQuantile(0.3, 0), 0);
    assert.equal(chiSquareDensity(1, 0), 0);
  });

  it('gives the density at 0 by the shape: infinite below df 2, ½ at df 2, 0 above', () => {
    assert.equal(chiSquareDensity(0, 1), Infinity);
    assert.equal(chiSquareDensity(0, 2), 0.5);
    assert.equal(chiSquareDensity(0, 3), 0);
  });

  it('gives the quantile ends: p = 0 → 0, p = 1 → ∞, q = 0 → ∞, ln q = −∞ → ∞', () => {
    assert.equal(chiSquareQuantile(0, 3), 0);
    assert.equal(chiSquareQuantile(1, 3), Infinity);
    assert.equal(chiSquareUpperQuantile(0, 3), Infinity);
    assert.equal(chiSquareUpperQuantile(1, 3), 0);
    assert.equal(chiSquareUpperQuantileFromLog(-Infinity, 3), Infinity);
    assert.equal(chiSquareUpperQuantileFromLog(0, 3), 0);
  });

  it('keeps P and Q of the incomplete gamma function complementary in the bulk', () => {
    for (const [a, x] of [[0.05, 0.3], [0.5, 2], [3, 2.5], [40, 41], [2500, 2400]] as const) {
      const sum = regularizedGammaLower(a, x) + regularizedGammaUpper(a, x);
      assert.ok(Math.abs(sum - 1) < 4e-16, `P + Q at a=${a}, x=${x}: ${sum}`);
    }
  });

  it('gives the noncentral distribution the same edges, and the atom e^(−ncp/2) at 0 when df = 0', () => {
    assert.equal(noncentralChiSquareLowerTail(-1, 3, 2), 0);
    assert.equal(noncentralChiSquareUpperTail(Infinity, 3, 2), 0);
    assert.equal(noncentralChiSquareLowerTail(0, 0, 2), Math.exp(-1));
    assert.ok(Number.isNaN(noncentralChiSquareLowerTail(1, 3, -1)));
    assert.equal(noncentralChiSquareLowerTail(5, 3, 0), chiSquareLowerTail(5, 3));
  });
});
