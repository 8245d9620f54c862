// The JSON Schema shipped for *.countercheck.json is generated from the procedure registry.
// When a handler's fields change, regenerate it with:
//   UPDATE_SCHEMA=1 npx mocha test/unit/savedtest/schema.test.ts   (fails once after rewriting; run again)
import { strict as assert } from 'node:assert';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { COMMON_FIELDS, PROCEDURES } from '../../../src/savedtest/procedures/index';
import { buildSpecSchema, specSchemaText } from '../../../src/savedtest/schema';

const schemaFile = join(__dirname, '..', '..', '..', 'schemas', 'countercheck.schema.json');

describe('spec JSON Schema', () => {
  it('the committed schema equals the one generated from the registry', () => {
    // The comparison is always against the file as it was before this run: with UPDATE_SCHEMA=1 a stale file is
    // rewritten and the test still fails once, so a run never passes on what it has just written.
    const committed = readFileSync(schemaFile, 'utf8');
    const generated = specSchemaText();
    if (committed !== generated && process.env.UPDATE_SCHEMA === '1') {
      writeFileSync(schemaFile, generated);
      assert.fail('schemas/countercheck.schema.json was stale and has been rewritten: review the change and run the tests again');
    }
    assert.equal(committed, generated, 'schemas/countercheck.schema.json is stale: run UPDATE_SCHEMA=1 npx mocha test/unit/savedtest/schema.test.ts');
  });

  it('describes every field of every test, and restricts each test to its own fields', () => {
    const schema = buildSpecSchema() as { properties: Record<string, { description?: string }>; allOf: { if: unknown; then: { propertyNames: { enum: string[] } } }[] };
    for (const p of PROCEDURES) {
      for (const name of Object.keys(p.fields)) {
        assert.ok(schema.properties[name]?.description, `${p.test}.${name} has a description in the schema`);
      }
      const rule = schema.allOf.find((r) => JSON.stringify(r.if).includes(`"${p.test}"`));
      assert.ok(rule, `a rule for ${p.test}`);
      assert.deepEqual(new Set(rule.then.propertyNames.enum), new Set([...Object.keys(COMMON_FIELDS), ...Object.keys(p.fields)]));
    }
    assert.deepEqual((schema.properties.test as { enum?: string[] }).enum, PROCEDURES.map((p) => p.test));
  });

  it('uses the field names the saved-test format promises', () => {
    const names = new Set(Object.keys(buildSpecSchema().properties as object));
    for (const required of [
      'test', 'table', 'rowLabels', 'columnLabels', 'observed', 'expected', 'proportions', 'ratios', 'values', 'summary', 'df', 'x', 'p',
      'source', 'sigma0', 'variance0', 'alternative', 'confidence', 'alpha', 'correction', 'statistic', 'lambda', 'estimatedParameters',
      'version', 'title', 'description', 'method', 'resamples', 'seed', 'categories',
    ]) {
      assert.ok(names.has(required), required);
    }
  });
});
