/**
 * The byte scanner on several threads, for big plain files with a header: the data lines are cut
 * into ranges that start at line starts, each range is scanned by its own worker thread with the
 * ordinary scanner (fed the header first), and the partial results are merged: category counts by
 * label in first-seen order, moments with Pébay's merge. The SHA-256 is computed on this thread,
 * over every byte in order, while the workers scan.
 *
 * The result equals the single-threaded scanner's. Where it could not be shown to, the caller is
 * told to read the file the ordinary way: a quote the scanner leaves to csv-parse in any range
 * (`ScannerFallback`, as in one thread), a level limit reached (the limit counts levels of the whole
 * file), or a merge that does not come out exactly.
 */
import { createHash, type Hash } from 'node:crypto';
import { existsSync } from 'node:fs';
import type { FileHandle } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { InputError, isInstance } from '../errors';
import { MomentAccumulator } from '../stats/moments';
import type { Aggregator, SourceInfo } from './aggregate';
import { missingTokens } from './categories';
import type { Dialect, IntakeOptions } from './options';
import { ScannerFallback } from './scanner';
import type { Aggregate, AggregateRequest } from './types';
import { prefix } from './where';

/** Files at least this big are scanned in parallel when the caller leaves it to us. */
export const PARALLEL_THRESHOLD = 64 * 1024 * 1024;

export interface ParallelChoice {
  /** `auto` (default): in parallel from PARALLEL_THRESHOLD bytes; `always`: at any size; `never`. */
  readonly parallel?: 'auto' | 'always' | 'never';
  /** Scanning threads (default min(2, os.availableParallelism())). */
  readonly workers?: number;
}

/** How often each ending occurred in this process (for tests and diagnostics). */
export const parallelCounts = { merged: 0, declined: 0, fellBack: 0 };

/** What one scanning thread is asked to do (sent as workerData). */
export interface WorkerTask {
  readonly path: string;
  readonly file: string;
  readonly intake: IntakeOptions;
  readonly requests: readonly AggregateRequest[];
  readonly dialect: Dialect;
  readonly encoding: 'utf-8' | 'latin1';
  /** The bytes from after the byte-order mark to the end of the header line (ranges after the first scan them first). */
  readonly header: { readonly start: number; readonly end: number };
  readonly start: number;
  readonly end: number;
  /** Whether this is the first range (it starts at byte 0, reads the header itself, numbers lines from 1). */
  readonly first: boolean;
  readonly bomLength: number;
  readonly chunkSize?: number;
}

/** One category column of one request: its labels in code order, and which code is the missing level. */
export interface CoderSnapshot {
  readonly labels: readonly string[];
  readonly missingId: number;
}

export interface PartSnapshot {
  readonly aggregate: Aggregate;
  readonly coders: readonly CoderSnapshot[];
}

/**
 * A thread's last message. Lines: the first range numbers lines as the file does; the others from 1
 * at their first line, and `nextLine` is the number the line after the range would get.
 */
export type WorkerMessage =
  | { readonly type: 'progress'; readonly bytes: number; readonly rows: number }
  | { readonly type: 'done'; readonly columns: readonly string[]; readonly parts: readonly PartSnapshot[]; readonly nextLine: number; readonly rows: number }
  | { readonly type: 'fallback'; readonly reason: string }
  | { readonly type: 'input-error'; readonly message: string; readonly location: InputError['location']; readonly code: string }
  | { readonly type: 'failed'; readonly message: string; readonly stack?: string };

type Outcome = Exclude<WorkerMessage, { type: 'progress' }>;

export interface ParallelInput {
  readonly handle: FileHandle;
  readonly path: string;
  readonly file: string;
  readonly size: number;
  readonly bomLength: number;
  readonly encoding: 'utf-8' | 'latin1';
  readonly dialect: Dialect;
  readonly intake: IntakeOptions;
  readonly requests: readonly AggregateRequest[];
  readonly makeAggregators: (columns: string[]) => Aggregator[];
  readonly signal?: AbortSignal;
  readonly chunkSize?: number;
  /** Progress: bytes scanned by all threads, records counted. */
  readonly tick: (bytes: number, rows: number, final: boolean) => void;
  /** Sees every byte in order with the hash (the UTF-8 check); may throw to stop the read. */
  readonly checkBytes?: (bytes: Uint8Array) => void;
}

