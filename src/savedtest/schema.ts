/**
 * The JSON Schema of `*.countercheck.json`, generated from the procedure registry so that the editor's
 * completions, hovers and squiggles say exactly what `validateSpec` says. `npm run schema` writes it to
 * schemas/countercheck.schema.json; a unit test fails when the committed file is stale.
 */
import { toJsonSchema } from './fields';
import { COMMON_FIELDS, PROCEDURES } from './procedures/index';

export function buildSpecSchema(): Record<string, unknown> {
  // Every field of every test, for completions and hovers; each test then restricts the names it allows.
  const properties: Record<string, unknown> = {};
  for (const [name, f] of Object.entries(COMMON_FIELDS)) properties[name] = { ...toJsonSchema(f.type, f.description), ...(f.default !== undefined ? { default: f.default } : {}) };
  properties.version = { ...toJsonSchema(COMMON_FIELDS.version.type, COMMON_FIELDS.version.description), const: 1 };
  properties.test = {
    description: COMMON_FIELDS.test.description,
    enum: PROCEDURES.map((p) => p.test),
    markdownEnumDescriptions: PROCEDURES.map((p) => p.summary),
  };
  const allNames = new Set<string>();
  for (const p of PROCEDURES) for (const name of Object.keys(p.fields)) allNames.add(name);
  for (const name of allNames) {
    const owners = PROCEDURES.filter((p) => name in p.fields);
    const shapes = new Set(owners.map((o) => JSON.stringify(toJsonSchema(o.fields[name].type))));
    const description = `${owners[0].fields[name].description} (${owners.map((o) => o.test).join(', ')})`;
    // A field whose type differs between tests (source columns, say) is typed in each test's rule only.
    properties[name] = shapes.size === 1 ? toJsonSchema(owners[0].fields[name].type, description) : { description };
    // The default is shown where every test that has the field uses the same one.
    const defaults = new Set(owners.map((o) => JSON.stringify(o.fields[name].default)));
    const only = owners[0].fields[name].default;
    if (defaults.size === 1 && only !== undefined) properties[name] = { ...(properties[name] as object), default: only };
  }
  return {
    $schema: 'http://json-schema.org/draft-07/schema#',
    title: 'Countercheck saved test (version 1)',
    description: 'One chi-square procedure described completely: the data (inline or a source file), the options, and the result recorded when it was saved.',
    type: 'object',
    required: ['test'],
    properties,
    additionalProperties: false,
    allOf: PROCEDURES.map((p) => ({
      if: { properties: { test: { const: p.test } }, required: ['test'] },
      then: {
        // The test's own field types (a field shared by several tests may differ in detail, e.g. source columns).
        properties: Object.fromEntries(Object.entries(p.fields).map(([name, f]) => [name, toJsonSchema(f.type)])),
        propertyNames: { enum: [...Object.keys(COMMON_FIELDS), ...Object.keys(p.fields)] },
      },
    })),
  };
}

/** The schema as it is written to disk (stable key order, two-space indent, final newline). */
export function specSchemaText(): string {
  return JSON.stringify(buildSpecSchema(), null, 2) + '\n';
}
