// Excel workbooks: test/fixtures/xlsx/kilns.xlsx is written by openpyxl and counted by pandas.read_excel
// (scripts/fixtures/xlsx_fixtures.py; versions in kilns.json). Counts must agree exactly; variances within
// 1e-12 relative (pandas' var(ddof=1) against our compensated moments).
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { aggregateFileSource, fileReaderFor } from '../../../src/data/readers';
import type { Aggregate, CountTable } from '../../../src/data/types';
import { aggregateWorkbook, isDateFormat, previewWorkbook, serialToIso, sheetReference, workbookSheets } from '../../../src/data/xlsx';
import { runSpec } from '../../../src/savedtest/run';
import { sampleVariance } from '../../../src/stats/moments';
import { assertClose } from '../tolerance';
import { rejectsInput } from './expect';

const dir = join(__dirname, '..', '..', 'fixtures', 'xlsx');
const kilns = join(dir, 'kilns.xlsx');
const ref = JSON.parse(readFileSync(join(dir, 'kilns.json'), 'utf8'));
const scratch = mkdtempSync(join(tmpdir(), 'countercheck-xlsx-'));

interface RefTable {
  rows: string[];
  columns: string[];
  counts: number[][];
}

/** Our table, reordered to pandas' (sorted) label order, must equal pandas' counts exactly. */
function assertSameTable(got: CountTable, want: RefTable, what: string): void {
  assert.deepEqual([...got.rowLabels].sort(), [...want.rows].sort(), `${what}: row labels`);
  assert.deepEqual([...got.columnLabels].sort(), [...want.columns].sort(), `${what}: column labels`);
  want.rows.forEach((r, i) =>
    want.columns.forEach((c, j) => assert.equal(got.counts[got.rowLabels.indexOf(r)][got.columnLabels.indexOf(c)], want.counts[i][j], `${what}: ${r} × ${c}`)),
  );
}

function table(a: Aggregate): CountTable {
  assert.equal(a.kind, 'table');
  return (a as Extract<Aggregate, { kind: 'table' }>).table;
}

function categories(a: Aggregate): Record<string, number> {
  assert.equal(a.kind, 'categories');
  const c = (a as Extract<Aggregate, { kind: 'categories' }>).counts;
  return Object.fromEntries(c.labels.map((l, k) => [l, c.counts[k]]));
}

function moments(a: Aggregate) {
  assert.equal(a.kind, 'moments');
  return (a as Extract<Aggregate, { kind: 'moments' }>).moments;
}

