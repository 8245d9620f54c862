// A stratified test from a database: the server counts stratum × row × column with one GROUP BY, and the
// result is identical to the same rows written to CSV by psql's \copy and read by the file reader, and agrees
// with R's mantelhaen.test on the same tables (test/fixtures/R/advanced.json, scripts/fixtures/advanced.R).
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../src/data/file';
import { aggregateSql, sqlSpecReader } from '../../src/data/sql/index';
import { plan } from '../../src/planner/plan';
import { english, type Choice, type Questions, type Shown } from '../../src/planner/questions';
import { runSpec } from '../../src/savedtest/run';
import type { SpecReaders } from '../../src/savedtest/types';
import type { TestResult } from '../../src/stats/result';
import { liveServer } from './server';

const server = liveServer();
const R = JSON.parse(readFileSync(join(__dirname, '..', 'fixtures', 'R', 'advanced.json'), 'utf8')) as {
  rVersion: string;
  cmh: { name: string; strata: number[][][]; uncorrected: number; uncorrectedP: number; correctedP: number; commonOddsRatio: number; exactP: number }[];
  generalizedCmh: { name: string; strata: number[][][]; statistic: number; df: number; pValue: number }[];
};

function near(got: number, expected: number, relative: number, what: string): void {
  const delta = got === expected ? 0 : Math.abs(got - expected) / Math.abs(expected);
  assert.ok(delta <= relative, `${what}: got ${got}, expected ${expected} (${R.rVersion}), relative Δ ${delta}, tolerance ${relative}`);
}

/** VALUES rows (case, stratum, row, column, count) for every non-empty cell of the fixture's tables. */
function cells(name: string, strata: number[][][]): string[] {
  const out: string[] = [];
  strata.forEach((t, k) => t.forEach((row, i) => row.forEach((n, j) => { if (n > 0) out.push(`('${name}', 'site ${k + 1}', 'arm ${i + 1}', 'outcome ${j + 1}', ${n})`); })));
  return out;
}

/** Answers the planner's questions by title (the column choices in turn). */
class Answers implements Questions {
  constructor(private readonly byTitle: Record<string, string | string[]>) {}
  async choose<T>(q: { title: Shown; placeholder: Shown; choices: readonly Choice<T>[] }): Promise<T> {
    const [title, placeholder] = [english(q.title), english(q.placeholder)];
    const key = Object.keys(this.byTitle).find((k) => k === title || placeholder.includes(k));
    if (!key) throw new Error(`unexpected question ${title} (${placeholder})`);
    const v = this.byTitle[key];
    const label = Array.isArray(v) ? (v.shift() as string) : v;
    const choice = q.choices.find((c) => english(c.label) === label);
    if (!choice) throw new Error(`no choice "${label}" for ${title}: ${q.choices.map((c) => english(c.label)).join(', ')}`);
    return choice.value;
  }
  async enter(): Promise<string> {
    throw new Error('no text question expected');
  }
  async confirm(): Promise<boolean> {
    return false;
  }
}

