// The trip log on a distributed PostgreSQL built from PostgreSQL's own pieces (scripts/pg/start-distributed.sh):
// a coordinator whose table is partitioned by station, each partition a postgres_fdw foreign table on one of two
// shard servers. Printed: for each request the SQL reader sends, the bytes each shard sent to the coordinator
// (counted by a TCP relay placed between them), against the same statement with partition-wise aggregation off
// and against shipping every column of every row.
// Uses the setup named by COUNTERCHECK_PG_DIST_ENV=<DIR/env>; without it, starts one in a temporary folder and
// stops it afterwards. Rows: COUNTERCHECK_BENCH_DIST_ROWS (default 1,000,000; the bytes of raw rows grow with it,
// those of a pushed-down aggregate barely: 2.1 KB per shard at 100,000 rows, 2.6 KB at 1,000,000).
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createConnection, createServer, type AddressInfo, type Server, type Socket } from 'node:net';
import { join } from 'node:path';
import { Client } from 'pg';
import { aggregateSql, planAggregate, type SqlReaderContext } from '../src/data/sql/index';
import type { AggregateRequest } from '../src/data/types';
import { envFile, tripsSelectSql } from './postgres';

export const SHARDS = ['shard1', 'shard2'] as const;
export type ShardName = (typeof SHARDS)[number];

/** Which stations each shard holds: the list partitions of the coordinator's table. */
export const SHARD_STATIONS: Readonly<Record<ShardName, readonly string[]>> = {
  shard1: ['Harbour', 'Old Town', 'Campus'],
  shard2: ['Riverside', 'Station', 'Hillside'],
};

/** The requests the bench and the tests send: the partition key in the GROUP BY, not in it, and moments. */
export const distributedRequests: readonly { name: string; request: AggregateRequest; higherMoments?: boolean }[] = [
  { name: '6×4 station × bike', request: { kind: 'crosstab', rowColumn: 'station', columnColumn: 'bike' } },
  { name: 'counts of station', request: { kind: 'categories', column: 'station' } },
  { name: 'counts of bike', request: { kind: 'categories', column: 'bike' } },
  { name: 'moments, one scan', request: { kind: 'numeric', column: 'minutes' }, higherMoments: false },
  { name: 'moments, two scans', request: { kind: 'numeric', column: 'minutes' } },
];

export interface DistributedEnv {
  /** PG* lines of the coordinator, as the SQL reader takes them. */
  readonly coordinator: Record<string, string>;
  readonly shards: Readonly<Record<ShardName, Record<string, string>>>;
  /** File holding the coordinator's superuser password (only the bench's byte counter needs it). */
  readonly adminPasswordFile?: string;
}

/** Reads DIR/env written by scripts/pg/start-distributed.sh; undefined when the file is missing. */
export function readDistributedEnv(file: string): DistributedEnv | undefined {
  const coordinator = envFile(file);
  if (!coordinator) return undefined;
  const shards = {} as Record<ShardName, Record<string, string>>;
  for (const shard of SHARDS) {
    const path = coordinator[`${shard.toUpperCase()}_ENV`];
    const env = path ? envFile(path) : undefined;
    if (!env) throw new Error(`${file}: no readable ${shard.toUpperCase()}_ENV (was it written by scripts/pg/start-distributed.sh?)`);
    shards[shard] = env;
  }
  return { coordinator, shards, adminPasswordFile: coordinator.COUNTERCHECK_ADMIN_PWFILE };
}

export async function withClient<T>(env: Record<string, string>, f: (client: Client) => Promise<T>, user = env.PGUSER, password = env.PGPASSWORD): Promise<T> {
  const client = new Client({ host: env.PGHOST, port: Number(env.PGPORT), user, password, database: env.PGDATABASE, application_name: 'countercheck-setup' });
  await client.connect();
  try {
    return await f(client);
  } finally {
    await client.end();
  }
}

const quoteList = (values: readonly string[]): string => values.map((v) => `'${v.replace(/'/g, "''")}'`).join(', ');

/**
 * Creates `table` on the coordinator: partitioned by list of station, one foreign partition per shard. Each shard
 * generates the whole deterministic log and keeps the rows of its stations (`<table>_rows`), so the union is
 * exactly the table `ensureTrips(env, table, rows)` makes on one server. Table names are the caller's literals.
 */
