/**
 * The reader table: which reader serves a saved test's `source`, and what each can deliver. `runSpec` picks
 * the reader here, checks that it delivers what the procedure needs (raw values for a distribution fit), and
 * calls it. Adding a kind of file is one reader function plus one line in FILE_READERS.
 */
import { aggregateRecords } from './aggregate';
import { sha256Hex } from './delimited';
import { aggregateFile, MAX_TEXT_FILE_BYTES, readTextFile } from './file';
import { readJsonData, type JsonData } from './json';
import { parseMarkdownTable } from './markdown';
import { loadChunk } from './lazy';
import { readDelimitedPreview, readDelimitedRecords } from './preview';
import type { IntakeOptions } from './options';
import type { Records } from './records';
import type { Aggregate, AggregateRequest } from './types';
import { fail } from './where';

/** What a reader can hand over: records, counts (tables, category counts), moments of a numeric column, the values themselves. */
export type Delivery = 'records' | 'counts' | 'moments' | 'values';

export interface ReadControl {
  readonly signal?: AbortSignal;
  /** Fraction done in [0, 1], when known. */
  readonly onProgress?: (fraction: number) => void;
}

export type ReadAggregate = (path: string, request: AggregateRequest, options: IntakeOptions, control: ReadControl) => Promise<Aggregate>;

/** What the editor's planner sees of a file: its first records (or all), or data already in a test's shape. */
export interface FileView {
  readonly data: JsonData;
  /** The records are the whole file. */
  readonly complete: boolean;
}

export interface FileReaderEntry {
  /** For messages: "delimited text". */
  readonly name: string;
  /** File name endings it serves, lower case with the dot. */
  readonly extensions: readonly string[];
  readonly delivers: readonly Delivery[];
  readonly read: ReadAggregate;
  /** Hosts inject their own call of this reader (the streaming reader with their progress display). */
  readonly hostInjected?: boolean;
  /** The file for the editor's planner: its first records (`whole`: all of them). `file` names it in messages. */
  readonly view: (path: string, file: string, whole: boolean, part?: FilePart['source']) => Promise<FileView>;
  /** A file of several tables (a workbook's sheets, defined names, tables): the parts to choose from. */
  readonly parts?: (path: string, file: string) => Promise<readonly FilePart[]>;
}

/** One table inside a file, and the `source` fields that select it. */
export interface FilePart {
  readonly label: string;
  /** "sheet", "defined name · 'Line 2'!B2:H302", … */
  readonly detail?: string;
  readonly source: { readonly sheet?: string; readonly range?: string };
}

// The workbook and Parquet readers are chunks loaded on first use (src/data/lazy.ts); only their types are imported here.
const xlsx = () => loadChunk(() => require('./xlsx') as typeof import('./xlsx')); // eslint-disable-line @typescript-eslint/no-require-imports
const parquetReader = () => loadChunk(() => require('./parquet') as typeof import('./parquet')); // eslint-disable-line @typescript-eslint/no-require-imports

/** Rows of a workbook or Parquet file shown to the planner (about what 64 KB of CSV holds). */
const PREVIEW_ROWS = 2000;
/** Rows read when a procedure keeps every record inline. */
const WHOLE_ROWS = 1_000_000;

/** The typed readers report bytes and rows; the table's callers want a fraction. */
const typedControl = (control: ReadControl) => ({ signal: control.signal, onProgress: (p: { bytesRead: number; totalBytes: number }) => { if (p.totalBytes) control.onProgress?.(p.bytesRead / p.totalBytes); } });
const workbook: ReadAggregate = async (path, request, options, control) => (await xlsx().aggregateWorkbook(path, [request], options, typedControl(control))).aggregates[0];
const parquet: ReadAggregate = async (path, request, options, control) => (await parquetReader().aggregateParquet(path, [request], options, typedControl(control)))[0];

async function workbookParts(path: string, file: string): Promise<readonly FilePart[]> {
  const kinds = { sheet: 'sheet', name: 'defined name', table: 'table' } as const;
  return (await xlsx().workbookChoices(path, file)).map((c) => ({
    label: c.label,
    detail: c.detail ? `${kinds[c.kind]} · ${c.detail}` : kinds[c.kind],
    source: c.kind === 'sheet' || c.range === undefined ? { sheet: c.sheet } : { sheet: c.sheet, range: c.range },
  }));
}

/** A SQL source: the server counts; the read itself is injected by the host (it holds the passwords). */
export const SQL_READER = { name: 'SQL', delivers: ['counts', 'moments', 'values'] as readonly Delivery[] };

