#!/usr/bin/env bash
# Stops the clusters started by scripts/pg/start-distributed.sh and removes their folder:
#   scripts/pg/stop-distributed.sh DIR
set -uo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
DIR="${1:?usage: stop-distributed.sh DIR}"
case "$DIR" in /|"") echo "refusing to remove '$DIR'" >&2; exit 1 ;; esac
[ -d "$DIR" ] || exit 0
for node in coordinator shard1 shard2; do bash "$here/stop.sh" "$DIR/$node" >/dev/null; done
rm -rf "$DIR"
echo "stopped and removed $DIR"
