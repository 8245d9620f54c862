#!/usr/bin/env bash
# Starts a throwaway PostgreSQL cluster for the tests and benchmarks:
#   scripts/pg/start.sh [DIR]      (default DIR: /tmp/countercheck-ci-pg)
# initdb in DIR/data, listening on 127.0.0.1 only, on a free port, with password (SCRAM) authentication;
# creates database `countercheck_test` owned by role `countercheck_test` (no superuser) and writes the
# connection as PG* variables to DIR/env (mode 600): `set -a; . DIR/env; set +a`, or point the tests at it
# with COUNTERCHECK_PG_ENV=DIR/env. Stop with scripts/pg/stop.sh DIR. Runs as root (switches to the
# `postgres` user, since initdb refuses root) or as an ordinary user.
set -euo pipefail

DIR="${1:-/tmp/countercheck-ci-pg}"
here="$(cd "$(dirname "$0")" && pwd)"
# A cluster left by an earlier run is stopped and removed first.
bash "$here/stop.sh" "$DIR" >/dev/null 2>&1 || true

PGBIN="${COUNTERCHECK_PGBIN:-$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1)}"
[ -x "$PGBIN/initdb" ] || { echo "PostgreSQL server binaries not found (looked in /usr/lib/postgresql/*/bin)" >&2; exit 1; }

if [ "$(id -u)" -eq 0 ]; then
  RUNAS=(runuser -u postgres --)
  id postgres >/dev/null 2>&1 || useradd --system --home-dir /var/lib/postgresql --shell /bin/false postgres
else
  RUNAS=()
fi

mkdir -p "$DIR"
chmod 700 "$DIR"
[ "$(id -u)" -eq 0 ] && chown postgres "$DIR"
secret() { head -c 18 /dev/urandom | base64 | tr '+/' 'xy'; }
ADMIN_PASSWORD=$(secret)
TEST_PASSWORD=$(secret)
umask 077
printf '%s\n' "$ADMIN_PASSWORD" > "$DIR/admin.pw"
[ "$(id -u)" -eq 0 ] && chown postgres "$DIR/admin.pw"

"${RUNAS[@]}" "$PGBIN/initdb" -D "$DIR/data" -U countercheck_admin --pwfile="$DIR/admin.pw" \
  --auth-local=scram-sha-256 --auth-host=scram-sha-256 -E UTF8 --locale=C.UTF-8 >"$DIR/initdb.log" 2>&1 \
  || { cat "$DIR/initdb.log" >&2; exit 1; }

# A free port: bind port 0 and read what the kernel chose.
PORT=$(node -e 'const s=require("net").createServer().listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close()})')

"${RUNAS[@]}" "$PGBIN/pg_ctl" -D "$DIR/data" -l "$DIR/server.log" -w -t 60 start -o \
  "-c listen_addresses=127.0.0.1 -p $PORT -k $DIR -c max_connections=40 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c shared_buffers=128MB -c max_parallel_workers_per_gather=2 -c log_min_messages=warning" \
  >/dev/null || { cat "$DIR/server.log" >&2; exit 1; }

psql_admin() { PGPASSWORD="$ADMIN_PASSWORD" "$PGBIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 -p "$PORT" -U countercheck_admin "$@"; }
psql_admin -d postgres -c "CREATE ROLE countercheck_test LOGIN PASSWORD '$TEST_PASSWORD'" \
  -c "CREATE DATABASE countercheck_test OWNER countercheck_test ENCODING 'UTF8'"

cat > "$DIR/env" <<ENV
PGHOST=127.0.0.1
PGPORT=$PORT
PGDATABASE=countercheck_test
PGUSER=countercheck_test
PGPASSWORD=$TEST_PASSWORD
PGSSLMODE=disable
COUNTERCHECK_PG_BIN=$PGBIN
ENV
echo "PostgreSQL $("$PGBIN/postgres" --version | awk '{print $3}') on 127.0.0.1:$PORT (data in $DIR/data); connection in $DIR/env"
