/**
 * Files of any size, streamed: the byte scanner for plain UTF-8 and Latin-1 files, csv-parse for
 * UTF-16, counted tables and quoting the scanner leaves to it. The only module of `data/` that
 * does I/O. Memory stays bounded: one read buffer (grown only for a longer line) and the counts.
 */
import { createHash, type Hash } from 'node:crypto';
import { constants as fsConstants, type Stats } from 'node:fs';
import { open, realpath, type FileHandle } from 'node:fs/promises';
import { isAbsolute, relative as relativePath, sep } from 'node:path';
import { Readable } from 'node:stream';
import { parse } from 'csv-parse';
import { Aggregator, type SourceInfo } from './aggregate';
import { detectDialect } from './dialect';
import { csvParseFailure, csvParseOptions, normaliseNewlines, recordStartLine, RecordSink } from './delimited';
import type { Dialect, IntakeOptions } from './options';
import { parallelWanted, scanParallel, type ParallelChoice } from './parallel';
import { scanRange } from './rangeScan';
import { ByteScanner, ScannerFallback } from './scanner';
import { InvalidUtf8, Utf8Check } from './utf8';
import type { Aggregate, AggregateRequest } from './types';
import { fail, inputError } from './where';
import { isInstance } from '../errors';

export interface ReadProgress {
  readonly bytesRead: number;
  readonly totalBytes: number;
  readonly rows: number;
}

export interface FileReadControl extends ParallelChoice {
  /** Aborting stops the read within one chunk (a few milliseconds); the promise rejects with the signal's reason. */
  readonly signal?: AbortSignal;
  /** Called about every 100 ms and once at the end. */
  readonly onProgress?: (progress: ReadProgress) => void;
  /** `auto` (default): the byte scanner where it applies; `csv-parse`: always the general reader. */
  readonly engine?: 'auto' | 'csv-parse';
  /** Read size in bytes (default 1 MiB for the byte scanner, 64 KiB for csv-parse, whose memory grows with it). */
  readonly chunkSize?: number;
}

export type FileReader = 'byte-scanner' | 'csv-parse' | 'xlsx' | 'parquet';
export type FileAggregate = Aggregate & { readonly reader: FileReader };

type TextEncoding = 'utf-8' | 'utf-16le' | 'utf-16be' | 'latin1';

const SAMPLE_BYTES = 64 * 1024;

interface Opened {
  /** The path opened: the real path when it was checked against an allowed folder. */
  readonly path: string;
  readonly handle: FileHandle;
  readonly size: number;
  /** Modification time when opened, to notice a file that changes while it is read. */
  readonly modified: number;
  readonly encoding: TextEncoding;
  /** Bytes of the byte-order mark. */
  readonly bomLength: number;
  readonly dialect: Dialect;
}

class Progress {
  private last = 0;
  constructor(
    private readonly total: number,
    private readonly report: ((p: ReadProgress) => void) | undefined,
  ) {}
  tick(bytesRead: number, rows: number, force = false): void {
    if (!this.report) return;
    const now = Date.now();
    if (!force && now - this.last < 100) return;
    this.last = now;
    this.report({ bytesRead, totalBytes: this.total, rows });
  }
}

function progressOf(opened: Opened, control: FileReadControl): (bytes: number, rows: number, final: boolean) => void {
  const progress = new Progress(opened.size, control.onProgress);
  return (bytes, rows, final) => progress.tick(bytes, rows, final);
}

function fileFailure(e: unknown, file: string): never {
  const code = (e as { code?: string }).code;
  if (code === 'ENOENT') fail({ file }, 'found no file at this path', 'file-not-found');
  if (code === 'EISDIR') fail({ file }, 'this is a folder; expected a data file', 'not-a-file');
  if (code === 'EACCES' || code === 'EPERM') fail({ file }, 'permission to read the file was refused', 'unreadable-file');
  throw e;
}

function encodingOf(head: Uint8Array, options: IntakeOptions): { encoding: TextEncoding; bomLength: number } {
  if (head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf) return { encoding: 'utf-8', bomLength: 3 };
  if (head[0] === 0xff && head[1] === 0xfe) return { encoding: 'utf-16le', bomLength: 2 };
  if (head[0] === 0xfe && head[1] === 0xff) return { encoding: 'utf-16be', bomLength: 2 };
  const given = options.dialect?.encoding ?? 'utf-8';
  return { encoding: given === 'utf-16' ? 'utf-16le' : given, bomLength: 0 };
}