export interface ParallelResult {
  readonly results: readonly { result(source: SourceInfo): Aggregate }[];
  readonly hash: Hash;
}

const LF = 10;
const CR = 13;

/** How to start the scanning thread: the bundle's dist/scanWorker.js, or the source under tsx (tests). */
function workerEntry(): { readonly script: string; readonly evalCode?: string } | undefined {
  const bundled = join(__dirname, 'scanWorker.js');
  if (existsSync(bundled)) return { script: bundled };
  const source = join(__dirname, 'scanWorker.ts');
  if (!existsSync(source)) return undefined;
  return { script: source, evalCode: `require('tsx/cjs'); require(${JSON.stringify(source)});` };
}

/** Whether a parallel read is worth planning for this file and these options. */
export function parallelWanted(size: number, dialect: Dialect, choice: ParallelChoice): boolean {
  const mode = choice.parallel ?? 'auto';
  if (mode === 'never' || !dialect.header) return false;
  if (threadCount(choice) < 2) return false;
  return (mode === 'always' || size >= PARALLEL_THRESHOLD) && workerEntry() !== undefined;
}

function threadCount(choice: ParallelChoice): number {
  return Math.max(1, Math.floor(choice.workers ?? Math.min(2, availableParallelism())));
}

/**
 * The byte after the header line, found as the scanner finds it: blank lines (empty or a lone CR
 * before the newline) and comment lines before it are skipped. Undefined when it is not in `head`.
 */
export function headerEnd(head: Uint8Array, from: number, comment: string | null): number | undefined {
  const mark = comment ? comment.charCodeAt(0) : -1;
  let pos = from;
  while (pos < head.length) {
    const nl = head.indexOf(LF, pos);
    if (nl < 0) return undefined;
    const blank = nl === pos || (nl === pos + 1 && head[pos] === CR);
    if (!blank && head[pos] !== mark) return nl + 1;
    pos = nl + 1;
  }
  return undefined;
}

/** Range starts: each cut moved forward to just after the next newline; undefined if a line is too long to find one. */
async function cuts(handle: FileHandle, dataStart: number, size: number, count: number): Promise<number[] | undefined> {
  const starts = [dataStart];
  const probe = new Uint8Array(64 * 1024);
  for (let k = 1; k < count; k++) {
    const at = dataStart + Math.floor(((size - dataStart) * k) / count);
    const previous = starts[starts.length - 1];
    if (at <= previous) continue;
    const { bytesRead } = await handle.read(probe, 0, probe.length, at - 1);
    const nl = probe.subarray(0, bytesRead).indexOf(LF);
    if (nl < 0) return undefined;
    const cut = at + nl;
    if (cut > previous && cut < size) starts.push(cut);
  }
  return starts;
}

/** Hashes every byte of the file in order on this thread (the workers read their ranges themselves). */
async function hashFile(handle: FileHandle, hash: Hash, stop: AbortSignal, check?: (bytes: Uint8Array) => void): Promise<void> {
  const buffers = [new Uint8Array(1 << 20), new Uint8Array(1 << 20)];
  let position = 0;
  let pending = handle.read(buffers[0], 0, buffers[0].length, 0);
  let which = 0;
  try {
    for (;;) {
      const { bytesRead } = await pending;
      if (stop.aborted) return;
      if (bytesRead === 0) return;
      position += bytesRead;
      const current = buffers[which];
      which ^= 1;
      pending = handle.read(buffers[which], 0, buffers[which].length, position);
      check?.(current.subarray(0, bytesRead));
      hash.update(current.subarray(0, bytesRead));
    }
  } finally {
    await pending.catch(() => undefined);
  }
}

