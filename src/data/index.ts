/**
 * Data intake: text or bytes in, typed data out. Everything exported here is pure; the file reader
 * (`aggregateFile`, `aggregateFileMany` in ./file, the one module that reads files) is imported from
 * there by hosts and the command line only.
 *
 *   parseDelimited(text, options) → Records           a CSV/TSV/semicolon/pipe text in memory
 *   parseSelection(text, hint) → Selection             an editor selection (CSV/TSV, JSON, markdown, HTML)
 *   parseNotebookOutput(mime, data) → Selection        a notebook cell output
 *   aggregateRecords(records, request, options)        Records → Aggregate (counts, table, moments)
 *   aggregateFile(path, request, options, control)     ./file: a file of any size, streamed
 *   aggregateFileMany(path, requests, options, control) ./file: several requests in one pass; .xlsx and .parquet
 *                                                       paths go to ./xlsx and ./parquet (they read files too)
 *
 * Long counts (two category columns and a count column) are a `crosstab` request with `weight` set
 * to the count column; one category column with counts is a `categories` request with `weight`.
 */
export type { Aggregate, AggregateRequest, CategoryCounts, CountTable, Provenance } from './types';
export type { CategoryOptions, DecimalMark, Delimiter, Dialect, DialectOptions, Encoding, IntakeOptions, MissingOptions } from './options';
export { DEFAULT_MISSING_TOKENS } from './options';
export type { Records } from './records';
export { detectDialect } from './dialect';
export { parseDelimited, type DelimitedOptions } from './delimited';
export { aggregateRecords } from './aggregate';
export { parseDecimal } from './numbers';
export { parseMarkdownTable } from './markdown';
export { parseHtmlTable, type HtmlTableOptions } from './html';
export { readJsonData, type JsonData } from './json';
export { parseSelection, parseNotebookOutput, detectSelectionFormat, type Selection, type SelectionFormat, type SelectionHint, type NotebookOutputOptions } from './selection';
// The file reader does I/O: import it from './file' (hosts and the command line only).
