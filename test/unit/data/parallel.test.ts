// The byte scanner on several threads (src/data/parallel.ts) against the same scanner on one thread,
// on generated files of a bike-share dock log: the results must be the same (counts exactly, moments
// to 1e-12 relative: Pébay's merge reorders the sums), quoting a thread cannot handle must send the
// file to csv-parse, and refusals must name the file's own line. From source the threads run
// src/data/scanWorker.ts under tsx; the bundled dist/scanWorker.js is checked when it has been built.
import { strict as assert } from 'node:assert';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { aggregateFileMany, type FileReadControl } from '../../../src/data/file';
import type { IntakeOptions } from '../../../src/data/options';
import { parallelCounts, type WorkerMessage, type WorkerTask } from '../../../src/data/parallel';
import type { Aggregate, AggregateRequest } from '../../../src/data/types';
import { InputError, isInstance } from '../../../src/errors';

const scratch = mkdtempSync(join(tmpdir(), 'countercheck-parallel-'));
after(() => rmSync(scratch, { recursive: true, force: true }));

function scratchFile(name: string, content: string): string {
  const path = join(scratch, name);
  writeFileSync(path, content);
  return path;
}

const REQUESTS: AggregateRequest[] = [
  { kind: 'crosstab', rowColumn: 'dock', columnColumn: 'bike' },
  { kind: 'crosstab', rowColumn: 'dock', columnColumn: 'bike', weight: 'riders' },
  { kind: 'categories', column: 'bike' },
  { kind: 'numeric', column: 'minutes' },
];

const DOCKS = ['pier', 'market', 'campus', 'station', 'museum'];
const BIKES = ['city', 'electric', 'cargo'];

/** Dock log lines (without the header): deterministic, with missing values here and there. */
function logLines(count: number, seed = 1): string[] {
  let state = seed;
  const next = () => {
    state = (Math.imul(state, 1103515245) + 12345) >>> 0;
    return state / 2 ** 32;
  };
  return Array.from({ length: count }, (_, i) => {
    const dock = i % 97 === 5 ? 'NA' : DOCKS[Math.floor(next() * DOCKS.length)];
    const bike = BIKES[Math.floor(next() * BIKES.length)];
    const minutes = i % 89 === 3 ? '' : (next() * 40 + 1).toFixed(2);
    return `${i + 1},${dock},${bike},${Math.floor(next() * 4)},${minutes}`;
  });
}

const HEADER = 'trip,dock,bike,riders,minutes';

async function read(path: string, control: FileReadControl, options: IntakeOptions = {}) {
  return aggregateFileMany(path, REQUESTS, options, control);
}

/** Counts, labels, rows, dropped and hash exactly; moments to 1e-12 relative (printed on failure). */
function assertSame(got: readonly Aggregate[], expected: readonly Aggregate[]): void {
  assert.equal(got.length, expected.length);
  got.forEach((g, k) => {
    const e = expected[k];
    if (g.kind === 'moments' && e.kind === 'moments') {
      assert.deepEqual(g.provenance, e.provenance);
      for (const key of ['n', 'min', 'max'] as const) assert.equal(g.moments[key], e.moments[key], key);
      for (const key of ['mean', 'm2', 'm3', 'm4'] as const) {
        const delta = Math.abs(g.moments[key] - e.moments[key]);
        const tolerance = 1e-12 * Math.max(1, Math.abs(e.moments[key]));
        assert.ok(delta <= tolerance, `${key}: expected ${e.moments[key]}, got ${g.moments[key]}, Δ ${delta}, tolerance ${tolerance}`);
      }
    } else assert.deepEqual(g, e);
  });
}

async function compare(path: string, control: FileReadControl = {}, options: IntakeOptions = {}) {
  const single = await read(path, { parallel: 'never' }, options);
  const before = { ...parallelCounts };
  const parallel = await read(path, { parallel: 'always', ...control }, options);
  assert.equal(parallel.reader, single.reader);
  assertSame(parallel.aggregates, single.aggregates);
  return { single, parallel, merged: parallelCounts.merged - before.merged, fellBack: parallelCounts.fellBack - before.fellBack };
}

async function inputErrorOf(run: () => Promise<unknown>): Promise<InputError> {
  try {
    await run();
  } catch (e) {
    assert.ok(isInstance(e, InputError), `expected an InputError, got ${String(e)}`);
    return e;
  }
  assert.fail('expected an InputError');
}

