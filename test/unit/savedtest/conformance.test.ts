// The shipped JSON Schema (what the editor validates *.countercheck.json with) agrees with Countercheck's own
// validation: every demo, example and report-block spec is valid under both, and every invalid fixture
// (test/fixtures/specs/invalid/) is refused by both. The schema is checked with ajv, an independent validator.
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import Ajv from 'ajv';
import { validateSpec } from '../../../src/savedtest/validate';

const root = join(__dirname, '..', '..', '..');
const schema = JSON.parse(readFileSync(join(root, 'schemas', 'countercheck.schema.json'), 'utf8'));

function specsUnder(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return name === 'node_modules' || name.startsWith('.') ? [] : specsUnder(path);
    return name.endsWith('.countercheck.json') ? [path] : [];
  });
}

/** Specs written inline in the living blocks of the demo report (blocks that point at a file are checked as files). */
function reportBlockSpecs(): { name: string; value: unknown }[] {
  const text = readFileSync(join(root, 'demo', 'report.md'), 'utf8');
  return [...text.matchAll(/```countercheck\n([\s\S]*?)```/g)]
    .map((m, i) => ({ name: `demo/report.md block ${i + 1}`, value: JSON.parse(m[1]) as Record<string, unknown> }))
    .filter((b) => !('spec' in (b.value as object)));
}

describe('the shipped JSON Schema agrees with the validator', () => {
  const ajv = new Ajv({ allErrors: true, strict: false });
  const validate = ajv.compile(schema);
  const errorsOf = () => (validate.errors ?? []).map((e) => `${e.instancePath || '/'} ${e.message}`).join('; ');

  const valid = [...specsUnder(join(root, 'demo')), ...specsUnder(join(root, 'examples'))];
  it('finds the demo and example specs', () => assert.ok(valid.length >= 20, `found ${valid.length}`));
  for (const file of valid) {
    it(`accepts ${relative(root, file)}`, () => {
      const value = JSON.parse(readFileSync(file, 'utf8'));
      assert.ok(validate(value), `schema: ${errorsOf()}`);
      assert.deepEqual(validateSpec(value), []);
    });
  }
  for (const block of reportBlockSpecs()) {
    it(`accepts ${block.name}`, () => {
      assert.ok(validate(block.value), `schema: ${errorsOf()}`);
      assert.deepEqual(validateSpec(block.value), []);
    });
  }

  const invalidDir = join(root, 'test', 'fixtures', 'specs', 'invalid');
  const invalid = readdirSync(invalidDir).filter((f) => f.endsWith('.countercheck.json'));
  it('finds the invalid fixtures', () => assert.ok(invalid.length >= 10, `found ${invalid.length}`));
  for (const name of invalid) {
    it(`refuses ${name}`, () => {
      const value = JSON.parse(readFileSync(join(invalidDir, name), 'utf8'));
      assert.equal(validate(value), false, `the schema accepts ${name}`);
      assert.notDeepEqual(validateSpec(value), [], `the validator accepts ${name}`);
    });
  }
});
