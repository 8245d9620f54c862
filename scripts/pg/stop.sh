#!/usr/bin/env bash
# Stops the throwaway cluster started by scripts/pg/start.sh and removes its folder:
#   scripts/pg/stop.sh [DIR]       (default DIR: /tmp/countercheck-ci-pg)
set -uo pipefail
DIR="${1:-/tmp/countercheck-ci-pg}"
case "$DIR" in /|"") echo "refusing to remove '$DIR'" >&2; exit 1 ;; esac
[ -d "$DIR" ] || exit 0
PGBIN="${COUNTERCHECK_PGBIN:-$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1)}"
if [ -f "$DIR/data/postmaster.pid" ]; then
  if [ "$(id -u)" -eq 0 ]; then RUNAS=(runuser -u postgres --); else RUNAS=(); fi
  # fast: roll back open transactions and close sessions; immediate if that does not finish in 20 s.
  "${RUNAS[@]}" "$PGBIN/pg_ctl" -D "$DIR/data" -m fast -w -t 20 stop >/dev/null 2>&1 \
    || "${RUNAS[@]}" "$PGBIN/pg_ctl" -D "$DIR/data" -m immediate -w -t 10 stop >/dev/null 2>&1
  if [ -f "$DIR/data/postmaster.pid" ]; then
    pid=$(head -1 "$DIR/data/postmaster.pid")
    [ -n "$pid" ] && kill -KILL "$pid" 2>/dev/null
  fi
fi
rm -rf "$DIR"
echo "stopped and removed $DIR"
