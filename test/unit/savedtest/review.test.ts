// Recording a result into a spec's text, and comparing a re-run with it.
import { strict as assert } from 'node:assert';
import { folderMembership } from '../../../src/savedtest/family';
import { parseJsonWithLocations } from '../../../src/savedtest/json-text';
import { compareWithRecord, describeReview, makeRecord, numberDifferences, reviewExitCode, writeRecordedInto, type RecordedResult } from '../../../src/savedtest/review';
import type { SpecRun } from '../../../src/savedtest/types';
import type { TestResult } from '../../../src/stats/result';

const now = new Date('2026-11-30T12:00:00Z');

function fakeRun(statistic: number, p: number, sha = 'a'.repeat(64), rows = 100): SpecRun {
  const result: TestResult = {
    kind: 'test',
    test: 'independence',
    procedure: 'Chi-square test of independence',
    statisticSymbol: 'X²',
    statistic,
    df: 2,
    n: rows,
    pValue: { value: p, log10: Math.log10(p) },
    alternative: null,
    reference: { kind: 'chi-square', df: 2 },
    alpha: 0.05,
    significant: p < 0.05,
    conclusion: p < 0.05 ? 'associated' : 'no evidence',
    otherStatistics: [],
    effectSizes: [{ id: 'cramersV', name: "Cramér's V", value: Math.sqrt(statistic / rows) }],
    estimates: [],
    notices: [],
    assumptions: [],
  };
  return { result, data: { sha256: sha, rows, columns: ['shift', 'defect'], description: 'data/x.csv' } };
}

function record(run: SpecRun): RecordedResult {
  return JSON.parse(JSON.stringify(makeRecord(run, 'countercheck 0.1.0', now))) as RecordedResult;
}

