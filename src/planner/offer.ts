/**
 * What a place where data lives offers the planner: records (a file's first records, a selection, a cell's
 * table), data already in a test's shape (a counted table, category counts, a list of values), a database
 * catalogue (column names and server types), or nothing at all (the command palette).
 */
import type { JsonData } from '../data/json';
import type { Records } from '../data/records';
import { parseNotebookOutput, parseSelection, type Selection } from '../data/selection';

export interface CatalogueColumn {
  readonly name: string;
  /** The server's type name, shown beside the column. */
  readonly type: string;
  readonly numeric: boolean;
}

export type Offer =
  | {
      readonly kind: 'records';
      readonly records: Records;
      /** "demo/data/bakery.csv", "selection in report.md, lines 3–9". */
      readonly description: string;
      /**
       * Set when the records are the first part of a file: the saved test then reads the file by `source.path`.
       * `complete`: the records are the whole file. `readAll` reads every record, for procedures whose saved
       * form holds the counts inline (stratified tables).
       */
      readonly file?: { readonly path: string; readonly complete: boolean; readonly readAll?: () => Promise<Records> };
    }
  | { readonly kind: 'counted'; readonly data: Exclude<JsonData, { kind: 'records' }>; readonly description: string }
  | {
      readonly kind: 'catalogue';
      readonly sql: { readonly connection: string; readonly table?: string; readonly query?: string };
      readonly columns: readonly CatalogueColumn[];
      readonly description: string;
    }
  | { readonly kind: 'nothing'; readonly description: string };

export function offerFromSelection(selection: Selection | JsonData, description: string): Offer {
  return selection.kind === 'records' ? { kind: 'records', records: selection.records, description } : { kind: 'counted', data: selection, description };
}

/** Selected text (a delimited range, a JSON block, a markdown or HTML table), read by the data layer. */
export function offerFromText(text: string, options: { file?: string; firstLine?: number; description: string }): Offer {
  return offerFromSelection(parseSelection(text, { file: options.file, firstLine: options.firstLine }), options.description);
}

/** A notebook cell's output by MIME type. */
export function offerFromNotebookOutput(mime: string, data: unknown, options: { file: string; description: string }): Offer {
  return offerFromSelection(parseNotebookOutput(mime, data, { file: options.file }), options.description);
}
