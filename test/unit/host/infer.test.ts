// The editor's inference of table shape and test (pure parts of src/host).
import { strict as assert } from 'node:assert';
import { parseDelimited } from '../../../src/data/delimited';
import { describeColumn, inferShape, profileColumns, testForColumns } from '../../../src/host/infer';
import { sourceFromText } from '../../../src/host/selectionRecords';

const missing = ['', 'NA'];

function shapeOf(csv: string) {
  const records = parseDelimited(csv);
  return inferShape(records, profileColumns(records, missing));
}

describe('editor inference', () => {
  it('recognises an already-counted r×c table', () => {
    assert.deepEqual(shapeOf('oven,cracked,burnt\nA,3,4\nB,5,6\n'), { kind: 'counted-table' });
  });

  it('recognises category counts (a label column and one count column)', () => {
    assert.deepEqual(shapeOf('flavour,sold\nplain,40\nseeded,22\nrye,31\n'), { kind: 'category-counts', labelColumn: 'flavour', countColumn: 'sold' });
  });

  it('treats repeated labels as raw records', () => {
    assert.deepEqual(shapeOf('shift,defects\nearly,3\nearly,4\nlate,1\n'), { kind: 'raw' });
  });

  it('profiles columns: numbers, counts, level counts most frequent first, missing tokens left out', () => {
    const records = parseDelimited('dock,minutes\nPark,12.5\nPark,NA\nHarbour,9\n');
    const [dock, minutes] = profileColumns(records, missing);
    assert.deepEqual(dock.levels, [{ label: 'Park', count: 2 }, { label: 'Harbour', count: 1 }]);
    assert.equal(dock.numeric, false);
    assert.equal(minutes.numeric, true);
    assert.equal(minutes.counts, false);
    assert.deepEqual(minutes.firstValues, ['12.5', '9']);
    assert.equal(describeColumn(dock), '2 levels: Park (2), Harbour (1)');
  });

  it('picks the test from the columns chosen', () => {
    const records = parseDelimited(`a,b,x\n${Array.from({ length: 30 }, (_, i) => `p${i % 2},q${i % 3},${i * 1.5}`).join('\n')}\n`);
    const [a, b, x] = profileColumns(records, missing);
    assert.equal(testForColumns([a, b]), 'independence');
    assert.equal(testForColumns([a]), 'goodness-of-fit');
    assert.equal(testForColumns([x]), 'variance');
    assert.equal(testForColumns([]), undefined);
  });

  it('turns counted selections into inline data and raw ones into records', () => {
    const table = sourceFromText('{"table": [[1, 2], [3, 4]], "rowLabels": ["r1", "r2"], "columnLabels": ["c1", "c2"]}', { description: 'sel' });
    assert.equal(table.kind, 'inline');
    assert.equal(table.kind === 'inline' && table.test, 'independence');
    const values = sourceFromText('{"values": [1.5, 2.5, 3]}', { description: 'sel' });
    assert.equal(values.kind === 'inline' && values.test, 'variance');
    const raw = sourceFromText('| shift | result |\n| --- | --- |\n| early | pass |\n| late | fail |\n', { description: 'sel' });
    assert.equal(raw.kind, 'records');
  });
});
