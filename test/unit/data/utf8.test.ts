// Invalid UTF-8 is refused with its line and byte, on every path (byte scanner, csv-parse, threads), instead of
// becoming U+FFFD and merging distinct labels ("caf\xe9" and "caf\xe8" both read as "caf�" before).
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile, type FileReadControl } from '../../../src/data/file';
import { isInputError } from '../../../src/errors';

const scratch = mkdtempSync(join(tmpdir(), 'countercheck-utf8-'));
const bytes = (...parts: (string | number[])[]): Uint8Array =>
  Uint8Array.from(parts.flatMap((p) => (typeof p === 'string' ? [...Buffer.from(p, 'utf8')] : p)));
const latinFile = join(scratch, 'latin.csv');
writeFileSync(latinFile, bytes('colour\nred\ncaf', [0xe9], '\ncaf', [0xe8], '\n'));
const request = { kind: 'categories', column: 'colour' } as const;

describe('invalid UTF-8 in a data file', () => {
  after(() => rmSync(scratch, { recursive: true, force: true }));

  const paths: [string, FileReadControl][] = [
    ['byte scanner', {}],
    ['csv-parse', { engine: 'csv-parse' }],
    ['threads', { parallel: 'always', workers: 2 }],
    ['byte scanner, 3-byte reads', { chunkSize: 3 }],
  ];
  for (const [name, control] of paths) {
    it(`is refused with its line and byte (${name})`, async () => {
      await assert.rejects(aggregateFile(latinFile, request, { file: 'latin.csv' }, control), (e: unknown) => {
        assert.ok(isInputError(e), String(e));
        assert.equal(e.code, 'invalid-utf8');
        assert.equal(e.location.line, 3);
        assert.match(e.message, /^latin\.csv, line 3: byte 4 of the line \(0xE9\) is not valid UTF-8/);
        assert.match(e.message, /"encoding": "latin1"/);
        return true;
      });
    });
  }

  it('reads the same file as Latin-1 when asked, with two distinct labels', async () => {
    const a = await aggregateFile(latinFile, request, { dialect: { encoding: 'latin1' } });
    assert.ok(a.kind === 'categories');
    assert.deepEqual(a.counts.labels, ['red', 'café', 'cafè']);
  });

  it('accepts valid multi-byte characters split across reads, and refuses a sequence cut at the end of the file', async () => {
    const ok = join(scratch, 'ok.csv');
    writeFileSync(ok, 'colour\ncafé\n日本\n😀\n');
    const a = await aggregateFile(ok, request, {}, { chunkSize: 3 });
    assert.ok(a.kind === 'categories');
    assert.deepEqual(a.counts.labels, ['café', '日本', '😀']);
    const cut = join(scratch, 'cut.csv');
    writeFileSync(cut, bytes('colour\nab', [0xe6, 0x97]));
    await assert.rejects(aggregateFile(cut, request, { file: 'cut.csv' }), (e: unknown) => isInputError(e) && e.code === 'invalid-utf8' && e.location.line === 2);
  });
});
