/**
 * A scanning thread (bundled as dist/scanWorker.js): scans one byte range of a file with the byte
 * scanner and posts its partial result (see parallel.ts). Ranges after the first are fed the header
 * line first and number their lines from 1.
 */
import { open } from 'node:fs/promises';
import { parentPort, workerData } from 'node:worker_threads';
import { InputError, isInstance } from '../errors';
import { Aggregator } from './aggregate';
import { missingTokens } from './categories';
import type { PartSnapshot, WorkerMessage, WorkerTask } from './parallel';
import { scanRange } from './rangeScan';
import { ByteScanner, ScannerFallback } from './scanner';

async function scan(task: WorkerTask, post: (m: WorkerMessage) => void): Promise<WorkerMessage> {
  const handle = await open(task.path, 'r');
  try {
    const scanner = new ByteScanner({
      dialect: task.dialect,
      encoding: task.encoding,
      file: task.file,
      aggregatorsFor: (columns) => task.requests.map((request) => new Aggregator(columns, request, task.intake, 'line')),
    });
    if (!task.first) {
      const header = new Uint8Array(task.header.end - task.header.start);
      const { bytesRead } = await handle.read(header, 0, header.length, task.header.start);
      scanner.scan(header, 0, bytesRead, false);
      if (scanner.result() === undefined) throw new Error('the header was not where it was expected');
      scanner.line = 1;
    }
    let last = 0;
    const rows = () => scanner.result()?.[0].recordCount ?? 0;
    await scanRange(handle, scanner, {
      start: task.start,
      end: task.end,
      skip: task.first ? task.bomLength : 0,
      chunkSize: task.chunkSize,
      onScanned: (position) => {
        const now = Date.now();
        if (now - last < 50) return;
        last = now;
        post({ type: 'progress', bytes: position - task.start, rows: rows() });
      },
    });
    const aggregators = scanner.result();
    if (!aggregators) throw new Error('the range held no header');
    const token = [...missingTokens(task.intake.missing)][0];
    const parts = aggregators.map((aggregator): PartSnapshot => {
      const coders = aggregator.slots().flatMap((slot) => {
        if (slot.role !== 'category') return [];
        const labels = [...slot.coder.labels];
        // The missing level's code, if it was given one (asking after the snapshot cannot change the labels taken).
        const id = token === undefined ? -1 : slot.coder.code(token, 0);
        return [{ labels, missingId: id >= 0 && id < labels.length ? id : -1 }];
      });
      return { aggregate: aggregator.result({ description: '', sha256: '' }), coders };
    });
    return { type: 'done', columns: [...aggregators[0].columns], parts, nextLine: scanner.line, rows: rows() };
  } finally {
    await handle.close();
  }
}

function failure(e: unknown): WorkerMessage {
  if (isInstance(e, ScannerFallback)) return { type: 'fallback', reason: e.message };
  if (isInstance(e, InputError)) return { type: 'input-error', message: e.message, location: e.location, code: e.code };
  const error = isInstance(e, Error) ? e : new Error(String(e));
  return { type: 'failed', message: error.message, stack: error.stack };
}

const port = parentPort;
if (port) {
  const post = (m: WorkerMessage) => port.postMessage(m);
  scan(workerData as WorkerTask, post).then(post, (e: unknown) => post(failure(e)));
}
