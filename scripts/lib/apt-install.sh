#!/usr/bin/env bash
# Installs Debian packages for the project's scripts: says what it is about to install, waits for another
# apt/dpkg process to finish (bounded), installs only what is needed (--no-install-recommends), and on
# failure prints one line saying what failed and what to do, then exits 1.
# Usage: bash scripts/lib/apt-install.sh "why they are needed" PACKAGE...
set -uo pipefail
why="$1"; shift
[ $# -gt 0 ] || exit 0
fail() { echo "countercheck setup: could not install $*" >&2; exit 1; }

command -v apt-get >/dev/null 2>&1 || fail "$* ($why): this machine has no apt-get; install them with your system's package manager, then run the command again"
SUDO=""
if [ "$(id -u)" -ne 0 ]; then
  command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null || fail "$* ($why): installing needs root; run 'sudo apt-get install --no-install-recommends $*' once, then run the command again"
  SUDO="sudo -n"
fi
wait_s="${COUNTERCHECK_APT_LOCK_TIMEOUT:-300}"
echo "countercheck setup: installing Debian packages for $why: $* (apt-get, --no-install-recommends; waits up to ${wait_s} s if apt is busy)"
log=$(mktemp)
trap 'rm -f "$log"' EXIT
export DEBIAN_FRONTEND=noninteractive
apt_opts=(-o "DPkg::Lock::Timeout=$wait_s" -o "Acquire::Retries=3")
if ! $SUDO apt-get "${apt_opts[@]}" update -qq >"$log" 2>&1; then
  grep -qi 'lock' "$log" && fail "$*: apt is still busy after ${wait_s} s (another install is running); retry in a few minutes"
  fail "$*: 'apt-get update' failed ($(tail -n 1 "$log")); check the network or the apt sources, then retry"
fi
if ! $SUDO apt-get "${apt_opts[@]}" install -y -qq --no-install-recommends "$@" >"$log" 2>&1; then
  grep -qi 'could not get lock\|unable to acquire\|lock-frontend' "$log" && fail "$*: apt is still busy after ${wait_s} s (another install is running); retry in a few minutes"
  fail "$*: apt-get install failed ($(grep -E '^E:' "$log" | tail -n 1)); see 'apt-get install $*'"
fi
echo "countercheck setup: installed $*"
