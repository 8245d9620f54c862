// Saved tests that are not ordinary files: a FIFO, /dev/zero, JSON nested 100,000 deep, a spec far too large.
// Each ends at once with a located message and exit code 2, not a block, a stack overflow or an out-of-memory.
import { strict as assert } from 'node:assert';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli';
import { MAX_TEXT_FILE_BYTES } from '../../../src/data/file';
import { checkJsonNesting, MAX_SPEC_NESTING } from '../../../src/savedtest/validate';

let dir: string;

async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), readStdin: async () => '', cwd: dir, now: () => new Date('2026-11-30T12:00:00Z') });
  return { code, stdout, stderr };
}

describe('command line on hostile spec files', () => {
  beforeEach(() => (dir = mkdtempSync(join(tmpdir(), 'countercheck-hostile-'))));
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('refuses a FIFO as the spec at once', async () => {
    execFileSync('mkfifo', [join(dir, 'pipe.countercheck.json')]);
    const out = await cli(['run', 'pipe.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /pipe\.countercheck\.json: this is a named pipe/);
  });

  it('refuses /dev/zero as the spec at once', async () => {
    const out = await cli(['run', '/dev/zero']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /\/dev\/zero: this is a device/);
  });

  it(`refuses a spec above ${MAX_TEXT_FILE_BYTES} bytes without reading it, and reads one just below the limit`, async () => {
    const head = '{"test": "goodness-of-fit", "observed": [315, 108, 101, 32], "ratios": [9, 3, 3, 1], "description": "';
    const tail = '"}\n';
    writeFileSync(join(dir, 'big.countercheck.json'), head + 'x'.repeat(MAX_TEXT_FILE_BYTES + 1 - head.length - tail.length) + tail);
    const big = await cli(['run', 'big.countercheck.json']);
    assert.equal(big.code, 2);
    assert.match(big.stderr, /big\.countercheck\.json: the file has 16777217 bytes, more than the 16777216/);
    writeFileSync(join(dir, 'fits.countercheck.json'), head + 'x'.repeat(MAX_TEXT_FILE_BYTES - head.length - tail.length) + tail);
    const fits = await cli(['run', 'fits.countercheck.json']);
    assert.doesNotMatch(fits.stderr, /more than the/);
  });

  it('refuses JSON nested 100,000 deep with the line and column where the limit is passed', async () => {
    writeFileSync(join(dir, 'deep.countercheck.json'), '{"test":\n' + '['.repeat(100_000) + ']'.repeat(100_000) + '}');
    const out = await cli(['run', 'deep.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, new RegExp(`deep\\.countercheck\\.json:2:${MAX_SPEC_NESTING}: the JSON is nested more than ${MAX_SPEC_NESTING} levels`));
    assert.doesNotMatch(out.stderr, /call stack/);
  });

  it(`accepts nesting of exactly ${MAX_SPEC_NESTING} and refuses ${MAX_SPEC_NESTING + 1}; brackets inside strings do not count`, () => {
    checkJsonNesting('['.repeat(MAX_SPEC_NESTING) + ']'.repeat(MAX_SPEC_NESTING));
    assert.throws(() => checkJsonNesting('['.repeat(MAX_SPEC_NESTING + 1)), /nested more than/);
    checkJsonNesting(`{"a": "${'['.repeat(500)}\\"["}`);
  });
});

describe('command line writing into a closed pipe', () => {
  it('exits quietly with code 141 (128 + SIGPIPE, as documented) when its reader has gone (`| head -c 10`)', async () => {
    const { spawn } = await import('node:child_process');
    const { existsSync } = await import('node:fs');
    const bundle = join(__dirname, '..', '..', '..', 'dist', 'cli.js');
    assert.ok(existsSync(bundle), 'dist/cli.js is missing: run `npm run build`');
    const child = spawn(process.execPath, [bundle, 'run', '-', '--json'], { stdio: ['pipe', 'pipe', 'pipe'] });
    child.stdout.destroy(); // the reader goes away before anything is written
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.stdin.end('{"test": "distribution", "df": 4, "x": 161.13}');
    const code = await new Promise<number | null>((resolve) => child.on('close', (c) => resolve(c)));
    assert.equal(code, 141, stderr);
    assert.equal(stderr, '');
  });
});
