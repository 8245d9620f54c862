import assert from 'node:assert/strict';
import { assertAbsolute, assertRelative } from '../../tolerance';
import { chiSquareUpperProbability, chiSquareUpperQuantileFromLog } from '../../../../src/stats/distributions/chisquare';
import { normalUpperProbability } from '../../../../src/stats/distributions/normal';
import {
  log1mExp,
  probabilityFromBoth,
  probabilityFromLog,
  probabilityFromValue,
  twoSidedFromTails,
} from '../../../../src/stats/distributions/probability';

describe('probabilities as a value and a power of ten', () => {
  it('keeps a p-value near 10^-3274 (a 6×4 table of ten million rows) as a power of ten', () => {
    // mpmath 1.2.1 at 50 digits: P(χ²(15) > 15179.081827895843) = e^−7539 (test/fixtures/mpmath/chisquare_quantiles.json).
    const p = chiSquareUpperProbability(15179.081827895843, 15);
    assert.equal(p.value, 0);
    assertRelative(p.log10, -7539 / Math.LN10, 1e-15, 'log10 p, df 15');
    assertRelative(chiSquareUpperQuantileFromLog(-7539, 15), 15179.081827895843, 1e-15, 'x from ln q = −7539');
  });

  it('builds {value, log10} from a natural log, from a value, and from both', () => {
    assert.deepEqual(probabilityFromLog(Math.log(0.25)), { value: 0.25, log10: Math.log10(0.25) });
    assert.deepEqual(probabilityFromLog(-2000 * Math.LN10), { value: 0, log10: -2000 });
    assert.deepEqual(probabilityFromValue(1e-5), { value: 1e-5, log10: -5 });
    assert.deepEqual(probabilityFromValue(0), { value: 0, log10: -Infinity });
    assert.ok(Number.isNaN(probabilityFromValue(1.5).value));
    assert.ok(Number.isNaN(probabilityFromLog(NaN).log10));
    assert.deepEqual(probabilityFromBoth(0, -1000 * Math.LN10), { value: 0, log10: -1000 });
  });

  it('doubles the smaller tail for a two-sided p-value and caps it at 1', () => {
    const lower = probabilityFromValue(0.01);
    const upper = probabilityFromValue(0.99);
    const two = twoSidedFromTails(lower, upper);
    assertRelative(two.value, 0.02, 1e-15, 'two-sided value');
    assertRelative(two.log10, Math.log10(0.02), 1e-15, 'two-sided log10');
    assert.deepEqual(twoSidedFromTails(probabilityFromValue(0.6), probabilityFromValue(0.7)), { value: 1, log10: 0 });
    const deep = twoSidedFromTails(probabilityFromLog(-5000), probabilityFromValue(1));
    assert.equal(deep.value, 0);
    assertRelative(deep.log10, -5000 / Math.LN10 + Math.log10(2), 1e-15, 'two-sided log10 below the double range');
  });

  it('computes ln(1 − e^x) without cancellation on both sides of −ln 2', () => {
    assertRelative(log1mExp(-1e-20), Math.log(1e-20), 1e-15, 'log1mExp(−1e-20)');
    assertRelative(log1mExp(-50), -Math.exp(-50), 1e-15, 'log1mExp(−50)');
  });

  it('reports the normal upper tail at z = 40 as a power of ten', () => {
    // mpmath 1.2.1 at 40 digits: log10(erfc(40/√2)/2) = −349.43700645934584209.
    const p = normalUpperProbability(40);
    assert.equal(p.value, 0);
    assertAbsolute(p.log10, -349.43700645934584, 1e-12, 'log10 P(Z > 40)');
  });
});
