// Property tests (fast-check): round trips of count tables through every text form, readers
// that never crash on random input, and the byte scanner agreeing with csv-parse.
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { aggregateRecords } from '../../../src/data/aggregate';
import { parseDelimited } from '../../../src/data/delimited';
import { aggregateFile, aggregateFileMany } from '../../../src/data/file';
import { parseHtmlTable } from '../../../src/data/html';
import { readJsonData } from '../../../src/data/json';
import { parseMarkdownTable } from '../../../src/data/markdown';
import { DEFAULT_MISSING_TOKENS } from '../../../src/data/options';
import { parseNumberBytes } from '../../../src/data/scanner';
import { parseSelection } from '../../../src/data/selection';
import type { Aggregate, AggregateRequest, CountTable } from '../../../src/data/types';
import { InputError, isInstance } from '../../../src/errors';

const scratch = mkdtempSync(join(tmpdir(), 'countercheck-props-'));
let fileNumber = 0;
function scratchFile(content: string | Uint8Array): string {
  const path = join(scratch, `p${fileNumber++}.csv`);
  writeFileSync(path, content);
  return path;
}

const LABEL_CHARS = [...'abcXYZ019 ,;|"\'.-_éß€😀'];
const label = fc
  .array(fc.constantFrom(...LABEL_CHARS), { minLength: 1, maxLength: 8 })
  .map((cs) => cs.join(''))
  .filter((l) => l.trim() === l && l !== '' && !DEFAULT_MISSING_TOKENS.includes(l));

const countTable: fc.Arbitrary<CountTable> = fc
  .record({
    rows: fc.uniqueArray(label, { minLength: 1, maxLength: 5 }),
    columns: fc.uniqueArray(label, { minLength: 1, maxLength: 5 }),
  })
  .chain(({ rows, columns }) =>
    fc
      .array(fc.array(fc.nat({ max: 1_000_000_000 }), { minLength: columns.length, maxLength: columns.length }), { minLength: rows.length, maxLength: rows.length })
      .map((counts) => ({ rowLabels: rows, columnLabels: columns, counts })),
  );

const quote = (s: string) => `"${s.replace(/"/g, '""')}"`;
const markdownCell = (s: string) => s.replace(/\|/g, '\\|');

function asCsv(t: CountTable): string {
  return [['group', ...t.columnLabels].map(quote).join(','), ...t.rowLabels.map((r, i) => [quote(r), ...t.counts[i].map(String)].join(','))].join('\r\n') + '\r\n';
}
function asMarkdown(t: CountTable): string {
  const line = (cells: string[]) => `| ${cells.map(markdownCell).join(' | ')} |`;
  return [line(['group', ...t.columnLabels]), line(t.columnLabels.concat('x').map(() => '---')), ...t.rowLabels.map((r, i) => line([r, ...t.counts[i].map((n) => n.toLocaleString('en'))]))].join('\n');
}
function asLongCounts(t: CountTable): string {
  const lines = ['row,column,count'];
  t.rowLabels.forEach((r, i) => t.columnLabels.forEach((c, j) => lines.push(`${quote(r)},${quote(c)},${t.counts[i][j]}`)));
  return `${lines.join('\n')}\n`;
}

function tableOf(a: Aggregate): CountTable {
  assert.equal(a.kind, 'table');
  return (a as { table: CountTable }).table;
}

/** Runs a reader; it must return or throw an InputError, nothing else. */
/** Refusals about the input as a whole (its shape, its encoding), which have no line, column or JSON path to give. */
const WHOLE_INPUT = new Set(['bad-html', 'too-few-columns', 'empty-input', 'no-table', 'no-data', 'not-a-table', 'binary-file', 'file-changed']);

/** An InputError must say where: a line, a column, a JSON path, or a code for the input as a whole. */
function assertPositioned(e: InputError): void {
  assert.ok(e.message.length > 0);
  const { line, column, jsonPath } = e.location;
  assert.ok(line !== undefined || column !== undefined || jsonPath !== undefined || WHOLE_INPUT.has(e.code), `unpositioned error (${e.code}): ${e.message}`);
}

function neverCrashes(run: () => unknown): void {
  try {
    run();
  } catch (e) {
    if (!(isInstance(e, InputError))) throw e;
    assertPositioned(e);
  }
}

async function neverCrashesAsync(run: () => Promise<unknown>): Promise<string> {
  try {
    return JSON.stringify(await run());
  } catch (e) {
    if (!(isInstance(e, InputError))) throw e;
    assertPositioned(e);
    return `error: ${e.message}`;
  }
}

/** Runs of the fuzz properties: a size that fits the unit suite, more with FUZZ_RUNS (npm run fuzz). */
const runs = (n: number): number => Math.max(n, Number(process.env.FUZZ_RUNS ?? 0));

