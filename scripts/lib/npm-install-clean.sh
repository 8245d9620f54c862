#!/usr/bin/env bash
# Runs `npm install --prefix PREFIX SPEC...` as a fresh shell would: without the npm_config_* / npm_* variables
# that an outer `npm run` exports (npm_config_user_agent names the outer Node, and packages such as code-server
# read their Node version from it), and with NODE_BIN_DIR's node first on PATH.
# Usage: bash scripts/lib/npm-install-clean.sh NODE_BIN_DIR PREFIX SPEC... (extra npm_config_* may be set with
# COUNTERCHECK_NPM_NODEDIR for native addons' headers).
set -uo pipefail
node_bin_dir="$1"; prefix="$2"; shift 2
for v in $(compgen -e); do
  case "$v" in npm_*|NPM_*|NODE|INIT_CWD|NODE_OPTIONS) unset "$v" ;; esac
done
export PATH="$node_bin_dir:$PATH"
[ -n "${COUNTERCHECK_NPM_NODEDIR:-}" ] && export npm_config_nodedir="$COUNTERCHECK_NPM_NODEDIR"
exec npm install --prefix "$prefix" --no-audit --no-fund --loglevel=error "$@"
