// The same saved tests on three copies of one bike-share trip log (1,000,000 rows): a table partitioned by station
// across two shard servers through postgres_fdw (the coordinator of scripts/pg/start-distributed.sh), the same rows in
// one table on one server, and a CSV file written from that table by psql's \copy. Counts agree exactly (the whole
// JSON result, and the data fingerprint between the two servers); the variance to 1e-12 relative. The coordinator's
// plans for the statements the SQL reader sends are checked: an aggregation whose GROUP BY holds the partition key
// runs on the shards; what PostgreSQL 15's postgres_fdw does not push down is asserted too, as
// docs/distributed-sql.md describes it. Reference: the CSV route (src/data/file.ts), which shares no code with the
// server's counting, and PostgreSQL's own aggregation on one server.
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Client } from 'pg';
import {
  coordinatorPlan,
  dropDistributedTrips,
  ensureDistributedTrips,
  pointShards,
  readDistributedEnv,
  remoteStatements,
  SHARD_STATIONS,
  SHARDS,
  withClient,
  type DistributedEnv,
  type PlanNode,
} from '../../bench/distributed';
import { ensureTrips, exportCsv } from '../../bench/postgres';
import { main } from '../../src/cli';
import { aggregateFile } from '../../src/data/file';
import { aggregateSql, planAggregate, type SqlSource } from '../../src/data/sql/index';
import type { AggregateRequest } from '../../src/data/types';
import { assertSameAggregate, leftoverSessions, liveServer } from './server';

const rows = 1_000_000;
const table = 'trips_distributed_check';
const cargoOnly = "bike = 'cargo'";

