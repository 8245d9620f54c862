// Fragility where the counts are not written in the spec, and for the trend and post-hoc tests: the production path
// (runSpec → withEvidence) against scipy/statsmodels brute-force enumeration (scripts/fixtures/fragility.py), and
// a paired table counted from records against the same table written inline.
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli';
import { withEvidence } from '../../../src/savedtest/evidence';
import type { SpecV1 } from '../../../src/savedtest/types';
import { postHocTest, type Adjustment, type Comparison } from '../../../src/stats/procedures/posthoc';
import { cochranArmitageTest, linearByLinearTest } from '../../../src/stats/procedures/trend';
import type { ComputedTestResult as TestResult } from '../../../src/stats/result';
import { fixture } from '../fixtures';

interface Outcome { significant: boolean; index: number | null }
const SP = fixture<{
  scipy: string;
  statsmodels: string;
  alpha: number;
  paired: ({ table: number[][] } & Outcome)[];
  trend: ({ table: number[][]; scores: number[] } & Outcome)[];
  linearByLinear: ({ table: number[][] } & Outcome)[];
  postHoc: ({ table: number[][]; compare: Comparison; adjustment: Adjustment } & Outcome)[];
}>('scipy', 'fragility');
const source = `scipy ${SP.scipy} / statsmodels ${SP.statsmodels} brute-force enumeration (scripts/fixtures/fragility.py)`;

function agree(cases: readonly ({ table: number[][] } & Outcome)[], evaluate: (c: (typeof cases)[number]) => TestResult): void {
  const misses: string[] = [];
  for (const c of cases) {
    const f = evaluate(c).fragility;
    if (!f || f.method !== 'exact' || f.index !== c.index || f.reverse !== !c.significant) {
      misses.push(`${JSON.stringify(c.table)}: expected index ${c.index} (significant ${c.significant}), got ${f ? `${f.index} (${f.method}, reverse ${f.reverse})` : 'no fragility'}`);
    }
  }
  assert.equal(misses.length, 0, `${cases.length - misses.length}/${cases.length} agree\n${misses.join('\n')}`);
}

const spec = (fields: Record<string, unknown>): SpecV1 => ({ version: 1, ...fields }) as unknown as SpecV1;

describe('fragility of trend and post-hoc results (Baer et al. 2021, generalized index)', () => {
  it(`Cochran–Armitage: agrees with ${source} on ${SP.trend.length} 2×k tables (an observation keeps its ordered group)`, () => {
    agree(SP.trend, (c) => withEvidence(cochranArmitageTest(c.table, { scores: (c as (typeof SP.trend)[number]).scores }), spec({ test: 'trend', table: c.table })));
  });

  it(`linear-by-linear: agrees with ${source} on ${SP.linearByLinear.length} 3×3 tables`, () => {
    assert.ok(SP.linearByLinear.some((c) => c.significant) && SP.linearByLinear.some((c) => !c.significant), 'the fixture holds both conclusions');
    agree(SP.linearByLinear, (c) => withEvidence(linearByLinearTest(c.table), spec({ test: 'trend', table: c.table })));
  });

  it(`post-hoc: the family conclusion (smallest adjusted p) agrees with ${source} on ${SP.postHoc.length} tables, cells, rows and columns, three adjustments`, () => {
    for (const compare of ['cells', 'rows', 'columns']) assert.ok(SP.postHoc.some((c) => c.compare === compare), compare);
    agree(SP.postHoc, (c) => {
      const { compare, adjustment } = c as (typeof SP.postHoc)[number];
      const result = withEvidence(postHocTest(c.table, { compare, adjustment }), spec({ test: 'post-hoc', table: c.table, compare, adjustment }));
      assert.equal(result.fragility?.basis, 'post-hoc-family');
      return result;
    });
  });
});

async function cli(args: string[], cwd: string): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), readStdin: async () => '', cwd, now: () => new Date('2026-12-03T12:00:00Z') });
  return { code, stdout, stderr };
}