describe('xlsx reader against openpyxl + pandas (test/fixtures/xlsx)', () => {
  it('lists the sheets in workbook order', async () => {
    assert.deepEqual((await workbookSheets(kilns)).map((s) => s.name), ['Line 2', 'Merged', 'NoCache', 'Empty', 'Firings']);
  });

  it('reads a range of a sheet: shared strings, booleans, dates, numbers and cached formula values agree with pandas', async () => {
    const { aggregates, notices } = await aggregateWorkbook(
      kilns,
      [
        { kind: 'crosstab', rowColumn: 'kiln', columnColumn: 'glaze' },
        { kind: 'crosstab', rowColumn: 'cracked', columnColumn: 'kiln' },
        { kind: 'categories', column: 'fired_on' },
        { kind: 'categories', column: 'kiln' },
        { kind: 'numeric', column: 'weight_g' },
        { kind: 'numeric', column: 'weight_kg' },
      ],
      { sheet: 'Line 2', range: 'B2:H302', file: 'kilns.xlsx' },
    );
    const line2 = ref.line2;
    assertSameTable(table(aggregates[0]), line2.kiln_by_glaze, 'kiln × glaze');
    assertSameTable(table(aggregates[1]), line2.cracked_by_kiln, 'cracked × kiln');
    assert.deepEqual(categories(aggregates[2]), line2.fired_on);
    assert.deepEqual(categories(aggregates[3]), line2.kiln);
    assert.equal(aggregates[3].provenance.rows, line2.rows);
    assert.equal(aggregates[3].provenance.dropped, line2.kiln_missing);
    const g = moments(aggregates[4]);
    assert.equal(g.n, line2.weight_g.n);
    assertClose(sampleVariance(g), line2.weight_g.variance, { rel: 1e-12 }, 'variance of weight_g (pandas var, ddof=1)');
    assertClose(g.mean, line2.weight_g.mean, { rel: 1e-12 }, 'mean of weight_g');
    const kg = moments(aggregates[5]);
    assert.equal(kg.n, line2.weight_kg.n);
    assertClose(sampleVariance(kg), line2.weight_kg.variance, { rel: 1e-12 }, 'variance of weight_kg (cached formula values)');
    // The formula cells whose input is empty were saved without a value: pandas reads NaN, we say so.
    assert.equal(notices.length, 1);
    assert.equal(notices[0].code, 'formula-without-value');
    assert.match(notices[0].message, /^5 formula cells have no stored value \('Line 2'!H\d+, /);
    assert.equal(aggregates[0].provenance.description, "kilns.xlsx 'Line 2'!B2:H302");
  });

  it('counts a row whose used cell is empty as a dropped record, as pandas has it as NaN, whichever columns are read', async () => {
    const { aggregates } = await aggregateWorkbook(kilns, [{ kind: 'categories', column: 'kiln' }], { sheet: 'Line 2', range: 'B2:H302' });
    assert.equal(aggregates[0].provenance.rows, ref.line2.rows);
    assert.equal(aggregates[0].provenance.dropped, ref.line2.kiln_missing);
  });

  it('reads a defined name and a table like the range they stand for', async () => {
    const byName = await aggregateWorkbook(kilns, [{ kind: 'crosstab', rowColumn: 'kiln', columnColumn: 'glaze' }], { range: 'Inspections' });
    assertSameTable(table(byName.aggregates[0]), ref.line2.kiln_by_glaze, 'defined name Inspections');
    const byTable = await aggregateWorkbook(kilns, [{ kind: 'crosstab', rowColumn: 'kiln', columnColumn: 'cone' }, { kind: 'numeric', column: 'hours' }], { range: 'Firings' });
    assertSameTable(table(byTable.aggregates[0]), ref.firings.kiln_by_cone, 'table Firings');
    assertClose(sampleVariance(moments(byTable.aggregates[1])), ref.firings.hours_variance, { rel: 1e-12 }, 'variance of hours');
  });

  it('flattens a merged header cell into numbered names and says so (pandas calls the second one "Unnamed: 1")', async () => {
    const { aggregates, notices } = await aggregateWorkbook(kilns, [{ kind: 'categories', column: 'Defects' }, { kind: 'categories', column: 'Defects (2)' }], { sheet: 'Merged' });
    assert.deepEqual(ref.merged.columns_pandas, ['Defects', 'Unnamed: 1', 'kiln']);
    assert.deepEqual(categories(aggregates[0]), ref.merged.first);
    assert.deepEqual(categories(aggregates[1]), ref.merged.second);
    assert.deepEqual(notices.map((n) => n.code), ['merged-header-flattened']);
    assert.equal(notices[0].message, 'The header cells Merged!A1:B1 are merged under "Defects"; the columns they cover are named `Defects`, `Defects (2)`.');
  });

  it('reads formulas without a cached value as missing, with a notice naming the cells', async () => {
    const { aggregates, notices } = await aggregateWorkbook(kilns, [{ kind: 'categories', column: 'kiln' }, { kind: 'numeric', column: 'load' }], { sheet: 'NoCache' });
    assert.equal(ref.nocache.load_non_missing, 0);
    assert.equal(moments(aggregates[1]).n, 0);
    assert.equal(aggregates[1].provenance.dropped, ref.nocache.rows);
    assert.equal(notices[0].code, 'formula-without-value');
    assert.match(notices[0].message, /^10 formula cells have no stored value \(NoCache!B2, NoCache!B3, NoCache!B4, NoCache!B5, NoCache!B6, …\)/);
  });

  it('is reached through the reader table, with the sheet and range in the options (the spec source)', async () => {
    const a = await aggregateFileSource(kilns, { kind: 'crosstab', rowColumn: 'kiln', columnColumn: 'glaze' }, { sheet: 'Line 2', range: 'B2:H302', file: 'kilns.xlsx' }, {});
    assert.equal(fileReaderFor(kilns).name, 'Excel workbook');
    assertSameTable(table(a), ref.line2.kiln_by_glaze, 'through the reader table');
  });

  it('fingerprints the file together with the sheet and range read', async () => {
    const request = { kind: 'categories', column: 'kiln' } as const;
    const a = await aggregateFileSource(kilns, request, { sheet: 'Line 2', range: 'B2:H302' }, {});
    const b = await aggregateFileSource(kilns, request, { range: 'Inspections' }, {});
    const c = await aggregateFileSource(kilns, request, { sheet: 'Line 2', range: 'B2:H100' }, {});
    assert.match(a.provenance.sha256, /^[0-9a-f]{64}$/);
    assert.notEqual(a.provenance.sha256, c.provenance.sha256, 'another range is another fingerprint');
    assert.notEqual(a.provenance.sha256, b.provenance.sha256, 'the defined name is part of what was read');
  });

  it('reports progress up to the whole sheet and stops when cancelled', async () => {
    const seen: { bytesRead: number; totalBytes: number; rows: number }[] = [];
    await aggregateWorkbook(kilns, [{ kind: 'categories', column: 'kiln' }], { sheet: 'Line 2', range: 'B2:H302' }, { onProgress: (p) => seen.push(p) });
    const last = seen[seen.length - 1];
    assert.equal(last.bytesRead, last.totalBytes);
    assert.equal(last.rows, ref.line2.rows, 'every row of the table is a record, whichever columns are read');
    const controller = new AbortController();
    controller.abort(new Error('stop'));
    await assert.rejects(() => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'kiln' }], { sheet: 'Line 2' }, { signal: controller.signal }), /stop/);
  });

  it('previews a sheet as text records for the editor', async () => {
    const { records, complete } = await previewWorkbook(kilns, { sheet: 'Line 2', range: 'B2:H302' }, 5);
    assert.deepEqual(records.columns, ['batch', 'kiln', 'glaze', 'cracked', 'fired_on', 'weight_g', 'weight_kg']);
    assert.equal(records.rows.length, 5);
    assert.equal(complete, false);
    assert.deepEqual(records.lines, [3, 4, 5, 6, 7]);
  });

  describe('refusals name the sheet and cell', () => {
    it('an empty sheet', () =>
      rejectsInput(() => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'x' }], { sheet: 'Empty', file: 'kilns.xlsx' }), 'kilns.xlsx: the sheet Empty has no cells; expected a header row and rows of data', 'empty-sheet'));

    it('no sheet named in a workbook of several', () =>
      rejectsInput(
        () => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'x' }], { file: 'kilns.xlsx' }),
        'kilns.xlsx: the workbook has 5 sheets (`Line 2`, `Merged`, `NoCache`, `Empty`, `Firings`); name one with "sheet"',
        'sheet-needed',
      ));

    it('a sheet that is not there', () =>
      rejectsInput(() => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'x' }], { sheet: 'Line 3', file: 'kilns.xlsx' }), 'kilns.xlsx: found no sheet `Line 3`; the sheets are `Line 2`, `Merged`, `NoCache`, `Empty`, `Firings`', 'unknown-sheet'));

    it('text where a number is expected, with the cell address', () =>
      rejectsInput(
        () => aggregateWorkbook(kilns, [{ kind: 'numeric', column: 'glaze' }], { sheet: 'Line 2', range: 'B2:H302', file: 'kilns.xlsx' }),
        "kilns.xlsx, 'Line 2'!D3, column `glaze`: expected a number, found `celadon`",
        'not-a-number',
      ));

    it('a date where a number is expected', () =>
      rejectsInput(
        () => aggregateWorkbook(kilns, [{ kind: 'numeric', column: 'fired_on' }], { sheet: 'Line 2', range: 'B2:H302', file: 'kilns.xlsx' }),
        "kilns.xlsx, 'Line 2'!F3, column `fired_on`: expected a number, found a date (2026-03-03)",
        'not-a-number',
      ));

    it('a range that is neither cells nor a name', () =>
      rejectsInput(
        () => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'x' }], { sheet: 'Line 2', range: 'Nowhere', file: 'kilns.xlsx' }),
        'kilns.xlsx: "range" "Nowhere" is neither a cell range like B2:F40 nor a defined name or table of this workbook',
        'unknown-range',
      ));

    it('a range whose first row is empty (the header must be there)', () =>
      rejectsInput(
        () => aggregateWorkbook(kilns, [{ kind: 'categories', column: 'kiln' }], { sheet: 'Line 2', range: 'B1:H302', file: 'kilns.xlsx' }),
        "kilns.xlsx: 'Line 2'!B1:H302: the first row of the range (row 1) is empty; expected the column names there (the first cells are in row 2)",
        'no-header',
      ));

    it('a password-protected workbook (its compound-file container)', () =>
      rejectsInput(
        () => aggregateWorkbook(join(dir, 'locked.xlsx'), [{ kind: 'categories', column: 'x' }], { file: 'locked.xlsx' }),
        'locked.xlsx: the workbook is password-protected (encrypted), or in the old binary .xls format; expected an unencrypted .xlsx workbook (open it, remove the password or save as .xlsx, and try again)',
        'encrypted-workbook',
      ));

    it('a workbook cut short', () =>
      rejectsInput(
        () => aggregateWorkbook(join(dir, 'truncated.xlsx'), [{ kind: 'categories', column: 'x' }], { file: 'truncated.xlsx' }),
        'truncated.xlsx: the workbook is damaged: found no zip directory at its end (the file is cut short, or is not a zip package); expected a complete .xlsx file',
        'corrupt-workbook',
      ));

    it('a workbook whose sheet data is damaged inside (bytes overwritten)', async () => {
      const bytes = new Uint8Array(readFileSync(kilns));
      // The sheet part is the first entry openpyxl writes after the document properties; overwrite the middle of the file.
      for (let k = Math.floor(bytes.length * 0.3); k < Math.floor(bytes.length * 0.3) + 400; k++) bytes[k] = 0x55;
      const path = join(scratch, 'damaged.xlsx');
      writeFileSync(path, bytes);
      await assert.rejects(
        () => aggregateWorkbook(path, [{ kind: 'categories', column: 'kiln' }], { sheet: 'Line 2', range: 'B2:H302', file: 'damaged.xlsx' }),
        (e: Error & { code?: string }) => {
          assert.equal(e.name, 'InputError');
          assert.match(e.message, /^damaged\.xlsx: the workbook is damaged: the part xl\/\S+ does not inflate/);
          return true;
        },
      );
    });

    it('a file that is not a workbook at all', async () => {
      const path = join(scratch, 'notes.xlsx');
      writeFileSync(path, 'kiln,glaze\nNorth,shino\n');
      await rejectsInput(() => aggregateWorkbook(path, [{ kind: 'categories', column: 'kiln' }], { file: 'notes.xlsx' }), 'notes.xlsx: this is not an .xlsx workbook (it does not start as a zip package); expected an Excel workbook saved as .xlsx', 'not-a-workbook');
    });
  });

  describe('pieces', () => {
    it('date formats (ECMA-376 built-ins are tested through the fixture; custom codes here)', () => {
      for (const code of ['yyyy-mm-dd', 'd/m/yy h:mm', '[$-409]mmmm d, yyyy', 'hh:mm:ss']) assert.equal(isDateFormat(code), true, code);
      for (const code of ['General', '0.00', '#,##0 "days"', '0.0%', '[Red]0.00', '_(* #,##0_)']) assert.equal(isDateFormat(code), false, code);
    });

    it('serial dates: 1900 system with its phantom 29 February, and the 1904 system (from memory: serial 1 is 1900-01-01, 61 is 1900-03-01, 1904 starts at 0; 45000.5 checked with Python datetime(1899,12,30)+timedelta)', () => {
      assert.equal(serialToIso(1, false), '1900-01-01');
      assert.equal(serialToIso(59, false), '1900-02-28');
      assert.equal(serialToIso(61, false), '1900-03-01');
      assert.equal(serialToIso(45000.5, false), '2023-03-15T12:00:00');
      assert.equal(serialToIso(0, true), '1904-01-01');
    });

    it('quotes sheet names as formulas do', () => {
      assert.equal(sheetReference('Line 2'), "'Line 2'");
      assert.equal(sheetReference("Bob's"), "'Bob''s'");
      assert.equal(sheetReference('Sheet1'), 'Sheet1');
      assert.equal(sheetReference('AB12'), "'AB12'", 'a name that reads as a cell address is quoted');
      assert.equal(sheetReference('Kilns'), 'Kilns');
    });
  });
});

