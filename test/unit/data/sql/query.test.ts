// Query generation for the SQL source: what is sent, what is refused before sending, and how the
// aggregate rows the server returns become the reader's Aggregate. No server here (see test/pg/).
import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import {
  canonicalAggregate,
  checkSelectQuery,
  checkSqlSource,
  checkWhereCondition,
  decodeAggregate,
  describeStatement,
  parseTableName,
  planAggregate,
  quoteIdentifier,
  type SqlSource,
} from '../../../../src/data/sql/query';
import { tokenizeSql } from '../../../../src/data/sql/lexer';

function refuses(f: () => unknown, code: string, pattern: RegExp): void {
  assert.throws(f, (e: unknown) => {
    assert.ok(isInstance(e, InputError), `expected InputError, got ${String(e)}`);
    assert.equal(e.code, code, e.message);
    assert.match(e.message, pattern);
    return true;
  });
}

const table: SqlSource = { sql: { connection: 'bakery', table: 'public.defects' } };

describe('SQL identifiers', () => {
  it('quotes names exactly and doubles embedded quotes', () => {
    assert.equal(quoteIdentifier('shift'), '"shift"');
    assert.equal(quoteIdentifier('Oven "B"'), '"Oven ""B"""');
    assert.equal(quoteIdentifier('x"; DROP TABLE t; --'), '"x""; DROP TABLE t; --"');
  });

  it('refuses an empty name and a NUL character', () => {
    refuses(() => quoteIdentifier(''), 'sql-identifier', /empty/);
    refuses(() => quoteIdentifier('a\u0000b'), 'sql-identifier', /NUL/);
  });

  it('splits schema.table, keeping quoted parts with dots whole', () => {
    assert.deepEqual(parseTableName('public.defects'), ['public', 'defects']);
    assert.deepEqual(parseTableName('defects'), ['defects']);
    assert.deepEqual(parseTableName('"sales"."q3.orders"'), ['sales', 'q3.orders']);
    assert.deepEqual(parseTableName('Sales."Orders ""2026"""'), ['Sales', 'Orders "2026"']);
  });

  it('refuses malformed table names with the reason', () => {
    refuses(() => parseTableName('a.b.c'), 'sql-table-name', /3 dot-separated parts/);
    refuses(() => parseTableName('a.'), 'sql-table-name', /ends with a dot/);
    refuses(() => parseTableName('.b'), 'sql-table-name', /empty/);
    refuses(() => parseTableName('"open.b'), 'sql-table-name', /never closed/);
    refuses(() => parseTableName('a"b'), 'sql-table-name', /whole part/);
  });
});

describe('the where condition', () => {
  it('accepts expressions, subqueries, strings and comments holding ; and parentheses', () => {
    for (const ok of [
      "shift = 'night'",
      "note <> ';' AND note <> ')'",
      "label = E'it\\'s; fine'",
      'label = $$a;b)$$ OR label = $tag$x;$tag$',
      'oven IN (SELECT oven FROM ovens WHERE active)',
      'weight > 0 -- trailing comment; with a semicolon',
      'weight > 0 /* a ; comment /* nested ) */ */',
      '"odd;name" > 1',
    ]) {
      assert.doesNotThrow(() => checkWhereCondition(ok), ok);
    }
  });

  it('refuses a second statement', () => {
    refuses(() => checkWhereCondition("shift = 'a'; DELETE FROM defects"), 'sql-multiple-statements', /`;` at line 1, column 12.*nothing was sent/);
  });

  it('refuses a parenthesis that would close the wrapper', () => {
    refuses(() => checkWhereCondition('1 = 1) OR (true'), 'sql-parentheses', /closes a parenthesis it never opened at line 1, column 6/);
    refuses(() => checkWhereCondition('(1 = 1'), 'sql-parentheses', /leaves 1 parenthesis open/);
  });

  it('refuses unterminated literals and comments', () => {
    refuses(() => checkWhereCondition("shift = 'a"), 'sql-unterminated', /string literal starting at line 1, column 9 is never closed/);
    refuses(() => checkWhereCondition('x > 1 /* open'), 'sql-unterminated', /comment/);
    refuses(() => checkWhereCondition('x = $q$abc'), 'sql-unterminated', /dollar-quoted/);
    refuses(() => checkWhereCondition('"x = 1'), 'sql-unterminated', /quoted identifier/);
  });

  it('refuses an empty condition', () => {
    refuses(() => checkWhereCondition('  -- nothing'), 'sql-where-empty', /empty/);
  });
});