/** Moves a relative line of a range's error to the file's line; undefined when the message is not in the expected form. */
function relocated(outcome: Extract<Outcome, { type: 'input-error' }>, firstLine: number): InputError | undefined {
  const { location } = outcome;
  if (location.line === undefined) return undefined;
  const where = { file: location.file, line: location.line, column: location.column };
  const old = prefix(where);
  if (!outcome.message.startsWith(old)) return undefined;
  const line = firstLine + location.line - 1;
  return new InputError(prefix({ ...where, line }) + outcome.message.slice(old.length), { ...location, line }, outcome.code);
}

/**
 * Scans the file on several threads. Returns undefined when a parallel read does not apply or a
 * thread could not run (the caller scans on one thread); throws ScannerFallback (read with csv-parse), an InputError (the
 * first in the file, with its true line) or the abort reason.
 */
export async function scanParallel(input: ParallelInput, choice: ParallelChoice): Promise<ParallelResult | undefined> {
  try {
    const result = await planAndScan(input, choice);
    parallelCounts[result ? 'merged' : 'declined']++;
    return result;
  } catch (e) {
    if (isInstance(e, ScannerFallback)) parallelCounts.fellBack++;
    throw e;
  }
}

async function planAndScan(input: ParallelInput, choice: ParallelChoice): Promise<ParallelResult | undefined> {
  const entry = workerEntry();
  if (!entry) return undefined;
  const head = new Uint8Array(Math.min(64 * 1024, input.size));
  const { bytesRead } = await input.handle.read(head, 0, head.length, 0);
  const dataStart = headerEnd(head.subarray(0, bytesRead), input.bomLength, input.dialect.comment);
  if (dataStart === undefined || dataStart >= input.size) return undefined;
  const starts = await cuts(input.handle, dataStart, input.size, threadCount(choice));
  if (!starts || starts.length < 2) return undefined;
  input.signal?.throwIfAborted();

  const stop = new AbortController();
  const workers: Worker[] = [];
  const scanned = starts.map(() => 0);
  const rows = starts.map(() => 0);
  const outcomes = starts.map((start, k) => {
    const task: WorkerTask = {
      path: input.path,
      file: input.file,
      intake: input.intake,
      requests: input.requests,
      dialect: input.dialect,
      encoding: input.encoding,
      header: { start: input.bomLength, end: dataStart },
      start: k === 0 ? 0 : start,
      end: k + 1 < starts.length ? starts[k + 1] : input.size,
      first: k === 0,
      bomLength: input.bomLength,
      chunkSize: input.chunkSize,
    };
    const worker = new Worker(entry.evalCode ?? entry.script, { eval: entry.evalCode !== undefined, workerData: task });
    workers.push(worker);
    return new Promise<Outcome>((resolve) => {
      worker.on('message', (m: WorkerMessage) => {
        if (m.type === 'progress') {
          scanned[k] = m.bytes;
          rows[k] = m.rows;
          input.tick(sum(scanned), sum(rows), false);
        } else resolve(m);
      });
      worker.on('error', (e: Error) => resolve({ type: 'failed', message: e.message, stack: e.stack }));
      worker.on('exit', (code) => resolve({ type: 'failed', message: `the scanning thread stopped (exit code ${code})` }));
    });
  });
  const hash = createHash('sha256');
  const hashing = hashFile(input.handle, hash, stop.signal, input.checkBytes);
  hashing.catch(() => undefined); // a refusal (invalid UTF-8) is raised where hashing is awaited, below
  let aborted: (reason: unknown) => void = () => undefined;
  const abortion = new Promise<never>((_, reject) => (aborted = reject));
  abortion.catch(() => undefined);
  const onAbort = () => aborted(input.signal?.reason);
  input.signal?.addEventListener('abort', onAbort, { once: true });
  try {
    const done: Extract<Outcome, { type: 'done' }>[] = [];
    let firstLine = 1;
    for (let k = 0; k < outcomes.length; k++) {
      const outcome = await Promise.race([outcomes[k], abortion]);
      if (outcome.type === 'fallback') throw new ScannerFallback(firstLine, outcome.reason);
      // A thread that could not run (no memory for it, a missing loader) is no reason to refuse the file.
      if (outcome.type === 'failed') return undefined;
      if (outcome.type === 'input-error') {
        // The level limit counts the levels of the whole file: only one thread knows where it is passed.
        if (outcome.code === 'too-many-levels') return undefined;
        const error = k === 0 ? new InputError(outcome.message, outcome.location, outcome.code) : relocated(outcome, firstLine);
        if (!error) return undefined;
        throw error;
      }
      done.push(outcome);
      firstLine = k === 0 ? outcome.nextLine : firstLine + outcome.nextLine - 1;
    }
    await Promise.race([hashing, abortion]);
    input.tick(input.size, sum(done.map((d) => d.rows)), true);
    const results = merge(done, input);
    return results ? { results, hash } : undefined;
  } finally {
    input.signal?.removeEventListener('abort', onAbort);
    stop.abort();
    await Promise.all(workers.map((w) => w.terminate()));
    await hashing.catch(() => undefined);
  }
}

