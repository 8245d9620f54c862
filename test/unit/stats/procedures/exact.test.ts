import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { fisherExactRxC } from '../../../../src/stats/procedures/exact';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

interface FisherCase { name: string; table: number[][]; pValue: number }
const R = fixture<{ rVersion: string; fisher: FisherCase[] }>('R', 'advanced');

describe('Fisher exact test for r×c tables', () => {
  it('gives the published p = 0.7827 for the 4×4 job-satisfaction table (Agresti, Categorical Data Analysis)', () => {
    const table = [[1, 2, 1, 0], [3, 3, 6, 1], [10, 10, 14, 9], [6, 7, 12, 11]];
    const got = fisherExactRxC(table).pValue!.value;
    closeTo(got, 0.7827, 0, 'job satisfaction p (published, 4 decimals)', table, 5e-5);
  });

  // t5x5_assoc (p ≈ 2e-5) is beyond the default work limit; montecarlo.test.ts checks its Monte Carlo fallback.
  for (const c of R.fisher.filter((f) => f.name !== 't5x5_assoc')) {
    it(`matches R fisher.test on ${c.name} (${c.table.length}×${c.table[0].length})`, () => {
      // Reference: R fisher.test (network algorithm, FEXACT), version in the fixture's rVersion.
      const out = fisherExactRxC(c.table);
      assert.ok(out.completed, 'exact computation finished');
      closeTo(out.pValue!.value, c.pValue, 1e-9, `fisher.test p (${R.rVersion})`, c.table);
    });
  }

  it('ignores an empty row and an empty column (R fisher.test on the table without them)', () => {
    const c = R.fisher.find((f) => f.name === 't2x3')!;
    const padded = [[c.table[0][0], 0, c.table[0][1], c.table[0][2]], [0, 0, 0, 0], [c.table[1][0], 0, c.table[1][1], c.table[1][2]]];
    closeTo(fisherExactRxC(padded).pValue!.value, c.pValue, 1e-9, 'p with empty margins', padded);
  });

  it('gives the same p for a table and its transpose', () => {
    const t = [[3, 0, 2, 5, 1], [0, 4, 1, 1, 6], [2, 2, 3, 0, 0]];
    const tt = t[0].map((_, j) => t.map((row) => row[j]));
    closeTo(fisherExactRxC(tt).pValue!.value, fisherExactRxC(t).pValue!.value, 1e-12, 'transpose', t);
  });

  it('keeps the log10 of p-values below the double range', () => {
    const t = [[400, 0, 0], [0, 400, 0], [0, 0, 400]];
    const p = fisherExactRxC(t).pValue!;
    // The six tables with 400 on a permutation of the diagonal are the least probable ones, each with probability
    // (400!)³/1200!, so ln p = ln 6 + 3 ln 400! − ln 1200! (R 4.2: lfactorial(400) = 2000.50069798, lfactorial(1200) = 7312.55624933).
    closeTo(p.log10, (Math.log(6) + 3 * 2000.50069798 - 7312.55624933) / Math.LN10, 1e-9, 'log10 p', t);
    assert.equal(p.value, 0);
  });

  it('reports "not completed" when the work limit is exceeded', () => {
    const out = fisherExactRxC([[10, 12, 9, 11, 8], [9, 11, 12, 10, 9], [12, 8, 10, 9, 11], [10, 9, 11, 12, 8]], { workLimit: 100 });
    assert.equal(out.completed, false);
  });

  it('refuses negative or fractional counts with the cell named', () => {
    assert.throws(() => fisherExactRxC([[1, 2], [3, -1]]), (e: unknown) => isInstance(e, InputError) && /row 2, column 2/.test(e.message));
    assert.throws(() => fisherExactRxC([[1, 2.5], [3, 1]]), (e: unknown) => isInstance(e, InputError) && /row 1, column 2/.test(e.message));
  });

  it('refuses a table with fewer than two non-empty rows', () => {
    assert.throws(() => fisherExactRxC([[1, 2, 3], [0, 0, 0]]), (e: unknown) => isInstance(e, InputError) && e.code === 'table-too-small');
  });
});
