// Field defaults live in the field tables: each one is a value its own field accepts, and the schema shows it.
import { strict as assert } from 'node:assert';
import { checkValue, type SpecProblem } from '../../../src/savedtest/fields';
import { COMMON_FIELDS, PROCEDURES } from '../../../src/savedtest/procedures/index';
import { buildSpecSchema } from '../../../src/savedtest/schema';

describe('field defaults', () => {
  it('every declared default is accepted by its own field type', () => {
    const tables = [['common', COMMON_FIELDS] as const, ...PROCEDURES.map((p) => [p.test, p.fields] as const)];
    let seen = 0;
    for (const [test, fields] of tables) {
      for (const [name, f] of Object.entries(fields)) {
        if (f.default === undefined) continue;
        seen++;
        const problems: SpecProblem[] = [];
        checkValue(f.type, f.default, `$.${name}`, problems);
        assert.deepEqual(problems, [], `${test}.${name}: default ${JSON.stringify(f.default)}`);
      }
    }
    assert.ok(seen >= 8, `${seen} defaults declared`);
  });

  it('the schema shows a default where every test that has the field agrees on it', () => {
    const properties = (buildSpecSchema() as { properties: Record<string, { default?: unknown }> }).properties;
    assert.equal(properties.alpha.default, 0.05);
    assert.equal(properties.adjustment.default, 'holm');
    assert.equal(properties.alternative.default, 'two-sided');
  });
});
