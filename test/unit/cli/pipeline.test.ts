// The command line as a pipeline uses it: per-command options (misplaced ones refused with the command's
// usage), folders and quoted globs as inputs, every input in the JSON output, --quiet, JUnit reports,
// --fail-on, --data - from standard input, output formats, --adjust, and a closed output pipe.
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { appendFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { DECIMALS } from '../../../src/cli/options';
import { runCli } from './run-cli';

let dir: string;
const cli = (args: string[], stdin = '') => runCli(dir, args, stdin);

function write(name: string, text: string): void {
  mkdirSync(dirname(join(dir, name)), { recursive: true });
  writeFileSync(join(dir, name), text);
}

// 60 "pass" and 40 "fail" against equal proportions: X² = (60−50)²/50 + (40−50)²/50 = 4.00, P(χ²₁ > 4) = 0.0455.
const sortingCsv = 'batch,outcome\n' + Array.from({ length: 100 }, (_, i) => `${i + 1},${i < 60 ? 'pass' : 'fail'}`).join('\n') + '\n';
const sortingSpec = JSON.stringify({ test: 'goodness-of-fit', title: 'Sorting', source: { path: '../data/sorting.csv', columns: ['outcome'] }, categories: ['pass', 'fail'] }, null, 2);
// Mendel's dihybrid cross: X² = 0.470, p = 0.925.
const mendelSpec = '{"test": "goodness-of-fit", "observed": [315, 108, 101, 32], "ratios": [9, 3, 3, 1]}\n';

describe('command line for pipelines', function () {
  this.timeout(30000);

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'countercheck-pipeline-'));
    write('data/sorting.csv', sortingCsv);
    write('specs/sorting.countercheck.json', sortingSpec);
    write('specs/peas/mendel.countercheck.json', mendelSpec);
    write('specs/node_modules/pkg/ignored.countercheck.json', mendelSpec);
    write('specs/.cache/ignored.countercheck.json', mendelSpec);
    write('specs/notes.json', '{}');
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  describe('options', () => {
    for (const [command, option, owner] of [
      ['report', '--json', 'run, check'],
      ['check', '--record', 'run'],
      ['run', '--check', 'report'],
      ['check', '--decimals=3', 'run, report'],
    ]) {
      it(`${command} ${option} is refused with the usage of ${command} (exit 2)`, async () => {
        const out = await cli([command, option, 'specs']);
        assert.equal(out.code, 2);
        assert.equal(out.stdout, '');
        assert.match(out.stderr, new RegExp(`^countercheck ${command}: unknown option ${option.split('=')[0]} \\(it belongs to countercheck ${owner}\\)`));
        assert.match(out.stderr, new RegExp(`Usage: countercheck ${command} \\[options\\]`));
      });
    }

    it('an option nobody takes, a missing value and a bad value are usage errors', async () => {
      const unknown = await cli(['run', '--colour', 'specs']);
      assert.equal(unknown.code, 2);
      assert.match(unknown.stderr, /^countercheck run: unknown option --colour\n/);
      const missing = await cli(['check', 'specs', '--junit']);
      assert.equal(missing.code, 2);
      assert.match(missing.stderr, /--junit/);
      const bad = await cli(['check', '--fail-on', 'result,mood', 'specs']);
      assert.equal(bad.code, 2);
      assert.match(bad.stderr, /--fail-on: expected one of result, conclusion, data, found "mood"/);
      assert.match((await cli(['run', '--format', 'yaml', 'specs'])).stderr, /--format: expected one of text, markdown, json, csv/);
      assert.match((await cli(['check', '--adjust', 'sidak', 'specs'])).stderr, /--adjust: expected one of holm, bh, bonferroni/);
      assert.match((await cli(['run', '--force', 'specs'])).stderr, /--force only goes with --record/);
      assert.match((await cli(['run', '--json', '--format', 'csv', 'specs'])).stderr, /two different outputs/);
      assert.match((await cli(['--json', 'run', 'specs'])).stderr, /name a command \(run, check or report\) before --json/);
    });

    it('--decimals takes the editor setting\'s range', async () => {
      const setting = JSON.parse(readFileSync(join(__dirname, '../../../package.json'), 'utf8')).contributes.configuration.properties['countercheck.decimals'];
      assert.deepEqual([setting.minimum, setting.maximum, setting.default], [DECIMALS.min, DECIMALS.max, DECIMALS.default]);
      assert.equal((await cli(['run', '--decimals', String(DECIMALS.max), 'specs/peas'])).code, 0);
      const over = await cli(['run', '--decimals', String(DECIMALS.max + 1), 'specs/peas']);
      assert.equal(over.code, 2);
      assert.match(over.stderr, new RegExp(`--decimals: expected a whole number from ${DECIMALS.min} to ${DECIMALS.max}, found "${DECIMALS.max + 1}"`));
    });

    it('--help per command prints its options and examples; help <command> too', async () => {
      for (const args of [['run', '--help'], ['help', 'run'], ['run', '-h', 'whatever']]) {
        const out = await cli(args);
        assert.equal(out.code, 0);
        assert.match(out.stdout, /^Usage: countercheck run \[options\]/);
        assert.match(out.stdout, /--data FILE\|-/);
        assert.match(out.stdout, /Examples:\n {2}countercheck run /);
        assert.match(out.stdout, /Exit codes: 0 success/);
      }
      const check = await cli(['check', '--help']);
      assert.match(check.stdout, /--junit FILE/);
      assert.match(check.stdout, /--fail-on LIST/);
      const global = await cli(['--help']);
      assert.match(global.stdout, /141 standard output was closed/);
    });
  });

  describe('inputs', () => {
    it('a folder is searched recursively, skipping node_modules and dot-folders', async () => {
      const out = await cli(['run', '--json', 'specs']);
      assert.equal(out.code, 0, out.stderr);
      assert.deepEqual(JSON.parse(out.stdout).map((r: { file: string }) => r.file), ['specs/peas/mendel.countercheck.json', 'specs/sorting.countercheck.json']);
    });

    it('a quoted glob is expanded, and a glob matching nothing is an error entry', async () => {
      const out = await cli(['run', '--json', 'specs/**/*.countercheck.json', 'other/*.countercheck.json']);
      assert.equal(out.code, 2);
      const json = JSON.parse(out.stdout);
      assert.deepEqual(json.map((r: { file: string }) => r.file), ['specs/peas/mendel.countercheck.json', 'specs/sorting.countercheck.json', 'other/*.countercheck.json']);
      assert.equal(json[2].error.code, 'no-match');
      assert.match(out.stderr, /other\/\*\.countercheck\.json: the pattern matches no file/);
      const top = JSON.parse((await cli(['run', '--json', 'specs/*.countercheck.json'])).stdout);
      assert.deepEqual(top.map((r: { file: string }) => r.file), ['specs/sorting.countercheck.json']);
    });

    it('every input appears in --json output; a failed one as {file, error: {code, message, location}}', async () => {
      write('specs/bad.countercheck.json', '{\n  "test": "independence",\n  "table": [[1, 2], [3, -4]]\n}\n');
      const out = await cli(['run', '--json', 'specs/sorting.countercheck.json', 'gone.countercheck.json', 'specs/bad.countercheck.json', 'specs/peas']);
      assert.equal(out.code, 2);
      const json = JSON.parse(out.stdout);
      assert.equal(json.length, 4);
      assert.equal(json[0].test, 'goodness-of-fit');
      assert.deepEqual(json[1], {
        file: 'gone.countercheck.json',
        error: { code: 'unreadable-spec', message: 'gone.countercheck.json: cannot read the spec: no such file', location: { file: 'gone.countercheck.json' } },
      });
      assert.equal(json[2].error.code, 'invalid-spec');
      assert.deepEqual(json[2].error.location, { file: 'specs/bad.countercheck.json', line: 3, column: 25, jsonPath: '$.table[1][1]' });
      assert.equal(json[3].file, 'specs/peas/mendel.countercheck.json');
      // stderr still carries the messages for people.
      assert.match(out.stderr, /gone\.countercheck\.json: cannot read the spec: no such file/);
    });

    it('a data error is located in the data file', async () => {
      write('data/shifts.csv', 'shift,defect,count\nday,yes,2\nnight,no,n/a\n');
      write('shifts.countercheck.json', '{"test": "independence", "source": {"path": "data/shifts.csv", "columns": ["shift", "defect"], "weight": "count"}}');
      const json = JSON.parse((await cli(['check', '--json', 'shifts.countercheck.json'])).stdout);
      assert.equal(json[0].status, 'cannot-run');
      assert.equal(json[0].error.location.file, 'data/shifts.csv');
      assert.equal(json[0].error.location.line, 3);
      assert.equal(json[0].error.location.column, 'count');
    });

    it('a folder as a report input is refused with a hint; a missing report exits 2', async () => {
      const out = await cli(['report', 'specs', 'nowhere.md']);
      assert.equal(out.code, 2);
      assert.match(out.stderr, /specs: a folder; name the markdown files/);
      assert.match(out.stderr, /nowhere\.md: cannot read the report: no such file/);
    });
  });

  describe('check for CI', () => {
    beforeEach(async () => {
      assert.equal((await cli(['run', '--record', 'specs'])).code, 0);
    });

    it('--quiet prints nothing when all reproduce, and only errors otherwise', async () => {
      const quiet = await cli(['check', '--quiet', 'specs']);
      assert.deepEqual([quiet.code, quiet.stdout, quiet.stderr], [0, '', '']);
      const run = await cli(['run', '-q', 'specs']);
      assert.deepEqual([run.code, run.stdout, run.stderr], [0, '', '']);
      const missing = await cli(['check', '--quiet', 'specs', 'gone.countercheck.json']);
      assert.equal(missing.code, 2);
      assert.equal(missing.stdout, '');
      assert.match(missing.stderr, /gone\.countercheck\.json: cannot read the spec/);
    });

    it('--fail-on chooses which changes fail: appended data that keeps the conclusion passes with --fail-on conclusion', async () => {
      // 61 pass / 40 fail: X² = (61−50.5)²/50.5 + (40−50.5)²/50.5 = 4.37, p = 0.037, still significant at 0.05.
      appendFileSync(join(dir, 'data/sorting.csv'), '101,pass\n');
      assert.equal((await cli(['check', 'specs'])).code, 1);
      assert.equal((await cli(['check', '--fail-on', 'data', 'specs'])).code, 1);
      const kept = await cli(['check', '--fail-on', 'result,conclusion', 'specs']);
      assert.equal(kept.code, 0, kept.stdout);
      assert.match(kept.stdout, /data changed: specs\/sorting\.countercheck\.json[\s\S]*conclusion unchanged[\s\S]*does not fail the check: --fail-on result,conclusion/);
      const json = JSON.parse((await cli(['check', '--json', '--fail-on', 'conclusion', 'specs'])).stdout);
      assert.deepEqual(json.map((r: { status: string; fails: boolean }) => [r.status, r.fails]), [['reproduced', false], ['data-changed', false]]);
      // 60 pass / 42 fail instead: X² = 3.18, p = 0.075 — the conclusion flips, and --fail-on conclusion fails.
      write('data/sorting.csv', sortingCsv + '101,fail\n102,fail\n');
      assert.equal((await cli(['check', '--fail-on', 'conclusion', 'specs'])).code, 1);
      assert.equal((await cli(['check', '--fail-on', 'result', 'specs'])).code, 0);
    });

    it('--junit writes one test case per saved test, the comparison in the failure message', async () => {
      appendFileSync(join(dir, 'data/sorting.csv'), '101,fail\n');
      write('specs/unrecorded.countercheck.json', mendelSpec);
      const out = await cli(['check', '--junit', 'out/junit.xml', 'specs']);
      assert.equal(out.code, 2);
      assert.equal(existsSync(join(dir, 'out/junit.xml')), false, 'a missing folder is not created');
      assert.match(out.stderr, /--junit: cannot write out\/junit\.xml/);
      mkdirSync(join(dir, 'out'));
      assert.equal((await cli(['check', '--junit', 'out/junit.xml', 'specs'])).code, 2);
      const xml = readFileSync(join(dir, 'out/junit.xml'), 'utf8');
      assert.match(xml, /^<\?xml version="1\.0" encoding="UTF-8"\?>\n<testsuites name="countercheck check" tests="3" failures="1" errors="1"/);
      assert.equal(xml.match(/<testcase /g)?.length, 3);
      assert.match(xml, /<testcase classname="countercheck" name="specs\/peas\/mendel\.countercheck\.json" [^>]*>\n {6}<system-out>reproduced: /);
      assert.match(
        xml,
        /<testcase classname="countercheck" name="specs\/sorting\.countercheck\.json \(Sorting\)" file="specs\/sorting\.countercheck\.json" time="[\d.]+">\n {6}<failure message="data changed \(data, conclusion\): data fingerprint differs: recorded 100 rows [^"]*n 100 → 101; statistic 4 → 3\.5[^"]*conclusion FLIPPED at α = 0\.05: was significant, now not significant[^"]*" type="countercheck\.changed">/,
      );
      assert.match(xml, /name="specs\/unrecorded\.countercheck\.json" file="[^"]*" time="[\d.]+">\n {6}<error message="cannot run: no recorded result in the spec; run `countercheck run --record` [^"]*" type="countercheck\.cannot-run">/);
      // With --fail-on result the data change passes, and shows its comparison as output.
      await cli(['check', '--junit', 'out/junit.xml', '--fail-on', 'result', 'specs/sorting.countercheck.json']);
      assert.match(readFileSync(join(dir, 'out/junit.xml'), 'utf8'), /failures="0" errors="0"[\s\S]*<system-out>data changed: specs\/sorting/);
    });

    it('--adjust holm adjusts the current p-values across the checked specs', async () => {
      const json = JSON.parse((await cli(['check', '--json', '--adjust', 'holm', 'specs'])).stdout);
      const p = json.map((r: { current: { result: { pValue: number } } }) => r.current.result.pValue);
      // Holm (1979) for two p-values, by its definition: the smaller is multiplied by 2, the larger by 1, then
      // made monotone. Mendel p = 0.925, sorting p = 0.0455: adjusted 0.925 and 0.0910.
      const [mendel, sorting] = json.map((r: { adjusted: { pValue: number; family: number; method: string } }) => r.adjusted);
      assert.equal(mendel.family, 2);
      assert.equal(mendel.method, 'holm');
      assert.ok(Math.abs(sorting.pValue - 2 * p[1]) < 1e-15, `sorting: expected ${2 * p[1]}, got ${sorting.pValue}`);
      assert.ok(Math.abs(mendel.pValue - Math.max(p[0], 2 * p[1])) < 1e-15);
      assert.equal(sorting.significant, false);
      const text = await cli(['check', '--adjust', 'bonferroni', 'specs']);
      assert.match(text.stdout, /adjusted p \(Bonferroni, 2 p-values\): 0\.091; not significant at α = 0\.05 after adjustment/);
    });
  });

  describe('data from standard input', () => {
    it('--data - reads the CSV for a spec with a source; the same bytes reproduce the record', async () => {
      await cli(['run', '--record', 'specs/sorting.countercheck.json']);
      const run = await cli(['run', '--json', '--data', '-', 'specs/sorting.countercheck.json'], sortingCsv);
      assert.equal(run.code, 0, run.stderr);
      const json = JSON.parse(run.stdout);
      assert.equal(json.data.rows, 100);
      assert.equal(json.data.description, '<stdin>');
      assert.ok(Math.abs(json.statistic - 4) < 1e-12);
      assert.equal((await cli(['check', '--data', '-', 'specs/sorting.countercheck.json'], sortingCsv)).code, 0);
      const changed = await cli(['check', '--data', '-', 'specs/sorting.countercheck.json'], sortingCsv + '101,fail\n');
      assert.equal(changed.code, 1);
      assert.match(changed.stdout, /data changed/);
    });

    it('--data names the data file in its errors, and refuses a spec without a source or several specs', async () => {
      const bad = await cli(['run', '--data', '-', 'specs/sorting.countercheck.json'], 'batch,result\n1,pass\n');
      assert.equal(bad.code, 2);
      assert.match(bad.stderr, /found no column `outcome`/);
      const inline = await cli(['run', '--data', '-', 'specs/peas/mendel.countercheck.json'], sortingCsv);
      assert.equal(inline.code, 2);
      assert.match(inline.stderr, /--data replaces the data file a spec reads/);
      const several = await cli(['run', '--data', '-', 'specs'], sortingCsv);
      assert.equal(several.code, 2);
      assert.match(several.stderr, /name exactly one spec \(found 2\)/);
      assert.match((await cli(['run', '--data', '-', '-'], '{}')).stderr, /cannot both read standard input/);
      const file = await cli(['run', '--json', '--data', 'data/sorting.csv', 'specs/sorting.countercheck.json']);
      assert.equal(JSON.parse(file.stdout).data.rows, 100);
    });
  });

  describe('output formats', () => {
    it('--format json is --json; csv gives one row per input; markdown the report block text', async () => {
      assert.deepEqual(JSON.parse((await cli(['run', '--format', 'json', 'specs'])).stdout), JSON.parse((await cli(['run', '--json', 'specs'])).stdout));
      const csv = await cli(['run', '--format', 'csv', 'specs', 'gone.countercheck.json']);
      assert.equal(csv.code, 2);
      const rows = csv.stdout.trimEnd().split('\n');
      assert.equal(rows[0], 'file,title,test,statistic,df,n,pValue,alpha,significant,effectSize,effectSizeValue,error');
      assert.match(rows[1], /^specs\/peas\/mendel\.countercheck\.json,,goodness-of-fit,0\.470\d*,3,556,0\.92\d*,0\.05,false,/);
      assert.match(rows[2], /^specs\/sorting\.countercheck\.json,Sorting,goodness-of-fit,(4|3\.99999\d*),1,100,0\.045\d*,0\.05,true,/);
      assert.equal(rows[3], 'gone.countercheck.json,,,,,,,,,,,gone.countercheck.json: cannot read the spec: no such file');
      const md = await cli(['run', '--format', 'markdown', 'specs/sorting.countercheck.json']);
      assert.match(md.stdout, /^\*\*Sorting\*\*/);
      assert.match(md.stdout, /\| Category \| Observed \| Expected \|/);
    });

    it('--plots is refused clearly until plots can be written', async () => {
      const out = await cli(['run', '--plots', 'plots', 'specs/peas']);
      assert.equal(out.code, 2);
      assert.match(out.stderr, /--plots: writing plots as SVG files is not available/);
    });
  });

  it('a closed output pipe ends the program quietly with exit 141', () => {
    const root = join(__dirname, '..', '..', '..');
    const bundle = join(root, 'dist', 'cli.js');
    assert.ok(existsSync(bundle), 'dist/cli.js is missing: run `npm run build`');
    // Enough output (about 200 KB) that the writer is still writing when head has gone.
    for (let i = 0; i < 80; i++) write(`many/s${i}.countercheck.json`, mendelSpec);
    const r = spawnSync('bash', ['-c', `node "${bundle}" run --json many | head -c 10; echo " status \${PIPESTATUS[0]}"`], { cwd: dir, encoding: 'utf8' });
    assert.match(r.stdout, /^\[\n {2}\{\n {4} status 141\n$/);
    assert.equal(r.stderr, '');
  });
});
