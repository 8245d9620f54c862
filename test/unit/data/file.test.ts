// Files streamed from disk: dialect files in test/fixtures/dialects (hand-made: a ferry ticket office,
// expected values counted by hand below), the pandas reference file, encodings, progress,
// cancellation and refusals.
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile, aggregateFileMany } from '../../../src/data/file';
import type { IntakeOptions } from '../../../src/data/options';
import type { AggregateRequest } from '../../../src/data/types';
import { rejectsInput } from './expect';

const fixtures = join(__dirname, '..', '..', 'fixtures');
const dialects = join(fixtures, 'dialects');
const scratch = mkdtempSync(join(tmpdir(), 'countercheck-data-'));

function scratchFile(name: string, content: string | Uint8Array): string {
  const path = join(scratch, name);
  writeFileSync(path, content);
  return path;
}

const FERRY = {
  byPassengers: { kind: 'crosstab', rowColumn: 'route', columnColumn: 'class', weight: 'passengers' } as AggregateRequest,
  records: { kind: 'crosstab', rowColumn: 'route', columnColumn: 'class' } as AggregateRequest,
  wait: { kind: 'numeric', column: 'wait_min' } as AggregateRequest,
};

// Counted by hand from the seven records (see the files).
const EXPECTED_WEIGHTED = { rowLabels: ['Île de Ré', "Île d'Yeu", 'Groix, port'], columnLabels: ['standard', 'flexi'], counts: [[3, 3], [0, 1], [4, 2]] };
const EXPECTED_RECORDS = [[2, 1], [1, 1], [1, 1]];
// Waits 12.5, 3.25, 0.5, 7, 4.75, 10: mean 38/6, s² = (338.625 − 38²/6)/5 = 587.75/30.
const EXPECTED_VARIANCE = 587.75 / 30;

const cases: { file: string; options: IntakeOptions; reader: string }[] = [
  { file: 'ferry-semicolon-decimal-comma.csv', options: {}, reader: 'byte-scanner' },
  { file: 'ferry-tab.tsv', options: {}, reader: 'byte-scanner' },
  { file: 'ferry-bom-crlf.csv', options: {}, reader: 'csv-parse' },
  { file: 'ferry-latin1.csv', options: { dialect: { encoding: 'latin1' } }, reader: 'byte-scanner' },
  { file: 'ferry-utf16.csv', options: {}, reader: 'csv-parse' },
];

