/**
 * The saved-test format, version 1 (`*.countercheck.json`), as TypeScript types, and the interfaces
 * through which a host (the command line, the extension) hands `runSpec` its file access.
 */
import type { CategoryOptions, IntakeOptions } from '../data/options';
import type { Aggregate, AggregateRequest, Provenance } from '../data/types';
import type { Result } from '../stats/result';
import type { CommonSpec } from './procedures/index';
import type { SourceSpec } from './procedures/shared';

/** Where a test's data lives when it is not inline: the type its field table (`sourceField` in procedures/shared.ts) gives. */
export type { SourceSpec } from './procedures/shared';

/** Proportions or ratios either in the order of the categories or keyed by level. */
export type WeightsByLevel = readonly number[] | Readonly<Record<string, number>>;

/**
 * A saved test as read from disk after validation, seen from outside its procedure: the common fields and the
 * source. Each handler sees its own typed form (`SpecOf<fields>`, procedures/index.ts), derived from its field table.
 */
export type SpecV1 = CommonSpec & { readonly source?: SourceSpec } & { readonly [field: string]: unknown };

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

/** What a procedure needs from a reader beyond the aggregate itself. */
export interface SourceNeeds {
  /** The raw values of a numeric column, not only their moments (a distribution fit bins them). */
  readonly values?: boolean;
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
  aggregate(request: AggregateRequest, levels?: Pick<CategoryOptions, 'levels' | 'rowLevels' | 'columnLevels'>, needs?: SourceNeeds): Promise<Aggregate>;
  /**
   * The counts a handler read from its source, as its inline data fields (`{ strata }`), so that the sections
   * computed beside the result (fragility) see them as if they were written in the saved test.
   */
  countsRead?(fields: Readonly<Record<string, unknown>>): void;
}
