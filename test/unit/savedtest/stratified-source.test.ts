// A stratified test read from a `source`: the file readers count stratum × row × column themselves (the database
// counts on the server, test/pg/stratified-sql.test.ts), and the result equals R's mantelhaen.test on the same
// tables (test/fixtures/R/advanced.json, written by scripts/fixtures/advanced.R) and the same spec with the counts inline.
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { aggregateParquet } from '../../../src/data/parquet';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import { validateSpec } from '../../../src/savedtest/validate';
import type { TestResult } from '../../../src/stats/result';
import { rejectsInput } from '../data/expect';
import { fixture } from '../fixtures';
import { closeTo } from '../tolerance';

interface Cmh { name: string; strata: number[][][]; uncorrected: number; uncorrectedP: number; commonOddsRatio: number }
interface Gcmh { name: string; strata: number[][][]; statistic: number; df: number; pValue: number }
const R = fixture<{ rVersion: string; cmh: Cmh[]; generalizedCmh: Gcmh[] }>('R', 'advanced');
const readers: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };

/** Labels that sort in index order: s1…, r1…, c1…. */
const labels = (prefix: string, n: number) => Array.from({ length: n }, (_, i) => `${prefix}${i + 1}`);

/** One record per unit (stratum, row, column), or one per non-empty cell with its count when `weighted`. */
function records(strata: number[][][], weighted: boolean): string[][] {
  const out: string[][] = [];
  strata.forEach((table, k) =>
    table.forEach((row, i) =>
      row.forEach((n, j) => {
        const key = [`s${k + 1}`, `r${i + 1}`, `c${j + 1}`];
        if (weighted) {
          if (n > 0) out.push([...key, String(n)]);
        } else for (let u = 0; u < n; u++) out.push(key);
      }),
    ),
  );
  return out;
}

async function run(spec: Record<string, unknown>, folder: string): Promise<TestResult> {
  const { result } = await runSpec(spec, { readers, specPath: join(folder, 'stratified.countercheck.json') });
  assert.equal(result.kind, 'test');
  return result as TestResult;
}

