/**
 * The named connections of a workspace's `.vscode/settings.json` (`countercheck.connections`), for the
 * command line: the same names the editor uses, so a saved spec runs from a terminal unchanged.
 * Settings files are JSON with comments and trailing commas. Passwords are never read from them
 * (resolveConnection refuses a `password` member). Pure: the walk reads through the function it is given.
 */
import * as path from 'node:path';
import { InputError } from '../../errors';
import type { ConnectionSettings } from './connection';

const KEY = 'countercheck.connections';

/** JSON with `//` and `/* *\/` comments and trailing commas → plain JSON (strings untouched). */
export function jsonWithCommentsToJson(text: string): string {
  let out = '';
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const dropTrailingComma = (): void => {
    let at = out.length - 1;
    while (at >= 0 && /\s/.test(out[at])) at--;
    if (out[at] === ',') out = out.slice(0, at) + out.slice(at + 1);
  };
  while (i < text.length) {
    const c = text[i];
    if (c === '"') {
      const start = i++;
      while (i < text.length && text[i] !== '"') i += text[i] === '\\' ? 2 : 1;
      out += text.slice(start, ++i);
    } else if (c === '/' && text[i + 1] === '/') {
      while (i < text.length && text[i] !== '\n') i++;
    } else if (c === '/' && text[i + 1] === '*') {
      const end = text.indexOf('*/', i + 2);
      i = end < 0 ? text.length : end + 2;
      out += ' ';
    } else {
      if (c === '}' || c === ']') dropTrailingComma();
      out += c;
      i++;
    }
  }
  return out;
}

/** `countercheck.connections` of one settings file's text; undefined when the file does not set it. */
export function connectionsFromSettings(text: string, file: string): Record<string, ConnectionSettings> | undefined {
  let settings: unknown;
  try {
    settings = text.trim() === '' ? {} : JSON.parse(jsonWithCommentsToJson(text));
  } catch (e) {
    throw new InputError(`${file}: not valid JSON (with comments): ${(e as Error).message}`, { file }, 'settings-json');
  }
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
