// The reader table: a saved test's source is read by the reader its file name (or "sql") calls for, and a
// procedure that needs the values themselves gets them from every reader: a distribution fit from a CSV file,
// a markdown table, a JSON file and a SQL source gives the result of the same values written inline.
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { fileReaderFor, FILE_READERS } from '../../../src/data/readers';
import { decodeAggregate, planAggregate } from '../../../src/data/sql/query';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import type { TestResult } from '../../../src/stats/result';

const demo = join(__dirname, '..', '..', '..', 'demo');
const fileReaders: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };

/** The bakery log's weight_g column, split out by hand (fifth field of each data line; blank and NA cells left out). */
function bakeryWeights(): number[] {
  return readFileSync(join(demo, 'data', 'bakery-defects.csv'), 'utf8')
    .split('\n')
    .filter((l) => l && !l.startsWith('#') && !l.startsWith('tray,'))
    .map((l) => l.split(',')[4].trim())
    .filter((f) => /^\d+(\.\d+)?$/.test(f))
    .map(Number);
}

async function fit(source: Record<string, unknown>, specFolder: string, readers: SpecReaders = fileReaders): Promise<TestResult> {
  const spec = { version: 1, test: 'distribution-fit', family: 'normal', source };
  return (await runSpec(spec, { readers, specPath: join(specFolder, 'fit.countercheck.json') })).result as TestResult;
}

async function inlineFit(values: readonly number[]): Promise<TestResult> {
  return (await runSpec({ version: 1, test: 'distribution-fit', family: 'normal', values }, { readers: fileReaders })).result as TestResult;
}

function sameResult(got: TestResult, expected: TestResult, what: string): void {
  assert.equal(got.n, expected.n, `${what}: n`);
  assert.equal(got.statistic, expected.statistic, `${what}: statistic`);
  assert.equal(got.pValue.value, expected.pValue.value, `${what}: p`);
}

describe('reader table', () => {
  it('picks the reader by the file name, delimited text for anything else', () => {
    assert.equal(fileReaderFor('a/b.JSON').name, 'JSON records');
    assert.equal(fileReaderFor('notes.md').name, 'markdown table');
    assert.equal(fileReaderFor('data.csv').name, 'delimited text');
    assert.equal(fileReaderFor('export.dat').name, 'delimited text');
    for (const r of FILE_READERS) assert.ok(r.delivers.includes('values'), `${r.name} delivers values`);
  });

  it('distribution-fit from a CSV file: the values themselves, as inline', async () => {
    const values = bakeryWeights();
    assert.ok(values.length > 1700, `${values.length} weights`);
    const expected = await inlineFit(values);
    sameResult(await fit({ path: 'data/bakery-defects.csv', columns: ['weight_g'] }, demo), expected, 'csv');
  });

  it('distribution-fit from a markdown table and from a JSON file', async () => {
    const values = bakeryWeights().slice(0, 60);
    const folder = mkdtempSync(join(tmpdir(), 'countercheck-readers-'));
    writeFileSync(join(folder, 'weights.md'), `# Trays\n\nSome words.\n\n| tray | weight_g |\n|---|---:|\n${values.map((v, i) => `| ${i + 1} | ${v} |`).join('\n')}\n\nMore words.\n`);
    writeFileSync(join(folder, 'weights.json'), JSON.stringify(values.map((v, i) => ({ tray: i + 1, weight_g: v }))));
    const expected = await inlineFit(values);
    sameResult(await fit({ path: 'weights.md', columns: ['weight_g'] }, folder), expected, 'markdown');
    sameResult(await fit({ path: 'weights.json', columns: ['weight_g'] }, folder), expected, 'json');
  });

  it('distribution-fit from SQL: the planned statement transfers the values, decoded into the same result', async () => {
    const values = bakeryWeights().slice(0, 200);
    let sent = '';
    const readers: SpecReaders = {
      ...fileReaders,
      // A server stand-in answering the planned statement with one row per record (a NULL among them).
      aggregateSql: async (source, request, intake) => {
        const options = { missing: intake.missing, categories: intake.categories, keepValues: intake.keepValues };
        sent = planAggregate({ sql: source.sql! }, request, options).text;
        const rows = [...values.map((x) => ({ x })), { x: null }];
        const decoded = decodeAggregate(request, rows, options);
        assert.equal(decoded.kind, 'moments');
        return { ...decoded, provenance: { ...decoded.provenance, description: 'sql', sha256: '' } } as never;
      },
    };
    const result = await fit({ sql: { connection: 'bakery', table: 'public.trays' }, columns: ['weight_g'] }, demo, readers);
    assert.match(sent, /^SELECT NULLIF\(\("weight_g"\)::double precision, 'NaN'::double precision\) AS x FROM "public"\."trays"\nLIMIT 1000001$/);
    sameResult(result, await inlineFit(values), 'sql');
  });
});
