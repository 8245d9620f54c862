/**
 * Delimited text (CSV, TSV, semicolon, pipe) held in memory: selections, small files, notebook
 * outputs. Parsing is csv-parse's; this module adds dialect detection, positions and our messages.
 */
import { createHash } from 'node:crypto';
import { CsvError, parse } from 'csv-parse/sync';
import { detectDialect } from './dialect';
import type { Dialect, DialectOptions } from './options';
import type { Records } from './records';
import { fail, inputError, lineTooLong, MAX_LINE_BYTES, shown, type Where } from './where';
import { isInstance } from '../errors';

export interface DelimitedOptions {
  readonly dialect?: DialectOptions;
  readonly file?: string;
  /** Line number of the text's first line in its document (a selection starting at line 40). Default 1. */
  readonly firstLine?: number;
}

/** CRLF and lone CR become LF so that csv-parse's line numbers are the editor's. */
export function normaliseNewlines(text: string): string {
  return text.replace(/\r\n?/g, '\n');
}

export function stripBom(text: string): string {
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/**
 * csv-parse options for a dialect; shared by the in-memory and the streaming readers. `info`
 * (a line number per record) costs an object per record: the stream reader reads the parser's
 * running line count instead.
 */
export function csvParseOptions(dialect: Dialect, info = true) {
  return {
    delimiter: dialect.delimiter,
    quote: '"',
    ...(dialect.comment ? { comment: dialect.comment, comment_no_infix: true } : {}),
    skip_empty_lines: true,
    relax_column_count: true,
    info,
    bom: true,
    record_delimiter: '\n',
    // Bounds the memory of one record; a longer one is refused by line (csvParseFailure). Characters, not bytes:
    // a UTF-8 line of MAX_LINE_BYTES bytes has at most that many characters. csv-parse 6.2.1 refuses a record only
    // when it passes the limit by 2 (measured: limit 50 accepts 51 characters, refuses 52), hence the − 1.
    max_record_size: MAX_LINE_BYTES - 1,
  } as const;
}

/** 1-based line of the last quote that opens and is never closed (quotes pair up, doubled ones too). */
function unclosedQuoteLine(text: string): number | undefined {
  let line = 1;
  let openedAt: number | undefined;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) line++;
    else if (c === 34) openedAt = openedAt === undefined ? line : undefined;
  }
  return openedAt;
}

/** Turns a csv-parse failure into a positioned InputError; `text` (when in memory) finds where an unclosed quote opened. */
export function csvParseFailure(e: unknown, where: Where, lineOffset: number, text?: string): never {
  // The sync and stream entry points each carry their own CsvError class, so test by shape.
  if (!(isInstance(e, CsvError)) && !(isInstance(e, Error) && typeof (e as { code?: unknown }).code === 'string' && 'lines' in e)) throw e;
  const code = (e as { code: string }).code;
  const line = (typeof (e as unknown as { lines?: unknown }).lines === 'number' ? (e as unknown as { lines: number }).lines : 1) + lineOffset;
  const at = { ...where, line };
  switch (code) {
    case 'CSV_QUOTE_NOT_CLOSED': {
      const opened = text === undefined ? undefined : unclosedQuoteLine(text);
      if (opened === undefined)
        return fail(at, 'the text ends inside a quoted field; expected a closing `"` (look for an unpaired quote above)', 'unclosed-quote');
      return fail({ ...where, line: opened + lineOffset }, 'a quoted field opens here and is still open at the end of the text; expected a closing `"`', 'unclosed-quote');
    }
    case 'CSV_INVALID_CLOSING_QUOTE': {
      const found = /got "(.*)" at line/.exec(e.message)?.[1] ?? '';
      return fail(at, `after a closing quote, expected a delimiter or the end of the line, found ${shown(found)}`, 'bad-closing-quote');
    }
    case 'CSV_MAX_RECORD_SIZE':
      return lineTooLong(where.file, line);
    case 'INVALID_OPENING_QUOTE':
      return fail(at, 'found a quote inside an unquoted field; expected the whole field in quotes with inner quotes doubled (`""`)', 'bad-opening-quote');
    default:
      return fail(at, `could not read the record (${e.message})`, 'unreadable-record');
  }
}

/** 1-based line where a record starts, given the line where it ends (csv-parse's `info.lines`). */
export function recordStartLine(endLine: number, fields: readonly string[]): number {
  let inner = 0;
  for (const f of fields) for (let i = f.indexOf('\n'); i >= 0; i = f.indexOf('\n', i + 1)) inner++;
  return endLine - inner;
}

/** Column names from a header record: trimmed; an empty name becomes the field's 1-based number. */
export function headerNames(fields: readonly string[]): string[] {
  return fields.map((f, i) => (f.trim() === '' ? String(i + 1) : f.trim()));
}

export function numberedColumns(count: number): string[] {
  return Array.from({ length: count }, (_, i) => String(i + 1));
}

/** A whitespace-only line in a multi-column text is a blank line, not a record. */
export function isBlankRecord(fields: readonly string[], columns: number): boolean {
  return columns > 1 && fields.length === 1 && fields[0].trim() === '';
}

export function raggedRecord(where: Where, expected: number, found: number, basis: string): never {
  return fail(
    where,
    `expected ${expected} field${expected === 1 ? '' : 's'} (${basis}), found ${found}; a record with another number of fields would shift the columns`,
    'ragged-row',
  );
}

/**
 * Turns csv-parse records into data rows: takes the header (or numbers the fields), skips blank
 * lines and refuses a record whose field count differs from the header's. Shared by the in-memory
 * and the streaming readers.
 */
export class RecordSink {
  columns: string[] | undefined;
  private headerLine = 0;

  constructor(
    private readonly header: boolean,
    private readonly file: string | undefined,
    private readonly onColumns: (columns: string[]) => void,
    private readonly onRow: (fields: string[], line: number) => void,
  ) {}

  accept(record: string[], line: number): void {
    if (this.columns === undefined) {
      this.headerLine = line;
      this.columns = this.header ? headerNames(record) : numberedColumns(record.length);
      this.onColumns(this.columns);
      if (this.header) return;
    }
    if (isBlankRecord(record, this.columns.length)) return;
    if (record.length !== this.columns.length)
      raggedRecord(
        { file: this.file, line },
        this.columns.length,
        record.length,
        this.header ? `as in the header on line ${this.headerLine}` : `as on line ${this.headerLine}`,
      );
    this.onRow(record, line);
  }

  /** Columns, or an error when the text held no record at all. */
  finish(): string[] {
    if (this.columns === undefined) throw inputError({ file: this.file }, 'found no records; expected at least one line of data', 'empty-input');
    return this.columns;
  }
}

export function parseDelimited(text: string, options: DelimitedOptions = {}): Records {
  const offset = (options.firstLine ?? 1) - 1;
  const file = options.file;
  const body = normaliseNewlines(stripBom(text));
  const dialect = detectDialect(body, options.dialect ?? {});
  let parsed: { record: string[]; info: { lines: number } }[];
  try {
    parsed = parse(body, csvParseOptions(dialect)) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (e) {
    return csvParseFailure(e, { file }, offset, body);
  }
  const rows: string[][] = [];
  const lines: number[] = [];
  const sink = new RecordSink(dialect.header, file, () => undefined, (fields, line) => {
    rows.push(fields);
    lines.push(line);
  });
  for (const { record, info } of parsed) sink.accept(record, recordStartLine(info.lines, record) + offset);
  const columns = sink.finish();
  return { columns, rows, lines, unit: 'line', ...(file !== undefined ? { file } : {}), sha256: sha256Hex(text), dialect };
}
