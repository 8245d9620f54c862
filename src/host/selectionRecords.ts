// Text the user selected (a CSV range, a JSON block, a markdown table, a notebook cell's text) to records.
import { parseDelimited } from '../data/delimited';
import type { Records } from '../data/records';
import { InputError } from '../errors';

const isPipeRow = (line: string) => /^\s*\|.*\|\s*$/.test(line);
const isRuleRow = (line: string) => /^\s*\|(\s*:?-{3,}:?\s*\|)+\s*$/.test(line);

function splitPipeRow(line: string): string[] {
  const inner = line.trim().replace(/^\|/, '').replace(/\|$/, '');
  return inner.split(/(?<!\\)\|/).map((c) => c.trim().replace(/\\\|/g, '|'));
}

function markdownRecords(text: string, firstLine: number, file?: string): Records | undefined {
  const lines = text.split(/\r?\n/);
  const start = lines.findIndex(isPipeRow);
  if (start < 0 || !isRuleRow(lines[start + 1] ?? '')) return undefined;
  const columns = splitPipeRow(lines[start]);
  const rows: string[][] = [];
  const at: number[] = [];
  for (let i = start + 2; i < lines.length && isPipeRow(lines[i]); i++) {
    const cells = splitPipeRow(lines[i]);
    if (cells.length !== columns.length) {
      throw new InputError(`line ${firstLine + i}: this table row has ${cells.length} cells but the header has ${columns.length}`, { file, line: firstLine + i }, 'ragged-row');
    }
    rows.push(cells);
    at.push(firstLine + i);
  }
  return { columns, rows, lines: at, file };
}

function jsonRecords(text: string, firstLine: number, file?: string): Records | undefined {
  const trimmed = text.trim();
  if (!/^[[{]/.test(trimmed)) return undefined;
  let value: unknown;
  try {
    value = JSON.parse(trimmed);
  } catch (e) {
    throw new InputError(`the selection looks like JSON but does not parse: ${(e as Error).message}`, { file, line: firstLine }, 'bad-json');
  }
  const lines = (n: number) => Array.from({ length: n }, () => firstLine);
  // {"label": count, …}: category counts.
  if (value && !Array.isArray(value) && typeof value === 'object' && Object.values(value).every((v) => typeof v === 'number')) {
    const entries = Object.entries(value as Record<string, number>);
    return { columns: ['category', 'count'], rows: entries.map(([k, v]) => [k, String(v)]), lines: lines(entries.length), file };
  }
  if (Array.isArray(value) && value.length > 0) {
    if (value.every((r) => r && typeof r === 'object' && !Array.isArray(r))) {
      const columns = [...new Set(value.flatMap((r) => Object.keys(r as object)))];
      const rows = value.map((r) => columns.map((c) => { const v = (r as Record<string, unknown>)[c]; return v === null || v === undefined ? '' : String(v); }));
      return { columns, rows, lines: lines(rows.length), file };
    }
    if (value.every(Array.isArray)) {
      const [head, ...body] = value as unknown[][];
      const headerIsText = head.some((h) => typeof h === 'string') && body.length > 0;
      const columns = headerIsText ? head.map(String) : head.map((_, j) => String(j + 1));
      const rows = (headerIsText ? body : (value as unknown[][])).map((r) => r.map((v) => String(v ?? '')));
      return { columns, rows, lines: lines(rows.length), file };
    }
    if (value.every((v) => typeof v === 'number')) {
      return { columns: ['value'], rows: (value as number[]).map((v) => [String(v)]), lines: lines(value.length), file };
    }
  }
  throw new InputError('the JSON selection is not a table: expected an array of objects, an array of rows, an array of numbers or an object of counts', { file, line: firstLine }, 'not-a-table');
}

export function selectionRecords(text: string, options: { file?: string; firstLine?: number } = {}): Records {
  const firstLine = options.firstLine ?? 1;
  if (text.trim() === '') throw new InputError('the selection is empty; select the rows of a table (with its header)', { file: options.file, line: firstLine }, 'empty-input');
  return markdownRecords(text, firstLine, options.file) ?? jsonRecords(text, firstLine, options.file) ?? parseDelimited(text, { file: options.file, firstLine });
}
