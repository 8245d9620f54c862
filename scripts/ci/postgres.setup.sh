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
fi

bash "$here/../pg/start.sh" "$DIR"
if [ -n "${COUNTERCHECK_CI_ENV:-}" ]; then
  echo "COUNTERCHECK_PG_ENV=$DIR/env" >> "$COUNTERCHECK_CI_ENV"
fi