describe('data: files', () => {
  after(() => rmSync(scratch, { recursive: true, force: true }));

  for (const c of cases) {
    it(`reads ${c.file} to the hand-counted tables and variance`, async () => {
      for (const engine of ['auto', 'csv-parse'] as const) {
        const { aggregates, reader } = await aggregateFileMany(join(dialects, c.file), [FERRY.byPassengers, FERRY.records, FERRY.wait], c.options, { engine });
        assert.equal(reader, engine === 'auto' ? c.reader : 'csv-parse');
        const [weighted, records, wait] = aggregates;
        assert.ok(weighted.kind === 'table' && records.kind === 'table' && wait.kind === 'moments');
        assert.deepEqual(weighted.table, EXPECTED_WEIGHTED);
        assert.equal(weighted.provenance.dropped, 1);
        assert.deepEqual(records.table.counts, EXPECTED_RECORDS);
        assert.equal(records.provenance.rows, 7);
        assert.equal(wait.moments.n, 6);
        assert.equal(wait.provenance.dropped, 1);
        const variance = wait.moments.m2 / (wait.moments.n - 1);
        const delta = Math.abs(variance - EXPECTED_VARIANCE);
        assert.ok(delta <= 1e-14 * EXPECTED_VARIANCE, `${c.file} (${engine}): variance expected ${EXPECTED_VARIANCE}, got ${variance}, Δ ${delta}, tolerance 1e-14 relative`);
      }
    });
  }

  it('hashes every byte of the file (SHA-256 as node:crypto and coreutils compute it)', async () => {
    const path = join(dialects, 'ferry-tab.tsv');
    const a = await aggregateFile(path, FERRY.records);
    const b = await aggregateFile(path, FERRY.records, {}, { engine: 'csv-parse' });
    const { createHash } = await import('node:crypto');
    assert.equal(a.provenance.sha256, createHash('sha256').update(new Uint8Array(readFileSync(path))).digest('hex'));
    assert.equal(b.provenance.sha256, a.provenance.sha256);
  });

  describe('against pandas (test/fixtures/pandas, written by scripts/fixtures/pandas_crosstab.py)', () => {
    const reference = JSON.parse(readFileSync(join(fixtures, 'pandas', 'parcels.json'), 'utf8'));
    const path = join(fixtures, 'pandas', 'parcels.csv');
    for (const engine of ['auto', 'csv-parse'] as const) {
      it(`agrees exactly with pandas.crosstab and with numpy's variance to 1e-12 (${engine}; pandas ${reference.versions.pandas}, numpy ${reference.versions.numpy})`, async () => {
        const { aggregates } = await aggregateFileMany(
          path,
          [{ kind: 'crosstab', rowColumn: 'depot', columnColumn: 'size' }, { kind: 'numeric', column: 'weight_kg' }, { kind: 'categories', column: 'depot' }],
          { categories: { order: 'sorted' } },
          { engine, chunkSize: 4096 },
        );
        const [crosstab, weight, depots] = aggregates;
        assert.ok(crosstab.kind === 'table' && weight.kind === 'moments' && depots.kind === 'categories');
        assert.deepEqual(crosstab.table, {
          rowLabels: reference.crosstab.rowLabels,
          columnLabels: reference.crosstab.columnLabels,
          counts: reference.crosstab.counts,
        });
        assert.equal(crosstab.provenance.dropped, reference.crosstab.dropped);
        assert.equal(crosstab.provenance.rows, reference.rows);
        for (const [label, n] of Object.entries(reference.depotCounts)) assert.equal(depots.counts.counts[depots.counts.labels.indexOf(label)], n, label);
        assert.equal(weight.moments.n, reference.weight.n);
        assert.equal(weight.provenance.dropped, reference.weight.dropped);
        assert.equal(weight.moments.min, reference.weight.min);
        assert.equal(weight.moments.max, reference.weight.max);
        const variance = weight.moments.m2 / (weight.moments.n - 1);
        const delta = Math.abs(variance - reference.weight.variance);
        assert.ok(delta <= 1e-12 * reference.weight.variance, `variance: expected ${reference.weight.variance}, got ${variance}, Δ ${delta}, tolerance 1e-12 relative`);
      });
    }
  });

  it('reads a line longer than the read buffer', async () => {
    const long = 'x'.repeat(10000);
    const path = scratchFile('long.csv', `label,n\n${long},1\nshort,2\n`);
    const a = await aggregateFile(path, { kind: 'categories', column: 'label', weight: 'n' }, {}, { chunkSize: 1024 });
    assert.deepEqual(a.kind === 'categories' && a.counts.counts, [1, 2]);
  });

  it('reports progress, ending with every byte read', async () => {
    const path = join(fixtures, 'pandas', 'parcels.csv');
    const seen: number[] = [];
    await aggregateFile(path, { kind: 'categories', column: 'size' }, {}, { onProgress: (p) => seen.push(p.bytesRead), chunkSize: 65536 });
    assert.ok(seen.length >= 1);
    assert.equal(seen[seen.length - 1], readFileSync(path).length);
  });

  it('stops within 200 ms of a cancel request and rejects with the abort reason', async () => {
    // About 3 MB, read in 4 KiB chunks, so the read is still going when the abort comes.
    const rows = Array.from({ length: 150_000 }, (_, i) => `${i % 7},${i % 3},${(i * 0.37).toFixed(2)}`).join('\n');
    const path = scratchFile('cancel.csv', `a,b,x\n${rows}\n`);
    for (const engine of ['auto', 'csv-parse'] as const) {
      const controller = new AbortController();
      const started = Date.now();
      const reading = aggregateFile(path, { kind: 'crosstab', rowColumn: 'a', columnColumn: 'b' }, {}, { signal: controller.signal, chunkSize: 4096, engine });
      setTimeout(() => controller.abort(), 20);
      let abortedAt = 0;
      controller.signal.addEventListener('abort', () => (abortedAt = Date.now()));
      await assert.rejects(reading, (e: Error) => e.name === 'AbortError');
      const stoppedAfter = Date.now() - abortedAt;
      assert.ok(abortedAt > started && stoppedAfter <= 200, `${engine}: stopped ${stoppedAfter} ms after the abort`);
    }
  });

  describe('refusals', () => {
    it('names a missing file', async () => {
      await rejectsInput(() => aggregateFile(join(scratch, 'nope.csv'), FERRY.records, { file: 'nope.csv' }), 'nope.csv: found no file at this path', 'file-not-found');
    });
    it('refuses a folder', async () => {
      await rejectsInput(() => aggregateFile(scratch, FERRY.records, { file: 'data' }), 'data: this is a folder; expected a data file', 'not-a-file');
    });
    it('refuses a file with NUL bytes, naming the line', async () => {
      const path = scratchFile('binary.csv', new Uint8Array([0x61, 0x0a, 0x62, 0x00, 0x63]));
      await rejectsInput(
        () => aggregateFile(path, FERRY.records, { file: 'binary.csv' }),
        'binary.csv, line 2: found a NUL byte; expected text (is this a binary file, or UTF-16 without a byte-order mark? then set the encoding to `utf-16`)',
        'binary-file',
      );
    });
    it('refuses an empty file', async () => {
      const path = scratchFile('empty.csv', '');
      await rejectsInput(() => aggregateFile(path, FERRY.records, { file: 'empty.csv' }), 'empty.csv: found no records; expected at least one line of data', 'empty-input');
    });
    for (const engine of ['auto', 'csv-parse'] as const) {
      it(`refuses a ragged record by line, never shifting columns (${engine})`, async () => {
        const path = scratchFile('ragged.csv', 'route,class\nA,x\nB\nC,y\n');
        await rejectsInput(
          () => aggregateFile(path, FERRY.records, { file: 'ragged.csv' }, { engine, chunkSize: 5 }),
          'ragged.csv, line 3: expected 2 fields (as in the header on line 1), found 1; a record with another number of fields would shift the columns',
          'ragged-row',
        );
      });
      it(`refuses a bad weight by line and column (${engine})`, async () => {
        const lines = ['route,class,passengers', ...Array.from({ length: 810 }, (_, i) => `A,x,${i % 5}`), 'B,y,n/a'];
        const path = scratchFile('weights.csv', `${lines.join('\n')}\n`);
        await rejectsInput(
          () => aggregateFile(path, FERRY.byPassengers, { file: 'weights.csv' }, { engine, chunkSize: 64 }),
          'weights.csv, line 812, column `passengers`: expected a frequency weight (a non-negative whole number), found `n/a`',
          'bad-count',
        );
      });
    }
    for (const engine of ['auto', 'csv-parse'] as const)
      it(`names the weight first when a record has a bad weight and an unknown category (${engine})`, async () => {
        const path = scratchFile('both.csv', 'route,class,passengers\nA,x,1\nB,z,-1\n');
        await rejectsInput(
          () => aggregateFile(path, FERRY.byPassengers, { file: 'both.csv', categories: { rowLevels: ['A', 'B'], columnLevels: ['x', 'y'] } }, { engine }),
          'both.csv, line 3, column `passengers`: expected a frequency weight (a non-negative whole number), found `-1`',
          'bad-count',
        );
      });
    it('refuses a file that changes while it is read', async () => {
      const path = scratchFile('growing.csv', 'route,class\nA,x\nB,y\n');
      const { appendFileSync } = await import('node:fs');
      await rejectsInput(
        () =>
          aggregateFile(path, FERRY.records, { file: 'growing.csv' }, {
            // The last progress report comes after the last read: the file grows just then.
            onProgress: (p) => p.bytesRead === p.totalBytes && appendFileSync(path, 'C,z\n'),
          }),
        'growing.csv: the file changed while it was being read; expected it unchanged (read it again once it is written)',
        'file-changed',
      );
    });
    it('refuses an unclosed quote in a file, through csv-parse', async () => {
      const path = scratchFile('quote.csv', 'route,class\nA,"x\nB,y\n');
      await rejectsInput(
        () => aggregateFile(path, FERRY.records, { file: 'quote.csv' }),
        'quote.csv, line 3: the text ends inside a quoted field; expected a closing `"` (look for an unpaired quote above)',
        'unclosed-quote',
      );
    });
  });
});
