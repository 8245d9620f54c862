/**
 * A small PostgreSQL lexer: enough to know where string literals, quoted identifiers, dollar quotes
 * and comments start and end, so that user-written SQL fragments (a `where` condition, a saved
 * SELECT) can be checked structurally before anything is sent. It does not parse SQL; it only
 * finds the tokens that matter for safety: semicolons, parentheses and bare keywords.
 * Pure: text in, tokens out.
 *
 * Kept rather than a SQL parser library: it needs only token boundaries (literals, quoted identifiers, dollar
 * quotes, nested comments), 160 lines with no dependency; a full PostgreSQL grammar would add a parser to
 * the bundle to answer the same question. Not measured against one (no such package is installed here).
 */
import { InputError, type InputLocation } from '../../errors';

export type SqlTokenKind = 'word' | 'quoted-identifier' | 'string' | 'parameter' | 'number' | 'punctuation' | 'operator';

export interface SqlToken {
  readonly kind: SqlTokenKind;
  readonly text: string;
  /** UTF-16 offset of the token in the fragment. */
  readonly offset: number;
}

/** "line 2, column 7" (1-based) for an offset inside a fragment, for messages. */
export function describePosition(text: string, offset: number): string {
  const lines = text.slice(0, offset).split('\n');
  return `line ${lines.length}, column ${lines[lines.length - 1].length + 1}`;
}

const wordStart = /[A-Za-z_\u0080-\uffff]/;
const wordPart = /[A-Za-z0-9_$\u0080-\uffff]/;

/**
 * Splits a SQL fragment into tokens, skipping whitespace and comments (PostgreSQL nests block
 * comments). Throws InputError for an unterminated literal, identifier or comment.
 * `what` names the fragment in messages ("the `where` condition").
 */
export function tokenizeSql(text: string, what: string, location: InputLocation = {}): SqlToken[] {
  const tokens: SqlToken[] = [];
  const unterminated = (kind: string, start: number): never => {
    throw new InputError(
      `${what}: ${kind} starting at ${describePosition(text, start)} is never closed`,
      location,
      'sql-unterminated',
    );
  };
  let i = 0;
  const n = text.length;
  while (i < n) {
    const c = text[i];
    if (/\s/.test(c)) {
      i++;
      continue;
    }
    if (c === '-' && text[i + 1] === '-') {
      while (i < n && text[i] !== '\n') i++;
      continue;
    }
    if (c === '/' && text[i + 1] === '*') {
      const start = i;
      let depth = 0;
      while (i < n) {
        if (text[i] === '/' && text[i + 1] === '*') {
          depth++;
          i += 2;
        } else if (text[i] === '*' && text[i + 1] === '/') {
          depth--;
          i += 2;
          if (depth === 0) break;
        } else i++;
      }
      if (depth !== 0) unterminated('a /* comment', start);
      continue;
    }
    if (c === "'") {
      const start = i;
      i = endOfString(text, start, false, () => unterminated('a string literal', start));
      tokens.push({ kind: 'string', text: text.slice(start, i), offset: start });
      continue;
    }
    if (c === '"') {
      const start = i;
      i++;
      for (;;) {
        if (i >= n) unterminated('a quoted identifier', start);
        if (text[i] === '"') {
          if (text[i + 1] === '"') i += 2;
          else break;
        } else i++;
      }
      i++;
      tokens.push({ kind: 'quoted-identifier', text: text.slice(start, i), offset: start });
      continue;
    }
    if (c === '$') {
      const start = i;
      if (/[0-9]/.test(text[i + 1] ?? '')) {
        i++;
        while (i < n && /[0-9]/.test(text[i])) i++;
        tokens.push({ kind: 'parameter', text: text.slice(start, i), offset: start });
        continue;
      }
      const tag = /^\$([A-Za-z_\u0080-\uffff][A-Za-z0-9_\u0080-\uffff]*)?\$/.exec(text.slice(i));
      if (tag) {
        const close = text.indexOf(tag[0], i + tag[0].length);
        if (close < 0) unterminated(`a dollar-quoted string ${tag[0]}`, start);
        i = close + tag[0].length;
        tokens.push({ kind: 'string', text: text.slice(start, i), offset: start });
        continue;
      }
      i++;
      tokens.push({ kind: 'operator', text: '$', offset: start });
      continue;
    }
    if (wordStart.test(c)) {
      const start = i;
      while (i < n && wordPart.test(text[i])) i++;
      const word = text.slice(start, i);
      // E'…' (backslash escapes), B'…', X'…', N'…', U&'…' are string literals with a prefix.
      if (text[i] === "'" && /^[EeBbXxNn]$/.test(word)) {
        const end = endOfString(text, i, /^[Ee]$/.test(word), () => unterminated('a string literal', start));
        i = end;
        tokens.push({ kind: 'string', text: text.slice(start, i), offset: start });
        continue;
      }
      if (/^[Uu]$/.test(word) && text[i] === '&' && (text[i + 1] === "'" || text[i + 1] === '"')) {
        // U&'…' or U&"…": let the next loop iteration read the quoted part.
        i++;
        continue;
      }
      tokens.push({ kind: 'word', text: word, offset: start });
      continue;
    }
    if (/[0-9.]/.test(c) && (c !== '.' || /[0-9]/.test(text[i + 1] ?? ''))) {
      const m = /^(?:0[xXoObB][0-9A-Fa-f_]+|[0-9_]*\.?[0-9_]+(?:[eE][+-]?[0-9]+)?)/.exec(text.slice(i));
      const len = m && m[0].length > 0 ? m[0].length : 1;
      tokens.push({ kind: 'number', text: text.slice(i, i + len), offset: i });
      i += len;
      continue;
    }
    if ('();,[].:'.includes(c)) {
      tokens.push({ kind: 'punctuation', text: c, offset: i });
      i++;
      continue;
    }
    const start = i;
    while (i < n && /[+\-*/<>=~!@#%^&|`?]/.test(text[i]) && !(text[i] === '-' && text[i + 1] === '-') && !(text[i] === '/' && text[i + 1] === '*')) i++;
    if (i === start) i++;
    tokens.push({ kind: 'operator', text: text.slice(start, i), offset: start });
  }
  return tokens;
}

/** Offset just after the closing quote of a '…' literal starting at `quote`. */
function endOfString(text: string, quote: number, backslashEscapes: boolean, fail: () => never): number {
  let i = quote + 1;
  for (;;) {
    if (i >= text.length) fail();
    const c = text[i];
    if (backslashEscapes && c === '\\') {
      i += 2;
    } else if (c === "'") {
      if (text[i + 1] === "'") i += 2;
      else return i + 1;
    } else i++;
  }
}
