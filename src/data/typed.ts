/**
 * Typed cells to aggregates, for readers whose cells already carry a type (workbooks, Parquet): a
 * number stays a number, an empty cell or a null is missing (under the missing-value policy, as an
 * empty CSV field is), and text goes through the same category coding and number grammar as a CSV
 * field. Refusals name the cell the way its reader does (`'Line 2'!D17`, `row 1,204 (row group 3)`).
 */
import { Aggregator, type SourceInfo } from './aggregate';
import { MISSING, type CategoryCoder } from './categories';
import { wholeCount } from './counts';
import { parseDecimal } from './numbers';
import type { IntakeOptions } from './options';
import type { Aggregate, AggregateRequest } from './types';
import { shown, type PositionUnit } from './where';
import { InputError, isInstance } from '../errors';

/** One column of a batch as a dictionary and indices: `index[i]` ≥ 0 is a dictionary entry, -1 a null, -2 a value in `values[i]`. */
export interface EncodedColumn {
  readonly dictionary: ArrayLike<unknown>;
  readonly index: Int32Array;
  readonly values: unknown[] | undefined;
}

export const NULL_INDEX = -1;
export const VALUE_INDEX = -2;

/** Cancellation and progress, as the file reader takes them (`FileReadControl`). */
export interface TypedReadControl {
  readonly signal?: AbortSignal;
  /** About every 100 ms and once at the end. */
  readonly onProgress?: (progress: { readonly bytesRead: number; readonly totalBytes: number; readonly rows: number }) => void;
}

/** A progress callback that reports at most every 100 ms, and always when `final`. */
export function throttledProgress(control: TypedReadControl): (bytesRead: number, totalBytes: number, rows: number, final?: boolean) => void {
  let last = 0;
  return (bytesRead, totalBytes, rows, final = false) => {
    if (!control.onProgress) return;
    const now = Date.now();
    if (!final && now - last < 100) return;
    last = now;
    control.onProgress({ bytesRead, totalBytes, rows });
  };
}

/** A date or time cell: shown as ISO text in categories, refused as a number. */
export class DateCell {
  constructor(readonly iso: string) {}
}

/** A cell value as a reader hands it over; null and undefined are missing. */
export type TypedValue = string | number | bigint | DateCell | null | undefined;

/** How a reader names a cell in a message: the text before ", column `x`: …" and the location fields. */
export interface CellPlace {
  /** "inspections.xlsx, 'Line 2'!D17" or "orders.parquet, row 1,204 (row group 3)". */
  readonly text: string;
  /** 1-based position (sheet row, record number) for the location. */
  readonly line: number;
}

export type Locate = (position: number, columnIndex: number) => CellPlace;

function describeValue(v: TypedValue): string {
  if (isInstance(v, DateCell)) return `a date (${v.iso})`;
  if (typeof v === 'bigint') return `\`${v}\``;
  return shown(String(v));
}

/** An entry of a dictionary not yet coded (codes are ≥ 0, or MISSING = -1). */
const UNCODED = -3;

function isEncoded(column: ArrayLike<unknown> | EncodedColumn): column is EncodedColumn {
  return isInstance((column as EncodedColumn).index, Int32Array) && 'dictionary' in column;
}

/** One request's aggregator, with the per-value readers its column roles need. */
class Part {
  readonly categories: { index: number; coder: CategoryCoder }[] = [];
  readonly weightIndex: number = -1;
  readonly numberIndex: number = -1;

  constructor(
    readonly aggregator: Aggregator,
    private readonly columns: readonly string[],
    private readonly locate: Locate,
    private readonly file: string | undefined,
  ) {
    for (const slot of aggregator.slots()) {
      if (slot.role === 'category') this.categories.push({ index: slot.index, coder: slot.coder });
      else if (slot.role === 'weight') this.weightIndex = slot.index;
      else this.numberIndex = slot.index;
    }
  }

  refuse(position: number, index: number, message: string, code: string): never {
    const place = this.locate(position, index);
    const column = this.columns[index];
    throw new InputError(`${place.text}, column \`${column}\`: ${message}`, { ...(this.file !== undefined ? { file: this.file } : {}), line: place.line, column }, code);
  }

