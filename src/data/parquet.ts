/**
 * Parquet files to the same aggregates as a CSV file, with hyparquet (pure JavaScript, no native
 * binaries) and its compressors (snappy, gzip, zstd, brotli, lz4). Only the columns a request needs are
 * read (column projection), one row group at a time, so memory holds one row group of those columns.
 *
 * Values: numbers and 64-bit integers (refused past 2^53 when used as numbers), strings, booleans
 * (`true`/`false`), dates and timestamps (ISO text in categories). A null is missing under the
 * missing-value policy, as an empty CSV field is; a string that is a missing token (`NA`…) is missing too.
 * Row groups are read one at a time, and of each only the chunks of the needed columns, decoded page by
 * page (parquetPages.ts) with hyparquet's page decoders: a dictionary-encoded column stays as indices into
 * its dictionary, each dictionary entry is coded once and the rows are counted by index (no string per
 * row). Nested columns (lists, structs, maps) and types without a meaning for counts or moments (binary,
 * fixed-length bytes, intervals) are refused by name.
 *
 * Measured in bench/tabular.ts (`npm run bench -- parquet`): figures there, beside the CSV path and
 * DuckDB's own GROUP BY on the same rows. hyparquet 1.33.0 with snappy (hysnappy 1.1.1, WebAssembly), zstd
 * (fzstd 0.1.1) and LZ4 (hyparquet-compressors 1.1.2), gzip and brotli from Node's zlib: no native binaries
 * of our own. The production extension bundle grows from 407 KB to 482 KB (esbuild --minify; 583 KB with
 * hyparquet-compressors' whole set).
 */
import { createHash } from 'node:crypto';
import type { FileHandle } from 'node:fs/promises';
import { parquetMetadataAsync, parquetSchema } from 'hyparquet';
import { decompress as decompressZstd } from 'fzstd';
import { snappyUncompressor } from 'hysnappy';
import { decompressLz4, decompressLz4Raw } from 'hyparquet-compressors/src/lz4.js';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import type { AsyncBuffer, Compressors, FileMetaData, SchemaTree } from 'hyparquet';
import { readFlatChunk } from './parquetPages';
import type { IntakeOptions } from './options';
import type { Records } from './records';
import { DateCell, NULL_INDEX, throttledProgress, TypedSink, type EncodedColumn, type TypedReadControl, type TypedValue } from './typed';
import type { Aggregate, AggregateRequest } from './types';
import { isInstance } from '../errors';
import { openRegularFile } from './file';
import { fail } from './where';
import { selectionFingerprint } from './xlsx';

const HASH_CHUNK = 1 << 20;

/**
 * hyparquet-compressors' set, with gzip and brotli from Node's zlib instead of its JavaScript inflaters:
 * the brotli one carries a 79 KB dictionary (the whole set is 115 KB minified; this one 24 KB), and zlib is
 * native and part of Node. Snappy (hysnappy, WebAssembly), zstd (fzstd) and LZ4 stay as the set has them.
 */
let snappy: ((input: Uint8Array, outputLength: number) => Uint8Array) | undefined;
const compressors: Compressors = {
  // The WebAssembly module is compiled on first use, not when the extension starts.
  SNAPPY: (input, outputLength) => (snappy ??= snappyUncompressor())(input, outputLength),
  GZIP: (input) => new Uint8Array(gunzipSync(input)),
  BROTLI: (input) => new Uint8Array(brotliDecompressSync(input)),
  ZSTD: (input) => decompressZstd(input),
  LZ4: decompressLz4,
  LZ4_RAW: decompressLz4Raw,
};
const MAX_GROUP_ROWS = 64 * 1024 * 1024;

function fileBuffer(handle: FileHandle, size: number): AsyncBuffer {
  return {
    byteLength: size,
    async slice(start: number, end?: number): Promise<ArrayBuffer> {
      const stop = end === undefined ? size : Math.min(end, size);
      const out = new Uint8Array(Math.max(0, stop - start));
      let done = 0;
      while (done < out.length) {
        const { bytesRead } = await handle.read(out, done, out.length - done, start + done);
        if (bytesRead === 0) break;
        done += bytesRead;
      }
      return out.buffer;
    },
  };
}

