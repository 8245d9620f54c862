// Text the user selected (a CSV range, a JSON block, a markdown table) or a notebook cell's output,
// read by the data layer into a table source for the flow: raw records, or data already counted.
import { parseNotebookOutput, parseSelection, type Selection } from '../data/selection';
import type { TableSource } from './flow';

export function sourceFromSelection(selection: Selection, description: string, documentUri?: string): TableSource {
  switch (selection.kind) {
    case 'records':
      return { kind: 'records', records: selection.records, description, documentUri };
    case 'table':
      return { kind: 'inline', test: 'independence', data: { table: selection.table.counts, rowLabels: selection.table.rowLabels, columnLabels: selection.table.columnLabels }, description, documentUri };
    case 'observed': {
      const weights = selection.proportions ? { proportions: selection.proportions } : selection.ratios ? { ratios: selection.ratios } : selection.expected ? { expected: selection.expected } : {};
      return { kind: 'inline', test: 'goodness-of-fit', data: { observed: selection.counts.counts, categories: selection.counts.labels, ...weights }, levels: selection.counts.labels, description, documentUri, hasExpectation: Object.keys(weights).length > 0 };
    }
    case 'values':
      return { kind: 'inline', test: 'variance', data: { values: selection.values }, description, documentUri };
  }
}

export function sourceFromText(text: string, options: { file?: string; firstLine?: number; description: string; documentUri?: string }): TableSource {
  return sourceFromSelection(parseSelection(text, { file: options.file, firstLine: options.firstLine }), options.description, options.documentUri);
}

export function sourceFromNotebookOutput(mime: string, data: unknown, options: { file: string; description: string; documentUri?: string }): TableSource {
  return sourceFromSelection(parseNotebookOutput(mime, data, { file: options.file }), options.description, options.documentUri);
}