  code(coder: CategoryCoder, v: TypedValue, position: number): number {
    if (v === null || v === undefined) return coder.missing();
    if (typeof v === 'number') return Number.isNaN(v) ? coder.missing() : coder.code(String(v), position);
    if (isInstance(v, DateCell)) return coder.code(v.iso, position);
    return coder.code(String(v), position);
  }

  /** A number, or NaN when missing. */
  number(v: TypedValue, position: number): number {
    if (v === null || v === undefined) return NaN;
    if (typeof v === 'number') {
      if (Number.isNaN(v)) return NaN;
      if (!Number.isFinite(v)) this.refuse(position, this.numberIndex, `expected a finite number, found ${v}`, 'not-a-number');
      return v;
    }
    if (typeof v === 'bigint') {
      const x = Number(v);
      if (!Number.isSafeInteger(x)) this.refuse(position, this.numberIndex, `found ${describeValue(v)}, beyond the integers a double holds exactly (2^53)`, 'integer-too-large');
      return x;
    }
    if (typeof v === 'string') {
      if (this.aggregator.isMissing(v)) return NaN;
      const x = parseDecimal(v, '.');
      if (Number.isNaN(x)) this.refuse(position, this.numberIndex, `expected a number, found ${describeValue(v)}`, 'not-a-number');
      return x;
    }
    return this.refuse(position, this.numberIndex, `expected a number, found ${describeValue(v)}`, 'not-a-number');
  }
}

/** Several requests answered from one pass over typed rows. */
export class TypedSink {
  private readonly parts: Part[];

  constructor(
    readonly columns: readonly string[],
    requests: readonly AggregateRequest[],
    intake: IntakeOptions,
    unit: PositionUnit,
    locate: Locate,
  ) {
    this.parts = requests.map((request) => new Part(new Aggregator(columns, request, intake, unit), columns, locate, intake.file));
  }

  /** The column indices the requests read (to project columns or to skip the rest of a row). */
  usedIndices(): number[] {
    const used = new Set<number>();
    for (const part of this.parts) {
      if (part.aggregator.request.kind === 'counted-table') this.columns.forEach((_, j) => used.add(j));
      for (const c of part.categories) used.add(c.index);
      if (part.weightIndex >= 0) used.add(part.weightIndex);
      if (part.numberIndex >= 0) used.add(part.numberIndex);
    }
    return [...used].sort((a, b) => a - b);
  }

  /** One record: `cell(j)` is the value in column j; `position` locates it (sheet row, record number). */
  push(cell: (index: number) => TypedValue, position: number): void {
    for (const part of this.parts) this.pushOne(part, cell, position);
  }

  private pushOne(part: Part, cell: (index: number) => TypedValue, position: number): void {
    const a = part.aggregator;
    if (a.request.kind === 'counted-table') {
      a.push(
        this.columns.map((_, j) => {
          const v = cell(j);
          return v === null || v === undefined ? '' : isInstance(v, DateCell) ? v.iso : String(v);
        }),
        position,
      );
      return;
    }
    a.addRecord();
    if (part.numberIndex >= 0) {
      const x = part.number(cell(part.numberIndex), position);
      if (Number.isNaN(x)) a.drop();
      else a.addValue(x);
      return;
    }
    const w = part.weightIndex >= 0 ? this.weightOf(part, cell(part.weightIndex), position) : 1;
    const first = part.categories[0];
    const r = part.code(first.coder, cell(first.index), position);
    const second = part.categories[1];
    const c = second ? part.code(second.coder, cell(second.index), position) : 0;
    const third = part.categories[2];
    const s = third ? part.code(third.coder, cell(third.index), position) : 0;
    if (r === MISSING || c === MISSING || s === MISSING || w < 0) a.drop();
    else a.addCell(r, c, w, s);
  }

