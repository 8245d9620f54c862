/**
 * Positioned refusals. Every message starts with where the problem is, in the order a person looks
 * for it: file, line (or row/record), column; then what was expected and what was found.
 */
import { InputError, type InputLocation } from '../errors';

/** What a position counts: text lines (as an editor numbers them), table rows (HTML) or JSON records. */
export type PositionUnit = 'line' | 'row' | 'record';

export interface Where {
  readonly file?: string;
  readonly line?: number;
  readonly unit?: PositionUnit;
  readonly column?: string;
  readonly jsonPath?: string;
}

/** Shows a found value the way a person would type it; long values are cut. */
export function shown(value: string): string {
  if (value === '') return 'an empty field';
  const cut = value.length > 40 ? `${value.slice(0, 37)}…` : value;
  return `\`${cut.replace(/\r/g, '\\r').replace(/\n/g, '\\n')}\``;
}

export function prefix(where: Where): string {
  const parts: string[] = [];
  if (where.file) parts.push(where.file);
  if (where.line !== undefined) parts.push(`${where.unit ?? 'line'} ${where.line}`);
  if (where.jsonPath !== undefined && where.unit !== 'line') parts.push(where.jsonPath);
  if (where.column !== undefined) parts.push(`column \`${where.column}\``);
  return parts.length > 0 ? `${parts.join(', ')}: ` : '';
}

export function inputError(where: Where, message: string, code: string): InputError {
  const location: InputLocation = {
    ...(where.file !== undefined ? { file: where.file } : {}),
    ...(where.line !== undefined ? { line: where.line } : {}),
    ...(where.column !== undefined ? { column: where.column } : {}),
    ...(where.jsonPath !== undefined ? { jsonPath: where.jsonPath } : {}),
  };
  return new InputError(prefix(where) + message, location, code);
}

export function fail(where: Where, message: string, code: string): never {
  throw inputError(where, message, code);
}

/**
 * Longest line (bytes before its newline) any reader accepts: 16 MiB. The byte scanner's read buffer grows to
 * hold a line and csv-parse keeps a record whole, so this bounds both; longer lines are refused by number.
 */
export const MAX_LINE_BYTES = 16 * 1024 * 1024;

/** The refusal of a line longer than MAX_LINE_BYTES. */
export function lineTooLong(file: string | undefined, line: number): never {
  return fail({ file, line }, `the line is longer than ${MAX_LINE_BYTES} bytes, the longest a reader accepts (is this a data file with line breaks?)`, 'line-too-long');
}
