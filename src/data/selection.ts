/**
 * What a user selected in an editor, or what a notebook cell shows: a CSV/TSV range (with or
 * without its header), a JSON block, a markdown pipe table, or an HTML table from a data frame.
 */
import { parseDelimited, sha256Hex } from './delimited';
import { parseHtmlTable, type HtmlTableOptions } from './html';
import { readJsonData, type JsonData } from './json';
import { looksLikeMarkdownTable, parseMarkdownTable } from './markdown';
import type { DialectOptions } from './options';
import { fail } from './where';

export type SelectionFormat = 'csv' | 'tsv' | 'markdown' | 'json' | 'html';

/** The data shapes of a selection, with the format it was read as. */
export type Selection = JsonData & { readonly format: SelectionFormat };

export interface SelectionHint {
  /** Skip detection. */
  readonly format?: SelectionFormat | 'auto';
  /** Whether the first selected row is a header; detected by default. */
  readonly header?: boolean | 'auto';
  /** Delimited text: delimiter, decimal mark, comment character. */
  readonly dialect?: DialectOptions;
  /** Document name, for messages. */
  readonly file?: string;
  /** Line of the selection's first line in the document (so messages give the editor's line). Default 1. */
  readonly firstLine?: number;
}

export function detectSelectionFormat(text: string): SelectionFormat {
  const t = text.trim();
  if (t.startsWith('{') || t.startsWith('[')) return 'json';
  if (/^<(table|div|style|!--)/i.test(t) && /<table\b/i.test(t)) return 'html';
  if (looksLikeMarkdownTable(t)) return 'markdown';
  return 'csv';
}

/** Records carry the SHA-256 of the selected text, for the provenance of what is computed from them. */
function hashed(selection: Selection, text: string): Selection {
  if (selection.kind !== 'records' || selection.records.sha256 !== undefined) return selection;
  return { ...selection, records: { ...selection.records, sha256: sha256Hex(text) } };
}

export function parseSelection(text: string, hint: SelectionHint = {}): Selection {
  return hashed(readSelection(text, hint), text);
}

function readSelection(text: string, hint: SelectionHint): Selection {
  if (text.trim() === '') fail({ file: hint.file, line: hint.firstLine }, 'the selection is empty; expected a table, a range of delimited lines or a JSON block', 'empty-input');
  const format = hint.format && hint.format !== 'auto' ? hint.format : detectSelectionFormat(text);
  const where = { file: hint.file, firstLine: hint.firstLine };
  switch (format) {
    case 'json':
      return { ...readJsonData(text, where), format };
    case 'markdown':
      return { kind: 'records', records: parseMarkdownTable(text, { ...where, header: hint.header }), format };
    case 'html':
      return { kind: 'records', records: parseHtmlTable(text, where), format };
    case 'csv':
    case 'tsv': {
      const dialect: DialectOptions = {
        ...hint.dialect,
        ...(format === 'tsv' ? { delimiter: '\t' } : {}),
        ...(hint.header !== undefined ? { header: hint.header } : {}),
      };
      const records = parseDelimited(text, { ...where, dialect });
      return { kind: 'records', records, format: records.dialect?.delimiter === '\t' ? 'tsv' : 'csv' };
    }
  }
}

export interface NotebookOutputOptions extends HtmlTableOptions {
  readonly dialect?: DialectOptions;
}

/**
 * A notebook cell output by MIME type: `text/csv` (and `text/tab-separated-values`), `application/json`
 * (parsed or text), `text/html` (a data frame's table), `text/markdown`. Notebook files keep text as an
 * array of lines; both forms are accepted.
 */
export function parseNotebookOutput(mime: string, data: unknown, options: NotebookOutputOptions = {}): Selection {
  const text = typeof data === 'string' ? data : Array.isArray(data) && data.every((d) => typeof d === 'string') ? data.join('') : undefined;
  const file = options.file;
  switch (mime.split(';')[0].trim().toLowerCase()) {
    case 'application/json':
      return hashed({ ...readJsonData(text ?? data, { file }), format: 'json' }, text ?? JSON.stringify(data));
    case 'text/html':
      if (text === undefined) break;
      return hashed({ kind: 'records', records: parseHtmlTable(text, options), format: 'html' }, text);
    case 'text/csv':
    case 'text/tab-separated-values':
      if (text === undefined) break;
      return parseSelection(text, { format: mime.includes('tab') ? 'tsv' : 'csv', file, ...(options.dialect ? { dialect: options.dialect } : {}) });
    case 'text/markdown':
      if (text === undefined) break;
      return parseSelection(text, { format: 'markdown', file });
    case 'text/plain':
      if (text === undefined) break;
      return parseSelection(text, { file });
    default:
      return fail({ file }, `found an output of type \`${mime}\`; expected text/csv, application/json, text/html, text/markdown or text/plain`, 'unsupported-output');
  }
  return fail({ file }, `the \`${mime}\` output holds ${data === null ? 'null' : typeof data}; expected text`, 'unsupported-output');
}