  /**
   * Many records at once, column by column (a Parquet row group): `columns[j]` holds column j's values for
   * `count` records (unused columns may be undefined), the first at `firstPosition`; `toTyped` turns a raw
   * value into a cell. The same result as `push` per record: each distinct raw value of a category column is
   * coded once (a dictionary-encoded column's values are the same few strings over and over), numbers skip
   * the conversion.
   */
  pushColumns(columns: readonly (ArrayLike<unknown> | EncodedColumn | undefined)[], count: number, firstPosition: number, toTyped: (v: unknown, index: number) => TypedValue): void {
    const valueAt = (column: ArrayLike<unknown> | EncodedColumn, i: number): unknown => {
      if (!isEncoded(column)) return column[i];
      const k = column.index[i];
      return k >= 0 ? column.dictionary[k] : k === NULL_INDEX ? null : column.values![i];
    };
    for (const part of this.parts) {
      const a = part.aggregator;
      if (a.request.kind === 'counted-table') {
        for (let i = 0; i < count; i++) this.pushOne(part, (j) => toTyped(valueAt(columns[j]!, i), j), firstPosition + i);
        continue;
      }
      if (part.numberIndex >= 0) {
        const column = columns[part.numberIndex]!;
        for (let i = 0; i < count; i++) {
          a.addRecord();
          const v = valueAt(column, i);
          const x = typeof v === 'number' && Number.isFinite(v) ? v : part.number(toTyped(v, part.numberIndex), firstPosition + i);
          if (Number.isNaN(x)) a.drop();
          else a.addValue(x);
        }
        continue;
      }
      const coded = part.categories.map(({ index, coder }) => {
        const column = columns[index]!;
        const ids = new Int32Array(count);
        const codeOf = (v: unknown, i: number) => part.code(coder, toTyped(v, index), firstPosition + i);
        if (isEncoded(column)) {
          // Counted from the dictionary: each entry coded once, when first met (so first-seen order holds).
          const entries = new Int32Array(column.dictionary.length).fill(UNCODED);
          for (let i = 0; i < count; i++) {
            const k = column.index[i];
            if (k >= 0) {
              let id = entries[k];
              if (id === UNCODED) id = entries[k] = codeOf(column.dictionary[k], i);
              ids[i] = id;
            } else ids[i] = k === NULL_INDEX ? coder.missing() : codeOf(column.values![i], i);
          }
          return ids;
        }
        const cache = new Map<unknown, number>();
        for (let i = 0; i < count; i++) {
          const v = column[i];
          let id = cache.get(v);
          if (id === undefined) {
            id = codeOf(v, i);
            if (v === null || v === undefined || typeof v !== 'object') cache.set(v, id);
          }
          ids[i] = id;
        }
        return ids;
      });
      const weights = part.weightIndex >= 0 ? columns[part.weightIndex]! : undefined;
      const [rows, cols, strata] = coded;
      for (let i = 0; i < count; i++) {
        a.addRecord();
        const w = weights ? this.weightOf(part, toTyped(valueAt(weights, i), part.weightIndex), firstPosition + i) : 1;
        const r = rows[i];
        const c = cols ? cols[i] : 0;
        const s = strata ? strata[i] : 0;
        if (r === MISSING || c === MISSING || s === MISSING || w < 0) a.drop();
        else a.addCell(r, c, w, s);
      }
    }
  }

  private weightOf(part: Part, v: TypedValue, position: number): number {
    const x = part.number(v, position);
    if (Number.isNaN(x)) return -1;
    if (x < 0 || !Number.isInteger(x) || x > Number.MAX_SAFE_INTEGER) {
      try {
        wholeCount(x, describeValue(v).replace(/^`|`$/g, ''), {}, 'a frequency weight');
      } catch (e) {
        part.refuse(position, part.weightIndex, (e as Error).message, (e as InputError).code);
      }
    }
    return x;
  }

  /** Data records seen so far. */
  get recordCount(): number {
    return this.parts[0]?.aggregator.recordCount ?? 0;
  }

  results(source: SourceInfo): Aggregate[] {
    return this.parts.map((p) => p.aggregator.result(source));
  }
}
