// Powers of ten for densities and quantiles that underflow to 0 in doubles, checked against closed forms:
// χ²(1) has density e^(−x/2)/sqrt(2πx) and P(X ≤ x) = erf(sqrt(x/2)) ≈ sqrt(2x/π) for small x;
// χ²(2) has density e^(−x/2)/2 (the exponential distribution with mean 2).
import { strict as assert } from 'node:assert';
import { assertAbsolute } from '../../tolerance';
import { chiSquareDensity, chiSquareLog10Density, chiSquareLog10Quantile, chiSquareLog10UpperQuantile, chiSquareQuantile } from '../../../../src/stats/distributions/chisquare';

describe('chi-square logarithms below the double range', () => {
  it('gives log10 of a density that underflows (df 1 and 2, x = 2000)', () => {
    assert.equal(chiSquareDensity(2000, 1), 0);
    const df1 = -0.5 * Math.log10(2000) - 1000 / Math.LN10 - 0.5 * Math.log10(2 * Math.PI);
    assertAbsolute(chiSquareLog10Density(2000, 1), df1, 1e-9, 'log10 density, x 2000, df 1 (closed form)');
    const df2 = Math.log10(0.5) - 1000 / Math.LN10;
    assertAbsolute(chiSquareLog10Density(2000, 2), df2, 1e-9, 'log10 density, x 2000, df 2 (closed form)');
  });

  it('agrees with log10 of the density where the density is representable, and is −∞ where it is truly 0', () => {
    const x = 11.7;
    const closed = Math.log10(Math.exp(-x / 2) / 2); // df 2
    assertAbsolute(chiSquareLog10Density(x, 2), closed, 1e-12, 'log10 density, x 11.7, df 2 (closed form)');
    assert.equal(chiSquareLog10Density(-1, 3), -Infinity);
    assert.equal(chiSquareLog10Density(Infinity, 3), -Infinity);
  });

  it('gives log10 of a lower quantile that underflows (df 1, p = 1e-300: x = πp²/2)', () => {
    assert.equal(chiSquareQuantile(1e-300, 1), 0);
    const expected = Math.log10(Math.PI / 2) - 600;
    assertAbsolute(chiSquareLog10Quantile(1e-300, 1), expected, 1e-9, 'log10 lower quantile, p 1e-300, df 1 (closed form)');
    assertAbsolute(chiSquareLog10Quantile(5e-301, 1), Math.log10(Math.PI / 2) + 2 * Math.log10(5e-301), 1e-9, 'log10 lower quantile, p 5e-301, df 1');
    // Representable quantiles: log10 of the value itself (df 2: x = −2·ln(1 − p)).
    assertAbsolute(chiSquareLog10Quantile(0.05, 2), Math.log10(-2 * Math.log1p(-0.05)), 1e-12, 'log10 lower quantile, p 0.05, df 2');
    assert.equal(chiSquareLog10Quantile(0, 1), -Infinity);
  });

  it('gives log10 of an upper quantile that underflows for a tiny df (lower tail 1 − q, leading term)', () => {
    // P(X ≤ x) ≈ (x/2)^a/Γ(1 + a) with a = df/2 = 5e-11, so log10 x = log10 2 + ln(1 − q)/a/ln 10 (Γ(1 + a) ≈ 1 − γa).
    const a = 5e-11;
    const expected = (Math.LN2 + (Math.log1p(-0.3) + -0.5772156649015329 * a) / a) / Math.LN10;
    assertAbsolute(chiSquareLog10UpperQuantile(0.3, 2 * a), expected, 1e-3, 'log10 upper quantile, q 0.3, df 1e-10');
  });
});