describe('the user query', () => {
  it('accepts SELECT, WITH … SELECT, VALUES and a final semicolon', () => {
    assert.equal(checkSelectQuery('SELECT * FROM defects;'), 'SELECT * FROM defects');
    assert.doesNotThrow(() => checkSelectQuery('with d as (select * from defects) select * from d'));
    assert.doesNotThrow(() => checkSelectQuery('(SELECT 1 AS a) UNION ALL (SELECT 2)'));
    assert.doesNotThrow(() => checkSelectQuery("VALUES ('a', 1), ('b', 2)"));
    assert.doesNotThrow(() => checkSelectQuery('SELECT "update", "into" FROM defects'));
  });

  it('refuses statements that are not a SELECT before sending', () => {
    refuses(() => checkSelectQuery('DELETE FROM defects'), 'sql-not-select', /starts with `DELETE`.*not sent/);
    refuses(() => checkSelectQuery('  /* hi */ update defects set x = 1'), 'sql-not-select', /starts with `update` \(line 1, column 12\)/);
    refuses(() => checkSelectQuery('SET statement_timeout = 0'), 'sql-not-select', /SET/);
  });

  it('refuses writing inside a SELECT: data-modifying WITH, SELECT INTO, FOR UPDATE', () => {
    refuses(() => checkSelectQuery('WITH gone AS (DELETE FROM defects RETURNING *) SELECT * FROM gone'), 'sql-not-select', /`DELETE` at line 1, column 15/);
    refuses(() => checkSelectQuery('SELECT * INTO copy FROM defects'), 'sql-not-select', /`INTO`/);
    refuses(() => checkSelectQuery('SELECT * FROM defects FOR UPDATE'), 'sql-not-select', /`UPDATE`/);
  });

  it('refuses two statements', () => {
    refuses(() => checkSelectQuery('SELECT 1; SELECT 2'), 'sql-multiple-statements', /only one statement/);
  });

  it('refuses an empty query', () => {
    refuses(() => checkSelectQuery(' ; '), 'sql-query-empty', /empty/);
  });
});

describe('the SQL source', () => {
  it('needs a connection and exactly one of table or query', () => {
    refuses(() => checkSqlSource({ sql: { connection: '', table: 't' } }), 'sql-connection-missing', /connection/);
    refuses(() => checkSqlSource({ sql: { connection: 'c' } }), 'sql-source-shape', /exactly one/);
    refuses(() => checkSqlSource({ sql: { connection: 'c', table: 't', query: 'SELECT 1' } }), 'sql-source-shape', /exactly one/);
  });

  it('checks that every $n has a parameter', () => {
    refuses(() => checkSqlSource({ ...table, where: 'shift = $2', parameters: ['night'] }), 'sql-parameters', /\$2 is used but "parameters" holds 1 value/);
    assert.doesNotThrow(() => checkSqlSource({ ...table, where: 'shift = $1', parameters: ['night'] }));
    refuses(() => checkSqlSource({ ...table, where: 'shift = $2', parameters: ['night', 'late'] }), 'sql-parameters', /a value for \$1, which neither "where" nor "query" uses/);
  });

  it('describes a source without reading a row', () => {
    assert.equal(describeStatement(table), 'SELECT * FROM "public"."defects" LIMIT 0');
    assert.equal(describeStatement({ sql: { connection: 'c', query: 'SELECT 1 AS a;' } }), 'SELECT * FROM (\nSELECT 1 AS a\n) AS "countercheck_source" LIMIT 0');
  });
});

