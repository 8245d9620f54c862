// Every saved spec in demo/ runs through runSpec (the same path as the command line and the editor),
// agrees with scipy on the same data (test/fixtures/scipy/demo-specs.json, written by
// scripts/fixtures/demo_specs.py), and reproduces the result recorded in it.
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { refreshReport } from '../../../src/report/blocks';
import { runReportBlock } from '../../../src/savedtest/living';
import { compareWithRecord, describeReview } from '../../../src/savedtest/review';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import { loadSpecText } from '../../../src/savedtest/validate';
import type { DistributionResult, TestResult } from '../../../src/stats/result';
import { assertClose } from '../tolerance';

const demo = join(__dirname, '..', '..', '..', 'demo');
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'fixtures', 'scipy', 'demo-specs.json'), 'utf8')) as {
  versions: Record<string, string>;
  specs: Record<string, Record<string, unknown>>;
};
const specs = readdirSync(demo).filter((f) => f.endsWith('.countercheck.json')).sort();
const readers: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };

function near(what: string, got: number, expected: number, relative: number, input: string): void {
  assertClose(got, expected, { rel: relative, abs: 1e-300 }, `${input} ${what} (scipy ${fixture.versions.scipy})`);
}

describe('demo specs', () => {
  it('there is a spec for every test and a scipy reference for every spec', () => {
    const tests = new Set(specs.map((f) => (JSON.parse(readFileSync(join(demo, f), 'utf8')) as { test: string }).test));
    for (const t of ['variance', 'goodness-of-fit', 'independence', 'distribution']) assert.ok(tests.has(t), `a demo spec for ${t}`);
    assert.deepEqual(Object.keys(fixture.specs).sort(), specs, 'rerun /usr/bin/python3 scripts/fixtures/demo_specs.py after adding a demo spec');
  });

  for (const file of specs) {
    it(`${file} runs and agrees with scipy`, async () => {
      const path = join(demo, file);
      const { spec } = loadSpecText(readFileSync(path, 'utf8'), file);
      const { result } = await runSpec(spec, { readers, specPath: path, allowedRoot: demo });
      const reference = fixture.specs[file];
      if (result.kind === 'distribution') {
        const r = reference as { points: { x: number; upper: number; lower: number }[]; critical: { p: number; upper: number; lower: number }[] };
        const d = result as DistributionResult;
        r.points.forEach((pt, i) => {
          near('upper tail', d.points[i].upper.value, pt.upper, 1e-11, `x = ${pt.x}, df = ${d.df}:`);
          near('lower tail', d.points[i].lower.value, pt.lower, 1e-11, `x = ${pt.x}, df = ${d.df}:`);
        });
        r.critical.forEach((c, i) => {
          near('upper critical value', d.critical[i].upper, c.upper, 1e-11, `p = ${c.p}, df = ${d.df}:`);
          near('lower critical value', d.critical[i].lower, c.lower, 1e-11, `p = ${c.p}, df = ${d.df}:`);
        });
        return;
      }
      const r = reference as { statistic: number; df: number; pValue: number; n: number; expected?: number[] | number[][] };
      const t = result as TestResult;
      near('statistic', t.statistic, r.statistic, 1e-11, `${file}:`);
      assert.equal(t.df, r.df);
      assert.equal(t.n, r.n);
      near('p-value', t.pValue.value, r.pValue, 1e-9, `${file}:`);
      if (r.expected && t.categories) r.expected.forEach((e, i) => near(`expected[${i}]`, t.categories![i].expected, e as number, 1e-12, `${file}:`));
      if (r.expected && t.grid) (r.expected as number[][]).forEach((row, i) => row.forEach((e, j) => near(`expected[${i}][${j}]`, t.grid!.expected[i][j], e, 1e-12, `${file}:`)));
    });
  }

  for (const file of specs) {
    it(`${file} reproduces its recorded result`, async () => {
      const path = join(demo, file);
      const { spec } = loadSpecText(readFileSync(path, 'utf8'), file);
      assert.ok(spec.recorded, `${file} has no recorded result: run \`node dist/cli.js run --record demo/${file}\``);
      const run = await runSpec(spec, { readers, specPath: path, allowedRoot: demo });
      const review = compareWithRecord(spec.recorded, run, 'test', new Date(0));
      assert.equal(review.status, 'reproduced', describeReview(review, file));
      // The record itself is checked against scipy too, so a record written by a wrong version cannot pass.
      const recorded = (spec.recorded as { result?: { statistic?: number; pValue?: number } }).result;
      const reference = fixture.specs[file] as { statistic?: number; pValue?: number };
      if (run.result.kind === 'test') {
        assert.equal(typeof recorded?.statistic, 'number', `${file}: the record lacks the statistic`);
        assert.equal(typeof reference.statistic, 'number', `${file}: the scipy reference lacks the statistic`);
        near('recorded statistic', recorded!.statistic!, reference.statistic!, 1e-9, `${file}:`);
        near('recorded p-value', recorded!.pValue!, reference.pValue!, 1e-9, `${file}:`);
      }
    });
  }

  it('demo/report.md is current: refreshing it changes nothing', async () => {
    const reportPath = join(demo, 'report.md');
    const text = readFileSync(reportPath, 'utf8');
    const outcome = await refreshReport(text, async (block) =>
      (await runReportBlock(block, { reportPath, readers, readText: async (f) => readFileSync(f, 'utf8'), allowedRoot: demo })).markdown,
    );
    assert.equal(outcome.blocks.length, 3);
    assert.deepEqual(outcome.blocks.filter((b) => b.error || b.changed), [], 'run `node dist/cli.js report demo/report.md`');
    assert.equal(outcome.text, text);
    // The numbers the report shows come from an outside reference, not only from a previous run of ours.
    for (const file of ['bakery-flavour-mix.countercheck.json', 'bakery-oven-defects.countercheck.json']) {
      const reference = fixture.specs[file] as { statistic?: number };
      assert.equal(typeof reference.statistic, 'number', `${file}: the scipy reference lacks the statistic`);
      assert.ok(text.includes(`) = ${reference.statistic!.toFixed(2)}, p`), `demo/report.md shows χ² = ${reference.statistic!.toFixed(2)} (scipy) for ${file}`);
    }
  });
});
