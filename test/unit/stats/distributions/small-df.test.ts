// Quantiles for df from 1e-4 to 0.05 (many far below the double range) and the density at df from 1e6 to 1e9,
// against mpmath at 60 digits (scripts/fixtures/mpmath_small_df.py; version in the fixture).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { chiSquareDensity, chiSquareLog10Density, chiSquareLog10Quantile, chiSquareLog10UpperQuantile, chiSquareQuantile, chiSquareUpperQuantile } from '../../../../src/stats/distributions/chisquare';
import { assertRelative } from '../../tolerance';

interface QuantilePoint { df: number; p: number; tail: 'lower' | 'upper'; lnX: number; x: number }
interface DensityPoint { df: number; x: number; lnDensity: number; density: number }
const F = JSON.parse(readFileSync(join(__dirname, '..', '..', '..', 'fixtures', 'mpmath', 'small_df.json'), 'utf8')) as { mpmath: string; quantiles: QuantilePoint[]; densities: DensityPoint[] };

function present<T extends object>(entry: T, keys: (keyof T & string)[]): void {
  for (const k of keys) assert.equal(typeof entry[k], k === 'tail' ? 'string' : 'number', `fixture entry ${JSON.stringify(entry)} lacks ${k}`);
}

const close = assertRelative;

describe(`chi-square quantiles for df down to 1e-4 against mpmath ${F.mpmath}`, () => {
  it('the fixture covers df 1e-4 and both tails', () => {
    assert.ok(F.quantiles.some((q) => q.df === 1e-4 && q.tail === 'upper') && F.quantiles.some((q) => q.df === 1e-4 && q.tail === 'lower'));
  });
  for (const q of F.quantiles) {
    it(`${q.tail} quantile at ${q.tail === 'lower' ? 'p' : 'q'} = ${q.p}, df = ${q.df}`, () => {
      present(q, ['df', 'p', 'tail', 'lnX', 'x']);
      const value = q.tail === 'lower' ? chiSquareQuantile(q.p, q.df) : chiSquareUpperQuantile(q.p, q.df);
      const log10 = q.tail === 'lower' ? chiSquareLog10Quantile(q.p, q.df) : chiSquareLog10UpperQuantile(q.p, q.df);
      // log10 of the quantile: everywhere, including below the double range.
      close(log10, q.lnX / Math.LN10, 1e-12, `log10 ${q.tail} quantile df=${q.df} p=${q.p}`);
      if (q.x > 1e-300) close(value, q.x, 1e-10, `${q.tail} quantile df=${q.df} p=${q.p}`);
      else assert.ok(value <= 1e-290, `quantile ${value} should underflow like ${q.x}`);
    });
  }
});

describe(`chi-square density at df 1e6 to 1e9 against mpmath ${F.mpmath}`, () => {
  for (const d of F.densities) {
    it(`density at x = ${d.x}, df = ${d.df}`, () => {
      present(d, ['df', 'x', 'lnDensity', 'density']);
      close(chiSquareDensity(d.x, d.df), d.density, 1e-12, `density df=${d.df} x=${d.x}`);
      close(chiSquareLog10Density(d.x, d.df), d.lnDensity / Math.LN10, 1e-13, `log10 density df=${d.df} x=${d.x}`);
    });
  }
});
