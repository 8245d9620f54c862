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

/**
 * Whether `value` was made by `kind` or a subclass of it (its prototype chain holds `kind.prototype`),
 * as a type guard. Primitives, null and undefined answer false.
 */
export function isInstance<T>(value: unknown, kind: { readonly prototype: T }): value is T {
  return Object.prototype.isPrototypeOf.call(kind.prototype, value as object);
}

export function isInputError(e: unknown): e is InputError {
  return isInstance(e, InputError);
}

/** The message of an error, or the thrown value as text when it is not an error. */
export function errorMessage(e: unknown): string {
  return isInstance(e, Error) ? e.message : String(e);
}
