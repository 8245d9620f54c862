// A database query (or a "where") that matches nothing is refused at "$.source", a field the spec contains, not
// at "$.table" 1:1 as before.
import { strict as assert } from 'node:assert';
import type { Aggregate } from '../../../src/data/types';
import { isInputError } from '../../../src/errors';
import { runSpec } from '../../../src/savedtest/run';

const provenance = { description: 'sql:warehouse public.orders', sha256: 'f'.repeat(64), rows: 0, dropped: 0, columns: ['a', 'b'] };
const empty: Record<string, Aggregate> = {
  independence: { kind: 'table', table: { rowLabels: [], columnLabels: [], counts: [] }, provenance },
  'goodness-of-fit': { kind: 'categories', counts: { labels: [], counts: [] }, provenance },
  variance: { kind: 'moments', moments: { n: 0, mean: NaN, m2: NaN, m3: NaN, m4: NaN, min: NaN, max: NaN }, provenance },
};
const specs: Record<string, object> = {
  independence: { test: 'independence', source: { sql: { connection: 'w', table: 'public.orders' }, columns: ['a', 'b'] } },
  'goodness-of-fit': { test: 'goodness-of-fit', source: { sql: { connection: 'w', table: 'public.orders' }, columns: ['a'] } },
  variance: { test: 'variance', sigma0: 1, source: { sql: { connection: 'w', table: 'public.orders' }, columns: ['a'] } },
};

describe('a source that gives no rows', () => {
  for (const test of Object.keys(specs)) {
    it(`is refused at $.source (${test})`, async () => {
      const readers = { aggregateFile: async (): Promise<never> => assert.fail('no file'), aggregateSql: async () => empty[test] };
      await assert.rejects(runSpec(specs[test], { readers, specPath: '/w/s.countercheck.json' }), (e: unknown) => {
        assert.ok(isInputError(e), String(e));
        assert.equal(e.location.jsonPath, '$.source', e.message);
        assert.equal(e.code, 'no-rows');
        assert.match(e.message, /sql:warehouse public\.orders gave no records/);
        return true;
      });
    });
  }
});
