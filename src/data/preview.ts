/**
 * The first records of a data file, for the planner's column profiles (up to 64 KB, cut at a line end),
 * and all of its records for procedures whose saved form keeps the counts inline. Node I/O, like file.ts.
 */
import { open, readFile } from 'node:fs/promises';
import { parseDelimited } from './delimited';
import type { Records } from './records';

export const PREVIEW_BYTES = 64 * 1024;

/** `complete`: the preview is the whole file. `file` names the file in messages. */
export async function readDelimitedPreview(path: string, file: string, bytes = PREVIEW_BYTES): Promise<{ records: Records; complete: boolean }> {
  const handle = await open(path, 'r');
  try {
    const buf = new Uint8Array(bytes);
    const { bytesRead } = await handle.read(buf, 0, bytes, 0);
    let text = new TextDecoder().decode(buf.subarray(0, bytesRead));
    const complete = bytesRead < bytes;
    if (!complete) text = text.slice(0, text.lastIndexOf('\n') + 1);
    return { records: parseDelimited(text, { file }), complete };
  } finally {
    await handle.close();
  }
}

/** Every record of a delimited file (held in memory: for small files only). */
export async function readDelimitedRecords(path: string, file: string): Promise<Records> {
  return parseDelimited(await readFile(path, 'utf8'), { file });
}