describe('a table partitioned across two PostgreSQL shards through postgres_fdw', function () {
  const single = liveServer();
  const coordinator = liveServer('COUNTERCHECK_PG_DIST_ENV', 'bash scripts/pg/start-distributed.sh /tmp/cc-pg');
  let dist: DistributedEnv;
  let folder = '';
  let csv = '';
  let cargoCsv = '';

  before(async () => {
    const file = process.env.COUNTERCHECK_PG_DIST_ENV as string;
    const read = readDistributedEnv(file);
    if (!read) throw new Error(`${file}: not a distributed env file`);
    dist = read;
    folder = mkdtempSync(join(tmpdir(), 'countercheck-pg-dist-'));
    csv = join(folder, 'trips.csv');
    cargoCsv = join(folder, 'trips-cargo.csv');
    await Promise.all([ensureTrips(single.env(), table, rows), ensureDistributedTrips(dist, table, rows)]);
    await exportCsv(single.env(), `SELECT * FROM ${table}`, csv);
    await exportCsv(single.env(), `SELECT * FROM ${table} WHERE ${cargoOnly}`, cargoCsv);
  });
  after(async () => {
    if (folder) rmSync(folder, { recursive: true, force: true });
    if (!dist) return; // skipped: no servers configured
    await single.query(`DROP TABLE IF EXISTS ${table}`);
    await dropDistributedTrips(dist, table);
  });

  it('has one foreign partition on each shard server, every row once, and partition-wise aggregation on', async () => {
    const partitions = await coordinator.query(
      `SELECT c.relname, s.srvname, s.srvoptions FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid
         JOIN pg_foreign_table f ON f.ftrelid = c.oid JOIN pg_foreign_server s ON s.oid = f.ftserver
       WHERE i.inhparent = $1::regclass ORDER BY c.relname`,
      [table],
    );
    assert.deepEqual(partitions.map((p) => [p.relname, p.srvname]), SHARDS.map((s) => [`${table}_${s}`, s]));
    for (const [i, shard] of SHARDS.entries()) {
      const options = partitions[i].srvoptions as string[];
      assert.ok(options.includes(`port=${dist.shards[shard].PGPORT}`), `${shard} points at its own server: ${options.join(', ')}`);
      assert.notEqual(dist.shards[shard].PGPORT, coordinator.env().PGPORT);
    }
    let total = 0;
    for (const shard of SHARDS) {
      const counted = await withClient(dist.shards[shard], (client) => client.query(`SELECT station, count(*)::bigint AS n FROM ${table}_rows GROUP BY 1 ORDER BY 1`));
      assert.deepEqual(counted.rows.map((x) => x.station), [...SHARD_STATIONS[shard]].sort(), `${shard} holds exactly its stations`);
      for (const x of counted.rows) total += Number(x.n);
    }
    assert.equal(total, rows, 'the shards together hold every row once');
    const settings = await coordinator.query(
      "SELECT current_setting('enable_partitionwise_aggregate') AS aggregate, current_setting('enable_partitionwise_join') AS join",
    );
    assert.deepEqual(settings[0], { aggregate: 'on', join: 'on' });
  });

  const statement = (request: AggregateRequest, options: { higherMoments?: boolean } = {}, where?: string) =>
    planAggregate({ sql: { connection: 'dist', table }, ...(where ? { where } : {}) }, request, options);
  const foreignScans = (plan: readonly PlanNode[]) => plan.filter((n) => n['Remote SQL'] !== undefined);

  const byPartitionKey: [string, AggregateRequest][] = [
    ['station × bike', { kind: 'crosstab', rowColumn: 'station', columnColumn: 'bike' }],
    ['counts of station', { kind: 'categories', column: 'station' }],
  ];
  for (const [name, request] of byPartitionKey) {
    it(`sends the whole aggregation to the shards when the GROUP BY holds the partition key: ${name}`, async () => {
      const plan = await coordinatorPlan(coordinator.env(), statement(request).text);
      const scans = foreignScans(plan);
      assert.equal(scans.length, 2, `one Foreign Scan per shard: ${JSON.stringify(plan.map((n) => n['Node Type']))}`);
      for (const [i, scan] of scans.entries()) {
        assert.match(scan.Relations ?? '', new RegExp(`^Aggregate on \\(public\\.${table}_${SHARDS[i]} `), 'the scan is an aggregate on the partition');
        assert.match(scan['Remote SQL'] ?? '', /count\(\*\).* GROUP BY /s, `the shard counts: ${scan['Remote SQL']}`);
      }
      const local = plan.filter((n) => /Aggregate/.test(n['Node Type']));
      assert.deepEqual(local, [], 'nothing is aggregated on the coordinator');
      // The setting is what makes the difference: without it the shards send raw values.
      const off = await coordinatorPlan(coordinator.env(), statement(request).text, [], 'SET enable_partitionwise_aggregate = off');
      for (const sql of remoteStatements(off)) assert.doesNotMatch(sql, /GROUP BY|count\(/, `partition-wise aggregation off: ${sql}`);
    });
  }

  it('ships only the needed column, with the condition applied on the shard, where PostgreSQL 15 cannot push the aggregate', async () => {
    // postgres_fdw (PostgreSQL 15) pushes no partial aggregate: a GROUP BY without the partition key, and the moments
    // over the whole table, are finished on the coordinator. If this fails, the server now pushes them: update
    // docs/distributed-sql.md ("What was verified on a distributed PostgreSQL") and the bench's note.
    const cases: [string, string, RegExp][] = [
      ['counts of bike', statement({ kind: 'categories', column: 'bike' }).text, /^SELECT bike FROM public\.trips_distributed_check_rows$/],
      ['moments', statement({ kind: 'numeric', column: 'minutes' }, { higherMoments: false }).text, /^SELECT minutes FROM public\.trips_distributed_check_rows$/],
      ['moments of cargo bikes', statement({ kind: 'numeric', column: 'minutes' }, { higherMoments: false }, cargoOnly).text, /^SELECT minutes FROM public\.trips_distributed_check_rows WHERE \(\(bike = 'cargo'(::text)?\)\)$/],
    ];
    for (const [name, text, expected] of cases) {
      const plan = await coordinatorPlan(coordinator.env(), text);
      const remote = remoteStatements(plan);
      assert.equal(remote.length, 2, `${name}: one Foreign Scan per shard`);
      for (const sql of remote) assert.match(sql, expected, `${name}: ${sql}`);
      assert.ok(plan.some((n) => n['Partial Mode'] === 'Partial'), `${name}: partial aggregates on the coordinator`);
    }
  });

  it('names the shard that does not answer, and leaves no session open on the coordinator', async () => {
    await pointShards(dist, { shard2: '1' });
    try {
      await assert.rejects(
        aggregateSql({ sql: { connection: 'dist', table } }, { kind: 'categories', column: 'station' }, { connections: { dist: {} }, env: coordinator.env() }),
        (e: Error & { code?: string }) => {
          assert.equal(e.code, 'sql-error');
          assert.match(e.message, /could not connect to server "shard2" \(SQLSTATE 08001\)/);
          return true;
        },
      );
    } finally {
      await pointShards(dist, {});
    }
    assert.deepEqual(await leftoverSessions(coordinator.query), []);
  });

  it('stops the query on the shard too when the statement timeout ends it on the coordinator', async () => {
    // A lock on shard1 holds the remote scan; the coordinator's timeout must cancel it there (postgres_fdw sends
    // the cancel request on abort), not leave it waiting until the lock goes.
    const e = dist.shards.shard1;
    const holder = new Client({ host: e.PGHOST, port: Number(e.PGPORT), user: e.PGUSER, password: e.PGPASSWORD, database: e.PGDATABASE, application_name: 'test-harness' });
    await holder.connect();
    const waiting = () =>
      withClient(e, async (client) => (await client.query("SELECT pid FROM pg_stat_activity WHERE application_name = 'postgres_fdw' AND wait_event_type = 'Lock'")).rows);
    try {
      await holder.query('BEGIN');
      await holder.query(`LOCK TABLE ${table}_rows IN ACCESS EXCLUSIVE MODE`);
      const started = Date.now();
      const run = aggregateSql({ sql: { connection: 'dist', table } }, { kind: 'categories', column: 'station' }, { connections: { dist: {} }, env: coordinator.env(), timeoutMs: 2000 });
      run.catch(() => undefined);
      let seen = 0;
      while (seen === 0 && Date.now() - started < 1500) seen = (await waiting()).length;
      assert.ok(seen > 0, 'a statement from the coordinator waits on shard1 while the lock is held');
      await assert.rejects(run, (err: Error & { code?: string }) => err.code === 'sql-timeout');
      assert.ok(Date.now() - started < 10_000, `stopped after ${Date.now() - started} ms`);
      const until = Date.now() + 5000;
      let left = await waiting();
      while (left.length > 0 && Date.now() < until) {
        await new Promise((r) => setTimeout(r, 100));
        left = await waiting();
      }
      assert.deepEqual(left, [], 'no remote scan still waits on shard1');
    } finally {
      await holder.query('ROLLBACK').catch(() => undefined);
      await holder.end();
    }
    assert.deepEqual(await leftoverSessions(coordinator.query), []);
  });

  // The saved tests below cover the other requests through the command line; the one-scan moments
  // (`higherMoments: false`, var_samp combined from the shards' partial states) only run here.
  const requests: { name: string; request: AggregateRequest; higherMoments?: boolean; where?: string }[] = [
    { name: 'moments, one scan', request: { kind: 'numeric', column: 'minutes' }, higherMoments: false },
    { name: 'moments of cargo bikes, one scan (a condition)', request: { kind: 'numeric', column: 'minutes' }, higherMoments: false, where: cargoOnly },
  ];
  for (const { name, request, higherMoments, where } of requests) {
    it(`gives the same aggregate on the shards, on one server and from the CSV: ${name}`, async () => {
      const source = (connection: string): SqlSource => ({ sql: { connection, table }, ...(where ? { where } : {}) });
      const options = { higherMoments };
      const viaShards = await aggregateSql(source('dist'), request, { connections: { dist: {} }, env: coordinator.env(), options });
      const viaServer = await aggregateSql(source('single'), request, { connections: { single: {} }, env: single.env(), options });
      const viaFile = await aggregateFile(where ? cargoCsv : csv, request, { dialect: { header: true, comment: null }, categories: { order: 'sorted' } });
      assertSameAggregate(viaShards, viaServer, name, ['shards', 'one server']);
      assertSameAggregate(viaShards, viaFile, name, ['shards', 'CSV']);
      assert.ok(viaShards.provenance.rows >= (where ? 200_000 : rows), `records read: ${viaShards.provenance.rows}`);
    });
  }

  describe('saved tests from the command line', () => {
    const saved: Record<string, string | undefined> = {};
    before(() => {
      for (const key of ['COUNTERCHECK_CONNECTION_DIST', 'COUNTERCHECK_CONNECTION_SINGLE', 'PGPASSWORD']) saved[key] = process.env[key];
      for (const [name, e] of [['DIST', coordinator.env()], ['SINGLE', single.env()]] as const) {
        process.env[`COUNTERCHECK_CONNECTION_${name}`] = `postgresql://${encodeURIComponent(e.PGUSER)}@${e.PGHOST}:${e.PGPORT}/${encodeURIComponent(e.PGDATABASE)}?sslmode=disable`;
      }
    });
    after(() => {
      for (const [key, value] of Object.entries(saved)) {
        if (value === undefined) delete process.env[key];
        else process.env[key] = value;
      }
    });

    /** Runs one spec with `source`; the two servers have different passwords, so PGPASSWORD is set per run. */
    async function run(name: string, spec: Record<string, unknown>, source: Record<string, unknown>, password?: string): Promise<Record<string, unknown>> {
      const file = join(folder, `${name}.countercheck.json`);
      writeFileSync(file, JSON.stringify({ version: 1, ...spec, source }));
      if (password) process.env.PGPASSWORD = password;
      else delete process.env.PGPASSWORD;
      let out = '';
      let err = '';
      const code = await main(['run', '--json', file], { stdout: (s) => (out += s), stderr: (s) => (err += s), readStdin: async () => '', cwd: folder });
      assert.equal(code, 0, `${name}: ${err}`);
      const result = JSON.parse(out) as Record<string, unknown>;
      delete result.file;
      return result;
    }

    /**
     * The variance test's results agree number by number. The statistic, estimates and intervals to 1e-12 relative;
     * skewness and excess kurtosis (O(1) figures that may sit near 0, from the third and fourth deviation sums) to
     * 1e-12 absolute; the tail probabilities to 1e-12 times their condition number κ = x·f(x)/p (the statistic's
     * allowed 1e-12 amplified by the tail: κ ≈ 8,000 for the 1,000,000-row test, whose p is about 1e-30). The
     * chi-square density f at the statistic comes from Stirling's series for lnΓ (error below 1/(360a³); df ≥ 20 here).
     */
    function assertSameVarianceResult(a: Record<string, unknown>, b: Record<string, unknown>, label: string): void {
      const x = a.statistic as number;
      const df = a.df as number;
      assert.ok(df >= 20, `df ${df}`);
      const half = df / 2;
      const lnGamma = (half - 0.5) * Math.log(half) - half + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * half);
      const lnDensity = (half - 1) * Math.log(x) - x / 2 - half * Math.LN2 - lnGamma;
      const tails = (a.details as { lowerTail: { log10: number }; upperTail: { log10: number } });
      const lnTail = Math.min(tails.lowerTail.log10, tails.upperTail.log10) * Math.LN10;
      const kappa = Math.max(1, x * Math.exp(lnDensity - lnTail));
      const ids = ((a.estimates as { id: string }[] | undefined) ?? []).map((e) => e.id);
      const walk = (u: unknown, v: unknown, path: string): void => {
        if (typeof u === 'number' && typeof v === 'number') {
          const delta = Math.abs(u - v);
          const scale = Math.max(Math.abs(u), Math.abs(v));
          const estimate = /^estimates\.(\d+)\./.exec(path);
          let tolerance = 1e-12 * scale;
          if (/pValue$|Tail\.value$/.test(path)) tolerance = kappa * 1e-12 * scale;
          else if (/pValueLog10$|Tail\.log10$/.test(path)) tolerance = (kappa * 1e-12) / Math.LN10 + 1e-12 * scale;
          else if (estimate && ['skewness', 'excessKurtosis'].includes(ids[Number(estimate[1])])) tolerance = 1e-12;
          assert.ok(delta <= tolerance, `${label}: ${path}: shards ${u}, ${label} ${v}, Δ ${delta}, tolerance ${tolerance} (κ ${kappa.toFixed(0)})`);
        } else if (u && v && typeof u === 'object' && typeof v === 'object') {
          assert.deepEqual(Object.keys(u).sort(), Object.keys(v).sort(), `${label}: ${path}: fields`);
          for (const key of Object.keys(u)) walk((u as Record<string, unknown>)[key], (v as Record<string, unknown>)[key], path ? `${path}.${key}` : key);
        } else assert.deepEqual(u, v, `${label}: ${path}`);
      };
      walk(a, b, '');
    }

    const specs: [string, Record<string, unknown>, string[], string?][] = [
      ['independence', { test: 'independence' }, ['station', 'bike']],
      ['goodness-of-fit-station', { test: 'goodness-of-fit' }, ['station']],
      ['goodness-of-fit-bike', { test: 'goodness-of-fit', proportions: { cargo: 0.25, classic: 0.25, electric: 0.25, tandem: 0.25 } }, ['bike']],
      ['variance', { test: 'variance', sigma0: 13, alternative: 'two-sided' }, ['minutes']],
      ['variance-cargo', { test: 'variance', sigma0: 13, alternative: 'greater' }, ['minutes'], cargoOnly],
    ];
    for (const [name, spec, columns, where] of specs) {
      it(`${name}: the same result on the shards, on one server and from the CSV`, async () => {
        const sql = (connection: string) => ({ sql: { connection, table }, columns, ...(where ? { where } : {}) });
        const viaShards = await run(`${name}-dist`, spec, sql('dist'), coordinator.env().PGPASSWORD);
        const viaServer = await run(`${name}-single`, spec, sql('single'), single.env().PGPASSWORD);
        const viaFile = await run(`${name}-csv`, spec, { path: where ? 'trips-cargo.csv' : 'trips.csv', columns, categories: 'sorted' });
        assert.equal(viaShards.test, spec.test);
        assert.ok(typeof viaShards.statistic === 'number' && Number.isFinite(viaShards.statistic), `statistic ${String(viaShards.statistic)}`);
        const data = (r: Record<string, unknown>) => r.data as Record<string, unknown>;
        assert.equal(data(viaShards).rows, data(viaFile).rows, 'records read');
        // The description names the source; the CSV's fingerprint is of its bytes.
        for (const r of [viaShards, viaServer, viaFile]) delete data(r).description;
        assert.equal(typeof data(viaFile).sha256, 'string');
        delete data(viaFile).sha256;
        if (spec.test === 'variance') {
          // The fingerprint of moments rounds them to 12 significant digits; values that differ in the 14th digit
          // can round apart, so it is not compared here.
          for (const r of [viaShards, viaServer]) delete data(r).sha256;
          assertSameVarianceResult(viaShards, viaServer, 'one server');
          assertSameVarianceResult(viaShards, viaFile, 'CSV');
        } else {
          // Counts are exact: the whole result, the data fingerprint included, is the same on both servers.
          assert.match(String(data(viaShards).sha256), /^[0-9a-f]{64}$/);
          assert.deepEqual(viaShards, viaServer, 'one server');
          delete data(viaShards).sha256;
          assert.deepEqual(viaShards, viaFile, 'CSV');
        }
      });
    }
  });
});