async function sha256Of(handle: FileHandle, size: number): Promise<string> {
  const hash = createHash('sha256');
  const buf = new Uint8Array(HASH_CHUNK);
  for (let position = 0; position < size; ) {
    const { bytesRead } = await handle.read(buf, 0, buf.length, position);
    if (bytesRead === 0) break;
    hash.update(buf.subarray(0, bytesRead));
    position += bytesRead;
  }
  return hash.digest('hex');
}

/** What a flat column holds, or why it cannot be read; undefined when fine. */
function refusal(column: SchemaTree): string | undefined {
  const e = column.element;
  const logical = e.logical_type?.type;
  if (column.children.length > 0 || e.repetition_type === 'REPEATED') {
    const kind = logical === 'LIST' || e.converted_type === 'LIST' ? 'a list' : logical === 'MAP' || e.converted_type === 'MAP' ? 'a map' : e.repetition_type === 'REPEATED' ? 'a repeated field' : 'a struct';
    return `is ${kind} (a nested column); expected a flat column of numbers, text, booleans or dates`;
  }
  switch (e.type) {
    case 'BYTE_ARRAY':
      if (logical === 'STRING' || logical === 'ENUM' || logical === 'JSON' || logical === 'DECIMAL' || e.converted_type === 'UTF8' || e.converted_type === 'ENUM' || e.converted_type === 'DECIMAL') return undefined;
      return 'holds binary data (BYTE_ARRAY without a string type); expected numbers, text, booleans or dates';
    case 'FIXED_LEN_BYTE_ARRAY':
      if (logical === 'DECIMAL' || e.converted_type === 'DECIMAL' || logical === 'FLOAT16') return undefined;
      return `holds ${logical === 'UUID' ? 'UUIDs' : e.converted_type === 'INTERVAL' ? 'intervals' : 'fixed-length binary data'} (FIXED_LEN_BYTE_ARRAY); expected numbers, text, booleans or dates`;
    default:
      return undefined;
  }
}

function describeType(column: SchemaTree): string {
  const e = column.element;
  return [e.type, e.logical_type?.type, e.converted_type].filter((x) => x !== undefined).join('/');
}

/** A decoded value as a typed cell; dates keep their day when the column is a DATE. */
function typed(v: unknown, dateOnly: boolean): TypedValue {
  if (v === null || v === undefined || typeof v === 'number' || typeof v === 'string' || typeof v === 'bigint') return v as TypedValue;
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  if (isInstance(v, Date)) {
    const iso = v.toISOString();
    return new DateCell(dateOnly || iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.endsWith('.000Z') ? iso.slice(0, 19) : iso.slice(0, 23));
  }
  return undefined;
}

interface Opened {
  readonly handle: FileHandle;
  readonly size: number;
  readonly buffer: AsyncBuffer;
  readonly metadata: FileMetaData;
  readonly columns: readonly SchemaTree[];
}

