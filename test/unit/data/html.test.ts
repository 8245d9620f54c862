// The notebook HTML table reader on outputs that broke the earlier hand-written tokenizer: character
// references, `>` inside attribute values, end tags HTML lets a writer omit, and polars' column-type row
// and quoted text values. Fixtures: test/fixtures/html/ (see its README for where each shape comes from).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseHtmlTable } from '../../../src/data/html';

const fixture = (name: string) => readFileSync(join(__dirname, '../../fixtures/html', name), 'utf8');

describe('data: notebook HTML tables', () => {
  it('decodes named and numeric character references (é, –, −, &, non-breaking space, <)', () => {
    const t = parseHtmlTable(fixture('entities.html'));
    assert.deepEqual(t.columns, ['café', 'range', 'change']);
    // HTML named character references: eacute U+00E9, ndash U+2013, minus U+2212, nbsp U+00A0 (folded to a plain space with the other whitespace).
    assert.deepEqual(t.rows, [
      ['Crème brûlée', '10\u201320', '\u22123'],
      ['Fish & chips', '5\u20139', '\u22121'],
      ['naïve tart', '<5', '0'],
    ]);
  });

  it('reads attribute values holding `>` without cutting the tag', () => {
    const t = parseHtmlTable(fixture('attribute-with-gt.html'));
    assert.deepEqual(t.columns, ['shift', 'outcome']);
    assert.deepEqual(t.rows, [
      ['day', 'pass'],
      ['night', 'fail'],
    ]);
  });

  it('closes cells, rows and sections whose end tags are omitted, keeping the last cell', () => {
    const t = parseHtmlTable(fixture('omitted-end-tags.html'));
    assert.deepEqual(t.columns, ['shift', 'outcome', 'count']);
    assert.deepEqual(t.rows, [
      ['day', 'pass', '12'],
      ['day', 'fail', '3'],
      ['night', 'pass', '9'],
      ['night', 'fail', '6'],
    ]);
  });

  it("drops polars' column-type row and unquotes its text values (text columns only)", () => {
    const records = parseHtmlTable(fixture('polars-frame.html'));
    assert.deepEqual(records.columns, ['oven', 'defect', 'trays']);
    assert.deepEqual(records.rows, [
      ['left', 'burnt', '3'],
      ['left', 'none', '41'],
      ['right', 'burnt', '7'],
      ['right', 'say "hi"', '2'],
      ['null', 'none', '38'],
    ]);
  });

  it('keeps a second header row that is not a type row, and quotes in a table without one', () => {
    const html = '<table><thead><tr><th>a</th><th>b</th></tr><tr><td>str</td><td>north</td></tr></thead><tbody><tr><td>"x"</td><td>1</td></tr></tbody></table>';
    const t = parseHtmlTable(html);
    assert.deepEqual(t.columns, ['a / str', 'b / north']);
    assert.deepEqual(t.rows, [['"x"', '1']]);
  });
});