describe('generated aggregation', () => {
  it('cross-tabulates with GROUP BY and count(*), quoting columns', () => {
    const plan = planAggregate(table, { kind: 'crosstab', rowColumn: 'shift', columnColumn: 'Defect "type"' });
    assert.equal(
      plan.text,
      'SELECT ("shift")::text AS k0, ("Defect ""type""")::text AS k1, count(*) AS records\nFROM "public"."defects"\nGROUP BY 1, 2',
    );
    assert.deepEqual(plan.values, []);
  });

  it('weights with sum(weight) and counts weights that are not frequencies', () => {
    const plan = planAggregate({ ...table, where: 'oven = $1', parameters: ['B'] }, { kind: 'categories', column: 'shift', weight: 'n' });
    assert.equal(
      plan.text,
      'SELECT k0, count(*) AS records, count(w) AS weighted, sum(w) AS weight,\n' +
        '  sum(CASE WHEN w >= 0 AND w = trunc(w) THEN 0 WHEN w IS NULL THEN 0 ELSE 1 END) AS invalid_weights\n' +
        'FROM (SELECT ("shift")::text AS k0, NULLIF(("n")::numeric, \'NaN\'::numeric) AS w\nFROM "public"."defects"\nWHERE (\noven = $1\n)\n) AS g\nGROUP BY 1',
    );
    assert.deepEqual(plan.values, ['B']);
    assert.deepEqual(plan.numericColumns, ['n']);
  });

  it('computes n, mean and var_samp on the server, never sums of squares', () => {
    const plan = planAggregate(table, { kind: 'numeric', column: 'weight_g' });
    assert.match(plan.text, /count\(x\) AS n, avg\(x\) AS mean, var_samp\(x\) AS variance/);
    assert.match(plan.text, /NULLIF\(\("weight_g"\)::double precision, 'NaN'::double precision\)/);
    assert.doesNotMatch(plan.text, /x \* x|power\(x|\^ ?2/);
    assert.match(plan.text, /sum\(d\) AS d1, sum\(d \* d\) AS d2, sum\(d \* d \* d\) AS d3/, 'second pass sums deviations from the mean');
    assert.equal(plan.text.split('FROM "public"."defects"').length - 1, 2, 'two scans, not more');
    const short = planAggregate(table, { kind: 'numeric', column: 'weight_g' }, { higherMoments: false });
    assert.doesNotMatch(short.text, /d \* d/);
  });

  it('wraps a user query as a subquery and the where condition in parentheses', () => {
    const plan = planAggregate(
      { sql: { connection: 'c', query: 'SELECT * FROM defects -- all' }, where: "shift = 'night' -- only nights" },
      { kind: 'categories', column: 'shift' },
    );
    assert.equal(
      plan.text,
      'SELECT ("shift")::text AS k0, count(*) AS records\nFROM (\nSELECT * FROM defects -- all\n) AS "countercheck_source"\nWHERE (\nshift = \'night\' -- only nights\n)\nGROUP BY 1',
    );
  });

  it('counts stratum × row × column with one GROUP BY, the stratum first, every name quoted', () => {
    const plan = planAggregate(table, { kind: 'strata', stratumColumn: 'plant "2"', rowColumn: 'shift', columnColumn: 'defect' });
    assert.equal(
      plan.text,
      'SELECT ("plant ""2""")::text AS k0, ("shift")::text AS k1, ("defect")::text AS k2, count(*) AS records\nFROM "public"."defects"\nGROUP BY 1, 2, 3',
    );
    assert.deepEqual(plan.columns, ['plant "2"', 'shift', 'defect']);
    assert.deepEqual(plan.numericColumns, []);
  });

  it("weights a three-way count with sum(weight) and binds the where condition's values", () => {
    const plan = planAggregate({ ...table, where: 'oven = $1', parameters: ['B'] }, { kind: 'strata', stratumColumn: 'plant', rowColumn: 'shift', columnColumn: 'defect', weight: 'n' });
    assert.equal(
      plan.text,
      'SELECT k0, k1, k2, count(*) AS records, count(w) AS weighted, sum(w) AS weight,\n' +
        '  sum(CASE WHEN w >= 0 AND w = trunc(w) THEN 0 WHEN w IS NULL THEN 0 ELSE 1 END) AS invalid_weights\n' +
        'FROM (SELECT ("plant")::text AS k0, ("shift")::text AS k1, ("defect")::text AS k2, NULLIF(("n")::numeric, \'NaN\'::numeric) AS w\nFROM "public"."defects"\nWHERE (\noven = $1\n)\n) AS g\nGROUP BY 1, 2, 3',
    );
    assert.deepEqual(plan.values, ['B']);
    assert.deepEqual(plan.numericColumns, ['n']);
  });

  it('refuses an already counted table', () => {
    refuses(() => planAggregate(table, { kind: 'counted-table' }), 'sql-counted-table', /weight/);
  });
});

describe('decoding aggregate rows', () => {
  const crosstab = { kind: 'crosstab', rowColumn: 'shift', columnColumn: 'defect' } as const;

  it('fills absent cells with zeros, sorts labels and drops missing values with their count', () => {
    const rows = [
      { k0: 'night', k1: 'crack', records: '3' },
      { k0: 'early', k1: 'burn', records: '5' },
      { k0: 'early', k1: null, records: '2' },
      { k0: ' early ', k1: 'crack', records: '1' },
      { k0: 'NA', k1: 'burn', records: '4' },
    ];
    const d = decodeAggregate(crosstab, rows);
    assert.equal(d.kind, 'table');
    if (d.kind !== 'table') return;
    assert.deepEqual(d.table, { rowLabels: ['early', 'night'], columnLabels: ['burn', 'crack'], counts: [[5, 1], [0, 3]] });
    assert.deepEqual(d.provenance, { rows: 15, dropped: 6, columns: ['shift', 'defect'] });
  });

  it('counts missing values as their own category when asked', () => {
    const d = decodeAggregate({ kind: 'categories', column: 'defect' }, [
      { k0: 'burn', records: 2 },
      { k0: null, records: '3' },
      { k0: '', records: '1' },
    ], { missing: { policy: 'category', label: '(none)' } });
    assert.deepEqual(d.kind === 'categories' && d.counts, { labels: ['burn', '(none)'], counts: [2, 4] }, 'the missing level comes last, as from a file');
    assert.equal(d.provenance.dropped, 0);
  });

  it('uses weight sums, drops records without a weight and refuses weights that are not frequencies', () => {
    const request = { kind: 'categories', column: 'shift', weight: 'n' } as const;
    const d = decodeAggregate(request, [
      { k0: 'a', records: '3', weighted: '2', weight: '40', invalid_weights: '0' },
      { k0: 'b', records: '1', weighted: '0', weight: null, invalid_weights: '0' },
    ]);
    assert.deepEqual(d.kind === 'categories' && d.counts, { labels: ['a'], counts: [40] }, 'b is only in dropped records, so it is left out as from a file');
    assert.deepEqual(d.provenance, { rows: 4, dropped: 2, columns: ['shift', 'n'] });
    refuses(() => decodeAggregate(request, [{ k0: 'a', records: '3', weighted: '3', weight: '2.5', invalid_weights: '2' }]), 'non-integer-weight', /2 records have weights that are not a non-negative whole number/);
    refuses(() => decodeAggregate(request, [{ k0: 'a', records: '1', weighted: '1', weight: 'NaN', invalid_weights: '0' }]), 'non-integer-weight', /sum to NaN/);
  });

  it('turns count, avg and var_samp into moments with m2 = s²(n − 1)', () => {
    const d = decodeAggregate({ kind: 'numeric', column: 'x' }, [{ records: '6', n: '5', mean: 3, variance: 2.5, min: 1, max: 5, m3: 0, m4: 34 }]);
    assert.deepEqual(d.kind === 'moments' && d.moments, { n: 5, mean: 3, m2: 10, m3: 0, m4: 34, min: 1, max: 5 });
    assert.deepEqual(d.provenance, { rows: 6, dropped: 1, columns: ['x'] });
  });

  it('codes labels as the file readers do: trimmed, case-folded on request, numeric labels sorted as numbers, given levels kept', () => {
    const rows = [
      { k0: 'Oven A', records: 1 },
      { k0: 'oven a ', records: 2 },
      { k0: 'Oven B', records: 4 },
    ];
    const folded = decodeAggregate({ kind: 'categories', column: 'oven' }, rows, { categories: { caseFold: true } });
    assert.deepEqual(folded.kind === 'categories' && folded.counts, { labels: ['Oven A', 'Oven B'], counts: [3, 4] });
    const numeric = decodeAggregate({ kind: 'categories', column: 'size' }, [{ k0: '10', records: 1 }, { k0: '9', records: 2 }]);
    assert.deepEqual(numeric.kind === 'categories' && numeric.counts.labels, ['9', '10']);
    const given = decodeAggregate({ kind: 'categories', column: 'size' }, [{ k0: 'M', records: 1 }], { categories: { order: 'given', levels: ['S', 'M', 'L'] } });
    assert.deepEqual(given.kind === 'categories' && given.counts, { labels: ['S', 'M', 'L'], counts: [0, 1, 0] });
    refuses(() => decodeAggregate({ kind: 'categories', column: 'size' }, [{ k0: 'XL', records: 1 }], { categories: { levels: ['S'] } }), 'unknown-category', /column `size`: found `XL`/);
  });

  it('leaves out a level seen only beside a missing value, and keeps a level whose weights are all zero, as a file does', () => {
    const d = decodeAggregate(crosstab, [{ k0: 'night', k1: null, records: 2 }, { k0: 'early', k1: 'burn', records: 1 }]);
    assert.deepEqual(d.kind === 'table' && d.table, { rowLabels: ['early'], columnLabels: ['burn'], counts: [[1]] });
    const zero = decodeAggregate({ kind: 'categories', column: 's', weight: 'w' }, [
      { k0: 'a', records: 1, weighted: 1, weight: '0', invalid_weights: 0 },
      { k0: 'b', records: 1, weighted: 1, weight: '3', invalid_weights: 0 },
    ]);
    assert.deepEqual(zero.kind === 'categories' && zero.counts, { labels: ['a', 'b'], counts: [0, 3] });
  });

  it('decodes three-way rows into one table per stratum, with the rows and columns of all strata and missing values dropped', () => {
    const request = { kind: 'strata', stratumColumn: 'plant', rowColumn: 'shift', columnColumn: 'defect' } as const;
    const d = decodeAggregate(request, [
      { k0: 'north', k1: 'early', k2: 'crack', records: '3' },
      { k0: 'north', k1: 'late', k2: 'burn', records: '2' },
      { k0: 'south', k1: 'early', k2: 'burn', records: '7' },
      { k0: ' south', k1: 'late', k2: 'crack', records: '1' },
      { k0: null, k1: 'late', k2: 'crack', records: '4' },
      { k0: 'west', k1: 'late', k2: null, records: '5' },
    ]);
    assert.equal(d.kind, 'strata');
    if (d.kind !== 'strata') return;
    assert.deepEqual(
      d.strata,
      { stratumLabels: ['north', 'south'], rowLabels: ['early', 'late'], columnLabels: ['burn', 'crack'], counts: [[[0, 3], [2, 0]], [[7, 0], [0, 1]]] },
      'west is only beside a missing value, so it is left out as from a file',
    );
    assert.deepEqual(d.provenance, { rows: 22, dropped: 9, columns: ['plant', 'shift', 'defect'] });
    const given = decodeAggregate(request, [{ k0: 'north', k1: 'early', k2: 'crack', records: 2 }], {
      categories: { order: 'given', levels: ['south', 'north'], rowLevels: ['early', 'late'], columnLevels: ['crack', 'burn'] },
    });
    assert.deepEqual(given.kind === 'strata' && given.strata, {
      stratumLabels: ['south', 'north'],
      rowLabels: ['early', 'late'],
      columnLabels: ['crack', 'burn'],
      counts: [[[0, 0], [0, 0]], [[2, 0], [0, 0]]],
    });
    const weighted = decodeAggregate({ ...request, weight: 'n' }, [{ k0: 'a', k1: 'x', k2: 'y', records: 2, weighted: 2, weight: '9', invalid_weights: 0 }]);
    assert.deepEqual(weighted.kind === 'strata' && weighted.strata.counts, [[[9]]]);
    assert.notEqual(canonicalAggregate(d), canonicalAggregate(given), 'the fingerprint sees the counts');
  });

  it('takes m2 from the corrected two-pass sums when the second pass ran', () => {
    const d = decodeAggregate({ kind: 'numeric', column: 'x' }, [{ records: 4, n: 4, mean: 2.5, variance: 99, min: 1, max: 4, d1: 0.5, d2: 5.5, m3: 0, m4: 0 }]);
    assert.equal(d.kind === 'moments' && d.moments.m2, 5.5 - 0.25 / 4);
  });

  it('refuses a count the client cannot hold exactly', () => {
    refuses(() => decodeAggregate({ kind: 'categories', column: 's' }, [{ k0: 'a', records: '9007199254740993' }]), 'sql-bad-count', /below 2\^53/);
  });

  it('fingerprints counts exactly and moments to 12 digits', () => {
    const a = decodeAggregate({ kind: 'numeric', column: 'x' }, [{ records: 3, n: 3, mean: 0.1 + 0.2, variance: 1, min: 0, max: 1 }]);
    const b = decodeAggregate({ kind: 'numeric', column: 'x' }, [{ records: 3, n: 3, mean: 0.3, variance: 1, min: 0, max: 1 }]);
    assert.equal(canonicalAggregate(a), canonicalAggregate(b));
    const c = decodeAggregate({ kind: 'categories', column: 's' }, [{ k0: 'a', records: 3 }]);
    const e = decodeAggregate({ kind: 'categories', column: 's' }, [{ k0: 'a', records: 4 }]);
    assert.notEqual(canonicalAggregate(c), canonicalAggregate(e));
  });
});

describe('the SQL lexer', () => {
  it('keeps prefixed strings and parameters whole', () => {
    const kinds = tokenizeSql("U&'d\\0061t' = X'1F' AND a = $12 AND b::text = e'\\''", 'x').map((t) => `${t.kind}:${t.text}`);
    assert.deepEqual(kinds.filter((k) => k.startsWith('string') || k.startsWith('parameter')), ["string:'d\\0061t'", "string:X'1F'", 'parameter:$12', "string:e'\\''"]);
  });
});