describe('fragility of tables counted from records', () => {
  let dir: string;
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'cc-fragility-'));
    // 40 units classified before and after: 14 stay "pass", 3 pass → fail, 11 fail → pass, 12 stay "fail".
    const rows = [...Array(14).fill('pass,pass'), ...Array(3).fill('pass,fail'), ...Array(11).fill('fail,pass'), ...Array(12).fill('fail,fail')];
    writeFileSync(join(dir, 'checks.csv'), ['before,after', ...rows].join('\n') + '\n');
    const trendRows: string[] = [];
    [[2, 8], [4, 6], [7, 3], [9, 1]].forEach(([yes, no], g) => {
      for (let i = 0; i < yes; i++) trendRows.push(`yes,dose${g + 1}`);
      for (let i = 0; i < no; i++) trendRows.push(`no,dose${g + 1}`);
    });
    writeFileSync(join(dir, 'doses.csv'), ['outcome,dose', ...trendRows].join('\n') + '\n');
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  async function fragilityOf(name: string, body: Record<string, unknown>): Promise<unknown> {
    writeFileSync(join(dir, name), JSON.stringify({ version: 1, ...body }));
    const out = await cli(['run', name, '--json'], dir);
    assert.equal(out.code, 0, out.stderr);
    const json = JSON.parse(out.stdout) as { fragility?: unknown };
    assert.ok(json.fragility, `${name} has a fragility section`);
    return json.fragility;
  }

  it('paired: the 2×2 counted from a CSV gets the same McNemar fragility as the same table inline', async () => {
    const labels = ['pass', 'fail'];
    const inline = await fragilityOf('inline.countercheck.json', { test: 'paired', table: [[14, 3], [11, 12]], rowLabels: labels });
    const fromFile = await fragilityOf('file.countercheck.json', { test: 'paired', source: { path: 'checks.csv', columns: ['before', 'after'] }, rowLabels: labels });
    assert.deepEqual(fromFile, inline);
  });

  it('trend: the 2×k counted from a CSV gets the same fragility as the same table inline', async () => {
    const columnLabels = ['dose1', 'dose2', 'dose3', 'dose4'];
    const inline = await fragilityOf('trend-inline.countercheck.json', { test: 'trend', table: [[2, 4, 7, 9], [8, 6, 3, 1]], rowLabels: ['yes', 'no'], columnLabels });
    const fromFile = await fragilityOf('trend-file.countercheck.json', { test: 'trend', source: { path: 'doses.csv', columns: ['outcome', 'dose'] }, rowLabels: ['yes', 'no'], columnLabels });
    assert.deepEqual(fromFile, inline);
  });

  it('post-hoc: check words a fragile recorded result as the family conclusion of the comparisons', async () => {
    // One pair of rows, overall p = .027: a single changed outcome makes it not significant (index at most 2).
    const spec = { version: 1, test: 'post-hoc', table: [[14, 6], [7, 13]], compare: 'rows' };
    writeFileSync(join(dir, 'posthoc-fragile.countercheck.json'), JSON.stringify(spec));
    assert.equal((await cli(['run', '--record', 'posthoc-fragile.countercheck.json'], dir)).code, 0);
    const out = await cli(['check', 'posthoc-fragile.countercheck.json'], dir);
    assert.match(out.stdout, /fragile: the significant comparisons \(after adjustment\) all turn not significant if/);
  });

  it('post-hoc: the text says the index is for the family conclusion, not each comparison', async () => {
    writeFileSync(join(dir, 'posthoc.countercheck.json'), JSON.stringify({ version: 1, test: 'post-hoc', table: [[20, 5, 9], [6, 18, 10]], compare: 'rows' }));
    const out = await cli(['run', 'posthoc.countercheck.json'], dir);
    assert.equal(out.code, 0, out.stderr);
    assert.match(out.stdout, /family conclusion of the comparisons/);
  });
});