const delimited: ReadAggregate = (path, request, options, control) =>
  aggregateFile(path, request, options, { signal: control.signal, onProgress: (p) => { if (p.totalBytes) control.onProgress?.(p.bytesRead / p.totalBytes); } });

/** A small text file read whole, as the planner sees it. */
function wholeView(toData: (text: string, file: string) => JsonData) {
  return async (path: string, file: string): Promise<FileView> => ({ data: toData(await readTextFile(path, file, MAX_TEXT_FILE_BYTES), file), complete: true });
}

async function delimitedView(path: string, file: string, whole: boolean): Promise<FileView> {
  if (whole) return { data: { kind: 'records', records: await readDelimitedRecords(path, file) }, complete: true };
  const { records, complete } = await readDelimitedPreview(path, file);
  return { data: { kind: 'records', records }, complete };
}

/** A small text file read whole into records, then aggregated like a selection. */
function wholeText(toRecords: (text: string, file: string) => Records): ReadAggregate {
  return async (path, request, options) => {
    const file = options.file ?? path;
    // Real path checked against the allowed folder, regular files only, bounded size (as every reader).
    const text = await readTextFile(path, file, MAX_TEXT_FILE_BYTES, options.allowedRoot);
    const records = { ...toRecords(text, file), sha256: sha256Hex(text) };
    return aggregateRecords(records, request, { ...options, file, description: options.description ?? file });
  };
}

const jsonRecords = (text: string, file: string): Records => {
  const data = readJsonData(text, { file });
  if (data.kind !== 'records') fail({ file }, `found ${data.kind === 'table' ? 'a table of counts' : data.kind === 'observed' ? 'category counts' : 'a list of values'}; a saved test's "source" reads records (an array of objects); put these numbers in the saved test itself`, 'json-not-records');
  return data.records;
};

/** The first pipe table of a markdown file. */
const markdownRecords = (text: string, file: string): Records => {
  const lines = text.split(/\r\n|\n|\r/);
  const start = lines.findIndex((l) => /^\s*\|/.test(l));
  if (start < 0) fail({ file }, 'found no pipe table (a line starting with "|")', 'no-markdown-table');
  let end = start;
  while (end < lines.length && /^\s*\|/.test(lines[end])) end++;
  return parseMarkdownTable(lines.slice(start, end).join('\n'), { file, firstLine: start + 1 });
};

const ALL: readonly Delivery[] = ['records', 'counts', 'moments', 'values'];

/** The file readers, first match by name ending; the last one serves any other file. */
export const FILE_READERS: readonly FileReaderEntry[] = [
  { name: 'JSON records', extensions: ['.json'], delivers: ALL, read: wholeText(jsonRecords), view: wholeView((text, file) => readJsonData(text, { file })) },
  { name: 'markdown table', extensions: ['.md', '.markdown'], delivers: ALL, read: wholeText(markdownRecords), view: wholeView((text, file) => ({ kind: 'records', records: markdownRecords(text, file) })) },
  { name: 'Excel workbook', extensions: ['.xlsx'], delivers: ALL, read: workbook, parts: workbookParts,
    view: async (path, file, whole, part = {}) => { const { records, complete } = await xlsx().previewWorkbook(path, part, whole ? WHOLE_ROWS : PREVIEW_ROWS, file); return { data: { kind: 'records', records }, complete }; } },
  { name: 'Parquet', extensions: ['.parquet'], delivers: ALL, read: parquet,
    view: async (path, file, whole) => { const { records, complete } = await parquetReader().previewParquet(path, whole ? WHOLE_ROWS : PREVIEW_ROWS, file); return { data: { kind: 'records', records }, complete }; } },
  { name: 'delimited text', extensions: ['.csv', '.tsv', '.tab', '.txt', ''], delivers: ALL, read: delimited, hostInjected: true, view: delimitedView },
];

export function fileReaderFor(path: string): FileReaderEntry {
  const lower = path.toLowerCase();
  return FILE_READERS.find((r) => r.extensions.some((e) => e !== '' && lower.endsWith(e))) ?? FILE_READERS[FILE_READERS.length - 1];
}

/** What a request needs from a reader. */
export function deliveryNeeded(request: AggregateRequest, options: IntakeOptions): Delivery {
  if (request.kind === 'numeric') return options.keepValues ? 'values' : 'moments';
  return 'counts';
}

/** Reads a file source with the reader its name calls for. */
export const aggregateFileSource: ReadAggregate = (path, request, options, control) => fileReaderFor(path).read(path, request, options, control);
