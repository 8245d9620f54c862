/**
 * What every reader hands to the statistics: already-aggregated data. A CSV streamed from disk,
 * a selection, a JSON block or a SQL engine that counts on the server all end in one of these,
 * so `stats/` never knows where the data came from.
 */
import type { MomentSummary } from '../stats/moments';
import type { Notice } from '../stats/result';

/** An r×c table of counts with its labels. */
export interface CountTable {
  readonly rowLabels: readonly string[];
  readonly columnLabels: readonly string[];
  /** counts[i][j] for row i, column j. */
  readonly counts: readonly (readonly number[])[];
}

/** Counts of one categorical variable. */
export interface CategoryCounts {
  readonly labels: readonly string[];
  readonly counts: readonly number[];
}

/** The same r×c cross-classification counted in each stratum of a third variable. */
export interface StratifiedCounts {
  readonly stratumLabels: readonly string[];
  /** Rows and columns are the same in every stratum: the levels seen in any of them. */
  readonly rowLabels: readonly string[];
  readonly columnLabels: readonly string[];
  /** counts[k][i][j] for stratum k, row i, column j. */
  readonly counts: readonly (readonly (readonly number[])[])[];
}

/** Where the data came from, for reports and for drift detection in saved tests. */
export interface Provenance {
  /** Human description: "demo/bakery-defects.csv", "selection in report.md lines 12–20", "sql:warehouse public.orders". */
  readonly description: string;
  /** SHA-256 (hex) of the bytes read, or of a canonical form of the aggregate for engine sources. */
  readonly sha256: string;
  /** Data records read (excluding header, blank and comment lines). */
  readonly rows: number;
  /** Records dropped for missing values. */
  readonly dropped: number;
  /** Columns used, in the order they were used. */
  readonly columns: readonly string[];
  /** What the reader had to say about the data (a formula without a stored value, a merged header). */
  readonly notices?: readonly Notice[];
}

/** What a reader is asked to produce. */
export type AggregateRequest =
  /** Cross-tabulate two categorical columns (optionally weighted by a frequency column). */
  | { readonly kind: 'crosstab'; readonly rowColumn: string; readonly columnColumn: string; readonly weight?: string }
  /** Cross-tabulate two categorical columns within each level of a third (optionally weighted). */
  | { readonly kind: 'strata'; readonly stratumColumn: string; readonly rowColumn: string; readonly columnColumn: string; readonly weight?: string }
  /** Count the levels of one categorical column (optionally weighted). */
  | { readonly kind: 'categories'; readonly column: string; readonly weight?: string }
  /** Moments of one numeric column. */
  | { readonly kind: 'numeric'; readonly column: string }
  /** An already-counted table: first column row labels, header column labels. */
  | { readonly kind: 'counted-table' };

export type Aggregate =
  | { readonly kind: 'table'; readonly table: CountTable; readonly provenance: Provenance }
  | { readonly kind: 'categories'; readonly counts: CategoryCounts; readonly provenance: Provenance }
  | { readonly kind: 'strata'; readonly strata: StratifiedCounts; readonly provenance: Provenance }
  | { readonly kind: 'moments'; readonly moments: MomentSummary; readonly provenance: Provenance; readonly values?: readonly number[] };
