// Spec validation: every problem carries its JSON path (and its line and column in the file),
// all problems are reported at once, and nothing runs until the whole spec is valid.
import { strict as assert } from 'node:assert';
import { isInputError, isInstance } from '../../../src/errors';
import { parseJsonWithLocations, locatePath } from '../../../src/savedtest/json-text';
import { SpecError, loadSpecText, validateSpec } from '../../../src/savedtest/validate';

function problemsOf(text: string): { path: string; message: string; line?: number; column?: number }[] {
  try {
    loadSpecText(text, 'bad.countercheck.json');
  } catch (e) {
    if (isInstance(e, SpecError)) return [...e.problems];
    throw e;
  }
  return [];
}

function expectProblem(text: string, path: string, fragment: RegExp): void {
  const problems = problemsOf(text);
  const hit = problems.find((p) => p.path === path && fragment.test(p.message));
  assert.ok(hit, `expected a problem at ${path} matching ${fragment}; got:\n${problems.map((p) => `${p.path}: ${p.message}`).join('\n')}`);
}

describe('spec validation', () => {
  it('accepts a minimal valid spec of each test', () => {
    for (const spec of [
      { test: 'goodness-of-fit', observed: [315, 108, 101, 32], ratios: [9, 3, 3, 1] },
      { test: 'independence', table: [[1, 2], [3, 4]] },
      { test: 'variance', values: [1, 2, 3], sigma0: 1 },
      { test: 'variance', summary: { n: 20, variance: 0.0153 }, variance0: 0.01 },
      { test: 'distribution', df: 3, x: 7.8 },
      { test: 'variance', version: 1, source: { path: 'data/fill.csv', columns: ['volume'] }, sigma0: 0.1 },
    ]) {
      assert.deepEqual(validateSpec(spec), [], JSON.stringify(spec));
    }
  });

  it('reports a wrong item type with its JSON path, line and column', () => {
    const text = '{\n  "test": "independence",\n  "table": [[1, 2], [3, "four"]]\n}';
    const problems = problemsOf(text);
    assert.equal(problems.length, 1);
    assert.equal(problems[0].path, '$.table[1][1]');
    assert.match(problems[0].message, /expected a number ≥ 0, found the string "four"/);
    assert.equal(problems[0].line, 3);
    assert.equal(problems[0].column, 25);
  });

  it('reports an unknown field with a suggestion', () => {
    expectProblem('{"test": "independence", "table": [[1,2],[3,4]], "corection": true}', '$.corection', /unknown field "corection" \(did you mean "correction"\?\)/);
  });

  it('reports a field that belongs to another test', () => {
    expectProblem('{"test": "independence", "table": [[1,2],[3,4]], "sigma0": 2}', '$.sigma0', /does not apply to the independence test \(it belongs to "variance"\)/);
  });

  it('reports an unknown test with the list of tests', () => {
    expectProblem('{"test": "anova"}', '$.test', /expected one of "variance", "goodness-of-fit", "independence", "distribution"/);
  });

  it('reports a missing test', () => {
    expectProblem('{"observed": [1, 2]}', '$', /missing required field "test"/);
  });

  it('reports a spec version it cannot read', () => {
    expectProblem('{"version": 2, "test": "distribution", "df": 1, "x": 1}', '$.version', /reads spec version 1, found the number 2/);
  });

  it('reports nested source problems with their paths', () => {
    const text = '{"test": "variance", "sigma0": 1, "source": {"path": "a.csv", "columns": ["x", 3], "delimiter": ":", "header": "yes"}}';
    const paths = problemsOf(text).map((p) => p.path).sort();
    assert.deepEqual(paths, ['$.source.columns', '$.source.columns[1]', '$.source.delimiter', '$.source.header']);
  });

  it('reports every problem at once, not only the first', () => {
    const text = '{"test": "goodness-of-fit", "observed": [1, -2, 3], "statistic": "chi", "alpha": 1.5, "extra": 1}';
    const paths = problemsOf(text).map((p) => p.path).sort();
    assert.deepEqual(paths, ['$.alpha', '$.extra', '$.observed[1]', '$.statistic']);
  });

  it('reports conflicting and missing data forms', () => {
    expectProblem('{"test": "variance", "values": [1,2,3], "summary": {"n": 3, "sd": 1}, "sigma0": 1}', '$.summary', /give only one of "values", "summary", "source"/);
    expectProblem('{"test": "variance", "values": [1,2,3]}', '$', /give "sigma0" \(σ0\) or "variance0"/);
    expectProblem('{"test": "variance", "summary": {"n": 3, "sd": 1, "variance": 1}, "sigma0": 1}', '$.summary', /exactly one of "sd" or "variance"/);
    expectProblem('{"test": "independence"}', '$', /give one of "table", "source"/);
  });

  it('reports a ragged table and labels of the wrong length', () => {
    expectProblem('{"test": "independence", "table": [[1,2,3],[4,5]]}', '$.table[1]', /row 2 has 2 counts but row 1 has 3/);
    expectProblem('{"test": "independence", "table": [[1,2],[4,5]], "rowLabels": ["a"]}', '$.rowLabels', /expected 2 items/);
  });

  it('checks proportions keyed by level against the categories', () => {
    const text = '{"test": "goodness-of-fit", "observed": [1,2,3], "categories": ["a","b","c"], "proportions": {"a": 0.2, "b": 0.3, "d": 0.5}}';
    expectProblem(text, '$.proportions', /missing level "c"/);
    expectProblem(text, '$.proportions.d', /level "d" is not in "categories"/);
  });

  it('refuses "lambda" without the Cressie–Read statistic', () => {
    expectProblem('{"test": "goodness-of-fit", "observed": [1,2], "lambda": 0.5}', '$.lambda', /only with "statistic": "cressie-read"/);
  });

  it('checks the number of source columns per test', () => {
    expectProblem('{"test": "independence", "source": {"path": "a.csv", "columns": ["x"]}}', '$.source.columns', /two columns .* found 1 column/);
    expectProblem('{"test": "goodness-of-fit", "source": {"columns": ["x"]}}', '$.source', /missing "path"/);
  });

  it('gives a positioned error for invalid JSON', () => {
    try {
      loadSpecText('{\n  "test": "variance",\n  "values": [1, 2,]\n}', 'bad.countercheck.json');
      assert.fail('expected an error');
    } catch (e) {
      assert.ok(isInputError(e));
      assert.match(e.message, /^bad\.countercheck\.json:3:19: invalid JSON: expected a value, found `]`/);
      assert.equal(e.location.line, 3);
    }
  });

  it('refuses duplicate fields in the JSON text', () => {
    assert.throws(() => loadSpecText('{"test": "variance", "test": "distribution"}', 'x'), /field "test" appears twice/);
  });

  it('locates quoted member names and array items', () => {
    const located = parseJsonWithLocations('{\n "a b": [10,\n  20]\n}');
    assert.deepEqual(locatePath(located, '$["a b"][1]'), { line: 3, column: 3 });
    assert.deepEqual(locatePath(located, '$["a b"]'), { line: 2, column: 2 });
  });
});