describe('saved tests on a workbook (runSpec)', () => {
  it('reads sheet and range from the source, and the reader notices join the result notices', async () => {
    const run = await runSpec(
      { version: 1, test: 'independence', source: { path: 'kilns.xlsx', sheet: 'Merged', columns: ['Defects', 'Defects (2)'] } },
      { readers: { aggregateFile: (p, request, options) => aggregateFile(p, request, options) }, specPath: join(dir, 'test.countercheck.json') },
    );
    assert.equal(run.data.description, 'kilns.xlsx Merged');
    assert.equal(run.data.rows, ref.merged.rows);
    assert.ok(run.result.notices.some((n) => n.code === 'merged-header-flattened'), 'the merged-header notice is among the result notices');
  });

  it('refuses a range without a sheet in a workbook of several, at the spec level too', async () => {
    await rejectsInput(
      () => runSpec({ version: 1, test: 'goodness-of-fit', source: { path: 'kilns.xlsx', range: 'B2:H302', columns: ['kiln'] } }, { readers: { aggregateFile: (p, request, options) => aggregateFile(p, request, options) }, specPath: join(dir, 'test.countercheck.json') }),
      'kilns.xlsx: the range B2:H302 needs a sheet; name one with "sheet" (the sheets are `Line 2`, `Merged`, `NoCache`, `Empty`, `Firings`)',
      'sheet-needed',
    );
  });
});