function decoderFor(encoding: TextEncoding): (bytes: Uint8Array, final: boolean) => string {
  if (encoding === 'latin1') return (bytes) => Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('latin1');
  const decoder = new TextDecoder(encoding);
  return (bytes, final) => decoder.decode(bytes, { stream: !final });
}

/**
 * The real path of `path` (symbolic links in every component followed), refused when it lies outside the real
 * path of `allowedRoot`. Nothing of the file is read, and the message names neither its content nor its target.
 */
async function realPathInside(path: string, file: string, allowedRoot: string): Promise<string> {
  let real: string;
  let root: string;
  try {
    [real, root] = await Promise.all([realpath(path), realpath(allowedRoot)]);
  } catch (e) {
    return fileFailure(e, file);
  }
  const relative = relativePath(root, real);
  if (relative === '..' || relative.startsWith('..' + sep) || isAbsolute(relative)) {
    fail({ file }, 'this path leads, through a symbolic link, outside the folder the test may read from; the file was not opened', 'path-outside-root');
  }
  return real;
}

/** What a path that is not a regular file is, for the message. */
function kindOf(stat: Stats): string {
  if (stat.isDirectory()) return 'this is a folder; expected a data file';
  if (stat.isFIFO()) return 'this is a named pipe (FIFO), which could block forever; expected a regular data file';
  if (stat.isCharacterDevice() || stat.isBlockDevice()) return 'this is a device, not a file; expected a regular data file';
  if (stat.isSocket()) return 'this is a socket; expected a regular data file';
  return 'this is not a regular file; expected a data file';
}

/**
 * Opens a data file for reading: the real path is checked against the allowed folder first; the open does not
 * block (O_NONBLOCK, so a FIFO without a writer returns at once) and anything but a regular file is refused.
 */
export async function openRegularFile(path: string, file: string, allowedRoot: string | undefined): Promise<{ target: string; handle: FileHandle; stat: Stats }> {
  const target = allowedRoot === undefined ? path : await realPathInside(path, file, allowedRoot);
  let handle: FileHandle;
  try {
    handle = await open(target, fsConstants.O_RDONLY | fsConstants.O_NONBLOCK);
  } catch (e) {
    return fileFailure(e, file);
  }
  try {
    const stat = await handle.stat();
    if (!stat.isFile()) fail({ file }, kindOf(stat), 'not-a-file');
    return { target, handle, stat };
  } catch (e) {
    await handle.close();
    throw e;
  }
}

async function openData(path: string, file: string, options: IntakeOptions): Promise<Opened> {
  const { target, handle, stat } = await openRegularFile(path, file, options.allowedRoot);
  try {
    const head = new Uint8Array(Math.min(SAMPLE_BYTES, stat.size));
    const { bytesRead } = await handle.read(head, 0, head.length, 0);
    const { encoding, bomLength } = encodingOf(head.subarray(0, bytesRead), options);
    const body = head.subarray(bomLength, bytesRead);
    if (encoding === 'utf-8' || encoding === 'latin1') {
      const nul = body.indexOf(0);
      if (nul >= 0) {
        let line = 1;
        for (let k = 0; k < nul; k++) if (body[k] === 10) line++;
        fail(
          { file, line },
          'found a NUL byte; expected text (is this a binary file, or UTF-16 without a byte-order mark? then set the encoding to `utf-16`)',
          'binary-file',
        );
      }
    }
    const sample = decoderFor(encoding)(body, true);
    const dialect = detectDialect(sample, options.dialect ?? {}, bytesRead < stat.size);
    return { path: target, handle, size: stat.size, modified: stat.mtimeMs, encoding, bomLength, dialect };
  } catch (e) {
    await handle.close();
    throw e;
  }
}

/** The byte scanner; throws ScannerFallback for input it leaves to csv-parse. */
async function scanBytes(
  opened: Opened,
  makeAggregators: (columns: string[]) => Aggregator[],
  file: string,
  control: FileReadControl,
  hash: Hash,
): Promise<Aggregator[] | undefined> {
  const scanner = new ByteScanner({
    dialect: opened.dialect,
    encoding: opened.encoding === 'latin1' ? 'latin1' : 'utf-8',
    file,
    aggregatorsFor: makeAggregators,
  });
  const progress = new Progress(opened.size, control.onProgress);
  await scanRange(opened.handle, scanner, {
    start: 0,
    end: Infinity,
    skip: opened.bomLength,
    chunkSize: control.chunkSize,
    signal: control.signal,
    onBytes: (bytes) => hash.update(bytes),
    onScanned: (position, final) => progress.tick(position, scanner.result()?.[0].recordCount ?? 0, final),
  });
  return scanner.result();
}