// Sums byte offsets and row counts only: integers below 2^53, which add exactly, so no compensation is needed.
function sum(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0);
}

/**
 * The ranges' results as one: category codes replayed range by range in each range's code order
 * (which is first-seen order, so the merged order is the file's first-seen order), cells added by
 * label, moments merged. Undefined when the merge refuses something one thread would not have met.
 */
function merge(done: readonly Extract<Outcome, { type: 'done' }>[], input: ParallelInput): { result(source: SourceInfo): Aggregate }[] | undefined {
  const aggregators = input.makeAggregators([...done[0].columns]);
  const token = [...missingTokens(input.intake.missing)][0];
  try {
    return aggregators.map((aggregator, p) => {
      const coders = aggregator.slots().flatMap((s) => (s.role === 'category' ? [s.coder] : []));
      let records = 0;
      let dropped = 0;
      const moments = new MomentAccumulator();
      const values: number[] = [];
      for (const range of done) {
        const part = range.parts[p];
        const { aggregate } = part;
        records += aggregate.provenance.rows;
        dropped += aggregate.provenance.dropped;
        // Labels to merged codes, in the range's code order.
        const codes = part.coders.map((snapshot, c) => {
          const byLabel = new Map<string, number>();
          snapshot.labels.forEach((label, id) => {
            if (byLabel.has(label)) throw new MergeRefused();
            byLabel.set(label, id === snapshot.missingId ? coders[c].code(token as string, 0) : coders[c].code(label, 0));
          });
          return byLabel;
        });
        const code = (c: number, label: string) => {
          const id = codes[c].get(label);
          if (id === undefined) throw new MergeRefused();
          return id;
        };
        if (aggregate.kind === 'table') {
          const { rowLabels, columnLabels, counts } = aggregate.table;
          rowLabels.forEach((r, i) => columnLabels.forEach((col, j) => aggregator.addCell(code(0, r), code(1, col), counts[i][j])));
        } else if (aggregate.kind === 'strata') {
          const { stratumLabels, rowLabels, columnLabels, counts } = aggregate.strata;
          stratumLabels.forEach((s, k) => rowLabels.forEach((r, i) => columnLabels.forEach((col, j) => aggregator.addCell(code(0, r), code(1, col), counts[k][i][j], code(2, s)))));
        } else if (aggregate.kind === 'categories') {
          aggregate.counts.labels.forEach((label, i) => aggregator.addCell(code(0, label), 0, aggregate.counts.counts[i]));
        } else {
          moments.merge(aggregate.moments);
          if (aggregate.values) for (const x of aggregate.values) values.push(x);
        }
      }
      return {
        result(source: SourceInfo): Aggregate {
          const merged = aggregator.result(source);
          const provenance = { ...merged.provenance, rows: records, dropped };
          if (merged.kind !== 'moments') return { ...merged, provenance };
          return { kind: 'moments', moments: moments.summary(), provenance, ...(input.intake.keepValues ? { values } : {}) };
        },
      };
    });
  } catch (e) {
    if (isInstance(e, MergeRefused) || isInstance(e, InputError)) return undefined;
    throw e;
  }
}

class MergeRefused extends Error {}
