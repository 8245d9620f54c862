#!/usr/bin/env node
// Writes demo/data/tea-shipments.parquet with DuckDB (@duckdb/node-api, a dev dependency), deterministic
// (every value a function of the row number through DuckDB's hash()): `node scripts/make-demo-parquet.mjs`.
// The scenario is invented: a tea subscription's parcels for one quarter, zstd-compressed, row groups of 2,048.
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DuckDBInstance } from '@duckdb/node-api';

const out = join(dirname(fileURLToPath(import.meta.url)), '..', 'demo', 'data', 'tea-shipments.parquet');
const db = await DuckDBInstance.create(':memory:');
const sql = await db.connect();
await sql.run(`
  copy (
    select
      i + 1 as parcel,
      ['north', 'south', 'east', 'west', 'islands'][(hash(i, 'region') % 5)::int + 1] as region,
      ['sampler', 'classic', 'family'][(hash(i, 'box') % 3)::int + 1] as box,
      -- Filling by weight: about 480.7 g, standard deviation about 2.05 g (a scaled sum of six uniforms, close to
      -- normal), a few parcels not weighed.
      case when hash(i, 'w') % 97 = 0 then null
           else round(472 + 2.9 * ((hash(i, 'a') % 1000) + (hash(i, 'b') % 1000) + (hash(i, 'c') % 1000)
                                 + (hash(i, 'd') % 1000) + (hash(i, 'e') % 1000) + (hash(i, 'f') % 1000)) / 1000.0, 1) end as weight_g
    from range(12000) t(i)
  ) to '${out}' (format parquet, compression 'zstd', row_group_size 2048)`);
console.log(`wrote ${out}`);
