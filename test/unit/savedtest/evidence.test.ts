// The sections that say how sure a conclusion is, from a saved spec to the JSON and the text: field names as the
// format promises, options honoured, bad options refused with their JSON path. The numbers themselves are checked
// against outside references in test/unit/stats/advanced/{fragility,bayes-factor,equivalence}.test.ts; here the
// Bayes factor of one table is also compared with R BayesFactor through the whole path.
import { strict as assert } from 'node:assert';
import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli';
import { fixture } from '../fixtures';

const root = join(__dirname, '..', '..', '..');

async function cli(args: string[], stdin = '', cwd = root): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), readStdin: async () => stdin, cwd, now: () => new Date('2026-12-03T12:00:00Z') });
  return { code, stdout, stderr };
}

async function runJson(spec: unknown): Promise<Record<string, unknown>> {
  const out = await cli(['run', '-', '--json'], JSON.stringify(spec));
  assert.equal(out.code, 0, out.stderr);
  return JSON.parse(out.stdout) as Record<string, unknown>;
}

const R = fixture<{ BayesFactor: string; contingency: { name: string; table: number[][]; samplingPlan: string; priorConcentration: number; lnBf10: number }[]; pAdjust: { name: string; p: number[]; holm: number[]; bh: number[]; bonferroni: number[] }[] }>('R', 'bayesfactor');

