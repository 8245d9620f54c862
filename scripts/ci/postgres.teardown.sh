#!/usr/bin/env bash
# Stops the cluster of postgres.setup.sh and removes its folder (safe to run when nothing is running).
here="$(cd "$(dirname "$0")" && pwd)"
bash "$here/../pg/stop.sh" /tmp/countercheck-ci-pg
