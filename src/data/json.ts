/**
 * JSON blocks: `{"table": …}`, `{"observed": …}`, `{"values": …}`, an array of records or an array
 * of arrays. Every refusal names the JSON path (and the line when the text does not parse).
 */
import { InputError, isInstance } from '../errors';
import { wholeCount } from './counts';
import { numberedColumns } from './delimited';
import { JsonSyntaxError, parseJsonWithLocations } from './jsonText';
import type { Records } from './records';
import type { CategoryCounts, CountTable } from './types';
import { fail, type Where } from './where';

export type JsonData =
  | { readonly kind: 'records'; readonly records: Records }
  | { readonly kind: 'table'; readonly table: CountTable }
  | {
      readonly kind: 'observed';
      readonly counts: CategoryCounts;
      /** In label order when they were given as an object keyed by label. */
      readonly expected?: readonly number[];
      readonly proportions?: readonly number[];
      readonly ratios?: readonly number[];
    }
  | { readonly kind: 'values'; readonly values: readonly number[]; readonly dropped: number };

export interface JsonOptions {
  readonly file?: string;
  readonly firstLine?: number;
}

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

function kindOf(v: Json): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 30 ? `${v.slice(0, 27)}…` : v)}`;
  return `${typeof v === 'number' ? 'the number' : 'the value'} ${String(v)}`;
}

function isObject(v: Json): v is { [key: string]: Json } {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * Parses JSON text; a syntax error names the line and column where it was found. JSON.parse does the work
 * (fast, and the reference behaviour); only when it refuses the text is it parsed again with the located
 * parser, whose error carries a position (V8's message often has none). Lines count from `firstLine`;
 * columns are within the selected text.
 */
export function parseJsonText(text: string, options: JsonOptions = {}): Json {
  try {
    return JSON.parse(text) as Json;
  } catch (e) {
    try {
      return parseJsonWithLocations(text, options.file).value;
    } catch (located) {
      if (!(isInstance(located, JsonSyntaxError))) throw located;
      const line = located.at.line + (options.firstLine ?? 1) - 1;
      const where = `${options.file ? `${options.file}, ` : ''}line ${line}, column ${located.at.column}`;
      throw new InputError(
        `${where}: the JSON does not parse (${located.detail}); expected valid JSON`,
        { ...(options.file !== undefined ? { file: options.file } : {}), line, column: String(located.at.column) },
        'bad-json',
      );
    }
  }
}

function count(v: Json, where: Where): number {
  if (typeof v !== 'number') return fail(where, `expected a count (a non-negative whole number), found ${kindOf(v)}`, 'bad-count');
  return wholeCount(v, String(v), where);
}

function numberAt(v: Json, where: Where): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) return fail(where, `expected a number, found ${kindOf(v)}`, 'not-a-number');
  return v;
}

function labels(v: Json | undefined, length: number, path: string, file: string | undefined): string[] | undefined {
  if (v === undefined) return undefined;
  if (!Array.isArray(v) || v.some((x) => typeof x !== 'string' && typeof x !== 'number'))
    return fail({ file, jsonPath: path }, `expected an array of labels, found ${kindOf(v)}`, 'bad-labels');
  if (v.length !== length) return fail({ file, jsonPath: path }, `expected ${length} labels, found ${v.length}`, 'bad-labels');
  return v.map((x) => String(x));
}

function tableFrom(rows: Json, path: string, file: string | undefined, rowLabels?: Json, columnLabels?: Json): CountTable {
  if (!Array.isArray(rows) || rows.length === 0) return fail({ file, jsonPath: path }, `expected an array of rows of counts, found ${kindOf(rows)}`, 'bad-table');
  const width = Array.isArray(rows[0]) ? rows[0].length : 0;
  const counts = rows.map((row, i) => {
    if (!Array.isArray(row)) return fail({ file, jsonPath: `${path}[${i}]` }, `expected a row (an array of counts), found ${kindOf(row)}`, 'bad-table');
    if (row.length !== width)
      return fail({ file, jsonPath: `${path}[${i}]` }, `expected ${width} counts (as in the first row), found ${row.length}`, 'ragged-row');
    return row.map((v, j) => count(v, { file, jsonPath: `${path}[${i}][${j}]` }));
  });
  return {
    rowLabels: labels(rowLabels, counts.length, '$.rowLabels', file) ?? counts.map((_, i) => String(i + 1)),
    columnLabels: labels(columnLabels, width, '$.columnLabels', file) ?? numberedColumns(width),
    counts,
  };
}

/** An array, or an object keyed by label (put in label order), of numbers. */
function byLabel(v: Json | undefined, order: readonly string[], path: string, file: string | undefined): number[] | undefined {
  if (v === undefined) return undefined;
  if (Array.isArray(v)) {
    if (v.length !== order.length) fail({ file, jsonPath: path }, `expected ${order.length} numbers (one per category), found ${v.length}`, 'length-mismatch');
    return v.map((x, i) => numberAt(x, { file, jsonPath: `${path}[${i}]` }));
  }
  if (!isObject(v)) return fail({ file, jsonPath: path }, `expected an array or an object keyed by category, found ${kindOf(v)}`, 'bad-expected');
  for (const key of Object.keys(v))
    if (!order.includes(key)) fail({ file, jsonPath: `${path}.${key}` }, `found the category \`${key}\`, which is not among the observed categories`, 'unknown-category');
  return order.map((label) => {
    if (!Object.prototype.hasOwnProperty.call(v, label)) return fail({ file, jsonPath: path }, `expected a value for the category \`${label}\`, found none`, 'missing-category');
    return numberAt(v[label], { file, jsonPath: `${path}.${label}` });
  });
}

