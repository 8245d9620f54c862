// The remaining refusals of the selection readers, each with its exact message.
import { parseHtmlTable } from '../../../src/data/html';
import { readJsonData } from '../../../src/data/json';
import { parseMarkdownTable } from '../../../src/data/markdown';
import { parseNotebookOutput } from '../../../src/data/selection';
import { throwsInput } from './expect';

describe('data: refusals of selection readers', () => {
  it('JSON: observed, expected, values and table of the wrong kind', () => {
    throwsInput(() => readJsonData('{"observed": 3}'), '$.observed: expected an array of counts or an object of counts by category, found the number 3', 'bad-observed');
    throwsInput(() => readJsonData('{"observed": [1, 2], "ratios": "3:1"}'), '$.ratios: expected an array or an object keyed by category, found the string "3:1"', 'bad-expected');
    throwsInput(() => readJsonData('{"observed": {"a": 1, "b": 2}, "expected": {"a": 1.5}}'), '$.expected: expected a value for the category `b`, found none', 'missing-category');
    throwsInput(() => readJsonData('{"values": {"a": 1}}'), '$.values: expected an array of numbers, found an object', 'bad-values');
    throwsInput(() => readJsonData('{"table": []}'), '$.table: expected an array of rows of counts, found an array', 'bad-table');
    throwsInput(() => readJsonData('{"table": [3, 4]}'), '$.table[0]: expected a row (an array of counts), found the number 3', 'bad-table');
    throwsInput(() => readJsonData('[1, 2]'), '$[0]: expected an array of records or an array of arrays, found the number 1 among them', 'bad-json-shape');
    throwsInput(() => readJsonData('"counts"'), '$: expected an object or an array, found the string "counts"', 'bad-json-shape');
    throwsInput(() => readJsonData('[]', { file: 'cell 3' }), 'cell 3, $: found an empty array; expected records or rows', 'empty-input');
    throwsInput(() => readJsonData('[[1, 2], [3]]'), '$[1]: expected 2 counts (as in the first row), found 1', 'ragged-row');
    throwsInput(() => readJsonData('[["a", "b"], ["x"]]'), '$[1]: expected 2 values (as in the first row), found 1', 'ragged-row');
  });

  it('markdown: a line that is not a table row, and no rows at all', () => {
    throwsInput(
      () => parseMarkdownTable('| a | b |\n|---|---|\n| 1 | 2 |\nsome prose\n', { firstLine: 30, file: 'notes.md' }),
      'notes.md, line 33: expected a table row with cells between `|`, found "some prose"',
      'not-a-table-row',
    );
    throwsInput(() => parseMarkdownTable('\n\n'), 'found no table rows; expected lines like `| a | b |`', 'empty-input');
  });

  it('HTML: nested tables, an unclosed table, no body rows, ragged rows', () => {
    throwsInput(() => parseHtmlTable('<table><tr><td><table><tr><td>1</td></tr></table></td></tr></table>'), 'found a table inside a table cell; expected one flat table', 'nested-table');
    throwsInput(() => parseHtmlTable('<table><tr><td>1</td></tr>'), 'the table is not closed; expected `</table>`', 'bad-html');
    throwsInput(() => parseHtmlTable('<table><thead><tr><th>a</th></tr></thead></table>'), 'the table has no body rows; expected rows of data', 'empty-input');
    throwsInput(() => parseHtmlTable('<table><tr><td>1</td><td>2</td></tr><tr><td>3</td></tr></table>'), 'row 2: expected 2 cells (as the widest row), found 1', 'ragged-row');
  });

  it('notebook: a text output that holds no text', () => {
    throwsInput(() => parseNotebookOutput('text/html', { rows: 1 }), 'the `text/html` output holds object; expected text', 'unsupported-output');
  });
});