describe('data: properties', () => {
  after(() => rmSync(scratch, { recursive: true, force: true }));

  it('a table of counts reads back the same from CSV, markdown, JSON and long counts', () => {
    fc.assert(
      fc.property(countTable, (t) => {
        assert.deepEqual(tableOf(aggregateRecords(parseDelimited(asCsv(t), { dialect: { header: true } }), { kind: 'counted-table' })), t);
        const md = parseSelection(asMarkdown(t));
        assert.equal(md.format, 'markdown');
        assert.ok(md.kind === 'records');
        assert.deepEqual(tableOf(aggregateRecords(md.records, { kind: 'counted-table' })), t);
        const json = readJsonData(JSON.stringify({ table: t.counts, rowLabels: t.rowLabels, columnLabels: t.columnLabels }));
        assert.deepEqual(json.kind === 'table' && json.table, t);
        const long = parseDelimited(asLongCounts(t), { dialect: { header: true } });
        assert.deepEqual(tableOf(aggregateRecords(long, { kind: 'crosstab', rowColumn: 'row', columnColumn: 'column', weight: 'count' })), t);
      }),
      { numRuns: 200 },
    );
  });

  it('a table of counts reads back the same from files, through both readers', async () => {
    await fc.assert(
      fc.asyncProperty(countTable, fc.integer({ min: 8, max: 64 }), async (t, chunkSize) => {
        const csv = scratchFile(asCsv(t));
        assert.deepEqual(tableOf(await aggregateFile(csv, { kind: 'counted-table' }, { dialect: { header: true } }, { chunkSize })), t);
        const long = scratchFile(asLongCounts(t));
        const request: AggregateRequest = { kind: 'crosstab', rowColumn: 'row', columnColumn: 'column', weight: 'count' };
        for (const engine of ['auto', 'csv-parse'] as const)
          assert.deepEqual(tableOf(await aggregateFile(long, request, { dialect: { header: true } }, { chunkSize, engine })), t);
      }),
      { numRuns: 60 },
    );
  });

  const csvish = fc.array(fc.constantFrom(...'ab,;\t|"\n\r #0.-9e\\x'.split(''), '\u00e9', '\ufeff'), { maxLength: 2000 }).map((cs) => cs.join(''));
  const anyText = fc.oneof(fc.string({ maxLength: 2000 }), csvish, fc.string({ unit: 'binary', maxLength: 2000 }));
  // Column names from JavaScript's own property names, to catch lookups that reach the prototype.
  const RESERVED = ['__proto__', 'constructor', 'toString', 'valueOf', 'hasOwnProperty', 'length', 'prototype', '1', '2', 'a'];
  const headed = fc
    .tuple(fc.uniqueArray(fc.constantFrom(...RESERVED), { minLength: 2, maxLength: 4 }), fc.array(fc.array(fc.constantFrom(...RESERVED, 'x', '', '3'), { minLength: 1, maxLength: 5 }), { maxLength: 40 }))
    .map(([header, rows]) => ({ header, text: [header.join(','), ...rows.map((r) => r.join(','))].join('\n') }));

  it('random text never crashes an in-memory reader (it parses or gives a positioned error)', () => {
    fc.assert(
      fc.property(headed, fc.constantFrom(...RESERVED), ({ header, text }, other) => {
        for (const column of [header[1], other]) {
          neverCrashes(() => aggregateRecords(parseDelimited(text), { kind: 'crosstab', rowColumn: header[0], columnColumn: column }));
          neverCrashes(() => aggregateRecords(parseDelimited(text), { kind: 'categories', column, weight: other }));
          neverCrashes(() => aggregateRecords(parseDelimited(text), { kind: 'numeric', column }));
        }
        neverCrashes(() => readJsonData(JSON.stringify({ [header[0]]: [1, 2], [other]: { a: 1 } })));
      }),
      { seed: 20261203, numRuns: runs(300) },
    );
    fc.assert(
      fc.property(anyText, (text) => {
        neverCrashes(() => aggregateRecords(parseDelimited(text), { kind: 'counted-table' }));
        neverCrashes(() => aggregateRecords(parseDelimited(text, { dialect: { header: false } }), { kind: 'crosstab', rowColumn: '1', columnColumn: '2' }));
        neverCrashes(() => parseSelection(text));
        neverCrashes(() => parseMarkdownTable(text));
        neverCrashes(() => readJsonData(text));
        neverCrashes(() => parseHtmlTable(`<table>${text}</table>`));
      }),
      { seed: 20261203, numRuns: runs(500) },
    );
  });

  it('random bytes never crash the file reader', async () => {
    const withBom = (bom: number[]) => fc.uint8Array({ maxLength: 2000 }).map((b) => new Uint8Array([...bom, ...b]));
    const bytes = fc.oneof(
      fc.uint8Array({ maxLength: 3000 }),
      csvish.map((s) => new TextEncoder().encode(s)),
      withBom([0xff, 0xfe]),
      withBom([0xfe, 0xff]),
      withBom([0xef, 0xbb, 0xbf]),
    );
    await fc.assert(
      fc.asyncProperty(bytes, fc.constantFrom<'auto' | 'csv-parse'>('auto', 'csv-parse'), async (b, engine) => {
        const path = scratchFile(b);
        await neverCrashesAsync(() =>
          aggregateFileMany(path, [{ kind: 'crosstab', rowColumn: '1', columnColumn: '2' }, { kind: 'numeric', column: '1' }], { dialect: { header: false } }, { engine, chunkSize: 16 }),
        );
      }),
      { seed: 20261203, numRuns: runs(200) },
    );
  });

  it('the byte scanner and csv-parse agree on random plain CSV files (counts, moments, drops, errors)', async () => {
    const field = fc.oneof(
      fc.constantFrom('A', 'B', ' c ', 'NA', '', '-', 'b', 'A ', '"A"', '"x, y"', '"q""r"', 'é', '#'),
      fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }).map((x) => String(x)),
      fc.integer({ min: -5, max: 30 }).map(String),
      fc.constantFrom('1e3', '2.50', '.5', '7.', '1,5', 'x1', '-0', '-', '+3', ' 4 ', '12345678901234567890', '0.1234567890123456789', '"2,5"'),
    );
    const record = fc.array(field, { minLength: 3, maxLength: 3 });
    const file = fc.record({
      records: fc.array(fc.oneof({ weight: 12, arbitrary: record }, { weight: 1, arbitrary: fc.constantFrom(['']) }, { weight: 1, arbitrary: fc.constantFrom(['# note']) }), { maxLength: 30 }),
      crlf: fc.boolean(),
      lastNewline: fc.boolean(),
      delimiter: fc.constantFrom(',', ';', '\t'),
      decimal: fc.constantFrom<'.' | ','>('.', ','),
      givenLevels: fc.boolean(),
    });
    await fc.assert(
      fc.asyncProperty(file, fc.integer({ min: 4, max: 40 }), async (f, chunkSize) => {
        const nl = f.crlf ? '\r\n' : '\n';
        const body = ['g,h,x'.replace(/,/g, f.delimiter), ...f.records.map((r) => r.join(f.delimiter))].join(nl) + (f.lastNewline ? nl : '');
        const path = scratchFile(body);
        const requests: AggregateRequest[] = [
          { kind: 'crosstab', rowColumn: 'g', columnColumn: 'h' },
          { kind: 'numeric', column: 'x' },
          { kind: 'categories', column: 'g', weight: 'x' },
        ];
        const levels = f.givenLevels ? { levels: ['A', 'b', 'c'], rowLevels: ['A', 'b', 'c'], columnLevels: ['A', 'B', 'c', 'é'] } : undefined;
        const options = { dialect: { delimiter: f.delimiter as ',' | ';' | '\t', header: true, decimal: f.decimal }, ...(levels ? { categories: levels } : {}) };
        for (const request of requests) {
          const scanned = await neverCrashesAsync(() => aggregateFile(path, request, options, { chunkSize }).then(({ reader: _, ...a }) => a));
          const parsed = await neverCrashesAsync(() => aggregateFile(path, request, options, { chunkSize, engine: 'csv-parse' }).then(({ reader: _, ...a }) => a));
          assert.equal(scanned, parsed, `file:\n${JSON.stringify(body)}\nrequest ${JSON.stringify(request)}`);
        }
        // All at once, with one column read both as categories and as numbers.
        const all = [...requests, { kind: 'categories', column: 'x' } as const];
        const scannedAll = await neverCrashesAsync(() => aggregateFileMany(path, all, options, { chunkSize }).then((r) => r.aggregates));
        const parsedAll = await neverCrashesAsync(() => aggregateFileMany(path, all, options, { chunkSize, engine: 'csv-parse' }).then((r) => r.aggregates));
        assert.equal(scannedAll, parsedAll, `file:\n${JSON.stringify(body)}\nall requests`);
      }),
      { numRuns: 300 },
    );
  });

  it('numbers read from bytes equal Number(text) exactly', () => {
    const numberText = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => String(x)),
      fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e9, max: 1e9 }), fc.integer({ min: 0, max: 12 })).map(([x, k]) => x.toFixed(k)),
      fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 20 })).map(([x, k]) => x.toExponential(k)),
      fc.array(fc.constantFrom(...'0123456789'), { minLength: 1, maxLength: 22 }).map((d) => d.join('')),
      fc.array(fc.constantFrom(...'0123456789.eE+-'), { minLength: 1, maxLength: 12 }).map((d) => d.join('')),
    );
    fc.assert(
      fc.property(numberText, (text) => {
        const bytes = new TextEncoder().encode(text);
        const fast = parseNumberBytes(bytes, 0, bytes.length, 46);
        if (!Number.isNaN(fast)) assert.ok(Object.is(fast, Number(text)), `${text}: bytes ${fast}, Number ${Number(text)}`);
      }),
      { numRuns: 5000 },
    );
  });
});