export async function ensureDistributedTrips(dist: DistributedEnv, table: string, rows: number): Promise<void> {
  await Promise.all(
    SHARDS.map((shard) =>
      withClient(dist.shards[shard], async (client) => {
        await client.query(`DROP TABLE IF EXISTS ${table}_rows`);
        await client.query(`CREATE UNLOGGED TABLE ${table}_rows AS SELECT * FROM (${tripsSelectSql(rows)}) AS g WHERE station IN (${quoteList(SHARD_STATIONS[shard])})`);
        await client.query(`ANALYZE ${table}_rows`);
      }),
    ),
  );
  await withClient(dist.coordinator, async (client) => {
    await client.query(`DROP TABLE IF EXISTS ${table}`);
    await client.query(`CREATE TABLE ${table} (id bigint, station text, bike text, minutes double precision) PARTITION BY LIST (station)`);
    for (const shard of SHARDS) {
      await client.query(
        `CREATE FOREIGN TABLE ${table}_${shard} PARTITION OF ${table} FOR VALUES IN (${quoteList(SHARD_STATIONS[shard])}) SERVER ${shard} OPTIONS (schema_name 'public', table_name '${table}_rows')`,
      );
    }
  });
}

export async function dropDistributedTrips(dist: DistributedEnv, table: string): Promise<void> {
  await withClient(dist.coordinator, (client) => client.query(`DROP TABLE IF EXISTS ${table}`));
  await Promise.all(SHARDS.map((shard) => withClient(dist.shards[shard], (client) => client.query(`DROP TABLE IF EXISTS ${table}_rows`))));
}

/** A plan node of `EXPLAIN (VERBOSE, FORMAT JSON)`. */
export interface PlanNode {
  readonly 'Node Type': string;
  readonly 'Partial Mode'?: string;
  readonly 'Relation Name'?: string;
  readonly Relations?: string;
  readonly 'Remote SQL'?: string;
  readonly Plans?: readonly PlanNode[];
}

/** Every node of the coordinator's plan for `text`, depth first. */
export async function coordinatorPlan(env: Record<string, string>, text: string, values: readonly unknown[] = [], settings = ''): Promise<PlanNode[]> {
  return withClient(env, async (client) => {
    if (settings) await client.query(settings);
    const result = await client.query(`EXPLAIN (VERBOSE, FORMAT JSON) ${text}`, [...values]);
    const root = (result.rows[0] as Record<string, [{ Plan: PlanNode }]>)['QUERY PLAN'][0].Plan;
    const nodes: PlanNode[] = [];
    const walk = (node: PlanNode): void => {
      nodes.push(node);
      for (const child of node.Plans ?? []) walk(child);
    };
    walk(root);
    return nodes;
  });
}

/** The remote statements of the Foreign Scans in a plan. */
export const remoteStatements = (plan: readonly PlanNode[]): string[] => plan.filter((n) => n['Remote SQL'] !== undefined).map((n) => n['Remote SQL'] as string);

/** TCP relays in front of the shards, counting what each shard sends; the foreign servers are pointed at them. */
interface Meter {
  readonly sent: Record<ShardName, number>;
  reset(): void;
  close(): Promise<void>;
}

/** Points the coordinator's foreign servers at other ports (as the coordinator's superuser); `{}` restores them. */
export async function pointShards(dist: DistributedEnv, ports: Partial<Record<ShardName, string>>): Promise<void> {
  if (!dist.adminPasswordFile) throw new Error('no COUNTERCHECK_ADMIN_PWFILE in the distributed env file');
  const admin = readFileSync(dist.adminPasswordFile, 'utf8').trim();
  await withClient(dist.coordinator, async (client) => {
    for (const shard of SHARDS) await client.query(`ALTER SERVER ${shard} OPTIONS (SET port '${ports[shard] ?? dist.shards[shard].PGPORT}')`);
  }, 'countercheck_admin', admin);
}

