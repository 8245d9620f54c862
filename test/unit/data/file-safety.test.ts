// What the file reader opens: the real path (symbolic links followed) must lie inside the allowed folder, checked
// before the file is opened, and only regular files are read (a FIFO would block forever, a device never ends).
// A refused file's content never appears in the message.
import { strict as assert } from 'node:assert';
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { isInputError } from '../../../src/errors';
import { runSpec } from '../../../src/savedtest/run';

const scratch = mkdtempSync(join(tmpdir(), 'countercheck-safety-'));
const workspace = join(scratch, 'workspace');
const outside = join(scratch, 'outside');
mkdirSync(join(workspace, 'data'), { recursive: true });
mkdirSync(outside);
const SECRET = 'root:x:0:0:secret-first-line';
writeFileSync(join(outside, 'secret.txt'), `${SECRET}\nsecond-secret-line\n`);
writeFileSync(join(workspace, 'data', 'ok.csv'), 'colour\nred\nblue\nred\n');
symlinkSync(join(outside, 'secret.txt'), join(workspace, 'data', 'p.csv'));
symlinkSync(outside, join(workspace, 'data', 'linked-folder'));
symlinkSync(join(workspace, 'data', 'ok.csv'), join(workspace, 'data', 'inside-link.csv'));
const fifo = join(workspace, 'data', 'pipe.csv');
execFileSync('mkfifo', [fifo]);
const request = { kind: 'categories', column: '1' } as const;

async function refusal(p: Promise<unknown>): Promise<{ code: string; message: string }> {
  try {
    await p;
  } catch (e) {
    assert.ok(isInputError(e), `expected an InputError, got ${String(e)}`);
    return { code: e.code, message: e.message };
  }
  return assert.fail('expected a refusal');
}

describe('file reader: real paths and file kinds', () => {
  after(() => rmSync(scratch, { recursive: true, force: true }));

  it('refuses a symbolic link inside the workspace that leads outside it, without reading or echoing the file', async () => {
    const r = await refusal(aggregateFile(join(workspace, 'data', 'p.csv'), request, { file: 'data/p.csv', allowedRoot: workspace, dialect: { header: false, delimiter: '|' } }));
    assert.equal(r.code, 'path-outside-root');
    assert.ok(!r.message.includes('secret'), r.message);
  });

  it('refuses a file reached through a linked folder that leads outside', async () => {
    const r = await refusal(aggregateFile(join(workspace, 'data', 'linked-folder', 'secret.txt'), request, { file: 'x', allowedRoot: workspace }));
    assert.equal(r.code, 'path-outside-root');
  });

  it('reads a symbolic link that stays inside the workspace', async () => {
    const a = await aggregateFile(join(workspace, 'data', 'inside-link.csv'), { kind: 'categories', column: 'colour' }, { allowedRoot: workspace });
    assert.deepEqual(a.kind === 'categories' && a.counts.counts, [2, 1]);
  });

  it('refuses a FIFO at once instead of waiting for a writer', async () => {
    const r = await refusal(aggregateFile(fifo, request, { file: 'data/pipe.csv' }));
    assert.equal(r.code, 'not-a-file');
    assert.match(r.message, /named pipe/);
  });

  it('refuses a device such as /dev/zero and a folder', async () => {
    const dev = await refusal(aggregateFile('/dev/zero', request, { file: '/dev/zero' }));
    assert.equal(dev.code, 'not-a-file');
    assert.match(dev.message, /device/);
    const dir = await refusal(aggregateFile(join(workspace, 'data'), request, { file: 'data' }));
    assert.equal(dir.code, 'not-a-file');
    assert.match(dir.message, /folder/);
  });

  it('runSpec with the real reader refuses the symlinked /etc/passwd-style file of a saved test', async () => {
    const spec = { test: 'goodness-of-fit', source: { path: 'data/p.csv', columns: ['1'], header: false, delimiter: '|' } };
    const r = await refusal(runSpec(spec, { readers: { aggregateFile: (f, req, o) => aggregateFile(f, req, o) }, specPath: join(workspace, 't.countercheck.json'), allowedRoot: workspace }));
    assert.equal(r.code, 'path-outside-root');
    assert.ok(!r.message.includes('secret'), r.message);
  });
});