describe('stratified test from a source', () => {
  let folder = '';
  before(() => (folder = mkdtempSync(join(tmpdir(), 'countercheck-strata-'))));
  after(() => rmSync(folder, { recursive: true, force: true }));

  for (const c of R.cmh) {
    it(`CSV records (one per unit, and weighted counts) give ${R.rVersion} mantelhaen.test on ${c.name}, and the inline spec's result`, async () => {
      const units = records(c.strata, false);
      writeFileSync(join(folder, `${c.name}.csv`), ['clinic,treatment,response', ...units.map((r) => r.join(','))].join('\n'));
      writeFileSync(join(folder, `${c.name}-counts.csv`), ['clinic,treatment,response,patients', ...records(c.strata, true).map((r) => r.join(','))].join('\n'));
      const columns = ['clinic', 'treatment', 'response'];
      // The fragility search sees the counts read from the source as it sees inline ones; it is run on the smallest
      // tables only, since on the large ones it takes seconds per run.
      const fragility = c.name === 'rabbits' ? {} : { fragility: false };
      const fromUnits = await run({ test: 'stratified', source: { path: `${c.name}.csv`, columns, categories: 'sorted' }, ...fragility }, folder);
      const fromCounts = await run({ test: 'stratified', source: { path: `${c.name}-counts.csv`, columns, weight: 'patients', categories: 'sorted' }, ...fragility }, folder);
      const src = `${R.rVersion} mantelhaen.test(correct = FALSE)`;
      closeTo(fromUnits.statistic, c.uncorrected, 1e-10, `CMH X² (${src})`, c.strata);
      closeTo(fromUnits.pValue.value, c.uncorrectedP, 1e-9, `p (${src})`, c.strata);
      closeTo(fromUnits.estimates[0].value, c.commonOddsRatio, 1e-12, `MH odds ratio (${src})`, c.strata);
      const inline = await run(
        {
          test: 'stratified',
          strata: c.strata,
          stratumLabels: labels('s', c.strata.length),
          rowLabels: labels('r', 2),
          columnLabels: labels('c', 2),
          rowVariable: 'treatment',
          columnVariable: 'response',
          ...fragility,
        },
        folder,
      );
      if (c.name === 'rabbits') assert.ok(fromUnits.fragility, 'the fragility section, from the counts read');
      assert.deepEqual(fromUnits, inline, 'the same result as the counts written inline');
      assert.deepEqual(fromCounts, inline, 'weighted long counts give the same result');
      assert.equal(fromUnits.n, units.length);
    });
  }

  for (const c of R.generalizedCmh) {
    it(`JSON records give the generalized CMH of ${R.rVersion} mantelhaen.test on ${c.name} (${c.strata[0].length}×${c.strata[0][0].length}×${c.strata.length})`, async () => {
      const rows = records(c.strata, true).map(([site, dose, grade, n]) => ({ site, dose, grade, n: Number(n) }));
      writeFileSync(join(folder, `${c.name}.json`), JSON.stringify(rows));
      const r = await run({ test: 'stratified', source: { path: `${c.name}.json`, columns: ['site', 'dose', 'grade'], weight: 'n', categories: 'sorted' }, fragility: false }, folder);
      const src = `${R.rVersion} mantelhaen.test, general association`;
      closeTo(r.statistic, c.statistic, 1e-10, `generalized CMH (${src})`, c.strata);
      assert.equal(r.df, c.df);
      closeTo(r.pValue.value, c.pValue, 1e-9, `p (${src})`, c.strata);
    });
  }

  it('places the counts in the order the spec lists the levels, a listed level the data lacks counting 0', async () => {
    const c = R.cmh.find((x) => x.name === 'clinics')!;
    writeFileSync(join(folder, 'order.csv'), ['clinic,treatment,response', ...records(c.strata, false).map((r) => r.join(','))].join('\n'));
    const source = { path: 'order.csv', columns: ['clinic', 'treatment', 'response'] };
    const reversed = await run({ test: 'stratified', source, stratumLabels: ['s3', 's2', 's1', 's0'], rowLabels: ['r1', 'r2'], columnLabels: ['c1', 'c2'], fragility: false }, folder);
    // A stratum without records adds nothing to the CMH sums: the same statistic as R's on the three clinics.
    closeTo(reversed.statistic, c.uncorrected, 1e-10, `CMH X² with an empty stratum (${R.rVersion} mantelhaen.test)`, c.strata);
    // The reader refuses a level the spec does not list, at its first line.
    const firstS3 = 2 + c.strata[0].flat().reduce((a, b) => a + b, 0) + c.strata[1].flat().reduce((a, b) => a + b, 0);
    await rejectsInput(
      () => run({ test: 'stratified', source, stratumLabels: ['s1', 's2'] }, folder),
      `order.csv, line ${firstS3}, column \`clinic\`: found \`s3\`, which is not one of the given categories (\`s1\`, \`s2\`)`,
      'unknown-category',
    );
  });

  it('refuses the exact method when the source gives strata larger than 2×2, at $.method', async () => {
    writeFileSync(join(folder, 'three-rows.csv'), ['site,arm,outcome', 'a,x,p', 'a,y,q', 'a,z,p', 'b,x,q', 'b,y,p', 'b,z,q'].join('\n'));
    const e = await rejectsInput(
      () => run({ test: 'stratified', method: 'exact', fragility: false, source: { path: 'three-rows.csv', columns: ['site', 'arm', 'outcome'] } }, folder),
      '$.method: the exact conditional test is available for 2×2×K strata only; use "asymptotic" for R×C×K',
      'method-unavailable',
    );
    assert.equal(e.location.jsonPath, '$.method');
  });

  it('asks for exactly one of "strata" and "source", and three columns', () => {
    const messages = (spec: unknown) => validateSpec(spec).map((p) => `${p.path}: ${p.message}`);
    assert.deepEqual(messages({ test: 'stratified' }), ['$: missing data: give "strata", an array of tables of counts, or a "source" with three columns']);
    assert.match(messages({ test: 'stratified', strata: [[[1, 2], [3, 4]]], source: { path: 'a.csv', columns: ['a', 'b', 'c'] } })[0], /give only one of "strata", "source"/);
    assert.deepEqual(messages({ test: 'stratified', source: { path: 'a.csv', columns: ['a', 'b'] } }), ['$.source.columns: expected at least 3 items, found 2']);
  });

  it('Parquet: the strata of rush orders sum to the region × channel counts DuckDB gives (test/fixtures/duckdb)', async () => {
    const dir = join(__dirname, '..', '..', 'fixtures', 'duckdb');
    const ref = JSON.parse(readFileSync(join(dir, 'orders.json'), 'utf8')) as { versions: Record<string, string>; files: Record<string, { regionByChannel: { region: string; channel: string; n: number }[] }> };
    for (const name of ['orders-snappy', 'orders-plain']) {
      const [a] = await aggregateParquet(join(dir, `${name}.parquet`), [{ kind: 'strata', stratumColumn: 'rush', rowColumn: 'region', columnColumn: 'channel' }], { file: `${name}.parquet` });
      assert.equal(a.kind, 'strata');
      if (a.kind !== 'strata') return;
      const margin: Record<string, number> = {};
      a.strata.counts.forEach((t) => t.forEach((row, i) => row.forEach((n, j) => { if (n > 0) margin[`${a.strata.rowLabels[i]}|${a.strata.columnLabels[j]}`] = (margin[`${a.strata.rowLabels[i]}|${a.strata.columnLabels[j]}`] ?? 0) + n; })));
      const want = Object.fromEntries(ref.files[name].regionByChannel.map((r) => [`${r.region}|${r.channel}`, r.n]));
      assert.deepEqual(margin, want, `${name}: summed over the strata of \`rush\` (DuckDB ${ref.versions.duckdb ?? ''} GROUP BY region, channel)`);
      assert.deepEqual([...a.strata.stratumLabels].sort(), ['false', 'true']);
    }
  });
});
