/**
 * The saved-test format, version 1 (`*.countercheck.json`), as TypeScript types, and the interfaces
 * through which a host (the command line, the extension) hands `runSpec` its file access.
 */
import type { CategoryOptions, IntakeOptions } from '../data/options';
import type { Aggregate, AggregateRequest, Provenance } from '../data/types';
import type { Alternative, Result } from '../stats/result';

/** Where a test's data lives when it is not inline. Paths are relative to the spec file. */
export interface SourceSpec {
  readonly path?: string;
  /** Columns used: one (goodness of fit, variance) or two (independence); none for an already-counted table. */
  readonly columns?: readonly string[];
  /** A frequency-weight column. */
  readonly weight?: string;
  /** A workbook's sheet (.xlsx). */
  readonly sheet?: string;
  /** A workbook's range: `B2:F40`, a defined name or a table (.xlsx). */
  readonly range?: string;
  readonly delimiter?: ',' | ';' | '\t' | '|' | 'auto';
  readonly decimal?: '.' | ',';
  readonly encoding?: 'utf-8' | 'utf-16' | 'latin1';
  readonly header?: boolean;
  readonly comment?: string | null;
  /** Cell texts meaning "missing", or the full missing-value policy. */
  readonly missing?: readonly string[] | { readonly tokens?: readonly string[]; readonly policy?: 'drop' | 'category'; readonly label?: string };
  /** Level order when the spec does not give the levels. */
  readonly categories?: 'first-seen' | 'sorted';
  readonly caseFold?: boolean;
  /** A SQL source (named connection and a table or a query of the user's own). */
  readonly sql?: { readonly connection: string; readonly table?: string; readonly query?: string };
  readonly where?: string;
  /** Bind parameters referenced as $1, $2, … in `where` or `query`. */
  readonly parameters?: readonly (string | number | boolean | null)[];
  /** A note recorded with the result ("nightly snapshot of 2026-11-30"). */
  readonly asOf?: string;
}

/** Proportions or ratios either in the order of the categories or keyed by level. */
export type WeightsByLevel = readonly number[] | Readonly<Record<string, number>>;

/** A spec as read from disk after validation. Fields not used by a test are absent. */
export interface SpecV1 {
  readonly version?: 1;
  readonly test: string;
  readonly title?: string;
  readonly description?: string;
  readonly alpha?: number;
  // data given inline
  readonly table?: readonly (readonly number[])[];
  readonly rowLabels?: readonly string[];
  readonly columnLabels?: readonly string[];
  /** Names of what the rows and the columns classify, for the conclusion (default: the source's column names). */
  readonly rowVariable?: string;
  readonly columnVariable?: string;
  /** Name of the variable counted or measured, for the conclusion (default: the source's column name). */
  readonly variable?: string;
  /** Unit of the measured values (variance test), e.g. "g". */
  readonly unit?: string;
  readonly observed?: readonly number[];
  readonly categories?: readonly string[];
  readonly expected?: readonly number[];
  readonly proportions?: WeightsByLevel;
  readonly ratios?: WeightsByLevel;
  readonly values?: readonly number[];
  readonly summary?: { readonly n: number; readonly sd?: number; readonly variance?: number };
  readonly df?: number;
  readonly x?: number | readonly number[];
  readonly p?: number | readonly number[];
  // data from a file or a database
  readonly source?: SourceSpec;
  // options
  readonly sigma0?: number;
  readonly variance0?: number;
  readonly alternative?: Alternative;
  readonly confidence?: number;
  readonly correction?: boolean;
  readonly statistic?: 'pearson' | 'likelihood-ratio' | 'cressie-read';
  readonly lambda?: number;
  readonly estimatedParameters?: number;
  readonly method?: 'asymptotic' | 'exact' | 'monte-carlo';
  readonly resamples?: number;
  readonly seed?: number;
  /** The result seen when the spec was saved (see src/spec/review.ts). */
  readonly recorded?: unknown;
  /** Fields added by procedures registered later (paired, stratified, trend, power…). */
  readonly [field: string]: unknown;
}

/** Progress and cancellation for long reads. */
export interface ReadControl {
  readonly signal?: AbortSignal;
  /** Fraction done in [0, 1], when known. */
  readonly onProgress?: (fraction: number) => void;
}


/**
 * File access injected by the host. The command line passes Node readers; the extension passes readers
 * that go through the workspace file system. Paths given here are already resolved and checked.
 */
export interface SpecReaders {
  aggregateFile(path: string, request: AggregateRequest, options: IntakeOptions, control: ReadControl): Promise<Aggregate>;
  /** Sources that count on a database server; absent where the host offers none. */
  aggregateSql?(source: SourceSpec, request: AggregateRequest, options: IntakeOptions, control: ReadControl): Promise<Aggregate>;
}

/** What runSpec needs besides the spec. */
export interface RunOptions {
  readonly readers: SpecReaders;
  /** The spec file's path (absolute, or relative to the process's folder); source paths are relative to its folder. Absent for a spec read from stdin. */
  readonly specPath?: string;
  /** The folder source files must stay inside (the workspace folder). Default: the spec's folder. */
  readonly allowedRoot?: string;
  /** Allow absolute source paths and `..` escapes out of the allowed root (a user setting; off by default). */
  readonly allowOutsideRoot?: boolean;
  readonly signal?: AbortSignal;
  readonly onProgress?: (fraction: number) => void;
}

/** The fingerprint of the data a result was computed from. */
export interface DataFingerprint {
  /** SHA-256 (hex) of the bytes read, or of the canonical JSON of inline data. */
  readonly sha256: string;
  readonly rows: number;
  readonly columns: readonly string[];
  /** "demo/data/bakery.csv", or "inline". */
  readonly description: string;
}

export interface SpecRun {
  readonly result: Result;
  readonly data: DataFingerprint;
  /** The reader's full provenance when the data came from a file or a database. */
  readonly provenance?: Provenance;
}

/** What a procedure handler gets at run time. */
export interface RunContext {
  readonly signal?: AbortSignal;
  /** Reports the fraction done of long computations (Monte Carlo, exact enumeration). */
  readonly onProgress?: (fraction: number) => void;
  /** True when the spec has a `source`. */
  readonly hasSource: boolean;
  /**
   * Reads the spec's `source` with this request (its path resolved and checked first). `levels` gives the
   * order and full set of levels when the spec names them (a level never seen still counts, with 0).
   */
  aggregate(request: AggregateRequest, levels?: Pick<CategoryOptions, 'levels' | 'rowLevels' | 'columnLevels'>): Promise<Aggregate>;
}
