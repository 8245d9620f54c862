/**
 * Checks that a stream of bytes is valid UTF-8, chunk by chunk (Node's native `buffer.isUtf8`; a sequence cut by
 * a chunk boundary is carried to the next chunk). The readers pass every byte through it, so a label with invalid
 * bytes is refused rather than decoded to U+FFFD, where `caf\xe9` and `caf\xe8` would merge into one level.
 */
import { isUtf8 } from 'node:buffer';

/** Thrown at the first invalid byte; `offset` counts from the start of the file. */
export class InvalidUtf8 extends Error {
  constructor(
    readonly offset: number,
    readonly byte: number,
  ) {
    super(`invalid UTF-8 at byte offset ${offset}`);
  }
}

const EMPTY = new Uint8Array(0);

export class Utf8Check {
  private carry: Uint8Array = EMPTY;
  /** File offset of the first byte of `carry` (or of the next chunk when there is no carry). */
  private offset = 0;

  update(bytes: Uint8Array): void {
    const chunk = this.carry.length === 0 ? bytes : concat(this.carry, bytes);
    const cut = completeLength(chunk);
    const body = chunk.subarray(0, cut);
    if (!isUtf8(body)) throw new InvalidUtf8(this.offset + firstInvalid(body), body[firstInvalid(body)]);
    this.carry = chunk.slice(cut);
    this.offset += cut;
  }

  /** At the end of the input: a sequence still open is invalid. */
  finish(): void {
    if (this.carry.length > 0) throw new InvalidUtf8(this.offset, this.carry[0]);
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

/** Length of `chunk` without a multi-byte sequence that its end leaves incomplete. */
function completeLength(chunk: Uint8Array): number {
  let k = chunk.length - 1;
  let continuation = 0;
  while (k >= 0 && continuation < 3 && (chunk[k] & 0xc0) === 0x80) {
    k--;
    continuation++;
  }
  if (k < 0) return chunk.length;
  const lead = chunk[k];
  const need = lead >= 0xf0 ? 4 : lead >= 0xe0 ? 3 : lead >= 0xc0 ? 2 : 1;
  return chunk.length - k < need ? k : chunk.length;
}

/** Index of the first byte that starts no valid sequence (only called on invalid input). */
function firstInvalid(bytes: Uint8Array): number {
  let i = 0;
  while (i < bytes.length) {
    const b = bytes[i];
    const need = b < 0x80 ? 1 : b >= 0xc2 && b <= 0xdf ? 2 : b >= 0xe0 && b <= 0xef ? 3 : b >= 0xf0 && b <= 0xf4 ? 4 : 0;
    if (need === 0 || i + need > bytes.length) return i;
    if (need > 1 && !isUtf8(bytes.subarray(i, i + need))) return i;
    i += need;
  }
  return bytes.length;
}
