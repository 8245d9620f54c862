// JSON text with positions (jsonc-parser's scanner, strict JSON): every syntax error names its line and
// column and what was found; spans locate values and member names.
import { strict as assert } from 'node:assert';
import { JsonSyntaxError, locatePath, parseJsonWithLocations } from '../../../src/data/jsonText';
import { isInstance } from '../../../src/errors';

function syntaxError(text: string): JsonSyntaxError {
  try {
    parseJsonWithLocations(text, 'x.countercheck.json');
  } catch (e) {
    assert.ok(isInstance(e, JsonSyntaxError), String(e));
    return e;
  }
  return assert.fail(`expected a syntax error for ${JSON.stringify(text)}`);
}

describe('located JSON', () => {
  const cases: [string, string, number, number, RegExp][] = [
    ['a trailing comma in an array', '{"a": [1, 2,]}', 1, 13, /expected a value, found `]`/],
    ['a trailing comma in an object', '{"a": 1,\n}', 2, 1, /expected a field name in double quotes, found `}`/],
    ['a line comment', '{\n  // note\n  "a": 1\n}', 2, 3, /comments are not allowed in JSON/],
    ['a block comment', '{"a": /* x */ 1}', 1, 7, /comments are not allowed in JSON/],
    ['a missing comma between members', '{"a": 1\n "b": 2}', 2, 2, /expected `,` or `}`, found `"b"`/],
    ['a missing comma between items', '[1 2]', 1, 4, /expected `,` or `]`, found `2`/],
    ['a single-quoted string', "{'a': 1}", 1, 2, /expected a value, found `'a'`/],
    ['NaN', '{"a": NaN}', 1, 7, /expected a value, found `NaN`/],
    ['an unterminated string', '{"a": "b}', 1, 7, /unterminated string/],
    ['a control character in a string', '{"a": "b\tc"}', 1, 9, /control character inside a string/],
    ['a bad escape', '{"a": "\\q"}', 1, 8, /bad escape sequence/],
    ['text after the value', '{"a": 1} x', 1, 10, /unexpected `x` after the end of the JSON value/],
    ['an empty text', '   ', 1, 4, /expected a value/],
  ];
  for (const [what, text, line, column, message] of cases) {
    it(`refuses ${what} at line ${line}, column ${column}`, () => {
      const e = syntaxError(text);
      assert.deepEqual(e.at, { line, column }, e.message);
      assert.match(e.message, new RegExp(`^x\\.countercheck\\.json:${line}:${column}: invalid JSON: ${message.source}`));
      assert.equal(e.code, 'invalid-json');
    });
  }

  it('refuses a field named twice, at the second name', () => {
    const e = syntaxError('{\n  "test": "variance",\n  "test": "distribution"\n}');
    assert.deepEqual(e.at, { line: 3, column: 3 });
    assert.match(e.message, /field "test" appears twice/);
  });

  it('accepts a byte-order mark and keeps offsets in the original text', () => {
    const located = parseJsonWithLocations('\ufeff{"a": [1, 2]}');
    assert.deepEqual(located.value, { a: [1, 2] });
    assert.deepEqual(located.spans.get('$.a[1]'), { start: 11, end: 12, keyStart: undefined });
    assert.deepEqual(locatePath(located, '$.a'), { line: 1, column: 3 });
  });

  it('gives the values JSON.parse gives (escapes, exponents, big and tiny numbers)', () => {
    const text = '{"s": "\\u00e9\\n\\"", "n": [-0, 1e-320, 1.7976931348623157e308, 12345678901234567890], "t": true, "z": null}';
    assert.deepEqual(parseJsonWithLocations(text).value, JSON.parse(text));
  });
});
