#!/usr/bin/env bash
# Installs the PostgreSQL server from Debian's packages when it is missing, then starts a throwaway
# cluster in DIR (scripts/pg/start.sh): scripts/pg/ensure-server.sh DIR
# With --distributed, starts the coordinator and two shards of scripts/pg/start-distributed.sh instead.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
start="$here/start.sh"
if [ "${1:-}" = "--distributed" ]; then start="$here/start-distributed.sh"; shift; fi
DIR="${1:?usage: ensure-server.sh [--distributed] DIR}"

if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1; then
  bash "$here/../lib/apt-install.sh" "the PostgreSQL tests" postgresql || exit 1
  SUDO=""; [ "$(id -u)" -eq 0 ] || SUDO="sudo -n"
  # The package may start a default cluster of its own; the tests use a throwaway one, so stop it.
  if command -v pg_lsclusters >/dev/null; then
    pg_lsclusters -h | awk '$4 == "online" { print $1, $2 }' | while read -r version name; do
      $SUDO pg_ctlcluster "$version" "$name" stop || true
    done
  fi
fi

bash "$start" "$DIR"
