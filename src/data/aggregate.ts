/**
 * From records to aggregates: cross-tabulations (optionally frequency-weighted, which also reads
 * long counts), one-column category counts, numeric moments and already-counted tables.
 * The same Aggregator serves in-memory records, the csv-parse stream and the byte scanner.
 */
import { MomentAccumulator } from '../stats/moments';
import type { Aggregate, AggregateRequest, CountTable } from './types';
import { CategoryCoder, MISSING, missingTokens } from './categories';
import { StrataCounter } from './strata';
import { wholeCount } from './counts';
import { parseDecimal, parseMeasurement } from './numbers';
import type { DecimalMark, IntakeOptions } from './options';
import type { Records } from './records';
import { InputError } from '../errors';
import { fail, inputError, shown, type PositionUnit, type Where } from './where';

/** Where the aggregate came from, apart from what the aggregator counts itself. */
export interface SourceInfo {
  readonly description: string;
  readonly sha256: string;
}

/** Column roles the byte scanner needs to know about. */
export type Slot =
  | { readonly role: 'category'; readonly index: number; readonly coder: CategoryCoder }
  | { readonly role: 'weight'; readonly index: number }
  | { readonly role: 'number'; readonly index: number };


/** Counts in one flat array (row-major), grown as levels appear. */
class CountGrid {
  private cells = new Float64Array(64);
  private stride = 8;
  private rowCapacity = 8;
  /** Levels that occur in a record that was kept (a level seen only in dropped records is left out). */
  private rowUsed = new Uint8Array(8);
  private columnUsed = new Uint8Array(8);
  /** Rows of a counted table already read (to refuse a repeated label). */
  readonly touched = new Set<number>();

  add(r: number, c: number, w: number): void {
    if (r >= this.rowCapacity || c >= this.stride) this.grow(r, c);
    this.cells[r * this.stride + c] += w;
    this.rowUsed[r] = 1;
    this.columnUsed[c] = 1;
  }

  get(r: number, c: number): number {
    return r < this.rowCapacity && c < this.stride ? this.cells[r * this.stride + c] : 0;
  }

  private grow(r: number, c: number): void {
    const stride = Math.max(this.stride, 2 ** Math.ceil(Math.log2(c + 1)));
    const rows = Math.max(this.rowCapacity, 2 ** Math.ceil(Math.log2(r + 1)));
    const cells = new Float64Array(stride * rows);
    for (let i = 0; i < this.rowCapacity; i++)
      for (let j = 0; j < this.stride; j++) cells[i * stride + j] = this.cells[i * this.stride + j];
    const rowUsed = new Uint8Array(rows);
    rowUsed.set(this.rowUsed);
    const columnUsed = new Uint8Array(stride);
    columnUsed.set(this.columnUsed);
    this.cells = cells;
    this.stride = stride;
    this.rowCapacity = rows;
    this.rowUsed = rowUsed;
    this.columnUsed = columnUsed;
  }

  /** Level ids to show: in the coder's order, given levels always, others once kept. */
  rowsShown(coder: CategoryCoder): number[] {
    return coder.order().filter((i) => coder.isGiven(i) || (i < this.rowCapacity && this.rowUsed[i] === 1));
  }

  columnsShown(coder: CategoryCoder): number[] {
    return coder.order().filter((j) => coder.isGiven(j) || (j < this.stride && this.columnUsed[j] === 1));
  }

  table(rows: CategoryCoder, columns: CategoryCoder): CountTable {
    const ro = this.rowsShown(rows);
    const co = this.columnsShown(columns);
    return {
      rowLabels: ro.map((i) => rows.labels[i]),
      columnLabels: co.map((j) => columns.labels[j]),
      counts: ro.map((i) => co.map((j) => this.get(i, j))),
    };
  }
}

function columnIndex(columns: readonly string[], name: string, where: Where): number {
  const first = columns.indexOf(name);
  if (first < 0) {
    const trimmed = columns.findIndex((c) => c.trim().toLowerCase() === name.trim().toLowerCase());
    const hint = trimmed >= 0 ? ` (did you mean \`${columns[trimmed]}\`?)` : '';
    const error = inputError(where, `found no column \`${name}\`${hint}; the columns are ${columns.map((c) => `\`${c}\``).join(', ')}`, 'unknown-column');
    // The missing name goes in the location (not the message prefix) so a spec runner can point at where it is asked for.
    throw new InputError(error.message, { ...error.location, column: name }, error.code);
  }
  const second = columns.indexOf(name, first + 1);
  if (second >= 0) fail(where, `the header names column \`${name}\` twice (fields ${first + 1} and ${second + 1}); expected unique names`, 'duplicate-column');
  return first;
}

