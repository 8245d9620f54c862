// Records → aggregates: cross-tabulations, category counts, long counts, counted tables, moments;
// missing values, category order and every refusal with its message.
import { strict as assert } from 'node:assert';
import { aggregateRecords } from '../../../src/data/aggregate';
import { parseDelimited } from '../../../src/data/delimited';
import type { IntakeOptions } from '../../../src/data/options';
import type { Aggregate, AggregateRequest } from '../../../src/data/types';
import { throwsInput } from './expect';

const BAKERY = `shift,oven,defect,grams
early,A,burnt,512
late,B,raw,498.5
early,A,raw,NA
night,,burnt,505
late,A,burnt,
early,B,cracked,501
`;

function run(text: string, request: AggregateRequest, options: IntakeOptions = {}): Aggregate {
  return aggregateRecords(parseDelimited(text, { file: options.file, dialect: options.dialect }), request, options);
}

function table(a: Aggregate) {
  assert.equal(a.kind, 'table');
  return a.kind === 'table' ? a.table : undefined;
}

describe('data: aggregation', () => {
  it('cross-tabulates two columns in first-seen order and drops records with a missing label (and levels seen only there)', () => {
    const a = run(BAKERY, { kind: 'crosstab', rowColumn: 'shift', columnColumn: 'oven' });
    assert.deepEqual(table(a), {
      rowLabels: ['early', 'late'],
      columnLabels: ['A', 'B'],
      counts: [
        [2, 1],
        [1, 1],
      ],
    });
    assert.equal(a.provenance.rows, 6);
    assert.equal(a.provenance.dropped, 1);
    assert.deepEqual(a.provenance.columns, ['shift', 'oven']);
  });

  it('keeps missing as its own level under the category policy', () => {
    const a = run(BAKERY, { kind: 'crosstab', rowColumn: 'oven', columnColumn: 'shift' }, { missing: { policy: 'category', label: 'unknown' } });
    assert.deepEqual(table(a)?.rowLabels, ['A', 'B', 'unknown']);
    assert.deepEqual(table(a)?.counts[2], [0, 0, 1]);
    assert.equal(a.provenance.dropped, 0);
  });

  it('uses a configured list of missing tokens', () => {
    const a = run('oven\nA\nn/a\nB\n', { kind: 'categories', column: 'oven' }, { missing: { tokens: ['n/a'] } });
    assert.equal(a.kind === 'categories' && a.counts.labels.join(), 'A,B');
    assert.equal(a.provenance.dropped, 1);
  });

  it('sorts levels (numerically when every label is a number)', () => {
    const a = run('tray\n10\n9\n100\n9\n', { kind: 'categories', column: 'tray' }, { categories: { order: 'sorted' } });
    assert.deepEqual(a.kind === 'categories' && a.counts, { labels: ['9', '10', '100'], counts: [2, 1, 1] });
    const b = run('oven\nb\nA\na\n', { kind: 'categories', column: 'oven' }, { categories: { order: 'sorted' } });
    assert.deepEqual(b.kind === 'categories' && b.counts.labels, ['A', 'a', 'b']);
  });

  it('keeps given levels in their order, with zero for a level never seen', () => {
    const a = run(BAKERY, { kind: 'categories', column: 'defect' }, { categories: { levels: ['raw', 'burnt', 'cracked', 'mouldy'] } });
    assert.deepEqual(a.kind === 'categories' && a.counts, { labels: ['raw', 'burnt', 'cracked', 'mouldy'], counts: [2, 3, 1, 0] });
  });

  it('trims labels and folds case on request, showing the first spelling seen', () => {
    const a = run('oven\n Oven A\noven a \nOVEN B\n', { kind: 'categories', column: 'oven' }, { categories: { caseFold: true } });
    assert.deepEqual(a.kind === 'categories' && a.counts, { labels: ['Oven A', 'OVEN B'], counts: [2, 1] });
  });

  it('reads long counts as a cross-tabulation weighted by the count column', () => {
    const text = 'station,bike,trips\nPier,e-bike,12\nPier,classic,30\nPark,e-bike,7\nPier,e-bike,3\n';
    const a = run(text, { kind: 'crosstab', rowColumn: 'station', columnColumn: 'bike', weight: 'trips' });
    assert.deepEqual(table(a)?.counts, [
      [15, 30],
      [7, 0],
    ]);
    assert.deepEqual(a.provenance.columns, ['station', 'bike', 'trips']);
  });

  it('reads a counted table: first column row labels, header column labels, thousands separators', () => {
    const a = run('shift,A,B\nearly,"1,204",3\nlate,0,17\n', { kind: 'counted-table' });
    assert.deepEqual(table(a), { rowLabels: ['early', 'late'], columnLabels: ['A', 'B'], counts: [[1204, 3], [0, 17]] });
  });

  it('computes moments of a numeric column, dropping missing values, with a decimal comma', () => {
    const a = run('line;ml\nA;499,5\nB;NA\nC;500,5\nD;-\n', { kind: 'numeric', column: 'ml' }, { keepValues: true });
    assert.equal(a.kind, 'moments');
    if (a.kind !== 'moments') return;
    assert.deepEqual(a.values, [499.5, 500.5]);
    assert.equal(a.moments.n, 2);
    assert.equal(a.moments.mean, 500);
    assert.equal(a.moments.m2, 0.5);
    assert.equal(a.provenance.dropped, 2);
  });

  describe('refusals', () => {
    it('names the line, column and value of a non-number', () => {
      throwsInput(
        () => run(BAKERY.replace('498.5', 'heavy'), { kind: 'numeric', column: 'grams' }, { file: 'bakery.csv' }),
        'bakery.csv, line 3, column `grams`: expected a number, found `heavy`',
        'not-a-number',
      );
    });
    it('refuses a number beyond the double range', () => {
      throwsInput(() => run('oven,grams\nA,1e400\n', { kind: 'numeric', column: 'grams' }), 'line 2, column `grams`: expected a number, found `1e400`', 'not-a-number');
    });
    it('suggests the decimal mark when a number has a comma', () => {
      throwsInput(
        () => run('oven,grams\nA,"12,5"\n', { kind: 'numeric', column: 'grams' }),
        'line 2, column `grams`: expected a number (with `.` as the decimal mark; is the decimal mark `,`?), found `12,5`',
        'not-a-number',
      );
    });
    it('refuses a weight that is not a number', () => {
      throwsInput(
        () => run('oven,weight\nA,2\nB,n/a\n', { kind: 'categories', column: 'oven', weight: 'weight' }),
        'line 3, column `weight`: expected a frequency weight (a non-negative whole number), found `n/a`',
        'bad-count',
      );
    });
    it('refuses a negative weight', () => {
      throwsInput(
        () => run('oven,weight\nA,-2\n', { kind: 'categories', column: 'oven', weight: 'weight' }),
        'line 2, column `weight`: expected a frequency weight (a non-negative whole number), found `-2`',
        'bad-count',
      );
    });
    it('refuses a non-integer weight for a count test', () => {
      throwsInput(
        () => run('oven,weight\nA,2.5\n', { kind: 'categories', column: 'oven', weight: 'weight' }),
        'line 2, column `weight`: expected a whole number, found `2.5`; count tests need frequency weights (how many times each record occurred)',
        'non-integer-weight',
      );
    });
    it('refuses a level outside the given categories', () => {
      throwsInput(
        () => run(BAKERY, { kind: 'categories', column: 'defect' }, { categories: { levels: ['raw', 'burnt'] }, file: 'bakery.csv' }),
        'bakery.csv, line 7, column `defect`: found `cracked`, which is not one of the given categories (`raw`, `burnt`)',
        'unknown-category',
      );
    });
    it('refuses an unknown column, suggesting a near name', () => {
      throwsInput(
        () => run(BAKERY, { kind: 'categories', column: 'Oven' }),
        'found no column `Oven` (did you mean `oven`?); the columns are `shift`, `oven`, `defect`, `grams`',
        'unknown-column',
      );
    });
    it('refuses a column named twice in the header', () => {
      throwsInput(
        () => run('oven,oven\nA,B\n', { kind: 'categories', column: 'oven' }, { dialect: { header: true } }),
        'the header names column `oven` twice (fields 1 and 2); expected unique names',
        'duplicate-column',
      );
    });
    it('refuses a column with too many levels to be categorical', () => {
      throwsInput(
        () => run('id\n1\n2\n3\n', { kind: 'categories', column: 'id' }, { categories: { maxLevels: 2 } }),
        'line 4, column `id`: found more than 2 distinct values (the latest `3`); expected a categorical column',
        'too-many-levels',
      );
    });
    it('refuses order "given" without the levels, and a level given twice', () => {
      throwsInput(() => run(BAKERY, { kind: 'categories', column: 'oven' }, { categories: { order: 'given' } }), 'category order "given" needs the list of categories for column `oven`', 'missing-levels');
      throwsInput(() => run(BAKERY, { kind: 'categories', column: 'oven' }, { categories: { levels: ['A', ' A'] } }), 'the given categories for column `oven` list `A` twice', 'duplicate-level');
    });
    it('refuses a bad count, an empty label and a repeated label in a counted table', () => {
      throwsInput(() => run('shift,A\nearly,x\n', { kind: 'counted-table' }), 'line 2, column `A`: expected a count (a non-negative whole number), found `x`', 'bad-count');
      throwsInput(() => run('shift,A\n,1\n', { kind: 'counted-table' }), 'line 2, column `shift`: expected a row label, found an empty field', 'missing-label');
      throwsInput(() => run('shift,A\nearly,1\nearly,2\n', { kind: 'counted-table' }), 'line 3, column `shift`: the row label `early` appears twice; expected each row once', 'duplicate-label');
      throwsInput(() => run('counts\n1\n', { kind: 'counted-table' }), 'a counted table needs row labels and at least one column of counts; found 1 column', 'too-few-columns');
    });
    it('refuses a count beyond exact integers', () => {
      throwsInput(
        () => run('shift,A\nearly,9007199254740993\n', { kind: 'counted-table' }),
        'line 2, column `A`: found `9007199254740993`, above the largest exactly representable count (2^53 − 1)',
        'count-too-large',
      );
    });
  });
});
