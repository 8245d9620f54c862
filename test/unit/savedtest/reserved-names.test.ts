// Specs are data, never objects: names that every JavaScript object has (constructor, toString, valueOf,
// hasOwnProperty, __proto__) are unknown fields with a location like any other, and a "__proto__" member cannot
// smuggle fields past validation. A seeded fuzz run draws field names from the schema and from JavaScript's
// reserved property names, with values of every JSON kind, and requires each outcome to be a valid spec or a
// SpecError/InputError whose every problem has a JSON path and a line.
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { isInputError, isInstance } from '../../../src/errors';
import { COMMON_FIELDS, PROCEDURES } from '../../../src/savedtest/procedures/index';
import { runSpec } from '../../../src/savedtest/run';
import { SpecError, loadSpecText, validateSpec } from '../../../src/savedtest/validate';

const RESERVED = ['__proto__', 'constructor', 'toString', 'valueOf', 'hasOwnProperty', 'isPrototypeOf', 'propertyIsEnumerable', 'toLocaleString', '__defineGetter__', '__lookupGetter__', 'prototype', 'length', 'then'];

function problemsOf(text: string): SpecError['problems'] {
  try {
    loadSpecText(text, 'x.countercheck.json');
  } catch (e) {
    if (isInstance(e, SpecError)) return e.problems;
    throw e;
  }
  return [];
}

describe('reserved JavaScript names in a spec', () => {
  for (const name of ['constructor', 'toString', 'valueOf', 'hasOwnProperty']) {
    it(`reports "${name}" as an unknown field with its location, at the top level and in "source"`, () => {
      const top = problemsOf(`{"test": "independence", "table": [[10, 20], [30, 40]],\n "${name}": 1}`);
      assert.equal(top.length, 1, JSON.stringify(top));
      assert.equal(top[0].path, `$.${name}`);
      assert.equal(top[0].line, 2);
      assert.match(top[0].message, /unknown field/);
      const inSource = problemsOf(`{"test": "goodness-of-fit", "source": {"path": "a.csv", "columns": ["x"], "${name}": 1}}`);
      assert.equal(inSource.length, 1, JSON.stringify(inSource));
      assert.equal(inSource[0].path, `$.source.${name}`);
      assert.equal(inSource[0].line, 1);
    });
  }

  it('refuses "__proto__" instead of running a table that validation never saw', () => {
    const problems = problemsOf('{"test": "independence",\n "__proto__": {"table": [[10, 20], [30, 40]]}}');
    assert.ok(problems.some((p) => p.path === '$.__proto__' && p.line === 2), JSON.stringify(problems));
  });

  it('refuses "__proto__" in a parsed object built by JSON.parse (own property) and nested in "source"', () => {
    assert.ok(validateSpec(JSON.parse('{"test": "independence", "table": [[1, 2], [3, 4]], "__proto__": {}}')).some((p) => p.path === '$.__proto__'));
    const nested = problemsOf('{"test": "goodness-of-fit", "source": {"path": "a.csv", "columns": ["x"], "__proto__": {"where": "1=1"}}}');
    assert.ok(nested.some((p) => p.path === '$.source.__proto__'), JSON.stringify(nested));
  });
});

describe('fuzz: field names from the schema and JavaScript, values of every kind (seeded)', () => {
  const schemaNames = [...new Set([...Object.keys(COMMON_FIELDS), ...PROCEDURES.flatMap((p) => Object.keys(p.fields))])];
  const name = fc.oneof(fc.constantFrom(...schemaNames), fc.constantFrom(...RESERVED), fc.string({ maxLength: 12 }));
  const leaf = fc.oneof(fc.integer(), fc.double(), fc.boolean(), fc.constant(null), fc.string({ maxLength: 20 }), fc.constantFrom(...schemaNames, ...RESERVED));
  const value = fc.letrec((tie) => ({
    v: fc.oneof({ depthSize: 'small', withCrossShrink: true }, leaf, fc.array(tie('v'), { maxLength: 4 }), fc.dictionary(name, tie('v'), { maxKeys: 4 })),
  })).v;
  const spec = fc.record({ test: fc.oneof(fc.constantFrom(...PROCEDURES.map((p) => p.test)), fc.constantFrom(...RESERVED)), rest: fc.dictionary(name, value, { maxKeys: 6 }) });

  it('never crashes; every problem has a JSON path and a line', () => {
    fc.assert(
      fc.property(spec, ({ test, rest }) => {
        // Pretty-printed, so that a problem's line tells members apart; "test" first (a "test" in rest replaces it).
        const text = JSON.stringify({ test, ...rest }, null, 1);
        try {
          loadSpecText(text, 'fuzz.countercheck.json');
        } catch (e) {
          assert.ok(isInputError(e), `not an InputError: ${String(e)} for ${text}`);
          if (isInstance(e, SpecError)) {
            for (const p of e.problems) {
              assert.ok(p.path.startsWith('$'), `problem without a JSON path: ${JSON.stringify(p)} for ${text}`);
              assert.ok(typeof p.line === 'number' && p.line >= 1, `problem without a line: ${JSON.stringify(p)} for ${text}`);
            }
          } else {
            assert.ok(e.location.line !== undefined || e.location.jsonPath !== undefined, `unlocated: ${e.message}`);
          }
        }
      }),
      { seed: 20261203, numRuns: Number(process.env.FUZZ_RUNS ?? 3000) },
    );
  });
});

describe('data levels named like inherited properties', () => {
  it('names a data level "constructor" that the proportions do not list, and uses its own proportion when listed', async () => {
    const provenance = { description: 'x.csv', sha256: 'f'.repeat(64), rows: 30, dropped: 0, columns: ['c'] };
    const readers = { aggregateFile: async () => ({ kind: 'categories' as const, counts: { labels: ['constructor', 'b'], counts: [10, 20] }, provenance }) };
    const spec = { test: 'goodness-of-fit', source: { path: 'x.csv', columns: ['c'] }, proportions: { b: 1, c: 1 } };
    await assert.rejects(runSpec(spec, { readers, specPath: '/w/s.countercheck.json' }), (e: unknown) => isInputError(e) && /constructor/.test(e.message));
    const ok = await runSpec({ ...spec, proportions: { b: 0.5, constructor: 0.5 } }, { readers, specPath: '/w/s.countercheck.json' });
    assert.ok(Number.isFinite((ok.result as { statistic: number }).statistic));
  });
});