describe('xlsx forms other writers use (hand-written parts, counted by hand)', () => {
  // A workbook as some writers save it: namespace prefixes (x:), rows and cells without "r" attributes,
  // inline strings, an error value and an ISO date cell (t="d"). Zipped with fflate (a dev dependency).
  async function workbook(cells: string): Promise<string> {
    const { strToU8, zipSync } = await import('fflate');
    const ns = 'http://schemas.openxmlformats.org';
    const path = join(scratch, `forms-${Math.random().toString(36).slice(2)}.xlsx`);
    writeFileSync(
      path,
      zipSync({
        '_rels/.rels': strToU8(`<Relationships xmlns="${ns}/package/2006/relationships"><Relationship Id="r1" Type="${ns}/officeDocument/2006/relationships/officeDocument" Target="/xl/workbook.xml"/></Relationships>`),
        'xl/workbook.xml': strToU8(`<x:workbook xmlns:x="${ns}/spreadsheetml/2006/main" xmlns:r="${ns}/officeDocument/2006/relationships"><x:sheets><x:sheet name="Log" sheetId="1" r:id="s1"/></x:sheets></x:workbook>`),
        'xl/_rels/workbook.xml.rels': strToU8(`<Relationships xmlns="${ns}/package/2006/relationships"><Relationship Id="s1" Type="${ns}/officeDocument/2006/relationships/worksheet" Target="sheets/log.xml"/></Relationships>`),
        'xl/sheets/log.xml': strToU8(`<x:worksheet xmlns:x="${ns}/spreadsheetml/2006/main"><x:sheetData>${cells}</x:sheetData></x:worksheet>`),
      }),
    );
    return path;
  }
  const inline = (s: string) => `<x:c t="inlineStr"><x:is><x:t>${s}</x:t></x:is></x:c>`;
  const row = (...cells: string[]) => `<x:row>${cells.join('')}</x:row>`;

  it('reads prefixed elements, positions without "r", inline strings and t="d" dates', async () => {
    const path = await workbook(
      row(inline('kiln'), inline('day'), inline('note')) +
        row(inline('North'), '<x:c t="d"><x:v>2026-03-04</x:v></x:c>', '<x:c t="e"><x:v>#DIV/0!</x:v></x:c>') +
        row(inline('South &amp; East'), '<x:c t="d"><x:v>2026-03-04</x:v></x:c>', inline('ok')) +
        row(inline('North'), '<x:c t="d"><x:v>2026-03-05</x:v></x:c>'),
    );
    const { aggregates } = await aggregateWorkbook(path, [{ kind: 'crosstab', rowColumn: 'kiln', columnColumn: 'day' }]);
    const t = table(aggregates[0]);
    assert.deepEqual(t.rowLabels, ['North', 'South & East']);
    assert.deepEqual(t.columnLabels, ['2026-03-04', '2026-03-05']);
    assert.deepEqual(t.counts, [[1, 1], [1, 0]]);
  });

  it('refuses an error value in a column that is used, naming the cell', async () => {
    const path = await workbook(row(inline('kiln'), inline('note')) + row(inline('North'), '<x:c t="e"><x:v>#N/A</x:v></x:c>'));
    await rejectsInput(
      () => aggregateWorkbook(path, [{ kind: 'categories', column: 'note' }], { file: 'log.xlsx' }),
      'log.xlsx: Log!B2, column `note`: the cell holds the error value #N/A (a formula that failed); expected a value',
      'error-value',
    );
  });

  it('refuses sheet XML whose row or cell is never closed, without scanning forever', async () => {
    for (const broken of [row(inline('kiln')) + '<x:row><x:c t="inlineStr"><x:is><x:t>North</x:t></x:is></x:c>', row(inline('kiln')) + '<x:row><x:c t="inlineStr"><x:is><x:t>North</x:t></x:is></x:row>']) {
      const path = await workbook(broken);
      await assert.rejects(
        () => aggregateWorkbook(path, [{ kind: 'categories', column: 'kiln' }], { file: 'log.xlsx' }),
        (e: Error & { code?: string }) => e.name === 'InputError' && e.code === 'corrupt-workbook' && /^log\.xlsx: Log, row 2: a (row|cell) of the sheet's XML is not closed/.test(e.message),
      );
    }
  });
});