describe('stratified tests counted on the server', () => {
  let folder = '';
  let readers: SpecReaders;
  const run = async (spec: Record<string, unknown>): Promise<TestResult> => {
    const { result } = await runSpec(spec, { readers, specPath: join(folder, 'strata.countercheck.json') });
    assert.equal(result.kind, 'test');
    return result as TestResult;
  };

  before(async () => {
    folder = mkdtempSync(join(tmpdir(), 'countercheck-pg-strata-'));
    readers = {
      aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }),
      aggregateSql: sqlSpecReader({ connections: server.context().connections, env: server.context().env }),
    };
    const all = [...R.cmh, ...R.generalizedCmh].flatMap((c) => cells(c.name, c.strata));
    await server.query('DROP TABLE IF EXISTS strata_counts; DROP TABLE IF EXISTS strata_units');
    await server.query('CREATE TABLE strata_counts ("case" text, "clinic site" text, arm text, "Outcome" text, patients integer)');
    await server.query(`INSERT INTO strata_counts VALUES ${all.join(', ')}`);
    // One row per patient, plus rows with a missing value in each column (dropped, and counted as dropped).
    await server.query('CREATE TABLE strata_units AS SELECT "case", "clinic site", arm, "Outcome" FROM strata_counts, generate_series(1, patients)');
    await server.query(`INSERT INTO strata_units VALUES ('clinics', NULL, 'arm 1', 'outcome 1'), ('clinics', 'site 1', NULL, 'outcome 2'), ('clinics', 'site 9', 'arm 2', NULL)`);
  });
  after(async () => {
    await server.query('DROP TABLE IF EXISTS strata_counts; DROP TABLE IF EXISTS strata_units');
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  const columns = ['clinic site', 'arm', 'Outcome'];

  for (const c of R.cmh) {
    it(`${c.name}: the database gives the CSV path's result exactly, and ${R.rVersion}'s mantelhaen.test`, async () => {
      const where = `"case" = '${c.name}'`;
      const csv = join(folder, `${c.name}.csv`);
      await server.psql(`\\copy (SELECT "clinic site", arm, "Outcome" FROM strata_units WHERE ${where}) TO '${csv}' WITH (FORMAT csv, HEADER)`);
      // The fragility search (seconds on the larger tables) runs on the smallest one, where it is compared too.
      const fragility = c.name === 'rabbits' ? {} : { fragility: false };
      const viaSql = await run({ test: 'stratified', source: { sql: { connection: 'test', table: 'strata_units' }, where: '"case" = $1', parameters: [c.name], columns }, ...fragility });
      const viaFile = await run({ test: 'stratified', source: { path: `${c.name}.csv`, columns, categories: 'sorted' }, ...fragility });
      assert.deepEqual(viaSql, viaFile, 'the same result from the server and from the same rows in a CSV file');
      if (c.name === 'rabbits') assert.ok(viaSql.fragility, 'the fragility section, from the counts the server gave');
      near(viaSql.statistic, c.uncorrected, 1e-10, 'CMH X² (mantelhaen.test, correct = FALSE)');
      near(viaSql.pValue.value, c.uncorrectedP, 1e-9, 'CMH p');
      near(viaSql.estimates[0].value, c.commonOddsRatio, 1e-12, 'Mantel–Haenszel odds ratio');
      const exact = await run({ test: 'stratified', method: 'exact', fragility: false, source: { sql: { connection: 'test', table: 'strata_counts' }, where: '"case" = $1', parameters: [c.name], columns, weight: 'patients' } });
      near(exact.pValue.value, c.exactP, 1e-9, 'exact conditional p (mantelhaen.test, exact = TRUE), from weighted counts');
    });
  }

  it('the three-way aggregate from the server equals the file reader\'s, missing values dropped alike', async () => {
    const csv = join(folder, 'clinics-all.csv');
    await server.psql(`\\copy (SELECT "clinic site", arm, "Outcome" FROM strata_units WHERE "case" = 'clinics') TO '${csv}' WITH (FORMAT csv, HEADER)`);
    const request = { kind: 'strata', stratumColumn: 'clinic site', rowColumn: 'arm', columnColumn: 'Outcome' } as const;
    const viaSql = await aggregateSql({ sql: { connection: 'test', table: 'strata_units' }, where: `"case" = 'clinics'` }, request, server.context());
    const viaFile = await aggregateFile(csv, request, { dialect: { header: true, comment: null }, categories: { order: 'sorted' } });
    assert.equal(viaSql.kind, 'strata');
    assert.deepEqual(viaSql.kind === 'strata' && viaSql.strata, viaFile.kind === 'strata' && viaFile.strata);
    assert.deepEqual([viaSql.provenance.rows, viaSql.provenance.dropped, viaSql.provenance.columns], [viaFile.provenance.rows, viaFile.provenance.dropped, viaFile.provenance.columns]);
    assert.equal(viaSql.provenance.dropped, 3);
    assert.deepEqual(viaSql.kind === 'strata' && viaSql.strata.stratumLabels, ['site 1', 'site 2', 'site 3'], 'site 9 is only beside a missing value');
  });

  for (const c of R.generalizedCmh) {
    it(`${c.name}: the planner offers stratified for the table, writes a SQL source, and the run gives ${R.rVersion}'s generalized CMH`, async () => {
      const offer = {
        kind: 'catalogue' as const,
        sql: { connection: 'test', table: 'strata_counts' },
        columns: [
          { name: 'case', type: 'text', numeric: false },
          { name: 'clinic site', type: 'text', numeric: false },
          { name: 'arm', type: 'text', numeric: false },
          { name: 'Outcome', type: 'text', numeric: false },
          { name: 'patients', type: 'integer', numeric: true },
        ],
        description: 'test: strata_counts',
      };
      const questions = new Answers({ 'Which test?': 'Stratified tables (Cochran–Mantel–Haenszel)', 'Choose ': ['clinic site', 'arm', 'Outcome'] });
      const planned = await plan({
        offer,
        questions,
        settings: { alpha: 0.05, correction: false, missingValues: [], monteCarloResamples: 1000 },
        given: { where: `"case" = '${c.name}'`, weight: 'patients', fragility: false },
        specFolder: folder,
      });
      assert.deepEqual(planned.spec.source, { sql: offer.sql, columns, weight: 'patients', where: `"case" = '${c.name}'` });
      const r = await run(planned.spec as Record<string, unknown>);
      near(r.statistic, c.statistic, 1e-10, 'generalized CMH (mantelhaen.test)');
      assert.equal(r.df, c.df);
      near(r.pValue.value, c.pValue, 1e-9, 'generalized CMH p');
    });
  }

  it('a weight column that is not a frequency is refused, as from a file', async () => {
    await assert.rejects(
      run({ test: 'stratified', source: { sql: { connection: 'test', query: `SELECT "clinic site", arm, "Outcome", patients - 0.5 AS half FROM strata_counts WHERE "case" = 'clinics'` }, columns, weight: 'half' } }),
      (e: Error) => /column `half`: \d+ records have weights that are not a non-negative whole number/.test(e.message),
    );
  });
});
