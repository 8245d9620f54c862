// The production build keeps the workbook and Parquet readers out of the bundles that load at activation
// (dist/xlsx.js and dist/parquet.js are required on first use), and an error thrown inside a chunk is still
// recognised as an InputError by the bundle that loaded it (its code and place reach the output, not "error").
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const root = join(__dirname, '..', '..', '..');
// Text literals that survive minification, one from each library or reader (hyparquet's metadata reader, the
// Snappy decompressor, our workbook reader).
const HYPARQUET = 'parquet file invalid (footer != PAR1)';
const HYSNAPPY = readFileSync(join(root, 'node_modules', 'hysnappy', 'js', 'uncompress.js'), 'utf8').match(/throw new Error\('([^']+)'\)/)![1];
const WORKBOOK = 'does not start as a zip package';

describe('reader chunks in the production build', function () {
  this.timeout(300_000);
  let out = '';
  let work = '';
  before(() => {
    out = mkdtempSync(join(tmpdir(), 'countercheck-build-'));
    work = mkdtempSync(join(tmpdir(), 'countercheck-chunks-'));
    const built = spawnSync(process.execPath, [join(root, 'scripts', 'build.mjs'), '--production', `--outdir=${out}`], { cwd: root, encoding: 'utf8' });
    assert.equal(built.status, 0, built.stderr);
  });
  after(() => {
    rmSync(out, { recursive: true, force: true });
    rmSync(work, { recursive: true, force: true });
  });

  it('dist/extension.js and dist/cli.js hold neither hyparquet nor the workbook reader; their chunks do', () => {
    for (const bundle of ['extension.js', 'cli.js']) {
      const text = readFileSync(join(out, bundle), 'utf8');
      for (const marker of [HYPARQUET, HYSNAPPY, WORKBOOK]) assert.ok(!text.includes(marker), `${bundle} contains "${marker}"`);
      assert.match(text, /require\("\.\/xlsx\.js"\)/, `${bundle} requires the workbook chunk`);
      assert.match(text, /require\("\.\/parquet\.js"\)/, `${bundle} requires the Parquet chunk`);
    }
    const parquet = readFileSync(join(out, 'parquet.js'), 'utf8');
    assert.ok(parquet.includes(HYPARQUET) && parquet.includes(HYSNAPPY), 'dist/parquet.js holds hyparquet and its decompressors');
    assert.ok(readFileSync(join(out, 'xlsx.js'), 'utf8').includes(WORKBOOK), 'dist/xlsx.js holds the workbook reader');
  });

  it('the chunks use the loading bundle\'s InputError instead of a copy of their own', () => {
    // The minified class InputError (src/errors.ts): its constructor's default code.
    const definesInputError = /extends Error\{constructor\(\w+,\w+=\{\},\w+="invalid-input"\)/;
    assert.match(readFileSync(join(out, 'cli.js'), 'utf8'), definesInputError, 'the pattern finds the class where it is defined');
    for (const chunk of ['xlsx.js', 'parquet.js']) {
      const text = readFileSync(join(out, chunk), 'utf8');
      assert.doesNotMatch(text, definesInputError, `${chunk} defines its own InputError`);
      assert.ok(text.includes('countercheck.errors'), `${chunk} takes the error module registered by src/data/lazy.ts`);
    }
  });

  it('a bad workbook and a bad Parquet file are refused with their code and file through the built command line', () => {
    writeFileSync(join(work, 'bad.xlsx'), 'not a zip file\n');
    writeFileSync(join(work, 'bad.parquet'), 'not a Parquet file either\n');
    writeFileSync(join(work, 'glass.countercheck.json'), JSON.stringify({ test: 'goodness-of-fit', source: { path: 'bad.xlsx', columns: ['defect'] } }));
    writeFileSync(join(work, 'tea.countercheck.json'), JSON.stringify({ test: 'goodness-of-fit', source: { path: 'bad.parquet', columns: ['grade'] } }));
    const run = spawnSync(process.execPath, [join(out, 'cli.js'), 'run', '--json', 'glass.countercheck.json', 'tea.countercheck.json'], { cwd: work, encoding: 'utf8' });
    assert.equal(run.status, 2, run.stderr);
    const entries = JSON.parse(run.stdout) as { error: { code: string; location: { file?: string } } }[];
    assert.deepEqual(
      entries.map((e) => [e.error.code, e.error.location.file]),
      [
        ['not-a-workbook', 'bad.xlsx'],
        ['not-parquet', 'bad.parquet'],
      ],
    );
  });

  it('the demo workbook and Parquet tests reproduce through the built command line', () => {
    const demo = join(root, 'demo');
    const run = spawnSync(process.execPath, [join(out, 'cli.js'), 'check', 'glass-line2-defects.countercheck.json', 'tea-parcel-weight-spread.countercheck.json'], { cwd: demo, encoding: 'utf8' });
    assert.equal(run.status, 0, run.stdout + run.stderr);
    assert.equal(run.stdout.match(/^reproduced: /gm)?.length, 2, run.stdout);
  });
});
