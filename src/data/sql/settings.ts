/**
 * The named connections of a workspace's `.vscode/settings.json` (`countercheck.connections`), for the
 * command line: the same names the editor uses, so a saved spec runs from a terminal unchanged.
 * Settings files are JSON with comments and trailing commas, read with jsonc-parser. Passwords are never read from them
 * (resolveConnection refuses a `password` member). Pure: the walk reads through the function it is given.
 */
import * as path from 'node:path';
import { parse as parseJsonc, printParseErrorCode, type ParseError } from 'jsonc-parser';
import { InputError } from '../../errors';
import { innermostContainerAt, lineColumnOf, maskByteOrderMark } from '../jsonText';
import type { ConnectionSettings } from './connection';

const KEY = 'countercheck.connections';

/** Settings files as the editor reads them: comments and trailing commas allowed. */
const SETTINGS_PARSE = { disallowComments: false, allowTrailingComma: true, allowEmptyContent: true } as const;

/**
 * A settings file's value (jsonc-parser, the editor's own reader); a syntax error names its line and column.
 * An empty file is an empty object.
 */
export function parseSettingsText(text: string, file: string): unknown {
  const errors: ParseError[] = [];
  const scanned = maskByteOrderMark(text);
  const value: unknown = parseJsonc(scanned, errors, SETTINGS_PARSE);
  if (errors.length > 0) {
    const { offset, error } = errors[0];
    const { line, column } = lineColumnOf(text, offset);
    const found = offset >= text.length ? 'the end of the file' : `\`${text.slice(offset, offset + Math.min(Math.max(errors[0].length, 1), 20))}\``;
    const expected = printParseErrorCode(error) === 'CommaExpected' ? `expected \`,\` or \`${innermostContainerAt(scanned, offset, true) === 'array' ? ']' : '}'}\`` : (SETTINGS_ERROR[printParseErrorCode(error)] ?? printParseErrorCode(error));
    throw new InputError(`${file}:${line}:${column}: not valid JSON (with comments): ${expected}, found ${found}`, { file, line, column: String(column) }, 'settings-json');
  }
  return value === undefined ? {} : value;
}

const SETTINGS_ERROR: Readonly<Record<string, string>> = {
  InvalidSymbol: 'expected a value',
  InvalidNumberFormat: 'malformed number',
  PropertyNameExpected: 'expected a setting name in double quotes',
  ValueExpected: 'expected a value',
  ColonExpected: 'expected `:` after the setting name',
  CloseBraceExpected: 'expected `,` or `}`',
  CloseBracketExpected: 'expected `,` or `]`',
  EndOfFileExpected: 'expected the end of the file',
  UnexpectedEndOfComment: 'unterminated comment',
  UnexpectedEndOfString: 'unterminated string',
  InvalidEscapeCharacter: 'bad escape sequence in a string',
  InvalidCharacter: 'control character inside a string',
};

/** `countercheck.connections` of one settings file's text; undefined when the file does not set it. */
export function connectionsFromSettings(text: string, file: string): Record<string, ConnectionSettings> | undefined {
  const settings = parseSettingsText(text, file);
  if (typeof settings !== 'object' || settings === null || Array.isArray(settings)) {
    throw new InputError(`${file}: expected an object of settings`, { file }, 'settings-json');
  }
  const connections = (settings as Record<string, unknown>)[KEY];
  if (connections === undefined) return undefined;
  const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
  if (!isObject(connections)) throw new InputError(`${file}: "${KEY}" must be an object of named connections`, { file, jsonPath: `$["${KEY}"]` }, 'settings-connections');
  for (const [name, value] of Object.entries(connections)) {
    if (!isObject(value)) {
      throw new InputError(`${file}: "${KEY}" → "${name}" must be an object (host, port, database, user, sslmode…)`, { file, jsonPath: `$["${KEY}"]["${name}"]` }, 'settings-connections');
    }
  }
  return connections as Record<string, ConnectionSettings>;
}

/**
 * The connections of the nearest `.vscode/settings.json` that sets `countercheck.connections`, looking in
 * `folder` and then each folder above it. `readText` returns undefined for a file that does not exist.
 */
export async function workspaceConnections(
  folder: string,
  readText: (file: string) => Promise<string | undefined>,
): Promise<{ file: string; connections: Record<string, ConnectionSettings> } | undefined> {
  for (let dir = path.resolve(folder); ; ) {
    const file = path.join(dir, '.vscode', 'settings.json');
    const text = await readText(file);
    const connections = text === undefined ? undefined : connectionsFromSettings(text, file);
    if (connections) return { file, connections };
    const parent = path.dirname(dir);
    if (parent === dir) return undefined;
    dir = parent;
  }
}
