/**
 * JSON text with positions: parses JSON (a spec file, a JSON block in a selection) while remembering where
 * every value sits, so that a problem found at `$.source.columns[1]` can be reported at its line and column,
 * and so that a recorded result can be written back into the file without disturbing anything else in it.
 * Pure: text in, values and offsets out. It lives in data/ because both data/ and spec/ use it (spec imports
 * data, never the reverse).
 */
import { InputError } from '../errors';

export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/** Where one value sits in the text (offsets are UTF-16 indices; line and column are 1-based). */
export interface JsonSpan {
  readonly start: number;
  readonly end: number;
  /** Offset of the key (the opening quote) for an object member; undefined for array items and the root. */
  readonly keyStart?: number;
}

export interface LocatedJson {
  readonly value: JsonValue;
  readonly text: string;
  /** JSON path ("$", "$.source.columns[1]") → span of its value. */
  readonly spans: ReadonlyMap<string, JsonSpan>;
}

/** Appends a member name to a JSON path, quoting names that are not plain identifiers. */
export function childPath(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  return /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key) ? `${path}.${key}` : `${path}[${JSON.stringify(key)}]`;
}

/** 1-based line and column of an offset. */
export function lineColumnOf(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

/** Line and column of the value at a JSON path, or of its nearest located ancestor. */
export function locatePath(located: LocatedJson, path: string): { line: number; column: number } | undefined {
  let p = path;
  for (;;) {
    const span = located.spans.get(p);
    if (span) return lineColumnOf(located.text, span.keyStart ?? span.start);
    const cut = Math.max(p.lastIndexOf('.'), p.lastIndexOf('['));
    if (cut <= 0) return undefined;
    p = p.slice(0, cut);
  }
}

/** A JSON syntax error: an InputError that also keeps the bare description and where it was found. */
export class JsonSyntaxError extends InputError {
  constructor(
    message: string,
    file: string | undefined,
    /** What is wrong, without the position ("expected `,` or `]`, found `4`"). */
    readonly detail: string,
    /** 1-based line and column within the parsed text. */
    readonly at: { readonly line: number; readonly column: number },
  ) {
    super(message, { file, line: at.line, column: String(at.column) }, 'invalid-json');
  }
}

/**
 * Parses JSON text (RFC 8259; a leading UTF-8 byte-order mark is allowed) and records spans.
 * A syntax error is a JsonSyntaxError (an InputError) carrying the file, line and column.
 */
export function parseJsonWithLocations(text: string, file?: string): LocatedJson {
  const spans = new Map<string, JsonSpan>();
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;

  const fail = (message: string, at: number): never => {
    const { line, column } = lineColumnOf(text, at);
    const where = file ? `${file}:${line}:${column}` : `line ${line}, column ${column}`;
    throw new JsonSyntaxError(`${where}: invalid JSON: ${message}`, file, message, { line, column });
  };
  const describe = (at: number): string => (at >= text.length ? 'the end of the text' : `\`${text[at]}\``);

  const skipSpace = (): void => {
    while (i < text.length) {
      const c = text.charCodeAt(i);
      if (c === 32 || c === 9 || c === 10 || c === 13) i++;
      else break;
    }
  };

  const parseString = (): string => {
    const start = i;
    i++; // opening quote
    let out = '';
    for (;;) {
      if (i >= text.length) return fail('unterminated string', start);
      const c = text[i];
      if (c === '"') {
        i++;
        return out;
      }
      if (c === '\\') {
        const e = text[i + 1];
        const simple: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
        if (e !== undefined && e in simple) {
          out += simple[e];
          i += 2;
        } else if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) {
          out += String.fromCharCode(parseInt(text.slice(i + 2, i + 6), 16));
          i += 6;
        } else {
          return fail(`bad escape sequence in a string`, i);
        }
      } else if (text.charCodeAt(i) < 0x20) {
        return fail('control character inside a string (use \\n, \\t …)', i);
      } else {
        out += c;
        i++;
      }
    }
  };

  const parseValue = (path: string, keyStart?: number): JsonValue => {
    skipSpace();
    const start = i;
    const c = text[i];
    let value: JsonValue;
    if (c === '{') {
      i++;
      const obj: { [key: string]: JsonValue } = {};
      skipSpace();
      if (text[i] === '}') i++;
      else {
        for (;;) {
          skipSpace();
          if (text[i] !== '"') fail(`expected a field name in double quotes, found ${describe(i)}`, i);
          const kStart = i;
          const key = parseString();
          skipSpace();
          if (text[i] !== ':') fail(`expected \`:\` after "${key}", found ${describe(i)}`, i);
          i++;
          if (Object.prototype.hasOwnProperty.call(obj, key)) fail(`field "${key}" appears twice`, kStart);
          obj[key] = parseValue(childPath(path, key), kStart);
          skipSpace();
          if (text[i] === ',') {
            i++;
            continue;
          }
          if (text[i] === '}') {
            i++;
            break;
          }
          fail(`expected \`,\` or \`}\`, found ${describe(i)}`, i);
        }
      }
      value = obj;
    } else if (c === '[') {
      i++;
      const arr: JsonValue[] = [];
      skipSpace();
      if (text[i] === ']') i++;
      else {
        for (;;) {
          arr.push(parseValue(childPath(path, arr.length)));
          skipSpace();
          if (text[i] === ',') {
            i++;
            continue;
          }
          if (text[i] === ']') {
            i++;
            break;
          }
          fail(`expected \`,\` or \`]\`, found ${describe(i)}`, i);
        }
      }
      value = arr;
    } else if (c === '"') {
      value = parseString();
    } else {
      const m = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
      if (m) {
        value = Number(m[0]);
        i += m[0].length;
      } else if (text.startsWith('true', i)) {
        value = true;
        i += 4;
      } else if (text.startsWith('false', i)) {
        value = false;
        i += 5;
      } else if (text.startsWith('null', i)) {
        value = null;
        i += 4;
      } else {
        return fail(`expected a value, found ${describe(i)}`, i);
      }
    }
    spans.set(path, { start, end: i, keyStart });
    return value;
  };

  const value = parseValue('$');
  skipSpace();
  if (i < text.length) fail(`unexpected ${describe(i)} after the end of the JSON value`, i);
  return { value, text, spans };
}
