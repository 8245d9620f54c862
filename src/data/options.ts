/**
 * The options a reader accepts. They are plain JSON-shaped objects so that a saved spec's
 * `"source"` (delimiter, decimal, encoding, header, missing, categories) passes straight through.
 */

/** Field separators we detect and accept. */
export type Delimiter = ',' | ';' | '\t' | '|';
export type DecimalMark = '.' | ',';
/** `utf-16` means UTF-16 with a byte-order mark (little-endian when there is none). */
export type Encoding = 'utf-8' | 'utf-16' | 'latin1';

export interface DialectOptions {
  /** Field separator; detected from the first lines when absent or `"auto"`. */
  readonly delimiter?: Delimiter | 'auto';
  /** Decimal mark of numeric fields; `","` is usual with a `;` delimiter. Default `"."`. */
  readonly decimal?: DecimalMark;
  /** Default UTF-8; a UTF-8 or UTF-16 byte-order mark always wins. */
  readonly encoding?: Encoding;
  /** Whether the first record is a header; detected when absent or `"auto"`. */
  readonly header?: boolean | 'auto';
  /** Lines starting with this character are skipped; default `#`, `null` turns it off. */
  readonly comment?: string | null;
}

/** The dialect actually used, after detection. */
export interface Dialect {
  readonly delimiter: Delimiter;
  readonly decimal: DecimalMark;
  readonly header: boolean;
  readonly comment: string | null;
}

export const DEFAULT_MISSING_TOKENS: readonly string[] = ['', 'NA', 'NaN', 'null', '-'];

export interface MissingOptions {
  /** Field values (after trimming) that mean "no value". Default: empty, NA, NaN, null, -. */
  readonly tokens?: readonly string[];
  /** `drop` (default): the record is left out and counted in `provenance.dropped`; `category`: missing is its own level. */
  readonly policy?: 'drop' | 'category';
  /** Label of the missing level under the `category` policy. Default `(missing)`. */
  readonly label?: string;
}

export interface CategoryOptions {
  /** Level order: as first seen (default), sorted (numerically when every label is a number), or as given. */
  readonly order?: 'first-seen' | 'sorted' | 'given';
  /** The full, ordered set of levels of a one-column request (levels never seen still count, with 0). */
  readonly levels?: readonly string[];
  /** The same for the row and the column variable of a cross-tabulation. */
  readonly rowLevels?: readonly string[];
  readonly columnLevels?: readonly string[];
  /** Treat `Oven A` and `oven a` as one level (shown as first seen, or as given). */
  readonly caseFold?: boolean;
  /** Refuse a column with more distinct levels than this (it is probably not categorical). Default 10,000. */
  readonly maxLevels?: number;
}

export interface IntakeOptions {
  readonly dialect?: DialectOptions;
  readonly missing?: MissingOptions;
  readonly categories?: CategoryOptions;
  /** File name as the user knows it, used in every message and in the provenance. */
  readonly file?: string;
  /** Provenance description; defaults to the file name. */
  readonly description?: string;
  /** For a numeric request, also return the values themselves (small inputs only). */
  readonly keepValues?: boolean;
  /**
   * The folder a file must lie in, checked on its real path (symbolic links followed) before it is opened.
   * Undefined: no folder check (the user allowed paths outside the workspace, or named the file directly).
   */
  readonly allowedRoot?: string;
}
