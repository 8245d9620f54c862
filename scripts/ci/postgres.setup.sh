#!/usr/bin/env bash
# PostgreSQL for the live tests (test/pg): installs the server from Debian's packages when missing,
# starts a throwaway cluster in /tmp/countercheck-ci-pg on 127.0.0.1 and a free port, and hands the
# connection file to the tests through $COUNTERCHECK_CI_ENV (read by .ci/run after the setups).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
DIR=/tmp/countercheck-ci-pg

if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1; then
  echo "installing postgresql with apt-get"
  SUDO=""; [ "$(id -u)" -eq 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq postgresql
  # The package may start a default cluster of its own; the tests use a throwaway one, so stop it.
  if command -v pg_lsclusters >/dev/null; then
    pg_lsclusters -h | awk '$4 == "online" { print $1, $2 }' | while read -r version name; do
      $SUDO pg_ctlcluster "$version" "$name" stop || true
    done
  fi
fi

bash "$here/../pg/start.sh" "$DIR"
if [ -n "${COUNTERCHECK_CI_ENV:-}" ]; then
  echo "COUNTERCHECK_PG_ENV=$DIR/env" >> "$COUNTERCHECK_CI_ENV"
fi
