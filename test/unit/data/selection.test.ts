// Editor selections and notebook outputs. The notebook renderings are pandas' own
// (test/fixtures/pandas/notebook.json, written by scripts/fixtures/pandas_crosstab.py).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError, isInstance } from '../../../src/errors';
import { aggregateRecords } from '../../../src/data/aggregate';
import type { Records } from '../../../src/data/records';
import { parseNotebookOutput, parseSelection, type Selection } from '../../../src/data/selection';
import { throwsInput } from './expect';

const SHA_OF_RECORD = 'b41c2caad604cad6aaeccd84f0aa87d69cb50ed85796839f912a41b7f244c1c2';

function records(s: Selection): Records {
  assert.equal(s.kind, 'records');
  return (s as { records: Records }).records;
}

describe('data: selections', () => {
  describe('delimited ranges', () => {
    it('reads a CSV range with its header', () => {
      const s = parseSelection('shift,oven\nearly,A\nlate,B\n', { firstLine: 12 });
      assert.equal(s.format, 'csv');
      assert.deepEqual(records(s).columns, ['shift', 'oven']);
      assert.deepEqual(records(s).lines, [13, 14]);
    });
    it('reads a TSV range without its header as numbered columns', () => {
      const s = parseSelection('early\t3\nlate\t5\n');
      assert.equal(s.format, 'tsv');
      assert.deepEqual(records(s).columns, ['1', '2']);
    });
    it('refuses ragged rows of a partial selection, naming the document line', () => {
      throwsInput(
        () => parseSelection('early,A,3\nlate,B\n', { firstLine: 40, file: 'shifts.csv', header: false }),
        'shifts.csv, line 41: expected 3 fields (as on line 40), found 2; a record with another number of fields would shift the columns',
        'ragged-row',
      );
    });
    it('refuses an empty selection', () => {
      throwsInput(() => parseSelection('  \n', { firstLine: 3 }), 'line 3: the selection is empty; expected a table, a range of delimited lines or a JSON block', 'empty-input');
    });
  });

  describe('markdown tables', () => {
    const TABLE = `| shift | oven A | oven B |
|:------|-------:|-------:|
| early | 1,204 | 17 |
| late  | **12** | \`3\` |
`;
    it('reads header, alignment row and cells, with thousands separators in counts', () => {
      const s = parseSelection(TABLE, { firstLine: 5 });
      assert.equal(s.format, 'markdown');
      const r = records(s);
      assert.deepEqual(r.columns, ['shift', 'oven A', 'oven B']);
      assert.deepEqual(r.lines, [7, 8]);
      const a = aggregateRecords(r, { kind: 'counted-table' });
      assert.deepEqual(a.kind === 'table' && a.table.counts, [[1204, 17], [12, 3]]);
    });
    it('keeps an escaped pipe inside a cell', () => {
      assert.deepEqual(records(parseSelection('| a | b |\n|---|---|\n| x \\| y | 1 |\n')).rows, [['x | y', '1']]);
    });
    it('reads rows selected without the header', () => {
      const r = records(parseSelection('| early | 4 |\n| late | 5 |\n'));
      assert.deepEqual(r.columns, ['1', '2']);
      assert.equal(r.rows.length, 2);
    });
    it('refuses a ragged row, naming its line and asking for whole rows', () => {
      throwsInput(
        () => parseSelection('| a | b |\n|---|---|\n| 1 | 2 |\n| 3 |\n', { file: 'report.md', firstLine: 20 }),
        'report.md, line 23: expected 2 fields (as in the header row on line 20; select whole rows of the table), found 1; a record with another number of fields would shift the columns',
        'ragged-row',
      );
    });
  });

  describe('JSON blocks', () => {
    it('reads {"table": …} with labels', () => {
      const s = parseSelection('{"table": [[3, 1], [1, 3]], "rowLabels": ["milk first", "tea first"], "columnLabels": ["said milk", "said tea"]}');
      assert.deepEqual(s.kind === 'table' && s.table, { rowLabels: ['milk first', 'tea first'], columnLabels: ['said milk', 'said tea'], counts: [[3, 1], [1, 3]] });
    });
    it('reads {"observed": …} as an array with labels, or an object, with proportions keyed by category', () => {
      const a = parseSelection('{"observed": [315, 108], "labels": ["round", "wrinkled"], "ratios": [3, 1]}');
      assert.deepEqual(a.kind === 'observed' && [a.counts, a.ratios], [{ labels: ['round', 'wrinkled'], counts: [315, 108] }, [3, 1]]);
      const b = parseSelection('{"observed": {"red": 5, "blue": 7}, "proportions": {"blue": 0.5, "red": 0.5}}');
      assert.deepEqual(b.kind === 'observed' && [b.counts.labels, b.proportions], [['red', 'blue'], [0.5, 0.5]]);
    });
    it('reads {"values": …}, dropping nulls', () => {
      const s = parseSelection('{"values": [499.5, null, 500.25]}');
      assert.deepEqual(s.kind === 'values' && [s.values, s.dropped], [[499.5, 500.25], 1]);
    });
    it('gives records the SHA-256 of the selected text', () => {
      // sha256 of the 12 bytes `[{"a": "x"}]` (coreutils sha256sum).
      const r = records(parseSelection('[{"a": "x"}]'));
      assert.equal(r.sha256, SHA_OF_RECORD);
    });
    it('reads an array of records, with null as missing', () => {
      const r = records(parseSelection('[{"oven": "A", "grams": 512}, {"oven": "B", "grams": null}, {"oven": "A"}]'));
      assert.deepEqual(r.columns, ['oven', 'grams']);
      assert.deepEqual(r.rows, [['A', '512'], ['B', ''], ['A', '']]);
      assert.equal(r.unit, 'record');
    });
    it('reads an array of arrays: numbers only as a table, a string first row as a header', () => {
      const t = parseSelection('[[1, 2], [3, 4]]');
      assert.deepEqual(t.kind === 'table' && t.table.counts, [[1, 2], [3, 4]]);
      const r = records(parseSelection('[["oven", "grams"], ["A", 512]]'));
      assert.deepEqual([r.columns, r.rows], [['oven', 'grams'], [['A', '512']]]);
    });
    it('refuses JSON that does not parse, naming the line and column', () => {
      // Hand-counted: the selection starts on line 10; `4` is on its third line, 7th character.
      throwsInput(
        () => parseSelection('{\n "table": [[1, 2],\n   [3 4]]\n}', { firstLine: 10 }),
        'line 12, column 7: the JSON does not parse (expected `,` or `]`, found `4`); expected valid JSON',
        'bad-json',
      );
    });
    it('names the line and column even where the engine\'s own message has no position (a trailing comma)', () => {
      // Node 20's JSON.parse says only: Unexpected token ']', "…" is not valid JSON. Hand-counted: `]` is on
      // the selection's second line (line 5 + 1), 9th character (two spaces, then `[1, 2,`).
      let caught: unknown;
      try {
        parseSelection('{"values":\n  [1, 2,]}', { firstLine: 5 });
      } catch (e) {
        caught = e;
      }
      assert.ok(isInstance(caught, InputError), String(caught));
      assert.equal(caught.message, 'line 6, column 9: the JSON does not parse (expected a value, found `]`); expected valid JSON');
      assert.deepEqual([caught.code, caught.location.line, caught.location.column], ['bad-json', 6, '9']);
    });
    it('refuses bad counts, ragged rows and wrong lengths by JSON path', () => {
      throwsInput(() => parseSelection('{"table": [[1, 2.5]]}'), '$.table[0][1]: expected a whole number, found `2.5`; count tests need frequency weights (how many times each record occurred)', 'non-integer-weight');
      throwsInput(() => parseSelection('{"table": [[1, -2]]}'), '$.table[0][1]: expected a count (a non-negative whole number), found `-2`', 'bad-count');
      throwsInput(() => parseSelection('{"table": [[1, 2], [3]]}'), '$.table[1]: expected 2 counts (as in the first row), found 1', 'ragged-row');
      throwsInput(() => parseSelection('{"table": [[1, 2]], "columnLabels": ["a"]}'), '$.columnLabels: expected 2 labels, found 1', 'bad-labels');
      throwsInput(() => parseSelection('{"observed": [1, "x"]}'), '$.observed[1]: expected a count (a non-negative whole number), found the string "x"', 'bad-count');
      throwsInput(() => parseSelection('{"observed": {"a": 1}, "proportions": {"b": 1}}'), '$.proportions.b: found the category `b`, which is not among the observed categories', 'unknown-category');
      throwsInput(() => parseSelection('{"observed": [1, 2], "expected": [1]}'), '$.expected: expected 2 numbers (one per category), found 1', 'length-mismatch');
      throwsInput(() => parseSelection('{"values": [1, "2"]}'), '$.values[1]: expected a number, found the string "2"', 'not-a-number');
      throwsInput(() => parseSelection('[{"a": {"b": 1}}]'), '$[0].a: expected a string, number or null, found an object', 'bad-record');
      throwsInput(() => parseSelection('{"rows": []}'), '$: expected an object with "table", "observed" or "values", an array of records or an array of arrays; found an object with keys "rows"', 'bad-json-shape');
    });
    it('names the record and column of a bad value in an array of records', () => {
      const r = records(parseSelection('[{"oven": "A", "n": 1}, {"oven": "B", "n": "lots"}]'));
      throwsInput(
        () => aggregateRecords(r, { kind: 'categories', column: 'oven', weight: 'n' }),
        'record 2, column `n`: expected a frequency weight (a non-negative whole number), found `lots`',
        'bad-count',
      );
    });
  });

  describe('notebook outputs (pandas renderings)', () => {
    const nb = JSON.parse(readFileSync(join(__dirname, '..', '..', 'fixtures', 'pandas', 'notebook.json'), 'utf8'));
    const version = `pandas ${nb.versions.pandas}`;

    function expectFrame(r: Records, expected: { indexNames: string[]; columns: string[]; rows: string[][] }): void {
      const depth = expected.indexNames.length;
      assert.equal(r.indexColumns, depth);
      assert.deepEqual(r.columns.slice(depth), expected.columns);
      assert.deepEqual(
        r.columns.slice(0, depth),
        expected.indexNames.map((n, j) => n || (depth > 1 ? `index ${j + 1}` : 'index')),
      );
      // pandas shows floats with a fixed number of decimals ("512.50"): numbers compare as numbers.
      const same = (got: string, want: string) => (want !== '' && !Number.isNaN(Number(want)) ? Number(got) === Number(want) : got === want);
      assert.equal(r.rows.length, expected.rows.length);
      r.rows.forEach((row, i) => row.forEach((cell, j) => assert.ok(same(cell, expected.rows[i][j]), `row ${i + 1} cell ${j + 1}: expected ${expected.rows[i][j]}, got ${cell}`)));
    }

    it(`reads a crosstab's HTML with its index and column names (${version})`, () => {
      const r = records(parseNotebookOutput('text/html', nb.crosstabHtml));
      expectFrame(r, nb.crosstab);
      const a = aggregateRecords(r, { kind: 'counted-table' });
      assert.deepEqual(a.kind === 'table' && a.table.rowLabels, ['early', 'late', 'night']);
    });
    it(`reads a data frame's HTML with its default index, as lines of a notebook file (${version})`, () => {
      const lines = (nb.frameHtml as string).split(/(?<=\n)/);
      expectFrame(records(parseNotebookOutput('text/html', lines)), nb.frame);
    });
    it(`flattens multi-level column headers, or refuses them on request (${version})`, () => {
      expectFrame(records(parseNotebookOutput('text/html', nb.multiColumnHtml)), nb.multiColumn);
      throwsInput(
        () => parseNotebookOutput('text/html', nb.multiColumnHtml, { multiLevelHeaders: 'refuse' }),
        'the table has 2 levels of column headers; expected one (flatten the columns first)',
        'multi-level-header',
      );
    });
    it(`repeats a multi-level index spanning rows (${version})`, () => {
      expectFrame(records(parseNotebookOutput('text/html', nb.multiRowHtml)), nb.multiRow);
    });
    it(`reads text/csv and application/json outputs (${version})`, () => {
      const csv = records(parseNotebookOutput('text/csv', nb.crosstabCsv));
      assert.deepEqual(csv.rows, nb.crosstab.rows);
      const json = records(parseNotebookOutput('application/json', JSON.parse(nb.frameJsonRecords)));
      assert.deepEqual(json.columns, ['oven', 'grams']);
      assert.deepEqual(json.rows[2], ['A & C', '505.25']);
    });
    it('refuses a truncated table and an unknown output type', () => {
      const html = '<table><thead><tr><th></th><th>a</th></tr></thead><tbody><tr><th>0</th><td>1</td></tr><tr><th>...</th><td>...</td></tr></tbody></table>';
      throwsInput(
        () => parseNotebookOutput('text/html', html),
        'row 2: the table is shown truncated (a `...` cell); expected the full table (display it without truncation)',
        'truncated-table',
      );
      throwsInput(() => parseNotebookOutput('image/png', 'iVBOR'), 'found an output of type `image/png`; expected text/csv, application/json, text/html, text/markdown or text/plain', 'unsupported-output');
      throwsInput(() => parseNotebookOutput('text/html', '<p>no table</p>'), 'found no `<table>`; expected an HTML table', 'no-table');
    });
    it('decodes entities and ignores style blocks', () => {
      const r = records(parseNotebookOutput('text/html', '<style>td{}</style><table><tr><th>oven</th><th>n</th></tr><tr><td>A &amp; B&#39;s</td><td>4</td></tr></table>'));
      assert.deepEqual([r.columns, r.rows], [['oven', 'n'], [["A & B's", '4']]]);
    });
  });
});
