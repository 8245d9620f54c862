// `countercheck report` writes the plot files its result blocks link to, beside the report, and `--check` says
// when one would change, on a copy of the demo report (nothing in the repository is touched).
import { strict as assert } from 'node:assert';
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli';

const root = join(__dirname, '..', '..', '..');

async function cli(args: string[], cwd: string): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), readStdin: async () => '', cwd });
  return { code, stdout, stderr };
}

describe('report: plot files beside the report', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'countercheck-report-plots-'));
    for (const f of ['report.md', 'bakery-flavour-mix.countercheck.json', 'bakery-oven-defects.countercheck.json', 'data']) cpSync(join(root, 'demo', f), join(dir, f), { recursive: true });
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('writes every linked plot when it is missing, and then reports nothing to change', async () => {
    const links = [...readFileSync(join(dir, 'report.md'), 'utf8').matchAll(/\]\((report\.plots\/[^)]+\.svg)\)/g)].map((m) => m[1]);
    assert.ok(links.length >= 3, `the demo report links its plots (${links.length} found)`);
    const first = await cli(['report', 'report.md'], dir);
    assert.equal(first.code, 0, first.stderr);
    for (const link of links) {
      assert.ok(existsSync(join(dir, link)), `${link} written`);
      assert.match(readFileSync(join(dir, link), 'utf8'), /^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
    }
    assert.equal(readdirSync(join(dir, 'report.plots')).length, links.length, 'no plot file that no block links to');
    const again = await cli(['report', '--check', 'report.md'], dir);
    assert.equal(again.code, 0, again.stdout);
  });

  it('--check names a stale plot and exits 1 without writing it', async () => {
    await cli(['report', 'report.md'], dir);
    const plot = join(dir, 'report.plots', readdirSync(join(dir, 'report.plots'))[0]);
    writeFileSync(plot, '<svg/>');
    const check = await cli(['report', '--check', 'report.md'], dir);
    assert.equal(check.code, 1);
    assert.match(check.stdout, /report\.plots\/[^ ]+\.svg: plot would change/);
    assert.equal(readFileSync(plot, 'utf8'), '<svg/>');
  });
});
