#!/usr/bin/env bash
# Starts a small distributed PostgreSQL for the tests and benchmarks, out of PostgreSQL's own building blocks:
#   scripts/pg/start-distributed.sh DIR
# three throwaway clusters (scripts/pg/start.sh each: 127.0.0.1, a free port, SCRAM passwords, a non-superuser
# role `countercheck_test`) in DIR/coordinator, DIR/shard1 and DIR/shard2. On the coordinator's database:
#   - the postgres_fdw extension and two foreign servers, `shard1` and `shard2`, with
#     use_remote_estimate (the planner asks the shard for row estimates), fetch_size 10000 (rows per round trip
#     when raw rows must travel) and async_capable (an Append scans both shards at the same time);
#   - a user mapping for `countercheck_test` on each (the shard's own role and password) and USAGE on both servers,
#     so the test role can create foreign tables itself;
#   - enable_partitionwise_aggregate and enable_partitionwise_join on for every session of the database, so a
#     GROUP BY that contains the partition key is aggregated per partition and, on a foreign partition, sent to the
#     shard inside the remote SQL.
# The tables themselves are created by whoever uses the setup (test/pg/distributed.ts, bench/distributed.ts).
# Writes DIR/env (mode 600): the coordinator's PG* lines, SHARD1_ENV and SHARD2_ENV (the shards' own env
# files) and COUNTERCHECK_ADMIN_PWFILE (the coordinator's superuser password, for the benchmark that reroutes
# the foreign servers through a byte counter). Stop with scripts/pg/stop-distributed.sh DIR.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
DIR="${1:?usage: start-distributed.sh DIR}"
case "$DIR" in /|"") echo "refusing to use '$DIR'" >&2; exit 1 ;; esac
bash "$here/stop-distributed.sh" "$DIR" >/dev/null 2>&1 || true
mkdir -p "$DIR"
# Traversable (not listable) by others: as root, start.sh runs each cluster as the `postgres` user.
chmod 711 "$DIR"

# The three clusters start side by side (each picks its own free port).
pids=()
for node in coordinator shard1 shard2; do
  bash "$here/start.sh" "$DIR/$node" >"$DIR/$node.start.log" 2>&1 &
  pids+=($!)
done
failed=0
for pid in "${pids[@]}"; do wait "$pid" || failed=1; done
if [ $failed = 1 ]; then
  for node in coordinator shard1 shard2; do sed "s/^/$node: /" "$DIR/$node.start.log" >&2; done
  bash "$here/stop-distributed.sh" "$DIR" >/dev/null 2>&1
  exit 1
fi

value() { sed -n "s/^$2=//p" "$1"; }
C="$DIR/coordinator/env"
PGBIN=$(value "$C" COUNTERCHECK_PG_BIN)
ADMIN_PASSWORD=$(cat "$DIR/coordinator/admin.pw")
sql="CREATE EXTENSION postgres_fdw;"
for shard in shard1 shard2; do
  S="$DIR/$shard/env"
  sql+="
CREATE SERVER $shard FOREIGN DATA WRAPPER postgres_fdw
  OPTIONS (host '127.0.0.1', port '$(value "$S" PGPORT)', dbname '$(value "$S" PGDATABASE)',
           use_remote_estimate 'true', fetch_size '10000', async_capable 'true');
CREATE USER MAPPING FOR countercheck_test SERVER $shard
  OPTIONS (user '$(value "$S" PGUSER)', password '$(value "$S" PGPASSWORD)');
GRANT USAGE ON FOREIGN SERVER $shard TO countercheck_test;"
done
sql+="
ALTER DATABASE countercheck_test SET enable_partitionwise_aggregate = on;
ALTER DATABASE countercheck_test SET enable_partitionwise_join = on;"
printf '%s\n' "$sql" | PGPASSWORD="$ADMIN_PASSWORD" "$PGBIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 \
  -p "$(value "$C" PGPORT)" -U countercheck_admin -d countercheck_test -f - \
  || { bash "$here/stop-distributed.sh" "$DIR" >/dev/null 2>&1; exit 1; }

umask 077
{
  cat "$C"
  echo "SHARD1_ENV=$DIR/shard1/env"
  echo "SHARD2_ENV=$DIR/shard2/env"
  echo "COUNTERCHECK_ADMIN_PWFILE=$DIR/coordinator/admin.pw"
} > "$DIR/env"
echo "distributed PostgreSQL: coordinator on 127.0.0.1:$(value "$C" PGPORT), shards on $(value "$DIR/shard1/env" PGPORT) and $(value "$DIR/shard2/env" PGPORT) (postgres_fdw); connection in $DIR/env"
