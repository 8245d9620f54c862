// What the results panel shows is formatted by the same functions as the text report: a density or
// critical value below the double range appears as its power of ten (never 0.00), and the key figures
// read as the text report writes them.
import { strict as assert } from 'node:assert';
import { buildPanelPayload, untranslated, type PayloadOptions } from '../../../src/report/panel';
import { resultText } from '../../../src/report/text';
import { distributionProcedure } from '../../../src/savedtest/procedures/distribution';
import type { DistributionResult } from '../../../src/stats/result';
import { independenceTest } from '../../../src/stats/procedures/table';

const options: PayloadOptions = { id: 'r1', title: 'lookup', sourceDescription: '', decimals: 2, canSave: false, canRerun: false, computedAt: '2026-12-01T00:00:00.000Z' };
const noSource = { hasSource: false, aggregate: () => Promise.reject(new Error('no source')) };

function cells(payload: ReturnType<typeof buildPanelPayload>): string[][] {
  return payload.tables.map((table) => table.rows.flatMap((row) => [row.label, ...row.cells.map((c) => c.text)]));
}

describe('panel payload', () => {
  it('a density or critical value below the double range is shown as its power of ten, a true 0 as 0', async () => {
    const result = (await distributionProcedure.run({ test: 'distribution', df: 1, x: [2000, 0], p: 1e-300 }, noSource)) as DistributionResult;
    const [tails, critical] = cells(buildPanelPayload(result, options));
    // Closed forms for χ²(1): density e^(−x/2)/sqrt(2πx) = 10^-436.344 at x = 2000 (4.53e-437);
    // lower quantile πp²/2 = 1.571e-600 at p = 1e-300, and 3.927e-601 at p/2 = 5e-301.
    // The panel writes exponents as superscripts; the copied text keeps the caret form.
    assert.deepEqual(tails.slice(0, 4), ['2,000.00', '1.000', '9.05 × 10⁻⁴³⁷', '4.53 × 10⁻⁴³⁷']);
    assert.equal(critical[1], '1.571 × 10⁻⁶⁰⁰');
    assert.match(critical[3], /^\[3\.927 × 10⁻⁶⁰¹, 1,375\.258\]$/);
    assert.match(buildPanelPayload(result, options).text, /9\.05 × 10\^-437/);
    for (const text of [...tails.slice(0, 4), ...critical]) assert.doesNotMatch(text, /^0\.0+$/, `cell "${text}" hides a positive value`);
    // χ²(1) density at x = 0 is infinite (x^(-1/2)); with df = 3 it is truly 0 and prints as 0.
    const zero = (await distributionProcedure.run({ test: 'distribution', df: 3, x: 0 }, noSource)) as DistributionResult;
    assert.equal(cells(buildPanelPayload(zero, options))[0][3], '0');
  });

  it('headline and key figures read as the text report writes them', async () => {
    const fractional = (await distributionProcedure.run({ test: 'distribution', df: 2.5, x: 3 }, noSource)) as DistributionResult;
    assert.equal(buildPanelPayload(fractional, options).headline, 'χ² distribution with 2.5 degrees of freedom');
    // Agresti's aspirin and heart attack 2×2 (from memory: X² = 25.01).
    const aspirin = independenceTest([[189, 10845], [104, 10933]], { rowLabels: ['placebo', 'aspirin'], columnLabels: ['heart attack', 'none'] });
    const payload = buildPanelPayload(aspirin, options);
    const text = resultText(aspirin);
    for (const e of aspirin.effectSizes) {
      const figure = payload.keyFigures.find((k) => k.label === e.name);
      assert.ok(figure, `${e.name} is a key figure`);
      const shown = figure.value.split(' ')[0];
      assert.ok(text.includes(`${e.name} = ${shown}`), `text report writes ${e.name} = ${shown}:\n${text}`);
    }
    assert.equal(payload.keyFigures.find((k) => k.label === 'Degrees of freedom')?.value, '1');
    assert.equal(payload.computedAt, options.computedAt);
  });

  it('writes negative residuals in the grid with a true minus sign, as the category table does', () => {
    // Adjusted residuals of a 2×2 are ±z with the same magnitude in every cell, two of each sign.
    const result = independenceTest([[30, 10], [10, 30]], { rowLabels: ['a', 'b'], columnLabels: ['x', 'y'] });
    const grid = cells(buildPanelPayload(result, options)).at(-1) ?? [];
    const signed = grid.filter((t) => /[+−-]\d/.test(t)).map((t) => t.split(' ').at(-1) ?? '');
    assert.equal(signed.length, 4, grid.join(' | '));
    assert.equal(signed.filter((t) => t.startsWith('−')).length, 2, signed.join(' '));
    assert.equal(signed.filter((t) => t.startsWith('+')).length, 2, signed.join(' '));
    for (const t of grid) assert.doesNotMatch(t, /(^| )-\d/, `cell "${t}" uses a hyphen for minus`);
  });

  it('fills placeholders when no translator is given', () => {
    assert.equal(untranslated('Power {0} at n = {1}', '0.800', 52), 'Power 0.800 at n = 52');
    assert.equal(untranslated('{1} missing', 'a'), '{1} missing');
  });
});
