// The r×c fixture shared by the table and Fisher tests.
import { type FixtureNumber } from '../../tolerance';
import { type HighPrecision, loadFixture } from '../../fixtures';

interface Tail {
  statistic: FixtureNumber;
  pValue: FixtureNumber;
}
interface Ratio {
  value: number;
  lower: number;
  upper: number;
}
export interface TableCase {
  name: string;
  table: number[][];
  /** Which rows and columns remain after those with total 0 are left out. */
  kept: { rows: boolean[]; columns: boolean[] };
  rowLabels?: string[];
  columnLabels?: string[];
  df: number;
  expected: number[][];
  pearson: Tail;
  likelihoodRatio: Tail;
  cressieRead: { lambda: number; statistic: FixtureNumber; pValue: FixtureNumber }[];
  pearsonResiduals: number[][];
  adjustedResiduals: number[][];
  cramersV: FixtureNumber;
  cramersVCorrected: FixtureNumber;
  highPrecision: HighPrecision;
  yates?: { statistic: number; pValue: number };
  fisher?: Record<'twoSided' | 'greater' | 'less', { value: FixtureNumber; log10?: FixtureNumber }> & { reference: string; conditionalOddsRatio?: number | null };
  oddsRatio?: Ratio;
  relativeRisk?: Ratio;
  phi?: number;
}

// scipy 1.10 chi2_contingency (with and without correction, lambda_), contingency.association, statsmodels
// Table2x2 (shift_zeros) and mpmath at 40 digits (test/fixtures/scipy/independence.json,
// written by scripts/fixtures/procedures.py).
export const independenceFixture = loadFixture<TableCase>('scipy', 'independence.json');
