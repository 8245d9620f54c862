import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { deviationPlot, densityPlot, lookupDensityPlot, powerCurvePlot, intervalPlot, niceTicks, plotsFor, residualGridPlot, residualLabel, residualShade, RESIDUAL_BANDS, tickLabels } from '../../../src/report/plots';
import type { TestResult } from '../../../src/stats/result';
import { assertAbsolute } from '../tolerance';

const close = assertAbsolute;

/** A result shell: the geometry reads only the fields set here. */
function result(over: Partial<TestResult>): TestResult {
  return {
    kind: 'test', test: 'independence', procedure: 'test', statisticSymbol: 'X²', statistic: 5, df: 3, n: 100,
    pValue: { value: 0.17, log10: Math.log10(0.17) }, alternative: null, reference: { kind: 'chi-square', df: 3 },
    alpha: 0.05, significant: false, conclusion: '', otherStatistics: [], effectSizes: [], estimates: [], notices: [], assumptions: [],
    ...over,
  };
}

describe('plot geometry', () => {
  it('residual bands are the two-sided 5 %, 1 % and 0.1 % normal points', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.1 (standard normal table): 1.960, 2.576, 3.291.
    close(RESIDUAL_BANDS[0], 1.960, 5e-4, 'z 0.975');
    close(RESIDUAL_BANDS[1], 2.576, 5e-4, 'z 0.995');
    close(RESIDUAL_BANDS[2], 3.291, 5e-4, 'z 0.9995');
  });

  it('shades a residual by sign and band, and leaves zero and NaN unshaded', () => {
    assert.deepEqual(residualShade(0), { sign: 'none', level: 0, strength: 0 });
    assert.deepEqual(residualShade(Number.NaN), { sign: 'none', level: 0, strength: 0 });
    assert.equal(residualShade(1.5).sign, 'above');
    assert.equal(residualShade(1.5).level, 0);
    assert.equal(residualShade(-2.0).sign, 'below');
    assert.equal(residualShade(-2.0).level, 1);
    assert.equal(residualShade(3.0).level, 2);
    assert.equal(residualShade(-12).level, 3);
    assert.ok(residualShade(3.0).strength > residualShade(2.0).strength, 'tint grows with |r|');
  });

  it('picks round tick steps', () => {
    assert.deepEqual(niceTicks(0, 10, 5), [0, 2, 4, 6, 8, 10]);
    assert.deepEqual(niceTicks(0, 16.27, 6), [0, 5, 10, 15]);
    assert.deepEqual(niceTicks(-4, 4, 4), [-4, -2, 0, 2, 4]);
    assert.deepEqual(niceTicks(3, 3), [3]);
  });

  it('draws the chi-square density with the upper tail shaded for a test of independence', () => {
    const plot = densityPlot(result({ statistic: 9.2 }));
    assert.ok(plot);
    assert.equal(plot.shaded.length, 1);
    const tail = plot.shaded[0];
    close(tail[0].x, 9.2, 1e-12, 'tail starts at the statistic');
    close(tail[tail.length - 1].x, plot.xMax, 1e-12, 'tail ends at the axis end');
    // χ²(3) upper 5 % point 7.815: NIST/SEMATECH e-Handbook §1.3.6.7.4.
    assert.equal(plot.critical.length, 1);
    close(plot.critical[0], 7.815, 5e-4, 'critical value df 3, α 0.05');
    // Density of χ²(4) at 2 is 2·e^(−1)/4 = 0.18394 (closed form x·e^(−x/2)/4 of the textbook pdf).
    const df4 = densityPlot(result({ reference: { kind: 'chi-square', df: 4 }, df: 4, statistic: 2 }));
    assert.ok(df4);
    const at2 = df4.curve.reduce((best, p) => (Math.abs(p.x - 2) < Math.abs(best.x - 2) ? p : best));
    close(at2.y, (at2.x * Math.exp(-at2.x / 2)) / 4, 1e-9, `χ²(4) density at ${at2.x}`);
    assert.equal(plot.observed?.clipped, false);
  });

  it('flags a statistic far beyond the axis as clipped and draws it at the edge', () => {
    const plot = densityPlot(result({ statistic: 2000, reference: { kind: 'chi-square', df: 1 }, df: 1 }));
    assert.ok(plot);
    assert.equal(plot.observed?.clipped, true);
    assert.equal(plot.observed?.x, plot.xMax);
    assert.ok(plot.curve.every((p) => Number.isFinite(p.y) && p.y <= plot.yMax), 'df 1 pole is capped');
  });

  it('shades both tails with equal probability for a two-sided variance test', () => {
    // Input: a statistic in the lower tail with lower-tail probability 0.0318 (an illustrative input, not a checked value).
    const plot = densityPlot(result({
      test: 'variance', statistic: 10, df: 20, reference: { kind: 'chi-square', df: 20 }, alternative: 'two-sided',
      details: { lowerTail: { value: 0.0318, log10: Math.log10(0.0318) }, upperTail: { value: 0.9682, log10: Math.log10(0.9682) } },
    }));
    assert.ok(plot);
    assert.equal(plot.shaded.length, 2);
    close(plot.shaded[0][plot.shaded[0].length - 1].x, 10, 1e-12, 'lower tail ends at the statistic');
    const mirror = plot.shaded[1][0].x;
    // The mirror point leaves 3.18 % above it: for χ²(20) that is a little above the upper 5 % point 31.410 (NIST table).
    assert.ok(mirror > 31.41 && mirror < 37.57, `mirror ${mirror} between the 5 % (31.410) and 1 % (37.566) points`);
    assert.equal(plot.critical.length, 2);
    // χ²(20) lower 2.5 % point 9.591 and upper 2.5 % point 34.170: NIST/SEMATECH e-Handbook §1.3.6.7.4.
    close(plot.critical[0], 9.591, 5e-4, 'lower critical');
    close(plot.critical[1], 34.170, 5e-4, 'upper critical');
  });

  it('reads a two-sided hypothesis tested by a squared statistic (McNemar) in the upper tail of χ²(1)', () => {
    const plot = densityPlot(result({ test: 'paired', statistic: 4.5, df: 1, reference: { kind: 'chi-square', df: 1 }, alternative: 'two-sided' }));
    assert.ok(plot);
    assert.equal(plot.shaded.length, 1);
    close(plot.shaded[0][0].x, 4.5, 1e-12, 'tail starts at the statistic');
    // χ²(1) upper 5 % point 3.841: NIST/SEMATECH e-Handbook §1.3.6.7.4.
    assert.equal(plot.critical.length, 1);
    close(plot.critical[0], 3.841, 5e-4, 'critical value df 1, α 0.05');
  });

  it('shades the lower tail only for a "less" alternative', () => {
    const plot = densityPlot(result({ statistic: 4, df: 10, reference: { kind: 'chi-square', df: 10 }, alternative: 'less' }));
    assert.ok(plot);
    assert.equal(plot.shaded.length, 1);
    assert.equal(plot.shaded[0][0].x, 0);
  });

  it('draws no density without a reference distribution', () => {
    assert.equal(densityPlot(result({ reference: { kind: 'none' }, statistic: Number.NaN })), null);
  });

  it('draws goodness of fit as deviations over a ±1.96 SD band that agrees with the standardized residual', () => {
    // Two categories, n = 80, p = 0.5 each: the deviation's SD is sqrt(40 · 0.5) = 4.472, so 48 − 40 = 8 is
    // z = 1.789 (inside the band, half-width 1.96 · 4.472 = 8.765).
    const sd = Math.sqrt(40 * 0.5);
    const plot = deviationPlot([
      { label: 'a', observed: 48, expected: 40, pearsonResidual: 8 / Math.sqrt(40), standardizedResidual: 8 / sd, contribution: 1.6 },
      { label: 'b', observed: 32, expected: 40, pearsonResidual: -8 / Math.sqrt(40), standardizedResidual: -8 / sd, contribution: 1.6 },
    ]);
    assert.deepEqual(plot.rows.map((r) => r.deviation), [8, -8]);
    assert.ok(Math.abs(plot.rows[0].band - 1.959964 * sd) < 1e-5, `band ${plot.rows[0].band}`);
    assert.ok(plot.rows.every((r) => Math.abs(r.deviation) < r.band), 'both inside the band');
    assert.equal(plot.xMin, -plot.xMax, 'symmetric about the expectation');
    assert.ok(plot.xMax >= plot.rows[0].band, 'the band fits on the axis');
    assert.equal(plot.rows[0].text, '+8.00 (z = +1.79)');
    assert.equal(plot.rows[1].text, '−8.00 (z = −1.79)');
    // A category with no deviation still gets its band from E(1 − E/n).
    const zero = deviationPlot([{ label: 'a', observed: 40, expected: 40, pearsonResidual: 0, standardizedResidual: 0, contribution: 0 }, { label: 'b', observed: 40, expected: 40, pearsonResidual: 0, standardizedResidual: 0, contribution: 0 }]);
    assert.ok(Math.abs(zero.rows[0].band - 1.959964 * sd) < 1e-5);
  });

  it('centres the density on its bulk for large df, and keeps 0 for small df', () => {
    // χ²(1767): the 0.1 % and 99.9 % points are about 1,630 and 1,912 (normal approximation 1767 ± 3.09·sqrt(2·1767)).
    const large = densityPlot(result({ reference: { kind: 'chi-square', df: 1767 }, df: 1767, statistic: 1800 }));
    assert.ok(large);
    assert.ok(large.xMin > 1550 && large.xMin < 1700, `xMin ${large.xMin}`);
    assert.ok(large.xMax > 1850 && large.xMax < 1990, `xMax ${large.xMax}`);
    const small = densityPlot(result({ reference: { kind: 'chi-square', df: 3 }, df: 3, statistic: 4 }));
    assert.equal(small?.xMin, 0);
  });

  it('draws the lookup density with the x asked and its upper tail, or the critical value only', () => {
    const lookup = lookupDensityPlot({ kind: 'distribution', test: 'distribution', df: 4, noncentrality: 0, points: [{ x: 11.7, lower: { value: 0.98, log10: 0 }, upper: { value: 0.0197, log10: -1.7 }, density: 0.008 }], critical: [{ p: 0.05, lower: 0.7107, upper: 9.4877, twoSided: { lower: 0.4844, upper: 11.143 } }], notices: [] });
    assert.ok(lookup);
    assert.equal(lookup.observed?.label, 'x = 11.70');
    assert.equal(lookup.shaded.length, 1);
    assert.equal(lookup.shaded[0][0].x, 11.7);
    assert.deepEqual(lookup.critical, [9.4877]);
    const criticalOnly = lookupDensityPlot({ kind: 'distribution', test: 'distribution', df: 4, noncentrality: 0, points: [], critical: [{ p: 0.05, lower: 0.7107, upper: 9.4877, twoSided: { lower: 0.4844, upper: 11.143 } }], notices: [] });
    assert.equal(criticalOnly?.observed, null);
    assert.equal(criticalOnly?.shaded[0][0].x, 9.4877);
  });

  it('draws the power curve with the plan marked', () => {
    const plot = powerCurvePlot({ kind: 'power', test: 'power', target: 'variance', effectSize: { id: 'r', name: 'σ1/σ0', value: 1.3 }, df: 29, alpha: 0.05, n: 30, power: 0.669, solvedFor: 'power', curve: [{ n: 10, power: 0.3 }, { n: 30, power: 0.669 }, { n: 60, power: 0.93 }], notices: [] });
    assert.ok(plot);
    assert.deepEqual([plot.xMin, plot.xMax], [10, 60]);
    assert.deepEqual(plot.marker, { x: 30, y: 0.669, label: 'n = 30, power 0.669' });
  });

  it('shades every cell of the residual grid', () => {
    const plot = residualGridPlot({
      rowLabels: ['r1', 'r2'], columnLabels: ['c1', 'c2'], observed: [[1, 2], [3, 4]], expected: [[1, 2], [3, 4]],
      pearsonResiduals: [[0, 0], [0, 0]], adjustedResiduals: [[2.5, -2.5], [-0.5, 4]], contributions: [[0, 0], [0, 0]],
      rowTotals: [3, 7], columnTotals: [4, 6], total: 10,
    });
    assert.deepEqual(plot.shades.map((r) => r.map((s) => `${s.sign}${s.level}`)), [['above1', 'below1'], ['below0', 'above3']]);
  });

  it('puts the interval for σ against σ0 on the σ scale', () => {
    const plot = intervalPlot(result({
      test: 'variance', confidenceInterval: { lower: 4, upper: 16, level: 0.95, parameter: 'σ²', method: 'equal-tail chi-square' },
      details: { variance0: 25, sampleVariance: 9 },
    }));
    assert.ok(plot);
    assert.equal(plot.lower, 2);
    assert.equal(plot.upper, 4);
    assert.equal(plot.reference, 5);
    assert.equal(plot.estimate, 3);
    assert.equal(plot.referenceInside, false);
    assert.ok(plot.xMin <= 2 && plot.xMax >= 5);
  });

  it('keeps the open side of a one-sided bound at the axis edge', () => {
    const plot = intervalPlot(result({
      test: 'variance', confidenceInterval: { lower: 4, upper: Infinity, level: 0.95, parameter: 'σ²', method: 'one-sided' },
      details: { variance0: 9, sampleVariance: 6 },
    }));
    assert.ok(plot);
    assert.equal(plot.upper, plot.xMax);
    assert.equal(plot.referenceInside, true);
  });

  it('lists the plots that fit a result', () => {
    const kinds = plotsFor(result({})).map((p) => p.kind);
    assert.deepEqual(kinds, ['density']);
  });

  describe('labels (the webview prints these strings and formats nothing)', () => {
    it('writes each tick with the decimals its step needs', () => {
      assert.deepEqual(tickLabels([0, 5, 10, 15]), ['0', '5', '10', '15']);
      assert.deepEqual(tickLabels([0.2, 0.4, 0.6]), ['0.2', '0.4', '0.6']);
      assert.deepEqual(tickLabels([0.05, 0.1, 0.15]), ['0.05', '0.10', '0.15']);
      assert.deepEqual(tickLabels([0, 2000, 4000]), ['0', '2,000', '4,000']);
      assert.deepEqual(tickLabels([-4, -2, 0, 2, 4]), ['-4', '-2', '0', '2', '4']);
      // A tick reached by adding 0.2 three times to −0.6 is 5.6e-17, not 0: it is still labelled 0.
      assert.deepEqual(tickLabels([-0.6 + 0.2 + 0.2, -0.6 + 0.2 + 0.2 + 0.2, 0.2]), ['-0.2', '0.0', '0.2']);
      assert.deepEqual(tickLabels([3]), ['3']);
      assert.deepEqual(tickLabels([]), []);
    });

    it('gives every plot one label per tick', () => {
      const density = densityPlot(result({ statistic: 9.2 }));
      assert.ok(density);
      assert.equal(density.tickLabels.length, density.ticks.length);
      assert.deepEqual(density.tickLabels, tickLabels(density.ticks));
      const deviation = deviationPlot([{ label: 'a', observed: 48, expected: 40.5, pearsonResidual: 1.2, standardizedResidual: 1.6, contribution: 1.5 }], 3);
      assert.deepEqual(deviation.tickLabels, tickLabels(deviation.ticks), `ticks ${JSON.stringify(deviation.ticks)}`);
      assert.equal(deviation.rows[0].observedText, '48');
      assert.equal(deviation.rows[0].expectedText, '40.500');
    });

    it('writes residual-grid cells with their sign and the decimals setting', () => {
      const grid = {
        rowLabels: ['r1', 'r2'], columnLabels: ['c1', 'c2'], observed: [[1, 2], [3, 4]], expected: [[1, 2], [3, 4]],
        pearsonResiduals: [[0, 0], [0, 0]], adjustedResiduals: [[2.5, -2.456], [0, Number.NaN]], contributions: [[0, 0], [0, 0]],
        rowTotals: [3, 7], columnTotals: [4, 6], total: 10,
      };
      assert.deepEqual(residualGridPlot(grid).labels, [['+2.50', '−2.46'], ['0.00', '–']]);
      assert.deepEqual(residualGridPlot(grid, 0).labels, [['+3', '−2'], ['0', '–']]);
      assert.deepEqual(residualGridPlot(grid, 4).labels[0], ['+2.5000', '−2.4560']);
      assert.equal(residualLabel(-1234.5, 1), '−1,234.5');
    });

    it('writes the interval ends, the estimate and σ0 with the decimals setting; an open end reads ∞', () => {
      const variance = (decimals: number, upper = 16) => intervalPlot(result({
        test: 'variance', confidenceInterval: { lower: 4, upper, level: 0.95, parameter: 'σ²', method: 'equal-tail chi-square' },
        details: { variance0: 2.25, sampleVariance: 9 },
      }), decimals);
      const two = variance(2);
      assert.ok(two);
      assert.deepEqual(two.texts, { lower: '2.00', upper: '4.00', estimate: '3.00', reference: 'σ0 = 1.50' });
      assert.deepEqual(two.tickLabels, tickLabels(two.ticks));
      assert.equal(variance(0)?.texts.reference, 'σ0 = 2');
      assert.equal(variance(3, Infinity)?.texts.upper, '∞');
      // Below 1 an estimate keeps decimals + 1 significant digits, as in the result table.
      const small = intervalPlot(result({
        test: 'variance', confidenceInterval: { lower: 0.0001, upper: 0.0009, level: 0.9, parameter: 'σ²', method: 'equal-tail chi-square' },
        details: { variance0: 0.0004, sampleVariance: 0.0004 },
      }), 2);
      assert.deepEqual(small?.texts, { lower: '0.0100', upper: '0.0300', estimate: '0.0200', reference: 'σ0 = 0.0200' });
    });

    it('leaves no number formatting in the webview', () => {
      const source = readFileSync(path.join(__dirname, '../../../src/webview/main.ts'), 'utf8');
      const found = source.match(/\.(toFixed|toPrecision|toExponential|toLocaleString)\(|Intl\.NumberFormat/g) ?? [];
      assert.deepEqual(found, [], 'src/webview/main.ts formats numbers itself');
    });

    it('passes the decimals setting from plotsFor to every plot', () => {
      const plots = plotsFor(result({
        test: 'variance', confidenceInterval: { lower: 4, upper: 16, level: 0.95, parameter: 'σ²', method: 'equal-tail chi-square' },
        details: { variance0: 2.25, sampleVariance: 9 },
      }), 1);
      const interval = plots.find((p) => p.kind === 'interval');
      assert.ok(interval && interval.kind === 'interval');
      assert.equal(interval.texts.reference, 'σ0 = 1.5');
      const density = plots.find((p) => p.kind === 'density');
      assert.ok(density && density.kind === 'density');
      assert.equal(density.observed?.label, 'X² = 5.0');
    });
  });
});