describe('fragility, Bayes factor and equivalence in a run', () => {
  it('an independence run carries "fragility" and "bayesFactor" with the promised fields (R BayesFactor for the value)', async () => {
    const ref = R.contingency.find((c) => c.name === 't3x3' && c.samplingPlan === 'rows-fixed' && c.priorConcentration === 2.5)!;
    const json = await runJson({ version: 1, test: 'independence', table: ref.table, bayesFactor: { samplingPlan: 'rows-fixed', priorConcentration: 2.5 } });
    const f = json.fragility as Record<string, unknown>;
    for (const key of ['index', 'quotient', 'reverse', 'method', 'changes']) assert.ok(key in f, `fragility.${key}`);
    assert.ok(['exact', 'bounded-search'].includes(f.method as string));
    const bf = json.bayesFactor as Record<string, number | string>;
    for (const key of ['bf10', 'log10Bf10', 'samplingPlan', 'priorConcentration']) assert.ok(key in bf, `bayesFactor.${key}`);
    assert.equal(bf.samplingPlan, 'rows-fixed');
    assert.equal(bf.priorConcentration, 2.5);
    const expected = ref.lnBf10 / Math.LN10;
    assert.ok(Math.abs((bf.log10Bf10 as number) - expected) < 1e-9, `log10 BF10 ${bf.log10Bf10} vs R BayesFactor ${R.BayesFactor} ${expected}`);
  });

  it('a 2×2 fragility change list names cells as [row, column] with counts before and after', async () => {
    const json = await runJson({ version: 1, test: 'independence', table: [[12, 28], [25, 15]] });
    const f = json.fragility as { index: number; reverse: boolean; changes: { cell: number[]; from: number; to: number }[] };
    assert.equal(f.reverse, false);
    assert.deepEqual(f.changes.map((c) => c.cell), [[0, 0], [0, 1]]);
    assert.equal(f.changes[0].to - f.changes[0].from, f.index);
  });

  it('"fragilityMinLikelihood" allows only sufficiently likely changes: never fewer changes than with every change allowed', async () => {
    const table = [[30, 2, 8], [12, 14, 14]];
    const all = (await runJson({ version: 1, test: 'independence', table })).fragility as { index: number };
    const likely = (await runJson({ version: 1, test: 'independence', table, fragilityMinLikelihood: 0.2 })).fragility as { index: number | null; changes: { cell: number[]; from: number; to: number }[] };
    // Row 1's second column holds 2 of 40 (5% < 20%): no observation of row 1 may move into it.
    for (const c of likely.changes) if (c.cell[0] === 0 && c.cell[1] === 1) assert.ok(c.to <= c.from, 'no change into an unlikely outcome');
    assert.ok(likely.index === null || likely.index >= all.index, `restricted ${likely.index} < unrestricted ${all.index}`);
  });

  it('"fragility": false and "bayesFactor": false leave the sections out', async () => {
    const json = await runJson({ version: 1, test: 'independence', table: [[12, 28], [25, 15]], fragility: false, bayesFactor: false });
    assert.equal(json.fragility, undefined);
    assert.equal(json.bayesFactor, undefined);
  });

  it('goodness of fit: a Bayes factor with no sampling plan, categories named in changes, and Wellek equivalence with its margin', async () => {
    const json = await runJson({ version: 1, test: 'goodness-of-fit', observed: [252, 247, 249, 252], categories: ['a', 'b', 'c', 'd'], proportions: [0.25, 0.25, 0.25, 0.25], equivalence: { margin: 0.05 } });
    assert.equal((json.bayesFactor as { samplingPlan: unknown }).samplingPlan, null);
    const f = json.fragility as { reverse: boolean; changes: { cell: unknown }[] };
    assert.equal(f.reverse, true);
    for (const c of f.changes) assert.ok(['a', 'b', 'c', 'd'].includes(c.cell as string));
    const e = json.equivalence as Record<string, unknown>;
    for (const key of ['pValue', 'equivalent', 'margin', 'interval']) assert.ok(key in e, `equivalence.${key}`);
    assert.equal(e.equivalent, true);
    assert.equal(e.margin, 0.05);
  });

  it('goodness of fit with estimated parameters: no Bayes factor, and every format says why (notice "bayes-factor-estimated-parameters")', async () => {
    const spec = { version: 1, test: 'goodness-of-fit', observed: [18, 30, 27, 25], proportions: [0.2, 0.3, 0.3, 0.2], estimatedParameters: 1 };
    const json = await runJson(spec);
    assert.equal(json.bayesFactor, undefined);
    const codes = (json.notices as { code: string }[]).map((n) => n.code);
    assert.ok(codes.includes('bayes-factor-estimated-parameters'), codes.join(', '));
    const withoutFitted = await runJson({ ...spec, estimatedParameters: 0 });
    assert.ok(withoutFitted.bayesFactor, 'with nothing estimated the Bayes factor is there');
    assert.ok(!(withoutFitted.notices as { code: string }[]).some((n) => n.code === 'bayes-factor-estimated-parameters'));
    for (const format of ['text', 'markdown', 'csv']) {
      const out = await cli(['run', '-', '--format', format], JSON.stringify(spec));
      assert.equal(out.code, 0, out.stderr);
      assert.match(out.stdout, /No Bayes factor: the expected proportions use parameters estimated from these data/, format);
    }
  });

  it('variance: equivalence with σ limits ("lower", "upper") and the 1 − 2α interval; the text says so', async () => {
    const spec = { version: 1, test: 'variance', summary: { n: 25, sd: 0.04 }, sigma0: 0.04, equivalence: { lower: 0.03, upper: 0.05 } };
    const json = await runJson(spec);
    const e = json.equivalence as { lower: number; upper: number; interval: { level: number }; equivalent: boolean };
    assert.equal(e.lower, 0.03);
    assert.equal(e.upper, 0.05);
    assert.ok(Math.abs(e.interval.level - 0.9) < 1e-15);
    const text = await cli(['run', '-'], JSON.stringify(spec));
    assert.match(text.stdout, /Equivalence: σ within \[0\.03, 0\.05\], two one-sided chi-square tests/);
  });

  it('refuses an unknown sampling plan and a variance band without "upper", naming the JSON path', async () => {
    const bad = await cli(['run', '-'], JSON.stringify({ version: 1, test: 'independence', table: [[1, 2], [3, 4]], bayesFactor: { samplingPlan: 'fixed' } }));
    assert.equal(bad.code, 2);
    assert.match(bad.stderr, /\$\.bayesFactor\.samplingPlan/);
    const band = await cli(['run', '-'], JSON.stringify({ version: 1, test: 'variance', summary: { n: 5, sd: 1 }, sigma0: 1, equivalence: { lower: 0.5 } }));
    assert.equal(band.code, 2);
    assert.match(band.stderr, /upper/);
  });
});

