// Adjusted standardized residuals (Haberman 1973) near 1e9: the independence test's cell grid and the post-hoc
// cell-wise tests share one computation, checked against mpmath at 40 digits (scripts/fixtures/adjusted_residuals.py).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { postHocTest, type CellTest } from '../../../../src/stats/procedures/posthoc';
import { independenceTest } from '../../../../src/stats/procedures/table';
import { assertClose } from '../../tolerance';

interface ResidualCase {
  readonly name: string;
  readonly table: number[][];
  readonly adjustedResiduals: number[][];
}
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', '..', 'fixtures', 'mpmath', 'adjusted_residuals.json'), 'utf8')) as {
  versions: { mpmath: string; digits: number };
  cases: ResidualCase[];
};

// Relative 1e-14: o − e is exact, so what remains is a few roundings in the denominator (measured ≤ 2.1e-16).
// The plain formula misses these mpmath values by up to 5.3e-8 relative.
const TOLERANCE = { rel: 1e-14 };

/** The textbook formula with o − e formed after rounding e: what the post-hoc code did before sharing. */
function plainResidual(table: number[][], i: number, j: number): number {
  const rows = table.map((row) => row.reduce((s, x) => s + x, 0));
  const cols = table[0].map((_, k) => table.reduce((s, row) => s + row[k], 0));
  const n = rows.reduce((s, x) => s + x, 0);
  const e = (rows[i] * cols[j]) / n;
  return (table[i][j] - e) / Math.sqrt(e * (1 - rows[i] / n) * (1 - cols[j] / n));
}

describe(`adjusted residuals near 1e9 (mpmath ${fixture.versions.mpmath}, ${fixture.versions.digits} digits)`, () => {
  for (const c of fixture.cases) {
    it(`${c.name}: independence grid and post-hoc cell tests agree with each other and with mpmath`, () => {
      const grid = independenceTest(c.table).grid!;
      const cells = postHocTest(c.table, { compare: 'cells' }).details!.cells as CellTest[];
      c.table.forEach((row, i) =>
        row.forEach((_, j) => {
          const what = `${c.name} cell [${i}][${j}] of ${JSON.stringify(c.table)}`;
          const fromGrid = grid.adjustedResiduals[i][j];
          const fromPostHoc = cells[i * row.length + j].adjustedResidual;
          assert.equal(fromPostHoc, fromGrid, `${what}: post-hoc ${fromPostHoc} ≠ independence grid ${fromGrid}`);
          assertClose(fromGrid, c.adjustedResiduals[i][j], TOLERANCE, `${what} (mpmath)`);
        }),
      );
    });
  }

  it('the tables are ones where rounding e first breaks the tolerance (so the checks above can fail)', () => {
    const worst = fixture.cases.map((c) =>
      Math.max(...c.table.flatMap((row, i) => row.map((_, j) => {
        const want = c.adjustedResiduals[i][j];
        return Math.abs(plainResidual(c.table, i, j) - want) / (TOLERANCE.rel * Math.abs(want));
      }))),
    );
    // Ratio of the plain formula's error to the allowed error, per case; at least one case must exceed 1.
    assert.ok(Math.max(...worst) > 1, `plain o − e stays within tolerance on every case: ratios ${worst.join(', ')}`);
  });
});
