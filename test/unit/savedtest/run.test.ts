// runSpec with in-memory readers: what it asks the reader for, how it maps a spec's source options,
// how it orders levels, and how it refuses what it cannot do. Statistical values are checked against
// published results where they appear (Mendel's peas: X² = 0.470, p = 0.925).
import { strict as assert } from 'node:assert';
import type { Aggregate, AggregateRequest } from '../../../src/data/types';
import type { IntakeOptions } from '../../../src/data/options';
import { isInputError } from '../../../src/errors';
import { canonicalJson, inlineFingerprint, intakeOptionsOf, runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import type { TestResult } from '../../../src/stats/result';

const provenance = { description: 'data/peas.csv', sha256: 'f'.repeat(64), rows: 556, dropped: 0, columns: ['shape'] };

function reader(aggregate: Aggregate, calls: { path: string; request: AggregateRequest; options: IntakeOptions }[] = []): SpecReaders {
  return {
    async aggregateFile(path, request, options) {
      calls.push({ path, request, options });
      return aggregate;
    },
  };
}

async function inputError(p: Promise<unknown>): Promise<{ code: string; message: string; jsonPath?: string }> {
  try {
    await p;
  } catch (e) {
    assert.ok(isInputError(e), String(e));
    return { code: e.code, message: e.message, jsonPath: e.location.jsonPath };
  }
  assert.fail('expected an InputError');
}

const peas: Aggregate = {
  kind: 'categories',
  counts: { labels: ['wrinkled yellow', 'round yellow', 'wrinkled green', 'round green'], counts: [101, 315, 32, 108] },
  provenance,
};

describe('runSpec', () => {
  it('reads a source through the injected reader, in the order the spec gives, with the data fingerprint', async () => {
    const calls: { path: string; request: AggregateRequest; options: IntakeOptions }[] = [];
    const run = await runSpec(
      {
        test: 'goodness-of-fit',
        source: { path: 'data/peas.csv', columns: ['shape'], delimiter: ';', decimal: ',', missing: ['?'], caseFold: true },
        ratios: { 'round yellow': 9, 'round green': 3, 'wrinkled yellow': 3, 'wrinkled green': 1 },
      },
      { readers: reader(peas, calls), specPath: '/work/demo/peas.countercheck.json' },
    );
    const result = run.result as TestResult;
    // Mendel's dihybrid cross against 9:3:3:1 (published): X² = 0.470, p = 0.925.
    assert.equal(result.statistic.toFixed(3), '0.470');
    assert.equal(result.pValue.value.toFixed(3), '0.925');
    assert.deepEqual(result.categories!.map((c) => c.label), ['round yellow', 'round green', 'wrinkled yellow', 'wrinkled green']);
    assert.equal(calls[0].path, '/work/demo/data/peas.csv');
    assert.deepEqual(calls[0].request, { kind: 'categories', column: 'shape', weight: undefined });
    assert.deepEqual(calls[0].options.dialect, { delimiter: ';', decimal: ',' });
    assert.deepEqual(calls[0].options.missing, { tokens: ['?'] });
    assert.deepEqual(calls[0].options.categories, { caseFold: true, levels: ['round yellow', 'round green', 'wrinkled yellow', 'wrinkled green'] });
    assert.deepEqual(run.data, { sha256: 'f'.repeat(64), rows: 556, columns: ['shape'], description: 'data/peas.csv' });
  });

  it('counts a listed level that the data lacks as 0, and names a level the spec does not list', async () => {
    const two: Aggregate = { kind: 'categories', counts: { labels: ['a', 'b'], counts: [10, 12] }, provenance };
    const run = await runSpec({ test: 'goodness-of-fit', source: { path: 'x.csv', columns: ['c'] }, categories: ['a', 'b', 'z'] }, { readers: reader(two), specPath: '/w/s.json' });
    assert.deepEqual((run.result as TestResult).categories!.map((c) => c.observed), [10, 12, 0]);
    const e = await inputError(runSpec({ test: 'goodness-of-fit', source: { path: 'x.csv', columns: ['c'] }, categories: ['a', 'z'] }, { readers: reader(two), specPath: '/w/s.json' }));
    assert.equal(e.code, 'unknown-level');
    assert.match(e.message, /column `c` has level "b" that "categories" does not list/);
  });

  it('orders a cross-tabulation by the row and column labels the spec lists', async () => {
    const table: Aggregate = {
      kind: 'table',
      table: { rowLabels: ['night', 'day'], columnLabels: ['late', 'on time'], counts: [[30, 70], [10, 90]] },
      provenance: { ...provenance, columns: ['shift', 'arrival'] },
    };
    const run = await runSpec(
      { test: 'independence', source: { path: 'x.csv', columns: ['shift', 'arrival'] }, rowLabels: ['day', 'night'], columnLabels: ['on time', 'late'] },
      { readers: reader(table), specPath: '/w/s.json' },
    );
    const grid = (run.result as TestResult).grid!;
    assert.deepEqual(grid.observed, [[90, 10], [70, 30]]);
    assert.deepEqual(grid.rowLabels, ['day', 'night']);
    const e = await inputError(
      runSpec({ test: 'independence', source: { path: 'x.csv', columns: ['shift', 'arrival'] }, rowLabels: ['day'] }, { readers: reader(table), specPath: '/w/s.json' }),
    );
    assert.equal(e.code, 'unknown-level');
    assert.equal(e.jsonPath, '$.rowLabels');
    assert.match(e.message, /column `shift` has the level "night", which "rowLabels" does not list/);
  });

  it('names the source columns in the conclusion, or the names the spec gives', async () => {
    const table: Aggregate = {
      kind: 'table',
      table: { rowLabels: ['night', 'day'], columnLabels: ['late', 'on time'], counts: [[30, 70], [10, 90]] },
      provenance: { ...provenance, columns: ['shift', 'arrival'] },
    };
    const fromColumns = await runSpec({ test: 'independence', source: { path: 'x.csv', columns: ['shift', 'arrival'] } }, { readers: reader(table), specPath: '/w/s.json' });
    assert.match((fromColumns.result as TestResult).conclusion, /^`shift` and `arrival` are associated: the mix of `arrival` differs between the `shift` groups/);
    const inline = await runSpec(
      { test: 'independence', table: [[30, 70], [10, 90]], rowVariable: 'work shift', columnVariable: 'delivery' },
      { readers: reader(table), specPath: '/w/s.json' },
    );
    assert.match((inline.result as TestResult).conclusion, /^`work shift` and `delivery` are associated/);
    const generic = await runSpec({ test: 'independence', table: [[30, 70], [10, 90]] }, { readers: reader(table), specPath: '/w/s.json' });
    assert.match((generic.result as TestResult).conclusion, /^The row and column variables are associated/);
    const fit = await runSpec({ test: 'goodness-of-fit', source: { path: 'data/peas.csv', columns: ['shape'] }, ratios: { 'round yellow': 9, 'round green': 3, 'wrinkled yellow': 3, 'wrinkled green': 1 } }, { readers: reader(peas), specPath: '/w/s.json' });
    assert.match((fit.result as TestResult).conclusion, /^The observed counts of `shape` are consistent/);
    const fitInline = await runSpec({ test: 'goodness-of-fit', observed: [30, 50], variable: 'lane' }, { readers: reader(peas), specPath: '/w/s.json' });
    assert.match((fitInline.result as TestResult).conclusion, /^The observed counts of `lane` /);
    const variance = await runSpec({ test: 'variance', summary: { n: 20, variance: 0.0153 }, variance0: 0.01, variable: 'fill', unit: 'L' }, { readers: reader(peas), specPath: '/w/s.json' });
    assert.match((variance.result as TestResult).conclusion, /population variance of `fill` .*σ0² = 0\.01 L²/);
  });

  it('never half-runs: an invalid spec is refused before any read', async () => {
    const calls: { path: string; request: AggregateRequest; options: IntakeOptions }[] = [];
    const e = await inputError(runSpec({ test: 'goodness-of-fit', source: { path: 'x.csv', columns: ['c'] }, statistic: 'chi' }, { readers: reader(peas, calls), specPath: '/w/s.json' }));
    assert.equal(e.code, 'invalid-spec');
    assert.equal(calls.length, 0);
  });

  it('refuses a path out of the allowed root before reading', async () => {
    const calls: { path: string; request: AggregateRequest; options: IntakeOptions }[] = [];
    const e = await inputError(runSpec({ test: 'goodness-of-fit', source: { path: '../../x.csv', columns: ['c'] } }, { readers: reader(peas, calls), specPath: '/w/specs/s.json', allowedRoot: '/w' }));
    assert.equal(e.code, 'path-outside-root');
    assert.equal(calls.length, 0);
  });

  it('says so when a database source has no reader here', async () => {
    const sql = await inputError(runSpec({ test: 'goodness-of-fit', source: { sql: { connection: 'wh', table: 'public.t' }, columns: ['c'] } }, { readers: reader(peas) }));
    assert.equal(sql.code, 'sql-unavailable');
    // "method": "exact" and "monte-carlo" are available since src/savedtest/procedures/method.ts (tested in test/unit/stats/procedures/spec-handlers.test.ts).
  });

  it('refuses Yates correction on a table larger than 2×2', async () => {
    const e = await inputError(runSpec({ test: 'independence', table: [[1, 2, 3], [3, 4, 5]], correction: true }, { readers: reader(peas) }));
    assert.match(e.message, /2×2 tables only; this table is 2×3/);
  });

  it('stops when cancelled', async () => {
    const controller = new AbortController();
    controller.abort();
    assert.equal((await inputError(runSpec({ test: 'distribution', df: 1, x: 1 }, { readers: reader(peas), signal: controller.signal }))).code, 'cancelled');
  });

  it('fingerprints inline data by its data fields only, whatever their key order', () => {
    const a = inlineFingerprint({ test: 'independence', table: [[1, 2], [3, 4]], rowLabels: ['x', 'y'], alpha: 0.05 });
    const b = inlineFingerprint({ test: 'independence', rowLabels: ['x', 'y'], table: [[1, 2], [3, 4]], alpha: 0.01, title: 'changed' });
    const c = inlineFingerprint({ test: 'independence', table: [[1, 2], [3, 5]], rowLabels: ['x', 'y'] });
    assert.equal(a.sha256, b.sha256);
    assert.notEqual(a.sha256, c.sha256);
    assert.equal(a.rows, 2);
    assert.equal(canonicalJson({ b: 1, a: [{ d: 2, c: 3 }] }), '{"a":[{"c":3,"d":2}],"b":1}');
  });

  it('maps the missing-value policy and level order to the reader options', () => {
    const o = intakeOptionsOf({ path: 'a.csv', missing: { tokens: ['n/a'], policy: 'category', label: '(none)' }, categories: 'sorted', header: false, encoding: 'latin1' });
    assert.deepEqual(o.missing, { tokens: ['n/a'], policy: 'category', label: '(none)' });
    assert.deepEqual(o.categories, { order: 'sorted' });
    assert.deepEqual(o.dialect, { encoding: 'latin1', header: false });
    assert.equal(o.file, 'a.csv');
  });
});