function recordsFromObjects(items: Json[], file: string | undefined): Records {
  const columns: string[] = [];
  items.forEach((item, i) => {
    if (!isObject(item)) fail({ file, jsonPath: `$[${i}]` }, `expected a record (an object), found ${kindOf(item)}`, 'bad-record');
    for (const key of Object.keys(item)) if (!columns.includes(key)) columns.push(key);
  });
  const rows = items.map((item, i) =>
    columns.map((c) => {
      const v = (item as { [key: string]: Json })[c];
      if (v === undefined || v === null) return '';
      if (typeof v === 'object') return fail({ file, jsonPath: `$[${i}].${c}` }, `expected a string, number or null, found ${kindOf(v)}`, 'bad-record');
      return String(v);
    }),
  );
  return { columns, rows, lines: items.map((_, i) => i + 1), unit: 'record', ...(file !== undefined ? { file } : {}) };
}

function recordsFromArrays(items: Json[][], file: string | undefined): Records {
  const header = items.length > 1 && items[0].every((v) => typeof v === 'string');
  const width = items[0].length;
  const cells = items.map((row, i) => {
    if (row.length !== width) fail({ file, jsonPath: `$[${i}]` }, `expected ${width} values (as in the first row), found ${row.length}`, 'ragged-row');
    return row.map((v, j) => {
      if (v !== null && typeof v === 'object') return fail({ file, jsonPath: `$[${i}][${j}]` }, `expected a string, number or null, found ${kindOf(v)}`, 'bad-record');
      return v === null ? '' : String(v);
    });
  });
  const rows = header ? cells.slice(1) : cells;
  return {
    columns: header ? cells[0].map((c, j) => (c.trim() === '' ? String(j + 1) : c.trim())) : numberedColumns(width),
    rows,
    lines: rows.map((_, i) => i + (header ? 2 : 1)),
    unit: 'record',
    ...(file !== undefined ? { file } : {}),
  };
}

/** Reads a JSON value (already parsed, as a notebook gives it, or text) into one of the data shapes. */
export function readJsonData(input: string | unknown, options: JsonOptions = {}): JsonData {
  const file = options.file;
  const value = (typeof input === 'string' ? parseJsonText(input, options) : input) as Json;
  if (Array.isArray(value)) {
    if (value.length === 0) return fail({ file, jsonPath: '$' }, 'found an empty array; expected records or rows', 'empty-input');
    if (value.every(isObject)) return { kind: 'records', records: recordsFromObjects(value, file) };
    if (value.every((r) => Array.isArray(r))) {
      const rows = value as Json[][];
      if (rows.every((r) => r.every((v) => typeof v === 'number'))) return { kind: 'table', table: tableFrom(rows, '$', file) };
      return { kind: 'records', records: recordsFromArrays(rows, file) };
    }
    return fail({ file, jsonPath: '$[0]' }, `expected an array of records or an array of arrays, found ${kindOf(value[0])} among them`, 'bad-json-shape');
  }
  if (isObject(value)) {
    if ('table' in value) return { kind: 'table', table: tableFrom(value.table, '$.table', file, value.rowLabels, value.columnLabels) };
    if ('observed' in value) {
      const observed = value.observed;
      let counts: CategoryCounts;
      if (Array.isArray(observed)) {
        const given = labels(value.labels ?? value.categories, observed.length, value.labels !== undefined ? '$.labels' : '$.categories', file);
        counts = { labels: given ?? observed.map((_, i) => String(i + 1)), counts: observed.map((v, i) => count(v, { file, jsonPath: `$.observed[${i}]` })) };
      } else if (isObject(observed)) {
        const keys = Object.keys(observed);
        counts = { labels: keys, counts: keys.map((k) => count(observed[k], { file, jsonPath: `$.observed.${k}` })) };
      } else return fail({ file, jsonPath: '$.observed' }, `expected an array of counts or an object of counts by category, found ${kindOf(observed)}`, 'bad-observed');
      const expected = byLabel(value.expected, counts.labels, '$.expected', file);
      const proportions = byLabel(value.proportions, counts.labels, '$.proportions', file);
      const ratios = byLabel(value.ratios, counts.labels, '$.ratios', file);
      return { kind: 'observed', counts, ...(expected ? { expected } : {}), ...(proportions ? { proportions } : {}), ...(ratios ? { ratios } : {}) };
    }
    if ('values' in value) {
      const raw = value.values;
      if (!Array.isArray(raw)) return fail({ file, jsonPath: '$.values' }, `expected an array of numbers, found ${kindOf(raw)}`, 'bad-values');
      const values: number[] = [];
      raw.forEach((v, i) => {
        if (v !== null) values.push(numberAt(v, { file, jsonPath: `$.values[${i}]` }));
      });
      return { kind: 'values', values, dropped: raw.length - values.length };
    }
    const keys = Object.keys(value);
    return fail(
      { file, jsonPath: '$' },
      `expected an object with "table", "observed" or "values", an array of records or an array of arrays; found an object with ${keys.length === 0 ? 'no keys' : `keys ${keys.map((k) => `"${k}"`).join(', ')}`}`,
      'bad-json-shape',
    );
  }
  return fail({ file, jsonPath: '$' }, `expected an object or an array, found ${kindOf(value)}`, 'bad-json-shape');
}