/** The general reader: decoded text through csv-parse's stream parser. */
async function parseStream(
  opened: Opened,
  makeAggregators: (columns: string[]) => Aggregator[],
  file: string,
  control: FileReadControl,
  hash: Hash,
): Promise<Aggregator[] | undefined> {
  const progress = new Progress(opened.size, control.onProgress);
  let aggregators: Aggregator[] | undefined;
  const sink = new RecordSink(
    opened.dialect.header,
    file,
    (columns) => {
      aggregators = makeAggregators(columns);
    },
    (fields, line) => {
      for (const a of aggregators ?? []) a.push(fields, line);
    },
  );
  const chunkSize = control.chunkSize ?? 1 << 16;
  async function* decoded(): AsyncGenerator<string> {
    const decode = decoderFor(opened.encoding);
    const buf = new Uint8Array(chunkSize);
    let position = 0;
    let pendingCR = false;
    for (;;) {
      control.signal?.throwIfAborted();
      const { bytesRead } = await opened.handle.read(buf, 0, buf.length, position);
      const final = bytesRead === 0;
      hash.update(buf.subarray(0, bytesRead));
      const skip = position === 0 && opened.encoding === 'latin1' ? opened.bomLength : 0;
      position += bytesRead;
      let text: string = (pendingCR ? '\r' : '') + decode(buf.subarray(skip, bytesRead), final);
      pendingCR = !final && text.endsWith('\r');
      if (pendingCR) text = text.slice(0, -1);
      progress.tick(position, aggregators?.[0].recordCount ?? 0, final);
      if (text !== '') yield normaliseNewlines(text);
      if (final) return;
    }
  }
  const parser = parse(csvParseOptions(opened.dialect, false));
  const source = Readable.from(decoded());
  await new Promise<void>((resolve, reject) => {
    const stop = (e: unknown) => {
      source.unpipe(parser);
      source.destroy();
      parser.destroy();
      reject(e);
    };
    source.on('error', stop);
    parser.on('error', stop);
    // In flowing mode each record arrives while csv-parse is at its end, so the parser's running
    // line count is the record's last line (what `info: true` would say, without an object per record).
    parser.on('data', (record: string[]) => {
      try {
        sink.accept(record, recordStartLine(parser.info.lines, record));
      } catch (e) {
        stop(e);
      }
    });
    parser.on('end', resolve);
    source.pipe(parser);
  }).catch((e: unknown) => csvParseFailure(e, { file }, 0));
  return aggregators;
}

/**
 * Aggregates a delimited file in one streaming pass, answering several requests at once (say a
 * cross-tabulation and the moments of a numeric column). Every provenance carries the SHA-256 of
 * every byte read, the record count and the columns used; `dropped` counts the records that
 * request left out for missing values.
 */