describe('recorded results', () => {
  it('inserts "recorded" as the last member, keeping every other byte and the indentation', () => {
    const text = '{\n    "test": "independence",\n    "table": [[1, 2], [3, 4]]   \n}\n';
    const updated = writeRecordedInto(parseJsonWithLocations(text), makeRecord(fakeRun(1, 0.6), 'countercheck 0.1.0', now));
    assert.ok(updated.startsWith('{\n    "test": "independence",\n    "table": [[1, 2], [3, 4]],\n    "recorded": {\n        "tool": "countercheck 0.1.0",'), updated);
    assert.ok(updated.endsWith('\n    }   \n}\n'), JSON.stringify(updated.slice(-30)));
    const parsed = JSON.parse(updated);
    assert.deepEqual(parsed.table, [[1, 2], [3, 4]]);
    assert.equal(parsed.recorded.result.statistic, 1);
  });

  it('replaces an existing record in place and leaves the fields after it untouched', () => {
    const text = '{\r\n  "test": "independence",\r\n  "recorded": {"old": true},\r\n  "table": [[1, 2], [3, 4]]\r\n}';
    const updated = writeRecordedInto(parseJsonWithLocations(text), makeRecord(fakeRun(2, 0.4), 'countercheck 0.1.0', now));
    assert.ok(updated.startsWith('{\r\n  "test": "independence",\r\n  "recorded": {\r\n    "tool"'));
    assert.ok(updated.endsWith('\r\n  },\r\n  "table": [[1, 2], [3, 4]]\r\n}'));
    assert.ok(!/[^\r]\n/.test(updated), 'keeps CRLF line endings');
    assert.equal(JSON.parse(updated).recorded.result.statistic, 2);
  });

  it('writes a one-line spec back on one line', () => {
    const updated = writeRecordedInto(parseJsonWithLocations('{"test":"independence","table":[[1,2],[3,4]]}'), makeRecord(fakeRun(1, 0.6), 't', now));
    assert.ok(!updated.includes('\n'));
    assert.equal(JSON.parse(updated).recorded.tool, 't');
  });

  it('writes into an empty object, a tab-indented spec and a spec with a byte-order mark, changing nothing else', () => {
    const record = makeRecord(fakeRun(1, 0.6), 't', now);
    const empty = writeRecordedInto(parseJsonWithLocations('{}\n'), record);
    assert.ok(empty.startsWith('{\n  "recorded": {\n    "tool": "t",') && empty.endsWith('\n  }\n}\n'), empty);
    const emptyLines = writeRecordedInto(parseJsonWithLocations('{\n}'), record);
    assert.ok(emptyLines.startsWith('{\n  "recorded": {') && emptyLines.endsWith('\n  }\n}'), emptyLines);
    const tabs = '{\n\t"test": "independence",\n\t"table": [[1, 2], [3, 4]]\n}';
    const tabbed = writeRecordedInto(parseJsonWithLocations(tabs), record);
    assert.ok(tabbed.startsWith('{\n\t"test": "independence",\n\t"table": [[1, 2], [3, 4]],\n\t"recorded": {\n\t\t"tool": "t",'), tabbed);
    const bom = '\ufeff{"test": "independence", "table": [[1, 2], [3, 4]]}';
    const withBom = writeRecordedInto(parseJsonWithLocations(bom), record);
    assert.ok(withBom.startsWith(bom.slice(0, -1) + ',"recorded":{"tool":"t"'), withBom);
    assert.equal(JSON.parse(withBom.slice(1)).recorded.tool, 't');
  });

  it('is reproduced when the data and numbers are the same', () => {
    const run = fakeRun(7.5, 0.0235);
    const review = compareWithRecord(record(run), run, 'countercheck 0.1.0', now);
    assert.equal(review.status, 'reproduced');
    assert.equal(reviewExitCode([review]), 0);
    assert.match(describeReview(review, 'x.countercheck.json'), /^reproduced: x\.countercheck\.json\n {2}same data \(sha256 a{12}…, 100 rows\); statistic 7\.5/);
  });

  it('treats differences below the stated tolerance as equal, and above it as a regression', () => {
    assert.deepEqual(numberDifferences({ a: 1 }, { a: 1 + 1e-12 }), []);
    assert.equal(numberDifferences({ a: 1 }, { a: 1 + 1e-8 }).length, 1);
  });

  it('says "result differs" when the data is the same but the numbers are not', () => {
    const run = fakeRun(7.5, 0.0235);
    const altered = record(run);
    const tampered = { ...altered, result: { ...altered.result, statistic: 7.6 } };
    const review = compareWithRecord(tampered, run, 'countercheck 0.1.0', now);
    assert.equal(review.status, 'result-differs');
    assert.deepEqual(review.differences.map((d) => d.field), ['statistic']);
    assert.equal(reviewExitCode([review]), 1);
    assert.match(describeReview(review, 'x'), /statistic: recorded 7\.6, now 7\.5/);
  });

  it('says "data changed" with old and new n and statistic, and whether the conclusion flipped', () => {
    const before = fakeRun(7.5, 0.0235, 'a'.repeat(64), 100);
    const afterSame = fakeRun(7.1, 0.029, 'b'.repeat(64), 101);
    const afterFlipped = fakeRun(5.2, 0.074, 'c'.repeat(64), 101);
    const same = compareWithRecord(record(before), afterSame, 't', now);
    assert.equal(same.status, 'data-changed');
    assert.equal(same.conclusionFlipped, false);
    const flipped = compareWithRecord(record(before), afterFlipped, 't', now);
    assert.equal(flipped.conclusionFlipped, true);
    const text = describeReview(flipped, 'x');
    assert.match(text, /recorded 100 rows .* now 101 rows/);
    assert.match(text, /n 100 → 101; statistic 7\.5 → 5\.2/);
    assert.match(text, /conclusion FLIPPED at α = 0\.05: was significant, now not significant/);
  });

  it('cannot compare a spec without a record, and says how to make one', () => {
    const review = compareWithRecord(undefined, fakeRun(1, 0.5), 't', now);
    assert.equal(review.status, 'cannot-run');
    assert.match(review.reason!, /--record/);
    assert.equal(reviewExitCode([review, compareWithRecord(record(fakeRun(1, 0.5)), fakeRun(1, 0.5), 't', now)]), 2);
  });
});

describe('a saved test among the saved tests of its folder', () => {
  it('is numbered in file-name order among the hypothesis tests; lookups and power questions are not members', () => {
    const specs = [
      { name: 'c-variance.countercheck.json', test: 'variance' },
      { name: 'a-lookup.countercheck.json', test: 'distribution' },
      { name: 'b-mix.countercheck.json', test: 'goodness-of-fit' },
      { name: 'd-plan.countercheck.json', test: 'power' },
      { name: 'e-ovens.countercheck.json', test: 'independence' },
    ];
    assert.deepEqual(folderMembership(specs, 'c-variance.countercheck.json'), { position: 2, size: 3, kind: 'folder' });
    assert.equal(folderMembership(specs, 'a-lookup.countercheck.json'), undefined);
    assert.equal(folderMembership([specs[0]], 'c-variance.countercheck.json'), undefined);
  });
});