export class Aggregator {
  private rows = 0;
  private dropped = 0;
  private readonly where: { file?: string; unit?: PositionUnit };
  private readonly decimal: DecimalMark;
  private readonly tokens: ReadonlySet<string>;
  private readonly grid = new CountGrid();
  /** Three-way counts, for a `strata` request. */
  private readonly strata: StrataCounter | undefined;
  private readonly moments = new MomentAccumulator();
  private readonly values: number[] | undefined;
  private readonly coders: CategoryCoder[] = [];
  private readonly weightIndex: number = -1;
  private readonly numberIndex: number = -1;
  private readonly indices: number[] = [];
  private readonly used: string[];

  constructor(
    readonly columns: readonly string[],
    readonly request: AggregateRequest,
    options: IntakeOptions = {},
    unit: PositionUnit = 'line',
  ) {
    this.where = { file: options.file, unit };
    this.decimal = options.dialect?.decimal ?? '.';
    this.tokens = missingTokens(options.missing);
    this.values = options.keepValues && request.kind === 'numeric' ? [] : undefined;
    const settings = { file: options.file, unit, missing: options.missing, categories: options.categories };
    const at = { file: options.file };
    const cats = options.categories;
    switch (request.kind) {
      case 'crosstab':
        this.indices = [columnIndex(columns, request.rowColumn, at), columnIndex(columns, request.columnColumn, at)];
        this.coders = [
          new CategoryCoder(request.rowColumn, cats?.rowLevels, settings),
          new CategoryCoder(request.columnColumn, cats?.columnLevels, settings),
        ];
        break;
      case 'strata':
        // Row and column first, the stratum third: the readers that code two categories per record code a third only here.
        this.indices = [columnIndex(columns, request.rowColumn, at), columnIndex(columns, request.columnColumn, at), columnIndex(columns, request.stratumColumn, at)];
        this.coders = [
          new CategoryCoder(request.rowColumn, cats?.rowLevels, settings),
          new CategoryCoder(request.columnColumn, cats?.columnLevels, settings),
          new CategoryCoder(request.stratumColumn, cats?.levels, settings),
        ];
        this.strata = new StrataCounter();
        break;
      case 'categories':
        this.indices = [columnIndex(columns, request.column, at)];
        this.coders = [new CategoryCoder(request.column, cats?.levels, settings)];
        break;
      case 'numeric':
        this.numberIndex = columnIndex(columns, request.column, at);
        break;
      case 'counted-table': {
        if (columns.length < 2)
          fail(at, `a counted table needs row labels and at least one column of counts; found ${columns.length} column`, 'too-few-columns');
        this.coders = [
          new CategoryCoder(columns[0], cats?.rowLevels ?? cats?.levels, { ...settings, ignoreMissing: true }),
          new CategoryCoder('(header)', cats?.columnLevels, { ...settings, ignoreMissing: true }),
        ];
        for (const label of columns.slice(1)) this.coders[1].code(label, 1);
        break;
      }
    }
    if ((request.kind === 'crosstab' || request.kind === 'strata' || request.kind === 'categories') && request.weight !== undefined)
      this.weightIndex = columnIndex(columns, request.weight, at);
    this.used =
      request.kind === 'counted-table'
        ? [...columns]
        : // Named as the request names them: a stratified table's stratum first.
          [...(request.kind === 'strata' ? [this.indices[2], this.indices[0], this.indices[1]] : this.indices), this.numberIndex, this.weightIndex].filter((i) => i >= 0).map((i) => columns[i]);
  }

  /** Column roles for the byte scanner. */
  slots(): Slot[] {
    const slots: Slot[] = this.indices.map((index, k) => ({ role: 'category', index, coder: this.coders[k] }));
    if (this.weightIndex >= 0) slots.push({ role: 'weight', index: this.weightIndex });
    if (this.numberIndex >= 0) slots.push({ role: 'number', index: this.numberIndex });
    return slots;
  }

  isMissing(text: string): boolean {
    return this.tokens.has(text.trim());
  }

  /** A frequency weight: a non-negative whole number; -1 when missing. */
  readWeight(text: string, line: number): number {
    if (this.isMissing(text)) return -1;
    const where = { ...this.where, line, column: this.columns[this.weightIndex] };
    return wholeCount(parseDecimal(text, this.decimal), text, where, 'a frequency weight');
  }

