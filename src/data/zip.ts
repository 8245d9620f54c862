/**
 * The part of the zip format a workbook needs: the central directory (names, sizes, offsets) and
 * each entry inflated either whole (small parts) or in chunks (a sheet), with Node's zlib. Measured on
 * a 200,000-row sheet (33 MB of XML): fflate 0.8.3's inflater (pure JavaScript) 0.75 s of 1.6 s in all,
 * zlib (native, part of Node) about 0.1 s; so zlib, and no dependency for it.
 * Entries are found through the central directory, so local headers with data descriptors are fine.
 * Refused: ZIP64 (sizes past 4 GiB), encryption, methods other than stored and deflate.
 */
import { createInflateRaw, inflateRawSync } from 'node:zlib';
import { isInstance } from '../errors';

export interface ZipEntry {
  readonly name: string;
  readonly method: number;
  readonly flags: number;
  readonly compressedSize: number;
  readonly size: number;
  readonly localOffset: number;
}

/** A zip that cannot be read; the reader turns it into a located InputError. */
export class ZipProblem extends Error {}

const u16 = (b: Uint8Array, k: number): number => b[k] | (b[k + 1] << 8);
const u32 = (b: Uint8Array, k: number): number => (b[k] | (b[k + 1] << 8) | (b[k + 2] << 16)) + b[k + 3] * 0x1000000;

export function zipEntries(bytes: Uint8Array): Map<string, ZipEntry> {
  // End of central directory: 22 bytes plus a comment of up to 65,535 bytes, at the end.
  let end = -1;
  for (let k = bytes.length - 22; k >= Math.max(0, bytes.length - 22 - 0xffff); k--) {
    if (bytes[k] === 0x50 && bytes[k + 1] === 0x4b && bytes[k + 2] === 0x05 && bytes[k + 3] === 0x06) {
      end = k;
      break;
    }
  }
  if (end < 0) throw new ZipProblem('found no zip directory at its end (the file is cut short, or is not a zip package)');
  const count = u16(bytes, end + 10);
  const dirOffset = u32(bytes, end + 16);
  if (count === 0xffff || dirOffset === 0xffffffff) throw new ZipProblem('the package is in the ZIP64 format (over 4 GiB), which is not read');
  const entries = new Map<string, ZipEntry>();
  const names = new TextDecoder();
  let k = dirOffset;
  for (let i = 0; i < count; i++) {
    if (k + 46 > bytes.length || u32(bytes, k) !== 0x02014b50) throw new ZipProblem(`the zip directory is damaged at entry ${i + 1} of ${count}`);
    const nameLength = u16(bytes, k + 28);
    const entry: ZipEntry = {
      flags: u16(bytes, k + 8),
      method: u16(bytes, k + 10),
      compressedSize: u32(bytes, k + 20),
      size: u32(bytes, k + 24),
      localOffset: u32(bytes, k + 42),
      name: names.decode(bytes.subarray(k + 46, k + 46 + nameLength)),
    };
    entries.set(entry.name, entry);
    k += 46 + nameLength + u16(bytes, k + 30) + u16(bytes, k + 32);
  }
  return entries;
}

function compressedData(bytes: Uint8Array, entry: ZipEntry): Uint8Array {
  if (entry.flags & 1) throw new ZipProblem(`the part ${entry.name} is encrypted`);
  if (entry.method !== 0 && entry.method !== 8) throw new ZipProblem(`the part ${entry.name} uses zip method ${entry.method}; expected stored (0) or deflate (8)`);
  const k = entry.localOffset;
  if (k + 30 > bytes.length || u32(bytes, k) !== 0x04034b50) throw new ZipProblem(`the part ${entry.name} has no local header where the directory says`);
  const start = k + 30 + u16(bytes, k + 26) + u16(bytes, k + 28);
  if (start + entry.compressedSize > bytes.length) throw new ZipProblem(`the part ${entry.name} is cut short`);
  return bytes.subarray(start, start + entry.compressedSize);
}

/** A small part, inflated whole. `limit` guards against a part that inflates far beyond reason. */
export function inflateEntry(bytes: Uint8Array, entry: ZipEntry, limit: number): Uint8Array {
  if (entry.size > limit) throw new ZipProblem(`the part ${entry.name} would take ${entry.size} bytes, over the limit of ${limit}`);
  const data = compressedData(bytes, entry);
  if (entry.method === 0) return data;
  let out: Uint8Array;
  try {
    const inflated = inflateRawSync(data, { maxOutputLength: Math.max(1, entry.size) });
    out = new Uint8Array(inflated.buffer, inflated.byteOffset, inflated.byteLength);
  } catch (e) {
    throw new ZipProblem(`the part ${entry.name} does not inflate (${(e as Error).message})`);
  }
  if (out.length !== entry.size) throw new ZipProblem(`the part ${entry.name} inflated to ${out.length} bytes; the directory says ${entry.size}`);
  return out;
}

/**
 * A large part, inflated as a stream; `onData` sees each inflated piece (about 64 KiB); it may return false to stop early, or throw.
 * Stops with a ZipProblem when the part inflates to more than its directory size says, or is cut short.
 */
export async function streamEntry(bytes: Uint8Array, entry: ZipEntry, onData: (piece: Uint8Array, final: boolean) => void | false, chunk = 1 << 20): Promise<void> {
  const data = compressedData(bytes, entry);
  if (entry.method === 0) {
    for (let k = 0; k < data.length; k += chunk) if (onData(data.subarray(k, Math.min(data.length, k + chunk)), false) === false) return;
    onData(new Uint8Array(0), true);
    return;
  }
  const inflater = createInflateRaw({ chunkSize: 1 << 16 });
  let total = 0;
  const feed = (async () => {
    for (let k = 0; k < data.length; k += chunk) {
      if (inflater.destroyed) return;
      if (!inflater.write(data.subarray(k, Math.min(data.length, k + chunk))))
        await new Promise<void>((resolve) => {
          const done = () => {
            inflater.off('drain', done);
            inflater.off('close', done);
            resolve();
          };
          inflater.on('drain', done);
          inflater.on('close', done);
        });
    }
    if (!inflater.destroyed) inflater.end();
  })();
  try {
    for await (const piece of inflater as AsyncIterable<Buffer>) {
      total += piece.length;
      if (total > entry.size) throw new ZipProblem(`the part ${entry.name} inflates to more than the ${entry.size} bytes its directory says`);
      if (onData(new Uint8Array(piece.buffer, piece.byteOffset, piece.byteLength), false) === false) {
        inflater.destroy();
        return;
      }
    }
  } catch (e) {
    inflater.destroy();
    if (isInstance(e, ZipProblem) || typeof (e as { code?: unknown }).code !== 'string' || !/^Z_|^ERR_/.test((e as { code: string }).code)) throw e;
    throw new ZipProblem(`the part ${entry.name} does not inflate (${(e as Error).message})`);
  } finally {
    await feed.catch(() => undefined);
  }
  if (total !== entry.size) throw new ZipProblem(`the part ${entry.name} ends after ${total} bytes; its directory says ${entry.size}`);
  onData(new Uint8Array(0), true);
}