async function openParquet(path: string, file: string, allowedRoot?: string): Promise<Opened> {
  // Real path checked against the allowed folder, regular files only (no FIFO, device or folder), as every reader.
  const { handle } = await openRegularFile(path, file, allowedRoot);
  try {
    const { size } = await handle.stat();
    const buffer = fileBuffer(handle, size);
    if (size < 12) fail({ file }, `the file has ${size} bytes; expected a Parquet file (it starts and ends with PAR1)`, 'not-parquet');
    const head = new Uint8Array(await buffer.slice(0, 4));
    const tail = new Uint8Array(await buffer.slice(size - 4, size));
    const magic = (b: Uint8Array) => String.fromCharCode(...b) === 'PAR1';
    if (!magic(head)) fail({ file }, 'the file does not start with PAR1; expected a Parquet file', 'not-parquet');
    if (!magic(tail)) fail({ file }, 'the file does not end with the Parquet footer (PAR1): it is cut short (truncated) or still being written; expected a complete Parquet file', 'truncated-parquet');
    let metadata: FileMetaData;
    try {
      metadata = await parquetMetadataAsync(buffer);
    } catch (e) {
      fail({ file }, `the Parquet footer (file metadata) cannot be read (${(e as Error).message}); expected a complete Parquet file`, 'corrupt-parquet');
    }
    for (const [g, group] of metadata.row_groups.entries()) {
      // One row group's needed columns are held at once (4 bytes of index per row and column, plus values).
      if (Number(group.num_rows) > MAX_GROUP_ROWS)
        fail({ file }, `row group ${g + 1} holds ${Number(group.num_rows).toLocaleString('en-US')} rows; this reader holds at most ${MAX_GROUP_ROWS.toLocaleString('en-US')} rows of one row group at once (rewrite the file with smaller row groups)`, 'row-group-too-large');
      for (const chunk of group.columns) {
        const meta = chunk.meta_data;
        if (!meta) continue;
        const end = Number(meta.dictionary_page_offset ?? meta.data_page_offset) + Number(meta.total_compressed_size);
        if (end > size)
          fail({ file }, `row group ${g + 1}, column \`${meta.path_in_schema.join('.')}\`: the data ends at byte ${end}, past the end of the file (${size} bytes); the file is damaged`, 'corrupt-parquet');
      }
    }
    return { handle, size, buffer, metadata, columns: parquetSchema(metadata).children };
  } catch (e) {
    await handle.close();
    throw e;
  }
}

function columnNames(opened: Opened): string[] {
  return opened.columns.map((c) => c.element.name);
}

/** Decodes one row group's projected columns (see parquetPages.ts). */
async function readGroup(opened: Opened, names: readonly string[], group: number, rowStart: number, file: string): Promise<Map<string, EncodedColumn>> {
  const rowGroup = opened.metadata.row_groups[group];
  const rows = Number(rowGroup.num_rows);
  const out = new Map<string, EncodedColumn>();
  for (const name of names) {
    const chunk = rowGroup.columns.find((c) => c.meta_data?.path_in_schema.length === 1 && c.meta_data.path_in_schema[0] === name);
    const meta = chunk?.meta_data;
    if (!meta) fail({ file, column: name }, `row group ${group + 1} has no data for column \`${name}\`; the file is damaged`, 'corrupt-parquet');
    const start = Number(meta.dictionary_page_offset ?? meta.data_page_offset);
    const bytes = await opened.buffer.slice(start, start + Number(meta.total_compressed_size));
    const column = opened.columns.find((c) => c.element.name === name)!;
    try {
      out.set(name, readFlatChunk(bytes as ArrayBuffer, meta, [parquetSchema(opened.metadata), column], rows, compressors));
    } catch (e) {
      fail({ file }, `row group ${group + 1} (rows ${(rowStart + 1).toLocaleString('en-US')}–${(rowStart + rows).toLocaleString('en-US')}), column \`${name}\`: cannot be decoded (${(e as Error).message}); the file is damaged or uses an encoding this reader does not know`, 'corrupt-parquet');
    }
  }
  return out;
}

/**
 * Aggregates a Parquet file for several requests in one pass over the needed columns. The provenance's
 * SHA-256 is that of the file's bytes together with the columns read (see `selectionFingerprint`).
 */