  /** A number, or NaN when missing. */
  readNumber(text: string, line: number): number {
    if (this.isMissing(text)) return NaN;
    const x = parseMeasurement(text, this.decimal);
    if (Number.isNaN(x)) {
      const where = { ...this.where, line, column: this.columns[this.numberIndex] };
      const hint =
        this.decimal === '.' && !Number.isNaN(parseDecimal(text, ',')) ? ' (with `.` as the decimal mark; is the decimal mark `,`?)' : '';
      fail(where, `expected a number${hint}, found ${shown(text.trim())}`, 'not-a-number');
    }
    return x;
  }

  /** Data records seen so far. */
  get recordCount(): number {
    return this.rows;
  }

  // The adders the scanner calls once a record's fields are coded.
  addRecord(): void {
    this.rows++;
  }
  drop(): void {
    this.dropped++;
  }
  /** A kept record's cell; `s` is the stratum of a `strata` request (its third category). */
  addCell(r: number, c: number, w: number, s = 0): void {
    if (this.strata) this.strata.add(s, r, c, w);
    else this.grid.add(r, c, w);
  }
  addValue(x: number): void {
    this.moments.push(x);
    this.values?.push(x);
  }

  /** One record of string fields (already checked to have the header's number of fields). */
  push(fields: readonly string[], line: number): void {
    this.rows++;
    switch (this.request.kind) {
      case 'crosstab':
      case 'strata':
      case 'categories': {
        const w = this.weightIndex >= 0 ? this.readWeight(fields[this.weightIndex], line) : 1;
        const r = this.coders[0].code(fields[this.indices[0]], line);
        const c = this.indices.length > 1 ? this.coders[1].code(fields[this.indices[1]], line) : 0;
        const s = this.indices.length > 2 ? this.coders[2].code(fields[this.indices[2]], line) : 0;
        if (r === MISSING || c === MISSING || s === MISSING || w < 0) this.dropped++;
        else this.addCell(r, c, w, s);
        return;
      }
      case 'numeric': {
        const x = this.readNumber(fields[this.numberIndex], line);
        if (Number.isNaN(x)) this.dropped++;
        else this.addValue(x);
        return;
      }
      case 'counted-table':
        this.pushCountedRow(fields, line);
        return;
    }
  }

  private pushCountedRow(fields: readonly string[], line: number): void {
    const label = fields[0].trim();
    if (label === '') fail({ ...this.where, line, column: this.columns[0] }, 'expected a row label, found an empty field', 'missing-label');
    const before = this.coders[0].labels.length;
    const r = this.coders[0].code(label, line);
    if (r < before && this.grid.touched.has(r))
      fail({ ...this.where, line, column: this.columns[0] }, `the row label ${shown(label)} appears twice; expected each row once`, 'duplicate-label');
    this.grid.touched.add(r);
    const columnIds = this.columns.slice(1).map((c) => this.coders[1].code(c, 1));
    for (let j = 1; j < fields.length; j++) {
      const where = { ...this.where, line, column: this.columns[j] };
      this.grid.add(r, columnIds[j - 1], wholeCount(parseDecimal(fields[j], this.decimal), fields[j], where));
    }
  }

  result(source: SourceInfo): Aggregate {
    const provenance = { description: source.description, sha256: source.sha256, rows: this.rows, dropped: this.dropped, columns: this.used };
    switch (this.request.kind) {
      case 'crosstab':
      case 'counted-table':
        return { kind: 'table', table: this.grid.table(this.coders[0], this.coders[1]), provenance };
      case 'strata':
        return { kind: 'strata', strata: (this.strata as StrataCounter).result(this.coders[2], this.coders[0], this.coders[1]), provenance };
      case 'categories': {
        const order = this.grid.rowsShown(this.coders[0]);
        return {
          kind: 'categories',
          counts: { labels: order.map((i) => this.coders[0].labels[i]), counts: order.map((i) => this.grid.get(i, 0)) },
          provenance,
        };
      }
      case 'numeric':
        return { kind: 'moments', moments: this.moments.summary(), provenance, ...(this.values ? { values: this.values } : {}) };
    }
  }
}

/** Aggregates records already in memory. */
export function aggregateRecords(records: Records, request: AggregateRequest, options: IntakeOptions = {}): Aggregate {
  const file = options.file ?? records.file;
  const opts: IntakeOptions = { ...options, ...(file !== undefined ? { file } : {}), dialect: { ...records.dialect, ...options.dialect } };
  const aggregator = new Aggregator(records.columns, request, opts, records.unit ?? 'line');
  records.rows.forEach((fields, i) => {
    if (fields.length !== records.columns.length)
      throw inputError({ file, line: records.lines[i], unit: records.unit }, `expected ${records.columns.length} fields, found ${fields.length}`, 'ragged-row');
    aggregator.push(fields, records.lines[i]);
  });
  return aggregator.result({ description: options.description ?? file ?? 'records', sha256: records.sha256 ?? '' });
}
