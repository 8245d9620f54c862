// Delimited text in memory. Quoting cases follow RFC 4180 §2 (the CSV format): rules 5–7 on
// double quotes, embedded delimiters, line breaks and doubled quotes.
import { strict as assert } from 'node:assert';
import { detectDialect } from '../../../src/data/dialect';
import { parseDelimited } from '../../../src/data/delimited';
import { throwsInput } from './expect';

describe('data: delimited text', () => {
  describe('RFC 4180 quoting', () => {
    it('reads fields enclosed in double quotes like unquoted ones (§2.5)', () => {
      const r = parseDelimited('a,b\n"x","y"\n');
      assert.deepEqual(r.rows, [['x', 'y']]);
    });
    it('keeps a delimiter inside a quoted field (§2.6)', () => {
      const r = parseDelimited('oven,defect\n"A, left",burnt\n');
      assert.deepEqual(r.rows, [['A, left', 'burnt']]);
    });
    it('keeps a line break inside a quoted field and gives the record its first line (§2.6)', () => {
      const r = parseDelimited('oven,note\n"B","two\nlines"\nC,one\n');
      assert.deepEqual(r.rows, [['B', 'two\nlines'], ['C', 'one']]);
      assert.deepEqual(r.lines, [2, 4]);
    });
    it('reads a doubled quote inside a quoted field as one quote (§2.7)', () => {
      const r = parseDelimited('label\n"the ""good"" tray"\n', { dialect: { header: true } });
      assert.deepEqual(r.rows, [['the "good" tray']]);
    });
    it('accepts CRLF line breaks and a last line without one (§2.1, §2.2)', () => {
      const r = parseDelimited('a,b\r\n1,2\r\n3,4');
      assert.deepEqual(r.rows, [['1', '2'], ['3', '4']]);
      assert.deepEqual(r.lines, [2, 3]);
    });
    it('keeps empty fields, quoted or not', () => {
      const r = parseDelimited('a,b,c\n,"",x\n');
      assert.deepEqual(r.rows, [['', '', 'x']]);
    });
    it('refuses a quote that is never closed, naming the line', () => {
      throwsInput(() => parseDelimited('a,b\n1,"open\n2,3\n', { file: 'log.csv' }), 'log.csv, line 2: a quoted field opens here and is still open at the end of the text; expected a closing `"`', 'unclosed-quote');
    });
    it('refuses text after a closing quote', () => {
      throwsInput(() => parseDelimited('a,b\n1,"x"y\n'), 'line 2: after a closing quote, expected a delimiter or the end of the line, found `y`', 'bad-closing-quote');
    });
    it('refuses a quote inside an unquoted field', () => {
      throwsInput(
        () => parseDelimited('a,b\n1,x"y\n'),
        'line 2: found a quote inside an unquoted field; expected the whole field in quotes with inner quotes doubled (`""`)',
        'bad-opening-quote',
      );
    });
  });

  describe('dialects', () => {
    it('detects comma, semicolon, tab and pipe', () => {
      assert.equal(detectDialect('a,b,c\n1,2,3\n').delimiter, ',');
      assert.equal(detectDialect('a;b;c\n1,5;2;3\n').delimiter, ';');
      assert.equal(detectDialect('a\tb\n1\t2\n').delimiter, '\t');
      assert.equal(detectDialect('a|b\n1|2\n').delimiter, '|');
    });
    it('prefers the delimiter that splits every line alike', () => {
      // Commas inside the numbers, semicolons between the fields.
      assert.equal(detectDialect('shift;fill\nearly;499,5\nlate;500,25\n').delimiter, ';');
    });
    it('detects a decimal comma with a semicolon delimiter', () => {
      assert.equal(detectDialect('line;ml\nA;499,5\nB;500,1\n').decimal, ',');
      assert.equal(detectDialect('line;ml\nA;499.5\nB;500.1\n').decimal, '.');
    });
    it('detects a header from numbers below it, and its absence from numbers in the first row', () => {
      assert.equal(detectDialect('oven,grams\nA,12\n').header, true);
      assert.equal(detectDialect('A,12\nB,13\n').header, false);
      assert.equal(detectDialect('early,A\nlate,A\nearly,B\n').header, false);
    });
    it('keeps what is declared', () => {
      const d = detectDialect('A,12\nB,13\n', { header: true, delimiter: ';', decimal: ',' });
      assert.deepEqual(d, { delimiter: ';', decimal: ',', header: true, comment: '#' });
    });
    it('skips a BOM, blank lines and comment lines, keeping editor line numbers', () => {
      const r = parseDelimited('\ufeff# export\nshift,oven\n\nearly,A\n# note\nlate,B\n');
      assert.deepEqual(r.columns, ['shift', 'oven']);
      assert.deepEqual(r.rows, [['early', 'A'], ['late', 'B']]);
      assert.deepEqual(r.lines, [4, 6]);
    });
    it('numbers the columns when there is no header', () => {
      const r = parseDelimited('early,A\nlate,B\n', { dialect: { header: false } });
      assert.deepEqual(r.columns, ['1', '2']);
      assert.equal(r.rows.length, 2);
    });
    it('names an empty header field by its position', () => {
      assert.deepEqual(parseDelimited(',count\nA,1\n').columns, ['1', 'count']);
    });
    it('offsets lines by the selection start', () => {
      const r = parseDelimited('a,b\n1,2\n', { firstLine: 40 });
      assert.deepEqual(r.lines, [41]);
    });
    it('records the SHA-256 of the text', () => {
      // sha256("a\n1\n") from coreutils sha256sum.
      assert.equal(parseDelimited('a\n1\n').sha256, '309b0e45a73d3fc5325e2b6ed0a01ef8b9cde6b05a5633c1f893f970d52bfddc');
    });
  });

  describe('refusals', () => {
    it('refuses a record with more fields than the header, naming the line', () => {
      throwsInput(
        () => parseDelimited('shift,oven\nearly,A\nlate,B,extra\n', { file: 'bakery.csv' }),
        'bakery.csv, line 3: expected 2 fields (as in the header on line 1), found 3; a record with another number of fields would shift the columns',
        'ragged-row',
      );
    });
    it('refuses a record with fewer fields than the first record when there is no header', () => {
      throwsInput(
        () => parseDelimited('early,A\nlate\n', { dialect: { header: false } }),
        'line 2: expected 2 fields (as on line 1), found 1; a record with another number of fields would shift the columns',
        'ragged-row',
      );
    });
    it('refuses an empty text', () => {
      throwsInput(() => parseDelimited('\n\n', { file: 'empty.csv' }), 'empty.csv: found no records; expected at least one line of data', 'empty-input');
    });
  });
});