export async function aggregateParquet(
  path: string,
  requests: readonly AggregateRequest[],
  options: IntakeOptions = {},
  control: TypedReadControl = {},
): Promise<Aggregate[]> {
  const file = options.file ?? path;
  if (options.sheet !== undefined || options.range !== undefined)
    fail({ file, jsonPath: '$.source.sheet' }, '"sheet" and "range" apply to Excel workbooks only; a Parquet file has neither', 'not-a-workbook');
  const opened = await openParquet(path, file, options.allowedRoot);
  try {
    const names = columnNames(opened);
    let position = 0;
    let group = 0;
    const groupStarts: number[] = [];
    const sink = new TypedSink(names, requests, { ...options, file }, 'row', (row) => {
      let g = 0;
      while (g + 1 < groupStarts.length && groupStarts[g + 1] <= row - 1) g++;
      return { text: `${file}, row ${row.toLocaleString('en-US')} (row group ${g + 1})`, line: row };
    });
    const used = sink.usedIndices();
    for (const j of used) {
      const why = refusal(opened.columns[j]);
      if (why) fail({ file, column: names[j] }, `column \`${names[j]}\` (${describeType(opened.columns[j])}) ${why}`, 'unsupported-column');
    }
    const usedNames = used.map((j) => names[j]);
    const dateOnly = used.map((j) => opened.columns[j].element.logical_type?.type === 'DATE' || opened.columns[j].element.converted_type === 'DATE');
    const slot = new Map(used.map((j, k) => [j, k]));
    const progress = throttledProgress(control);
    const totalRows = Math.max(1, Number(opened.metadata.num_rows));
    for (const rowGroup of opened.metadata.row_groups) {
      control.signal?.throwIfAborted();
      const rows = Number(rowGroup.num_rows);
      groupStarts.push(position);
      const values = await readGroup(opened, usedNames, group, position, file);
      const columns: (EncodedColumn | undefined)[] = names.map((n, j) => (slot.has(j) ? values.get(n) : undefined));
      const toTyped = (v: unknown, index: number): TypedValue => {
        const t = typed(v, dateOnly[slot.get(index)!]);
        if (t === undefined && v !== undefined)
          fail({ file, column: names[index] }, `column \`${names[index]}\`: found a value of a type this reader does not know (${Object.prototype.toString.call(v)})`, 'unsupported-column');
        return t;
      };
      sink.pushColumns(columns, rows, position + 1, toTyped);
      position += rows;
      group++;
      progress(Math.round((opened.size * position) / totalRows), opened.size, position);
    }
    progress(opened.size, opened.size, position, true);
    if (position === 0) fail({ file }, 'the file has no rows; expected at least one', 'empty-input');
    const sha256 = await sha256Of(opened.handle, opened.size);
    const read = usedNames.join(',');
    return sink.results({ description: options.description ?? file, sha256: selectionFingerprint(sha256, `columns:${read}`) });
  } finally {
    await opened.handle.close();
  }
}

/** The column names and first rows as text records (for column profiles in the editor). */
export async function previewParquet(path: string, maxRows: number, file = path): Promise<{ records: Records; complete: boolean }> {
  const opened = await openParquet(path, file);
  try {
    const names = columnNames(opened);
    const flat = names.filter((_, j) => refusal(opened.columns[j]) === undefined);
    const total = Number(opened.metadata.num_rows);
    const rows: string[][] = [];
    const lines: number[] = [];
    let position = 0;
    for (const [g, rowGroup] of opened.metadata.row_groups.entries()) {
      if (rows.length >= maxRows) break;
      const n = Math.min(Number(rowGroup.num_rows), maxRows - rows.length);
      const values = await readGroup(opened, flat, g, position, file);
      const dateOnly = flat.map((name) => opened.columns[names.indexOf(name)].element.logical_type?.type === 'DATE');
      for (let i = 0; i < n; i++) {
        rows.push(
          flat.map((name, k) => {
            const column = values.get(name)!;
            const at = column.index[i];
            const t = typed(at >= 0 ? column.dictionary[at] : at === NULL_INDEX ? null : column.values![i], dateOnly[k]);
            return t === null || t === undefined ? '' : isInstance(t, DateCell) ? t.iso : String(t);
          }),
        );
        lines.push(position + i + 1);
      }
      position += Number(rowGroup.num_rows);
    }
    return { records: { columns: flat, rows, lines, unit: 'row', file }, complete: rows.length >= total };
  } finally {
    await opened.handle.close();
  }
}
