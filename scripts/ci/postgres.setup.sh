#!/usr/bin/env bash
# PostgreSQL for the live tests (test/pg): installs the server from Debian's packages when missing,
# starts a throwaway cluster in /tmp/countercheck-ci-pg on 127.0.0.1 and a free port, and hands the
# connection file to the tests through $COUNTERCHECK_CI_ENV (read by .ci/run after the setups).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
DIR=/tmp/countercheck-ci-pg

bash "$here/../pg/ensure-server.sh" "$DIR"
if [ -n "${COUNTERCHECK_CI_ENV:-}" ]; then
  echo "COUNTERCHECK_PG_ENV=$DIR/env" >> "$COUNTERCHECK_CI_ENV"
fi