async function meterShards(dist: DistributedEnv): Promise<Meter> {
  const sent = { shard1: 0, shard2: 0 };
  const servers: Server[] = [];
  const sockets = new Set<Socket>();
  const ports = {} as Record<ShardName, number>;
  for (const shard of SHARDS) {
    const target = dist.shards[shard];
    const server = createServer((inbound) => {
      const outbound = createConnection({ host: target.PGHOST, port: Number(target.PGPORT) });
      for (const s of [inbound, outbound]) {
        sockets.add(s);
        s.on('close', () => sockets.delete(s));
        s.on('error', () => { inbound.destroy(); outbound.destroy(); });
      }
      outbound.on('data', (chunk: Buffer) => (sent[shard] += chunk.length));
      inbound.pipe(outbound);
      outbound.pipe(inbound);
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    servers.push(server);
    ports[shard] = (server.address() as AddressInfo).port;
  }
  await pointShards(dist, { shard1: String(ports.shard1), shard2: String(ports.shard2) });
  return {
    sent,
    reset: () => { sent.shard1 = 0; sent.shard2 = 0; },
    close: async () => {
      await pointShards(dist, {});
      for (const s of sockets) s.destroy();
      await Promise.all(servers.map((s) => new Promise((resolve) => s.close(resolve))));
    },
  };
}

async function timed<T>(f: () => Promise<T>): Promise<{ value: T; seconds: number }> {
  const start = process.hrtime.bigint();
  const value = await f();
  return { value, seconds: Number(process.hrtime.bigint() - start) / 1e9 };
}

function startThrowawaySetup(): { dist: DistributedEnv; stop(): void } | undefined {
  const dir = '/tmp/countercheck-bench-dist';
  const script = (name: string) => join(process.cwd(), 'scripts', 'pg', name);
  const stop = () => void spawnSync('bash', [script('stop-distributed.sh'), dir], { stdio: 'ignore' });
  if (spawnSync('bash', [script('ensure-server.sh'), '--distributed', dir], { stdio: 'inherit' }).status !== 0) return undefined;
  const dist = readDistributedEnv(join(dir, 'env'));
  if (!dist) stop();
  return dist ? { dist, stop } : undefined;
}

export async function run(): Promise<void> {
  const configured = process.env.COUNTERCHECK_PG_DIST_ENV ? readDistributedEnv(process.env.COUNTERCHECK_PG_DIST_ENV) : undefined;
  const started = configured ? undefined : startThrowawaySetup();
  const dist = configured ?? started?.dist;
  if (!dist) {
    console.log('distributed PostgreSQL not available (no COUNTERCHECK_PG_DIST_ENV, and scripts/pg/start-distributed.sh could not start one): part skipped.');
    return;
  }
  try {
    await measure(dist);
  } finally {
    started?.stop();
  }
}

const size = (bytes: number): string => (bytes < 10_000 ? `${bytes} B` : `${(bytes / 1e6).toFixed(2)} MB`);

async function measure(dist: DistributedEnv): Promise<void> {
  const rows = Number(process.env.COUNTERCHECK_BENCH_DIST_ROWS ?? 1_000_000);
  const table = 'bench_trips_dist';
  const made = await timed(() => ensureDistributedTrips(dist, table, rows));
  console.log(`${table}: ${rows.toLocaleString('en')} rows, list-partitioned by station over shard1 (${SHARD_STATIONS.shard1.join(', ')}) and shard2 (${SHARD_STATIONS.shard2.join(', ')}), ready in ${made.seconds.toFixed(1)} s`);
  const meter = await meterShards(dist);
  try {
    const context: SqlReaderContext = { connections: { bench: {} }, env: dist.coordinator };
    console.log('request               | remote SQL on each shard              | s     | shard1 sent | shard2 sent | to the client | partition-wise off: shard1 / shard2');
    for (const { name, request, higherMoments } of distributedRequests) {
      const options = { higherMoments };
      const plan = planAggregate({ sql: { connection: 'bench', table } }, request, options);
      const remote = remoteStatements(await coordinatorPlan(dist.coordinator, plan.text));
      const pushed = remote.every((sql) => /\bGROUP BY\b|\bcount\(/.test(sql)) ? 'aggregate (GROUP BY on the shard)' : 'column values (aggregated here)';
      meter.reset();
      let traffic = { bytesRead: 0, bytesWritten: 0 };
      const viaReader = await timed(() => aggregateSql({ sql: { connection: 'bench', table } }, request, { ...context, options, onTraffic: (t) => (traffic = t) }));
      const on = { ...meter.sent };
      meter.reset();
      await withClient(dist.coordinator, async (client) => {
        await client.query('SET enable_partitionwise_aggregate = off');
        await client.query(plan.text, [...plan.values]);
      });
      const off = { ...meter.sent };
      console.log(
        `${name.padEnd(21)} | ${`${remote.length} × ${pushed}`.padEnd(37)} | ${viaReader.seconds.toFixed(2).padStart(5)} | ${size(on.shard1).padStart(11)} | ${size(on.shard2).padStart(11)} | ${size(traffic.bytesRead).padStart(13)} | ${size(off.shard1)} / ${size(off.shard2)}`,
      );
    }
    // Every column of every row, as an export would ship it: a whole-row reference keeps all columns in the remote SQL.
    meter.reset();
    const whole = await timed(() => withClient(dist.coordinator, (client) => client.query(`SELECT sum(octet_length(t::text)) AS text_bytes FROM ${table} AS t`)));
    console.log(`every column of every row (SELECT … FROM ${table}): shard1 sent ${size(meter.sent.shard1)}, shard2 ${size(meter.sent.shard2)} in ${whole.seconds.toFixed(2)} s`);
    console.log(
      'bytes: everything each shard wrote on its connection to the coordinator (startup, authentication, cursor fetches, transaction end), counted by a TCP relay; ' +
        'PostgreSQL 15\'s postgres_fdw pushes an aggregate to a shard only when the GROUP BY holds the partition key (no partial aggregates), so the other requests ship the one column they read',
    );
  } finally {
    await meter.close();
    await dropDistributedTrips(dist, table);
  }
}

export const distributedBench = { name: 'distributed', run };