describe('check: fragile conclusions and the family of tests', function () {
  this.timeout(60000);
  const family = (name: string) => R.pAdjust.find((f) => f.name === name)!;

  it('flags a recorded significant conclusion whose fragility index is at most the threshold (default 2)', async () => {
    const out = await cli(['check', 'demo/bakery-flavour-mix.countercheck.json']);
    assert.match(out.stdout, /fragile: .*fragility index 1 ≤ 2/);
    const none = await cli(['check', 'demo/bakery-flavour-mix.countercheck.json', '--fragility-threshold', '0']);
    assert.doesNotMatch(none.stdout, /fragile/);
  });

  it('--adjust on the demo specs agrees with R p.adjust on the same p-values, and marks the conclusions that change', async () => {
    const specs = readdirSync(join(root, 'demo')).filter((f) => f.endsWith('.countercheck.json') && !f.startsWith('audit-')).sort().map((f) => `demo/${f}`);
    for (const method of ['holm', 'bh', 'bonferroni'] as const) {
      const out = await cli(['check', '--adjust', method, '--json', ...specs]);
      const entries = JSON.parse(out.stdout) as { file: string; current: { result: { pValue: number } }; adjusted: { family: number; pValue: number } }[];
      const ref = family('demo_folder');
      assert.equal(entries.length, ref.p.length);
      entries.forEach((e, i) => {
        assert.equal(e.adjusted.family, ref.p.length);
        assert.ok(Math.abs(e.current.result.pValue - ref.p[i]) <= 1e-9 * ref.p[i], `${e.file}: the fixture's input p ${ref.p[i]} is the demo's p ${e.current.result.pValue}`);
        assert.ok(Math.abs(e.adjusted.pValue - ref[method][i]) <= 1e-9 * ref[method][i], `${e.file} ${method}: ${e.adjusted.pValue} vs R p.adjust ${ref[method][i]}`);
      });
    }
    const text = await cli(['check', '--adjust', 'holm', ...specs]);
    assert.match(text.stdout, /bakery-flavour-mix[^]*?not significant at α = 0\.05 after adjustment \(the conclusion CHANGES\)/);
  });

  it('report --adjust writes each block\'s adjusted p-value beside its own (R p.adjust "holm"), in a copy of the demo report', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'countercheck-family-'));
    try {
      for (const f of ['report.md', 'bakery-flavour-mix.countercheck.json', 'bakery-oven-defects.countercheck.json', 'data']) cpSync(join(root, 'demo', f), join(dir, f), { recursive: true });
      const out = await cli(['report', 'report.md', '--adjust', 'holm'], '', dir);
      assert.equal(out.code, 0, out.stderr);
      assert.match(out.stdout, /family of 3 tests, Holm adjustment/);
      const text = readFileSync(join(dir, 'report.md'), 'utf8');
      const lines = text.split('\n').filter((l) => l.startsWith('- Family: one of 3 tests in this report; Holm-adjusted p = '));
      assert.equal(lines.length, 3);
      family('demo_report').holm.forEach((p, i) => assert.ok(lines[i].includes(`Holm-adjusted p = ${p.toFixed(3).replace(/^0/, '')}`), `${lines[i]} vs R p.adjust ${p}`));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  describe('check on a living report (a copy of demo/report.md)', () => {
    let dir: string;
    beforeEach(() => {
      dir = mkdtempSync(join(tmpdir(), 'countercheck-check-report-'));
      for (const f of ['report.md', 'report.plots', 'bakery-flavour-mix.countercheck.json', 'bakery-oven-defects.countercheck.json', 'data']) cpSync(join(root, 'demo', f), join(dir, f), { recursive: true });
    });
    afterEach(() => rmSync(dir, { recursive: true, force: true }));

    it('re-runs each block and compares it with what the report recorded; --adjust makes the blocks one family (R p.adjust)', async () => {
      const plain = await cli(['check', 'report.md'], '', dir);
      assert.equal(plain.code, 0, plain.stdout + plain.stderr);
      assert.match(plain.stdout, /3 reproduced/);
      for (const method of ['holm', 'bh', 'bonferroni'] as const) {
        const out = await cli(['check', 'report.md', '--adjust', method, '--json'], '', dir);
        assert.equal(out.code, 0, out.stderr);
        const entries = JSON.parse(out.stdout) as { file: string; status: string; adjusted: { family: number; pValue: number } }[];
        const ref = family('demo_report');
        assert.deepEqual(entries.map((e) => e.file), ['report.md:11 (block 1)', 'report.md:48 (block 2)', 'report.md:94 (block 3)']);
        entries.forEach((e, i) => {
          assert.equal(e.status, 'reproduced');
          assert.equal(e.adjusted.family, 3);
          assert.ok(Math.abs(e.adjusted.pValue - ref[method][i]) <= 1e-9 * ref[method][i], `${e.file} ${method}: ${e.adjusted.pValue} vs R p.adjust ${ref[method][i]}`);
        });
      }
      // A report written with its family lines checks the same.
      assert.equal((await cli(['report', 'report.md', '--adjust', 'holm'], '', dir)).code, 0);
      assert.equal((await cli(['check', 'report.md', '--adjust', 'holm'], '', dir)).code, 0);
    });

    it('fails (exit 1) when a value written in the report was edited, naming the block and the line', async () => {
      const text = readFileSync(join(dir, 'report.md'), 'utf8');
      assert.ok(text.includes('χ²(3, N = 450) = 8.22, p = .042'));
      writeFileSync(join(dir, 'report.md'), text.replace('χ²(3, N = 450) = 8.22, p = .042', 'χ²(3, N = 450) = 8.22, p = .012'));
      const out = await cli(['check', 'report.md'], '', dir);
      assert.equal(out.code, 1, out.stdout);
      assert.match(out.stdout, /result differs: report\.md:11 \(block 1\)[^]*result written in the report, line \d+: written "χ²\(3, N = 450\) = 8\.22, p = \.012[^]*now "χ²\(3, N = 450\) = 8\.22, p = \.042/);
      assert.match(out.stdout, /1 result differs, 2 reproduced/);
      const junit = await cli(['check', 'report.md', '--junit', 'check.xml'], '', dir);
      assert.equal(junit.code, 1);
      assert.match(readFileSync(join(dir, 'check.xml'), 'utf8'), /<failure[^>]*>[^<]*result written in the report/);
    });

    it('fails (exit 1) when the recorded result of a block\'s saved test was tampered with', async () => {
      const specFile = join(dir, 'bakery-oven-defects.countercheck.json');
      const spec = JSON.parse(readFileSync(specFile, 'utf8')) as { recorded: { result: { statistic: number } } };
      spec.recorded.result.statistic += 0.5;
      writeFileSync(specFile, JSON.stringify(spec, null, 2));
      const out = await cli(['check', 'report.md', '--json'], '', dir);
      assert.equal(out.code, 1);
      const entries = JSON.parse(out.stdout) as { file: string; status: string; differences: { field: string }[] }[];
      assert.deepEqual(entries.map((e) => e.status), ['reproduced', 'result-differs', 'reproduced']);
      assert.deepEqual(entries[1].differences.map((d) => d.field), ['statistic']);
    });
  });

  it('run --json --adjust gives each test result "family": {size, method, adjustedPValue} (R p.adjust "bonferroni"); a distribution query stays out', async () => {
    const specs = ['bakery-flavour-mix', 'bakery-oven-defects', 'cider-fill-spread', 'audit-critical-values'].map((n) => `demo/${n}.countercheck.json`);
    const out = await cli(['run', '--json', '--adjust', 'bonferroni', ...specs]);
    assert.equal(out.code, 0, out.stderr);
    const parsed = JSON.parse(out.stdout) as { family?: { size: number; method: string; adjustedPValue: number } }[];
    const ref = family('demo_report');
    parsed.slice(0, 3).forEach((r, i) => {
      assert.deepEqual(Object.keys(r.family!).sort(), ['adjustedPValue', 'method', 'size']);
      assert.equal(r.family!.size, 3);
      assert.equal(r.family!.method, 'bonferroni');
      assert.ok(Math.abs(r.family!.adjustedPValue - ref.bonferroni[i]) <= 1e-9 * ref.bonferroni[i], `${specs[i]}: ${r.family!.adjustedPValue} vs R p.adjust ${ref.bonferroni[i]}`);
    });
    assert.equal(parsed[3].family, undefined);
  });

  it('--adjust with an unknown method is a usage error', async () => {
    const out = await cli(['check', 'demo', '--adjust', 'sidak']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /--adjust/);
    const threshold = await cli(['check', 'demo', '--fragility-threshold', 'two']);
    assert.equal(threshold.code, 2);
    assert.match(threshold.stderr, /--fragility-threshold: expected a whole number/);
  });
});
