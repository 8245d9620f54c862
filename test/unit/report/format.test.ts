// Number formatting shared by the reports.
import { strict as assert } from 'node:assert';
import {
  formatApaLine,
  formatCount,
  formatDf,
  formatEstimate,
  formatEstimateInterval,
  formatEstimateWithLog,
  formatNumber,
  formatPApa,
  formatPExact,
  formatProbability,
  scientificFromLog10,
  superscriptExponents,
} from '../../../src/report/format';

const p = (value: number, log10 = Math.log10(value)) => ({ value, log10 });

describe('report number formatting', () => {
  it('writes the APA line with df and N', () => {
    assert.equal(formatApaLine('X²', 0.470024, 3, 556, p(0.9254)), 'χ²(3, N = 556) = 0.47, p = .925');
    assert.equal(formatApaLine('G²', 25.37, 1, 22071, p(4.7e-7)), 'G²(1, N = 22,071) = 25.37, p < .001');
    assert.equal(formatApaLine('χ²', 29.07, 19, null, p(0.13)), 'χ²(19) = 29.07, p = .130');
    assert.equal(formatApaLine('X²', 3705082.03, 3999999, 4000000, p(0)), 'χ²(3999999, N = 4,000,000) = 3,705,082.03, p < .001');
    assert.equal(formatApaLine('z', 4.07, null, 177, p(0.0000477)), 'z = 4.07, p < .001');
  });

  it('honours the decimals setting', () => {
    assert.equal(formatApaLine('X²', 0.470024, 3, 556, p(0.9254), { decimals: 4 }), 'χ²(3, N = 556) = 0.4700, p = .925');
    assert.equal(formatNumber(1234567.891, 1), '1,234,567.9');
  });

  it('uses APA p-values: three decimals, no leading zero, p < .001', () => {
    assert.equal(formatPApa(p(0.0495)), 'p = .050');
    assert.equal(formatPApa(p(0.00099)), 'p < .001');
    assert.equal(formatPApa(p(0.9996)), 'p > .999');
  });

  it('gives the exact power of ten for a p-value below the double range', () => {
    // The upper tail at x = 2000 with 1 df is about 9.05e-437 (log10 ≈ -436.04): only its logarithm survives.
    assert.equal(formatPExact({ value: 0, log10: -436.0435 }), 'p ≈ 9.0 × 10^-437');
    assert.equal(formatPExact(p(3.2e-12)), 'p ≈ 3.2 × 10^-12');
    assert.equal(formatPExact(p(0.02)), undefined);
    assert.equal(scientificFromLog10(-3274.3), '5.0 × 10^-3275');
    assert.equal(scientificFromLog10(-2.00000001, 2), '1.0 × 10^-2');
    assert.equal(scientificFromLog10(Math.log10(9.996e-5), 3), '1.00 × 10^-4');
  });

  it('writes a count used as the statistic as a count', () => {
    assert.equal(formatApaLine('b', 9, null, null, { value: 0.029, log10: Math.log10(0.029) }), 'b = 9, p = .029');
    assert.equal(formatApaLine('X²', 4, 1, 100, { value: 0.0461, log10: Math.log10(0.0461) }), 'χ²(1, N = 100) = 4.00, p = .046');
  });

  it('writes exponents as superscripts for the panel only', () => {
    assert.equal(superscriptExponents('5.1 × 10^-5 and 2.0 × 10^12'), '5.1 × 10⁻⁵ and 2.0 × 10¹²');
    assert.equal(superscriptExponents('no exponent'), 'no exponent');
  });

  it('writes degrees of freedom: whole as they are, fractional with decimals, tiny fractional with significant digits', () => {
    assert.equal(formatDf(3), '3');
    assert.equal(formatDf(3999999), '3999999');
    assert.equal(formatDf(2.5), '2.5');
    assert.equal(formatDf(3.14159), '3.14');
    assert.equal(formatDf(3.14159, 4), '3.1416');
    assert.equal(formatDf(0.5), '0.5');
    assert.equal(formatDf(0.0153), '0.0153');
    assert.equal(formatDf(0.123456), '0.123');
    assert.equal(formatDf(1e-10), '1.00 × 10^-10');
    assert.equal(formatDf(2.345e-7, 1), '2.3 × 10^-7');
    assert.equal(formatApaLine('X²', 0.5, 1e-10, null, p(0.48)), 'χ²(1.00 × 10^-10) = 0.50, p = .480');
  });

  it('never prints a small nonzero number as zero', () => {
    assert.equal(formatNumber(0.000123, 2), '1.2 × 10^-4');
    assert.equal(formatNumber(0, 2), '0.00');
    assert.equal(formatProbability(p(0.0004)), '4.0 × 10^-4');
  });

  it('writes tiny estimates as powers of ten, an underflowed value from its logarithm, and a true 0 as 0', () => {
    assert.equal(formatEstimate(3.2e-9), '3.20 × 10^-9');
    assert.equal(formatEstimate(0), '0');
    // The χ²(1) density at x = 2000 underflows; its log10 (−436.344, closed form) still gives the value.
    assert.equal(formatEstimateWithLog(0, -436.344086), '4.53 × 10^-437');
    assert.equal(formatEstimateWithLog(0, -Infinity), '0');
    assert.equal(formatEstimateWithLog(0, undefined), '0');
    assert.equal(formatEstimateWithLog(0.162, undefined), '0.162');
    assert.equal(formatEstimateInterval(0, 1373.873, { decimals: 3 }, { lowerLog10: -599.80388 }), '[1.571 × 10^-600, 1,373.873]');
    assert.equal(formatEstimateInterval(0, 0.0287), '[0, 0.0287]');
  });

  it('formats counts, estimates and special values', () => {
    assert.equal(formatCount(1234567), '1,234,567');
    assert.equal(formatCount(12.5), '12.50');
    assert.equal(formatEstimate(0.0153), '0.0153');
    assert.equal(formatEstimate(1.8321), '1.83');
    assert.equal(formatNumber(Infinity), '∞');
    assert.equal(formatNumber(NaN), 'NaN');
    assert.equal(formatNumber(-0.5, 2), '-0.50');
  });
});