describe('parallel byte scanner', function () {
  this.timeout(60_000);

  it('gives the single-threaded result on a generated log, with 2 and 3 threads', async () => {
    const path = scratchFile('log.csv', `${HEADER}\n${logLines(30_000).join('\n')}\n`);
    for (const workers of [2, 3]) {
      const { merged, single } = await compare(path, { workers, chunkSize: 8192 });
      assert.equal(merged, 1, `${workers} threads: the parallel path ran`);
      assert.equal(single.reader, 'byte-scanner');
    }
  });

  it('agrees with pandas on the reference file (test/fixtures/pandas, pandas 1.5.3 crosstab, numpy 1.24.2 var) on 2 and 3 threads', async () => {
    // Written by scripts/fixtures/pandas_crosstab.py; quoted depot names with a comma stay on one line.
    const reference = JSON.parse(readFileSync(join(__dirname, '..', '..', 'fixtures', 'pandas', 'parcels.json'), 'utf8'));
    const path = join(__dirname, '..', '..', 'fixtures', 'pandas', 'parcels.csv');
    for (const workers of [2, 3]) {
      const before = parallelCounts.merged;
      const { aggregates } = await aggregateFileMany(
        path,
        [{ kind: 'crosstab', rowColumn: 'depot', columnColumn: 'size' }, { kind: 'numeric', column: 'weight_kg' }],
        { categories: { order: 'sorted' } },
        { parallel: 'always', workers, chunkSize: 4096 },
      );
      assert.equal(parallelCounts.merged, before + 1);
      const [crosstab, weight] = aggregates;
      assert.ok(crosstab.kind === 'table' && weight.kind === 'moments');
      assert.deepEqual(crosstab.table, { rowLabels: reference.crosstab.rowLabels, columnLabels: reference.crosstab.columnLabels, counts: reference.crosstab.counts });
      assert.equal(crosstab.provenance.dropped, reference.crosstab.dropped);
      assert.equal(weight.moments.n, reference.weight.n);
      const variance = weight.moments.m2 / (weight.moments.n - 1);
      const delta = Math.abs(variance - reference.weight.variance);
      assert.ok(delta <= 1e-12 * reference.weight.variance, `variance: expected ${reference.weight.variance}, got ${variance}, Δ ${delta}, tolerance 1e-12 relative`);
    }
  });

  it('stays on one thread below 64 MB unless asked', async () => {
    const path = scratchFile('small.csv', `${HEADER}\n${logLines(1000, 41).join('\n')}\n`);
    const before = { ...parallelCounts };
    await read(path, {});
    assert.deepEqual(parallelCounts, before);
  });

  it('keeps the file-wide first-seen order: a level first met in a dropped record of the first half, kept in the second', async () => {
    // `hangar` first appears with a missing bike type (dropped) on line 3, and is kept only after the cut.
    const first = ['1,pier,city,1,3.5', '2,hangar,-,1,2.0', ...logLines(2000, 7).slice(2)];
    const second = [...logLines(2000, 9), '9001,hangar,tandem,2,7.25', '9002,quay,city,1,1.5'];
    const path = scratchFile('order.csv', `${HEADER}\n${[...first, ...second].join('\n')}\n`);
    const { parallel, merged } = await compare(path);
    assert.equal(merged, 1);
    const table = parallel.aggregates[0];
    assert.ok(table.kind === 'table');
    // Expected, counted here: docks in the order first met anywhere, among those of a kept record.
    const records = [...first, ...second].map((l) => l.split(','));
    const kept = new Set(records.filter((f) => f[1] !== 'NA' && f[2] !== '-').map((f) => f[1]));
    const firstSeen = [...new Set(records.map((f) => f[1]).filter((d) => d !== 'NA'))].filter((d) => kept.has(d));
    assert.deepEqual(table.table.rowLabels, firstSeen);
    assert.equal(firstSeen[1], 'hangar');
  });

  it('with sorted order, case folding and missing values as a category', async () => {
    const lines = logLines(6000, 3).map((l, i) => (i % 13 === 0 ? l.replace(',city,', ',CITY,') : l));
    const path = scratchFile('options.csv', `${HEADER}\n${lines.join('\n')}\n`);
    const options: IntakeOptions = { categories: { order: 'sorted', caseFold: true }, missing: { policy: 'category', label: '(none)' } };
    const { merged } = await compare(path, {}, options);
    assert.equal(merged, 1);
  });

  it('CRLF, a byte-order mark, comment and blank lines, and no newline at the end', async () => {
    const body = logLines(8000, 5);
    body.splice(4000, 0, '', '# shift change', '');
    const path = scratchFile('crlf.csv', `\ufeff# dock log\r\n\r\n${HEADER}\r\n${body.join('\r\n')}`);
    const { merged } = await compare(path, {}, { dialect: { comment: '#' } });
    assert.equal(merged, 1);
  });

  it('quoted fields on one line in the second half are read by the threads', async () => {
    const body = logLines(6000, 11);
    body[5000] = '5001,"market",city,2,"4.50"';
    const path = scratchFile('quoted.csv', `${HEADER}\n${body.join('\n')}\n`);
    const { merged, single } = await compare(path);
    assert.equal(single.reader, 'byte-scanner');
    assert.equal(merged, 1);
  });

  it('a quoted field spanning the cut between ranges sends the file to csv-parse, as on one thread', async () => {
    // The cut of 2 ranges: the middle of the data bytes, moved to just after the next newline. Find a
    // record position where that newline is the one inside the quoted dock name.
    const body = logLines(6000, 13);
    let spanning: string | undefined;
    for (let i = 2990; i < 3050 && !spanning; i++)
      for (let k = 0; k < 30 && !spanning; k++) {
        const pad = 'x'.repeat(k);
        const text = `${HEADER}\n${[...body.slice(0, i), `${i + 1},"pier${pad}\nnorth",city,1,2.5`, ...body.slice(i + 1)].join('\n')}\n`;
        const dataStart = HEADER.length + 1;
        const at = dataStart + Math.floor((Buffer.byteLength(text) - dataStart) / 2);
        if (text.indexOf('\n', at - 1) === text.indexOf(`"pier${pad}\n`) + pad.length + 5) spanning = text;
      }
    assert.ok(spanning, 'a record position whose quoted newline is the cut');
    const path = scratchFile('spanning.csv', spanning);
    const { single, parallel, fellBack, merged } = await compare(path);
    assert.equal(single.reader, 'csv-parse');
    assert.equal(parallel.reader, 'csv-parse');
    assert.equal(fellBack, 1, 'the parallel attempt gave the file to csv-parse');
    assert.equal(merged, 0);
  });

  it('a bad record in the second half is refused with its own line in the file', async () => {
    const body = logLines(6000, 17);
    body[4500] = '4501,museum,city,2';
    body[5200] = '5201,museum,city,2,ten';
    // Line numbers: the header is line 1, body[k] is line k + 2.
    const path = scratchFile('ragged.csv', `${HEADER}\n${body.join('\n')}\n`);
    const single = await inputErrorOf(() => read(path, { parallel: 'never' }));
    const parallel = await inputErrorOf(() => read(path, { parallel: 'always' }));
    assert.match(single.message, /, line 4502: expected 5 fields/);
    assert.equal(parallel.message, single.message);
    assert.deepEqual(parallel.location, single.location);
    assert.equal(parallel.location.line, 4502);
    // Without the short record, the number that is not one (column `minutes`, line 5202).
    body[4500] = '4501,museum,city,2,1.0';
    writeFileSync(path, `${HEADER}\n${body.join('\n')}\n`);
    const single2 = await inputErrorOf(() => read(path, { parallel: 'never' }));
    const parallel2 = await inputErrorOf(() => read(path, { parallel: 'always', workers: 3 }));
    assert.match(single2.message, /line 5202, column `minutes`: expected a number/);
    assert.equal(parallel2.message, single2.message);
    assert.equal(parallel2.location.line, 5202);
  });

  it('the earliest refusal wins: a bad record in the first range before one in the second', async () => {
    const body = logLines(6000, 19);
    body[1000] = '1001,pier,city,1,x1';
    body[5000] = '5001,pier,city';
    const path = scratchFile('two-bad.csv', `${HEADER}\n${body.join('\n')}\n`);
    const parallel = await inputErrorOf(() => read(path, { parallel: 'always' }));
    assert.equal(parallel.location.line, 1002);
    assert.equal(parallel.message, (await inputErrorOf(() => read(path, { parallel: 'never' }))).message);
  });

  it('an unknown given level and a level limit passed in the second range name the right line', async () => {
    const body = logLines(6000, 23);
    body[4000] = '4001,lighthouse,city,1,3.0';
    const path = scratchFile('levels.csv', `${HEADER}\n${body.join('\n')}\n`);
    const given: IntakeOptions = { categories: { rowLevels: DOCKS, columnLevels: BIKES, levels: BIKES } };
    const single = await inputErrorOf(() => read(path, { parallel: 'never' }, given));
    const parallel = await inputErrorOf(() => read(path, { parallel: 'always' }, given));
    assert.equal(single.location.line, 4002);
    assert.equal(parallel.message, single.message);
    // A limit of 5 levels: the five docks come first, so the file passes the limit at `lighthouse`.
    const limited: IntakeOptions = { categories: { maxLevels: 5 } };
    const single2 = await inputErrorOf(() => read(path, { parallel: 'never' }, limited));
    const parallel2 = await inputErrorOf(() => read(path, { parallel: 'always' }, limited));
    assert.equal(single2.code, 'too-many-levels');
    assert.equal(parallel2.message, single2.message);
  });

  it('a level limit passed only when the ranges are put together is refused at the single-threaded line', async () => {
    // First half: docks pier, market; second half: campus, station (new to the file). Limit 3.
    const half = (docks: string[], from: number) =>
      Array.from({ length: 3000 }, (_, i) => `${from + i},${docks[i % docks.length]},city,1,${(i % 50) / 4}`);
    const path = scratchFile('limit.csv', `${HEADER}\n${[...half(['pier', 'market'], 1), ...half(['campus', 'station'], 3001)].join('\n')}\n`);
    const options: IntakeOptions = { categories: { maxLevels: 3 } };
    const single = await inputErrorOf(() => read(path, { parallel: 'never' }, options));
    const parallel = await inputErrorOf(() => read(path, { parallel: 'always' }, options));
    assert.equal(single.location.line, 3003);
    assert.equal(parallel.message, single.message);
  });

  it('reports progress from the threads, ending at the file size and the record count', async () => {
    const lines = logLines(40_000, 29);
    const path = scratchFile('progress.csv', `${HEADER}\n${lines.join('\n')}\n`);
    const seen: { bytesRead: number; rows: number }[] = [];
    const { aggregates } = await read(path, { parallel: 'always', chunkSize: 4096, onProgress: (p) => seen.push(p) });
    const last = seen[seen.length - 1];
    assert.equal(last.bytesRead, Buffer.byteLength(`${HEADER}\n${lines.join('\n')}\n`));
    assert.equal(last.rows, 40_000);
    assert.equal(aggregates[0].provenance.rows, 40_000);
  });

  it('stops within 200 ms of a cancel request while the threads scan, and rejects with the abort reason', async () => {
    const path = scratchFile('cancel.csv', `${HEADER}\n${logLines(200_000, 31).join('\n')}\n`);
    const controller = new AbortController();
    let abortedAt = 0;
    const reading = read(path, {
      parallel: 'always',
      chunkSize: 2048,
      signal: controller.signal,
      // Abort once a thread has reported progress, so the threads are running.
      onProgress: (p) => {
        if (abortedAt === 0 && p.bytesRead > 0 && p.rows > 0) {
          abortedAt = Date.now();
          controller.abort();
        }
      },
    });
    await assert.rejects(reading, (e: Error) => e.name === 'AbortError');
    const stoppedAfter = Date.now() - abortedAt;
    assert.ok(abortedAt > 0 && stoppedAfter <= 200, `stopped ${stoppedAfter} ms after the abort`);
  });

  const bundled = join(__dirname, '..', '..', '..', 'dist', 'scanWorker.js');
  (existsSync(bundled) ? it : it.skip)('the bundled thread (dist/scanWorker.js, after npm run build) scans a range', async () => {
    const text = `${HEADER}\n${logLines(500, 37).join('\n')}\n`;
    const path = scratchFile('bundled.csv', text);
    const dataStart = HEADER.length + 1;
    const task: WorkerTask = {
      path,
      file: 'bundled.csv',
      intake: { file: 'bundled.csv', dialect: { delimiter: ',', decimal: '.', header: true, comment: null } },
      requests: REQUESTS,
      dialect: { delimiter: ',', decimal: '.', header: true, comment: null },
      encoding: 'utf-8',
      header: { start: 0, end: dataStart },
      start: dataStart,
      end: Buffer.byteLength(text),
      first: false,
      bomLength: 0,
    };
    const message = await new Promise<WorkerMessage>((resolve, reject) => {
      const worker = new Worker(bundled, { workerData: task });
      worker.on('message', (m: WorkerMessage) => {
        if (m.type !== 'progress') resolve(m);
      });
      worker.on('error', reject);
    });
    assert.equal(message.type, 'done');
    if (message.type !== 'done') return;
    // 500 lines from relative line 1: the next would be 501.
    assert.equal(message.nextLine, 501);
    const single = await read(path, { parallel: 'never' });
    assertSame(
      message.parts.map((p) => ({ ...p.aggregate, provenance: { ...p.aggregate.provenance, description: 'x', sha256: 'y' } })),
      single.aggregates.map((a) => ({ ...a, provenance: { ...a.provenance, description: 'x', sha256: 'y' } })),
    );
  });
});
