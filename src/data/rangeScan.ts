/**
 * The byte scanner's read loop over one byte range of an open file, shared by the single-threaded
 * reader (`file.ts`, the whole file) and the scanning threads (`scanWorker.ts`, one range each).
 */
import type { FileHandle } from 'node:fs/promises';
import type { ByteScanner } from './scanner';
import { lineTooLong, MAX_LINE_BYTES } from './where';

export { MAX_LINE_BYTES } from './where';

const LF = 10;

export interface RangeScan {
  /** First byte to read. */
  readonly start: number;
  /** Byte after the last to read (Infinity: up to the end of the file). */
  readonly end: number;
  /** Bytes at `start` to read (for the hash) but not to scan: the byte-order mark. */
  readonly skip: number;
  /** Read size (default 1 MiB). */
  readonly chunkSize?: number;
  readonly signal?: AbortSignal;
  /** Every byte read, in order, before it is scanned. */
  readonly onBytes?: (bytes: Uint8Array) => void;
  /** After each chunk is scanned: the file position reached, and whether the range is done. */
  readonly onScanned?: (position: number, final: boolean) => void;
}

/**
 * Feeds bytes [start, end) to the scanner, the last chunk as final. Two buffers, so the next read
 * runs while this chunk is scanned; each keeps `room` bytes in front of its chunk for the
 * incomplete last line of the previous chunk, which makes the line contiguous without copying the chunk.
 */
export async function scanRange(handle: FileHandle, scanner: ByteScanner, range: RangeScan): Promise<void> {
  const chunk = range.chunkSize ?? 1 << 20;
  const read = (buf: Uint8Array, offset: number, at: number): Promise<{ bytesRead: number }> => {
    const length = Math.min(chunk, range.end - at);
    return length > 0 ? handle.read(buf, offset, length, at) : Promise.resolve({ bytesRead: 0 });
  };
  let room = chunk;
  let current = new Uint8Array(room + chunk);
  let next = new Uint8Array(room + chunk);
  let position = range.start;
  let pending = read(current, room, position);
  let leftover = 0;
  let first = true;
  try {
    for (;;) {
      const { bytesRead } = await pending;
      range.signal?.throwIfAborted();
      // Only a line that spans chunks can be longer than a chunk: its length is what is left over plus the bytes up
      // to the first newline of this chunk (a native search, once per chunk).
      if (leftover > 0) {
        const newline = current.subarray(room, room + bytesRead).indexOf(LF);
        if (leftover + (newline < 0 ? bytesRead : newline) > MAX_LINE_BYTES) lineTooLong(scanner.file, scanner.line);
      }
      range.onBytes?.(current.subarray(room, room + bytesRead));
      position += bytesRead;
      const final = bytesRead === 0;
      if (!final) pending = read(next, room, position);
      const start = room - leftover + (first ? Math.min(range.skip, bytesRead) : 0);
      first = false;
      const end = room + bytesRead;
      const consumed = scanner.scan(current, start, end, final);
      range.onScanned?.(position, final);
      if (final) return;
      leftover = end - consumed;
      if (leftover <= room) {
        next.set(current.subarray(consumed, end), room - leftover);
        [current, next] = [next, current];
      } else {
        // A line longer than the room: wait for the read under way and move both parts to larger buffers.
        const ahead = await pending;
        const larger = 2 ** Math.ceil(Math.log2(leftover));
        const grown = new Uint8Array(larger + Math.max(chunk, ahead.bytesRead));
        grown.set(current.subarray(consumed, end), larger - leftover);
        grown.set(next.subarray(room, room + ahead.bytesRead), larger);
        room = larger;
        current = grown;
        next = new Uint8Array(room + chunk);
        pending = Promise.resolve(ahead);
      }
    }
  } finally {
    // Never leave a read running on a handle that is about to close.
    await pending.catch(() => undefined);
  }
}
