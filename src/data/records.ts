/** Records: the string cells of a delimited text, a markdown table or a notebook table, with positions. */
import type { Dialect } from './options';
import type { PositionUnit } from './where';

export interface Records {
  /** Header names, or "1", "2", … (1-based field numbers) when there is no header. */
  readonly columns: readonly string[];
  readonly rows: readonly (readonly string[])[];
  /** 1-based position of each record (its first line in text sources). */
  readonly lines: readonly number[];
  /** What `lines` counts; `line` when absent. */
  readonly unit?: PositionUnit;
  /** File name for messages. */
  readonly file?: string;
  /** SHA-256 (hex) of the source text, UTF-8 encoded. */
  readonly sha256?: string;
  /** Dialect used, for delimited text. */
  readonly dialect?: Dialect;
  /** Leading columns that are a data frame's index (notebook tables). */
  readonly indexColumns?: number;
}
