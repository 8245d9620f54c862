import { assertAbsolute, assertRelative } from '../../tolerance';
import {
  chiSquareDensity,
  chiSquareLogUpperTail,
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperProbability,
  chiSquareUpperQuantile,
  chiSquareUpperTail,
} from '../../../../src/stats/distributions/chisquare';

describe('chi-square against published values', () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7.4, "Upper critical values of chi-square":
  // the column headed 0.95 is the probability LESS than the critical value, so P(X > 18.307) = 0.05 at df 10.
  it('reads the handbook upper-critical table as P(X ≤ c) = column heading (df 10, 0.95 → 18.307)', () => {
    // The table rounds to 3 decimals: the tail at the rounded value is within density × 0.0005 of 0.95.
    assertAbsolute(chiSquareLowerTail(18.307, 10), 0.95, chiSquareDensity(18.307, 10) * 5e-4, 'P(X ≤ 18.307; df 10)');
    assertAbsolute(chiSquareUpperQuantile(0.05, 10), 18.307, 5e-4, 'upper quantile q=0.05, df 10');
    assertAbsolute(chiSquareQuantile(0.95, 10), 18.307, 5e-4, 'lower quantile p=0.95, df 10');
  });

  it('gives the handbook critical value for df 100 at 0.999 (149.449)', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.4, upper critical values table.
    assertAbsolute(chiSquareUpperQuantile(0.001, 100), 149.449, 5e-4, 'upper quantile q=0.001, df 100');
  });

  it('gives the handbook lower critical value for df 30 at 0.05 (18.493)', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.4, lower critical values table (probability less than the value).
    assertAbsolute(chiSquareQuantile(0.05, 30), 18.493, 5e-4, 'lower quantile p=0.05, df 30');
    assertAbsolute(chiSquareLowerTail(18.493, 30), 0.05, chiSquareDensity(18.493, 30) * 5e-4, 'P(X ≤ 18.493; df 30)');
  });

  it('gives the upper tail at 161.13, df 4 as 8.35e-34 where 1 − CDF gives 0', () => {
    // mpmath 1.2.1, gammainc(2, 80.565, inf, regularized=True) at 50 digits: 8.36698337371953553e-34.
    assertRelative(chiSquareUpperTail(161.13, 4), 8.36698337371953553e-34, 1e-13, 'Q(161.13; df 4)');
  });

  it('gives the lower tail at x = 8, df 5 as 0.8437644', () => {
    // Common practice: the textbook tables' value, P(X ≤ 8; 5) = 0.8437644.
    assertAbsolute(chiSquareLowerTail(8, 5), 0.8437644, 5e-8, 'P(X ≤ 8; df 5)');
  });

  it('reports the upper tail at x = 2000, df 1 as a power of ten below the double range', () => {
    // mpmath 1.2.1: log10(erfc(sqrt(1000))) = −436.0432737160…
    const p = chiSquareUpperProbability(2000, 1);
    assertAbsolute(p.value, 0, 0, 'value underflows');
    assertAbsolute(p.log10, -436.04327371607, 1e-11, 'log10 Q(2000; df 1)');
    assertRelative(chiSquareLogUpperTail(2000, 1), -436.04327371607 * Math.LN10, 1e-13, 'ln Q(2000; df 1)');
  });
});
