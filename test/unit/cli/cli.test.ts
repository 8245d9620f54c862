// The command line, in-process (main with captured streams) and once as a program (node dist/cli.js).
// Exit codes, messages on stderr with file:line:column and JSON path, --record/check round trips and
// living report refreshes, on a throwaway folder with its own small data files.
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync, appendFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli, type Outcome } from './run-cli';

let dir: string;

const cli = (args: string[], stdin = ''): Promise<Outcome> => runCli(dir, args, stdin);

function write(name: string, text: string): void {
  writeFileSync(join(dir, name), text);
}

// 60 "pass" and 40 "fail" against equal proportions: X² = 4.00, p = 0.0455 (significant at 0.05).
const sortingCsv = 'batch,outcome\n' + Array.from({ length: 100 }, (_, i) => `${i + 1},${i < 60 ? 'pass' : 'fail'}`).join('\n') + '\n';
const sortingSpec = `{
  "version": 1,
  "test": "goodness-of-fit",
  "title": "Sorting line outcomes",
  "source": { "path": "data/sorting.csv", "columns": ["outcome"] },
  "categories": ["pass", "fail"],
  "proportions": { "pass": 0.5, "fail": 0.5 }
}
`;

describe('command line', function () {
  this.timeout(30000);

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'countercheck-cli-'));
    mkdirSync(join(dir, 'data'));
    write('data/sorting.csv', sortingCsv);
    write('sorting.countercheck.json', sortingSpec);
    write('mendel.countercheck.json', '{"test": "goodness-of-fit", "observed": [315, 108, 101, 32], "ratios": [9, 3, 3, 1]}\n');
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('run prints the summary and exits 0', async () => {
    const out = await cli(['run', 'mendel.countercheck.json']);
    assert.equal(out.code, 0, out.stderr);
    assert.match(out.stdout, /χ²\(3, N = 556\) = 0\.47, p = \.925/); // Mendel's dihybrid cross: X² = 0.470, p = 0.925
    assert.match(out.stdout, /Caution: Statistical significance is not practical importance/);
  });

  it('run reads a source file relative to the spec', async () => {
    const out = await cli(['run', 'sorting.countercheck.json']);
    assert.equal(out.code, 0, out.stderr);
    assert.match(out.stdout, /^Sorting line outcomes\n/);
    assert.match(out.stdout, /χ²\(1, N = 100\) = 4\.00, p = \.046/); // (60−50)²/50 + (40−50)²/50 = 4; P(χ²₁ > 4) = 0.0455
  });

  it('run --json gives the promised fields, an array for several specs', async () => {
    const one = await cli(['run', '--json', 'mendel.countercheck.json']);
    const json = JSON.parse(one.stdout);
    assert.equal(json.test, 'goodness-of-fit');
    assert.equal(json.df, 3);
    assert.ok(Math.abs(json.statistic - 0.470024) < 1e-6);
    for (const key of ['pValue', 'pValueLog10', 'expected', 'residuals', 'effectSize', 'warnings']) assert.ok(key in json, key);
    const two = JSON.parse((await cli(['run', '--json', 'mendel.countercheck.json', 'sorting.countercheck.json'])).stdout);
    assert.equal(two.length, 2);
    assert.equal(two[1].data.rows, 100);
  });

  it('run - reads the spec from standard input', async () => {
    const out = await cli(['run', '-'], '{"test": "distribution", "df": 100, "p": 0.001}');
    assert.equal(out.code, 0, out.stderr);
    assert.match(out.stdout, /upper critical value 149\.449/); // NIST/SEMATECH e-Handbook §1.3.6.7.4: df 100, upper 0.999 → 149.449
  });

  it('a bad spec exits 2 with every problem on stderr, positioned', async () => {
    write('bad.countercheck.json', '{\n  "test": "independence",\n  "table": [[1, 2], [3, -4]],\n  "colour": "red"\n}\n');
    const out = await cli(['run', 'bad.countercheck.json']);
    assert.equal(out.code, 2);
    assert.equal(out.stdout, '');
    assert.match(out.stderr, /bad\.countercheck\.json:3:25: \$\.table\[1\]\[1\]: expected a number ≥ 0, found the number -4/);
    assert.match(out.stderr, /bad\.countercheck\.json:4:3: \$\.colour: unknown field "colour"/);
  });

  it('invalid JSON, a missing spec and bad data exit 2 with the place named', async () => {
    write('broken.countercheck.json', '{"test": "variance",\n "values": [1, 2,,]}');
    assert.match((await cli(['run', 'broken.countercheck.json'])).stderr, /broken\.countercheck\.json:2:18: invalid JSON/);
    const missing = await cli(['run', 'nowhere.countercheck.json']);
    assert.equal(missing.code, 2);
    assert.match(missing.stderr, /nowhere\.countercheck\.json: cannot read the spec: no such file/);
    write('zero.countercheck.json', '{"test": "goodness-of-fit",\n "observed": [5, 3],\n "expected": [8, 0]}');
    const zero = await cli(['run', 'zero.countercheck.json']);
    assert.equal(zero.code, 2);
    assert.match(zero.stderr, /zero\.countercheck\.json:3:18: .*expected count is 0 but 3 observed/);
  });

  it('bad data exits 2 naming the spec, the data file, its line and column', async () => {
    write('data/shifts.csv', 'shift,defect,count\nday,yes,2\nnight,no,n/a\n');
    write('shifts.countercheck.json', '{"test": "independence", "source": {"path": "data/shifts.csv", "columns": ["shift", "defect"], "weight": "count"}}');
    const out = await cli(['run', 'shifts.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /^shifts\.countercheck\.json: data\/shifts\.csv, line 3, column `count`: .*found `n\/a`/);
  });

  it('a column the data lacks is pointed at in the spec', async () => {
    write('nocol.countercheck.json', '{"test": "goodness-of-fit",\n "source": {"path": "data/sorting.csv", "columns": ["result"]}}');
    const out = await cli(['run', 'nocol.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /^nocol\.countercheck\.json:2:53: \$\.source\.columns\[0\]: .*found no column `result`; the columns are `batch`, `outcome`/);
  });

  it('a source path leading out of the folder is refused unless allowed', async () => {
    write('escape.countercheck.json', '{"test": "variance", "sigma0": 1, "source": {"path": "../elsewhere.csv", "columns": ["x"]}}');
    const out = await cli(['run', 'escape.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /escape\.countercheck\.json:1:\d+: \$\.source\.path: "\.\.\/elsewhere\.csv" leads outside/);
    const allowed = await cli(['run', '--allow-outside', 'escape.countercheck.json']);
    assert.match(allowed.stderr, /elsewhere\.csv/);
    assert.doesNotMatch(allowed.stderr, /leads outside/);
  });

  it('--record stores the result, and check says reproduced', async () => {
    const rec = await cli(['run', '--record', 'sorting.countercheck.json']);
    assert.equal(rec.code, 0, rec.stderr);
    const written = readFileSync(join(dir, 'sorting.countercheck.json'), 'utf8');
    assert.ok(written.startsWith(sortingSpec.replace(/\n}\n$/, ',\n  "recorded": {')), written.slice(0, 400));
    const recorded = JSON.parse(written).recorded;
    assert.equal(recorded.data.rows, 100);
    assert.match(recorded.data.sha256, /^[0-9a-f]{64}$/);
    assert.deepEqual(recorded.data.columns, ['outcome']);
    assert.equal(recorded.result.significant, true);
    assert.equal(recorded.tool, 'countercheck 0.1.0');
    assert.equal(recorded.recordedAt, '2026-11-30T12:00:00.000Z');
    const again = await cli(['run', '--record', 'sorting.countercheck.json']);
    assert.match(again.stderr, /reproduced; the spec is unchanged/);
    assert.equal(readFileSync(join(dir, 'sorting.countercheck.json'), 'utf8'), written);
    const check = await cli(['check', 'sorting.countercheck.json']);
    assert.equal(check.code, 0, check.stdout);
    assert.match(check.stdout, /^reproduced: sorting\.countercheck\.json/);
  });

  it('one more row in the data: data changed, conclusion flipped (or not), exit 1', async () => {
    await cli(['run', '--record', 'sorting.countercheck.json']);
    // 60 pass / 41 fail: X² = 3.57, p = 0.059 — no longer significant.
    appendFileSync(join(dir, 'data/sorting.csv'), '101,fail\n');
    const flipped = await cli(['check', 'sorting.countercheck.json']);
    assert.equal(flipped.code, 1);
    assert.match(flipped.stdout, /^data changed: sorting\.countercheck\.json/);
    assert.match(flipped.stdout, /n 100 → 101/);
    assert.match(flipped.stdout, /conclusion FLIPPED at α = 0\.05: was significant, now not significant/);
    const json = JSON.parse((await cli(['check', '--json', 'sorting.countercheck.json'])).stdout);
    assert.equal(json[0].status, 'data-changed');
    assert.equal(json[0].conclusionFlipped, true);
    // 61 pass / 40 fail instead: X² = 4.37, p = 0.037 — still significant.
    write('data/sorting.csv', sortingCsv + '101,pass\n');
    const same = JSON.parse((await cli(['check', '--json', 'sorting.countercheck.json'])).stdout);
    assert.equal(same[0].status, 'data-changed');
    assert.equal(same[0].conclusionFlipped, false);
  });

  it('an altered recorded statistic: result differs, exit 1; --record refuses to overwrite without --force', async () => {
    await cli(['run', '--record', 'sorting.countercheck.json']);
    const file = join(dir, 'sorting.countercheck.json');
    const tampered = readFileSync(file, 'utf8').replace(/"statistic": [-0-9.e+]+,/, '"statistic": 4.5,');
    assert.notEqual(tampered, readFileSync(file, 'utf8'));
    writeFileSync(file, tampered);
    const check = await cli(['check', 'sorting.countercheck.json']);
    assert.equal(check.code, 1);
    assert.match(check.stdout, /^result differs: sorting\.countercheck\.json[\s\S]*statistic: recorded 4\.5, now 4/);
    const refused = await cli(['run', '--record', 'sorting.countercheck.json']);
    assert.equal(refused.code, 1);
    assert.match(refused.stderr, /not overwritten; run again with --record --force/);
    assert.equal(readFileSync(file, 'utf8'), tampered);
    const forced = await cli(['run', '--record', '--force', 'sorting.countercheck.json']);
    assert.equal(forced.code, 0);
    assert.equal((await cli(['check', 'sorting.countercheck.json'])).code, 0);
  });

  it('check exits 2 when a spec cannot run, and counts each status', async () => {
    await cli(['run', '--record', 'sorting.countercheck.json']);
    const out = await cli(['check', 'sorting.countercheck.json', 'mendel.countercheck.json', 'gone.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stdout, /cannot run: mendel\.countercheck\.json\n {2}no recorded result/);
    assert.match(out.stdout, /cannot run: gone\.countercheck\.json\n {2}gone\.countercheck\.json: cannot read the spec/);
    assert.match(out.stdout, /1 reproduced, 2 cannot run \(tolerance: numbers agree within a relative difference of 1e-9/);
  });

  it('report refreshes living blocks in place; twice gives identical bytes; --check reports changes', async () => {
    const md = [
      '# Sorting line review', '', '```countercheck', '{"spec": "sorting.countercheck.json"}', '```', '',
      'Between the blocks.', '', '```countercheck', '{"test": "goodness-of-fit", "observed": [315, 108, 101, 32], "ratios": [9, 3, 3, 1], "title": "Peas"}', '```', '',
      '```countercheck', '{"test": "independence", "source": {"path": "data/sorting.csv", "columns": ["outcome", "outcome"]}}', '```', '',
    ].join('\n');
    write('review.md', md);
    const pending = await cli(['report', '--check', 'review.md']);
    assert.equal(pending.code, 1);
    assert.equal(readFileSync(join(dir, 'review.md'), 'utf8'), md);
    const first = await cli(['report', 'review.md']);
    assert.equal(first.code, 0, first.stderr);
    const once = readFileSync(join(dir, 'review.md'), 'utf8');
    assert.match(once, /\*\*Sorting line outcomes\*\*/);
    assert.match(once, /\*\*Peas\*\*/);
    const second = await cli(['report', 'review.md']);
    assert.equal(second.code, 0);
    assert.equal(readFileSync(join(dir, 'review.md'), 'utf8'), once);
    assert.match(second.stdout, /review\.md:3: block 1: unchanged/);
    assert.equal((await cli(['report', '--check', 'review.md'])).code, 0);
  });

  it('report exits 2 and says why when a block cannot run', async () => {
    write('r.md', 'Intro\n\n```countercheck\n{"spec": "missing.countercheck.json"}\n```\n');
    const out = await cli(['report', 'r.md']);
    assert.equal(out.code, 2);
    assert.match(out.stdout, /r\.md:3: block 1: cannot run/);
    assert.match(out.stderr, /r\.md:4:2: cannot read the spec/);
    assert.match(readFileSync(join(dir, 'r.md'), 'utf8'), /Countercheck could not run this block/);
  });

  it('usage errors exit 2; --help and --version exit 0', async () => {
    assert.equal((await cli([])).code, 2);
    assert.equal((await cli(['frobnicate', 'x'])).code, 2);
    assert.equal((await cli(['run'])).code, 2);
    assert.equal((await cli(['run', '--bogus', 'x'])).code, 2);
    assert.match((await cli(['run', '--decimals', 'x', 'a'])).stderr, /--decimals: expected a whole number/);
    const help = await cli(['--help']);
    assert.equal(help.code, 0);
    assert.match(help.stdout, /countercheck run <spec…>/);
    assert.match(help.stdout, /check: 0 all reproduced; 1 some data changed or results differ; 2 some cannot run/);
    assert.equal((await cli(['--version'])).stdout, '0.1.0\n');
  });

  it('runs as a program from the bundle (npm run build first)', () => {
    const root = join(__dirname, '..', '..', '..');
    const bundle = join(root, 'dist', 'cli.js');
    assert.ok(existsSync(bundle), 'dist/cli.js is missing: run `npm run build`');
    const version = spawnSync(process.execPath, [join(root, 'bin', 'countercheck.js'), '--version'], { encoding: 'utf8' });
    assert.equal(version.status, 0, version.stderr);
    assert.equal(version.stdout, '0.1.0\n');
    const run = spawnSync(process.execPath, [bundle, 'run', '-', '--json'], { input: '{"test": "distribution", "df": 4, "x": 161.13}', encoding: 'utf8' });
    assert.equal(run.status, 0, run.stderr);
    const json = JSON.parse(run.stdout);
    // Upper tail of 161.13 at df 4: mpmath 1.2.1 gammainc(2, 80.565, ∞, regularized) at 50 digits = 8.36698337371955432e-34
    // (a naive 1 − CDF returns 0 here). The end-to-end path must carry it unchanged through the JSON output.
    const expected = 8.36698337371955432e-34;
    assert.ok(Math.abs(json.pValue / expected - 1) < 1e-12, `input x = 161.13, df = 4; expected ${expected}, got ${json.pValue}, Δ = ${json.pValue - expected}, tolerance 1e-12 relative`);
    const bad = spawnSync(process.execPath, [bundle, 'run', '-'], { input: '{"test": "nope"}', encoding: 'utf8' });
    assert.equal(bad.status, 2);
    assert.match(bad.stderr, /<stdin>:1:2: \$\.test: expected one of/);
  });
});
