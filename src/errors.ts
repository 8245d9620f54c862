/**
 * The one error type the pure layers throw for bad input. It carries where the problem is
 * (file, 1-based line, column name, JSON path) so every host can point the user at it.
 */
export interface InputLocation {
  /** File path as the user gave it (relative to the spec or workspace), if any. */
  readonly file?: string;
  /** 1-based line, as an editor shows it. */
  readonly line?: number;
  /** Column name (or 1-based column number when there is no header). */
  readonly column?: string;
  /** JSON path inside a spec or JSON block, e.g. "$.source.columns[1]". */
  readonly jsonPath?: string;
}

export class InputError extends Error {
  override readonly name = 'InputError';
  constructor(
    message: string,
    readonly location: InputLocation = {},
    /** Stable identifier for tests and machine output, e.g. "zero-expected", "ragged-row". */
    readonly code: string = 'invalid-input',
  ) {
    super(message);
  }
}

export function isInputError(e: unknown): e is InputError {
  return e instanceof InputError;
}