export async function aggregateFileMany(
  path: string,
  requests: readonly AggregateRequest[],
  options: IntakeOptions = {},
  control: FileReadControl = {},
): Promise<{ readonly aggregates: Aggregate[]; readonly reader: FileReader }> {
  const file = options.file ?? path;
  control.signal?.throwIfAborted();
  const opened = await openData(path, file, options);
  try {
    const intake: IntakeOptions = { ...options, file, dialect: { ...options.dialect, ...opened.dialect } };
    const makeAggregators = (columns: string[]) => requests.map((request) => new Aggregator(columns, request, intake, 'line'));
    const scannable =
      control.engine !== 'csv-parse' &&
      requests.every((r) => r.kind !== 'counted-table' && r.kind !== 'strata') &&
      (opened.encoding === 'utf-8' || opened.encoding === 'latin1');
    let reader: FileReader = 'csv-parse';
    // UTF-8 files: every byte that is hashed is also checked (utf8.ts), so invalid bytes are refused by line.
    let utf8 = opened.encoding === 'utf-8' ? new Utf8Check() : undefined;
    const checkedHash = (): Hash => {
      const h = createHash('sha256');
      if (!utf8) return h;
      const check = utf8;
      const update = h.update.bind(h);
      return Object.assign(h, { update: (bytes: Uint8Array) => (check.update(bytes), update(bytes)) }) as Hash;
    };
    let hash = checkedHash();
    let aggregators: readonly { result(source: SourceInfo): Aggregate }[] | undefined;
    if (scannable) {
      try {
        const parallel = parallelWanted(opened.size, opened.dialect, control)
          ? await scanParallel({ ...opened, file, checkBytes: utf8 ? (bytes) => utf8!.update(bytes) : undefined, encoding: opened.encoding === 'latin1' ? 'latin1' : 'utf-8', intake, requests, makeAggregators, signal: control.signal, chunkSize: control.chunkSize, tick: progressOf(opened, control) }, control)
          : undefined;
        if (parallel) [aggregators, hash] = [parallel.results, parallel.hash];
        else aggregators = await scanBytes(opened, makeAggregators, file, control, hash);
        reader = 'byte-scanner';
      } catch (e) {
        if (!(isInstance(e, ScannerFallback))) throw e;
        if (utf8) utf8 = new Utf8Check();
        hash = checkedHash();
      }
    }
    if (reader === 'csv-parse') aggregators = await parseStream(opened, makeAggregators, file, control, hash);
    utf8?.finish();
    if (aggregators === undefined) throw inputError({ file }, 'found no records; expected at least one line of data', 'empty-input');
    // The hash must describe the bytes that were counted: a file written meanwhile is refused.
    const after = await opened.handle.stat();
    if (after.size !== opened.size || after.mtimeMs !== opened.modified)
      fail({ file }, 'the file changed while it was being read; expected it unchanged (read it again once it is written)', 'file-changed');
    const source = { description: options.description ?? file, sha256: hash.digest('hex') };
    return { aggregates: aggregators.map((a) => a.result(source)), reader };
  } catch (e) {
    if (isInstance(e, InvalidUtf8)) return await invalidUtf8Failure(opened, e, file);
    throw e;
  } finally {
    await opened.handle.close();
  }
}

/** Refuses invalid UTF-8 at its line and its byte within the line, found by reading the file again up to it. */
async function invalidUtf8Failure(opened: Opened, e: InvalidUtf8, file: string): Promise<never> {
  const buf = new Uint8Array(1 << 20);
  let line = 1;
  let lineStart = 0;
  for (let position = 0; position < e.offset; ) {
    const { bytesRead } = await opened.handle.read(buf, 0, Math.min(buf.length, e.offset - position), position);
    if (bytesRead === 0) break;
    for (let k = 0; k < bytesRead; k++) {
      if (buf[k] === 10) {
        line++;
        lineStart = position + k + 1;
      }
    }
    position += bytesRead;
  }
  const hex = `0x${e.byte.toString(16).toUpperCase().padStart(2, '0')}`;
  return fail(
    { file, line },
    `byte ${e.offset - lineStart + 1} of the line (${hex}) is not valid UTF-8; read as UTF-8 it would become U+FFFD and distinct labels could merge. If the file is Latin-1, set "encoding": "latin1" in the source`,
    'invalid-utf8',
  );
}

/** Aggregates a delimited file in one streaming pass for one request. */
export async function aggregateFile(
  path: string,
  request: AggregateRequest,
  options: IntakeOptions = {},
  control: FileReadControl = {},
): Promise<FileAggregate> {
  const { aggregates, reader } = await aggregateFileMany(path, [request], options, control);
  return { ...aggregates[0], reader };
}

/**
 * Reads a small text file (a saved test, a report) whole, as UTF-8: only a regular file (a FIFO or a device
 * such as /dev/zero would block or never end) of at most `maxBytes` bytes, refused before its content is read.
 */
export async function readTextFile(path: string, file: string, maxBytes: number, allowedRoot?: string): Promise<string> {
  const { handle, stat } = await openRegularFile(path, file, allowedRoot);
  try {
    if (stat.size > maxBytes) {
      fail({ file }, `the file has ${stat.size} bytes, more than the ${maxBytes} this reader accepts; expected a saved test or report of ordinary size`, 'file-too-large');
    }
    const bytes = new Uint8Array(stat.size);
    let at = 0;
    while (at < bytes.length) {
      const { bytesRead } = await handle.read(bytes, at, bytes.length - at, at);
      if (bytesRead === 0) break;
      at += bytesRead;
    }
    return new TextDecoder('utf-8').decode(bytes.subarray(0, at));
  } finally {
    await handle.close();
  }
}

/** Largest saved test or report read whole: 16 MiB. */
export const MAX_TEXT_FILE_BYTES = 16 * 1024 * 1024;
