// A line longer than MAX_LINE_BYTES is refused with its line number by every reader, before the read buffer grows
// past the limit; a line just at the limit is read. (The memory figure for a 200 MB line is in npm run bench.)
import { strict as assert } from 'node:assert';
import { closeSync, mkdtempSync, openSync, rmSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile, type FileReadControl } from '../../../src/data/file';
import { MAX_LINE_BYTES } from '../../../src/data/rangeScan';
import { isInputError } from '../../../src/errors';

const scratch = mkdtempSync(join(tmpdir(), 'countercheck-long-'));

/** header, two short lines, then one line of `length` bytes (the field itself), then a short line. */
function fileWithLine(name: string, length: number, quoted = false): string {
  const path = join(scratch, name);
  const fd = openSync(path, 'w');
  writeSync(fd, 'colour\nred\nblue\n');
  const block = new Uint8Array(1 << 20).fill(0x78);
  let left = length;
  if (quoted) {
    writeSync(fd, '"');
    left -= 2;
  }
  while (left > 0) {
    const n = Math.min(left, block.length);
    writeSync(fd, block, 0, n);
    left -= n;
  }
  writeSync(fd, quoted ? '"\nred\n' : '\nred\n');
  closeSync(fd);
  return path;
}

const request = { kind: 'categories', column: 'colour' } as const;

describe(`lines longer than ${MAX_LINE_BYTES} bytes`, function () {
  this.timeout(60_000);
  after(() => rmSync(scratch, { recursive: true, force: true }));

  const over = fileWithLine('over.csv', MAX_LINE_BYTES + 1);
  const overQuoted = fileWithLine('over-quoted.csv', MAX_LINE_BYTES + 1, true);
  const at = fileWithLine('at.csv', MAX_LINE_BYTES);

  const paths: [string, string, FileReadControl][] = [
    ['byte scanner', over, {}],
    ['csv-parse', over, { engine: 'csv-parse' }],
    ['csv-parse after a quote the scanner leaves to it', overQuoted, {}],
    ['threads', over, { parallel: 'always', workers: 2 }],
  ];
  for (const [name, path, control] of paths) {
    it(`refuses a line of ${MAX_LINE_BYTES + 1} bytes at line 4 (${name})`, async () => {
      await assert.rejects(aggregateFile(path, request, { file: 'long.csv' }, control), (e: unknown) => {
        assert.ok(isInputError(e), String(e));
        assert.equal(e.code, 'line-too-long', e.message);
        assert.equal(e.location.line, 4, e.message);
        assert.match(e.message, /^long\.csv, line 4: the line is longer than 16777216 bytes/);
        return true;
      });
    });
  }

  it(`reads a line of exactly ${MAX_LINE_BYTES} bytes`, async () => {
    const a = await aggregateFile(at, request);
    assert.ok(a.kind === 'categories');
    assert.deepEqual(a.counts.counts, [2, 1, 1]);
  });
});
