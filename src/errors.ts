/**
 * A function argument of the numbers layer (src/stats), and a place inside it: `{ name: 'table', at: [1, 0] }` is
 * row 2, column 1 of the argument `table`; `{ name: 'summary', at: ['sd'] }` is the member `sd` of `summary`. The
 * numbers layer knows nothing of saved tests: the saved-test layer maps an argument to the JSON path it came from.
 */
export interface ArgumentLocation {
  /** The parameter's name, or the key of an options-object parameter, as the function declares it. */
  readonly name: string;
  /** Indices (arrays) and keys (objects) inside the argument, outermost first. */
  readonly at?: readonly (number | string)[];
}

/**
 * The one error type the pure layers throw for bad input. It carries where the problem is
 * (file, 1-based line, column name, JSON path, or the function argument) so every host can point the user at it.
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
  /** The function argument at fault, for errors of the numbers layer (which knows no files and no JSON). */
  readonly argument?: ArgumentLocation;
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

/** `name`, `name[1][0]`, `name.sd`: an argument and a place inside it, as the numbers layer writes it in a message. */
export function argumentText(argument: ArgumentLocation): string {
  return (argument.at ?? []).reduce<string>((text, key) => (typeof key === 'number' ? `${text}[${key}]` : `${text}.${key}`), argument.name);
}

/** A place inside an argument: `inside({ name: 'table' }, 1, 0)` is `table[1][0]`. */
export function inside(argument: ArgumentLocation, ...keys: readonly (number | string)[]): ArgumentLocation {
  return { name: argument.name, at: [...(argument.at ?? []), ...keys] };
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
