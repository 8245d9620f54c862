#!/usr/bin/env bash
# Renders one HTML or SVG file to a PNG with headless Chromium: render.sh INPUT OUTPUT.png WIDTH HEIGHT
set -euo pipefail
in="$1"; out="$2"; w="$3"; h="$4"
page="$in"
if [[ "$in" == *.svg ]]; then page="$(mktemp --suffix=.html)"; printf '<html><body style="margin:0;background:transparent">%s</body></html>' "$(cat "$in")" > "$page"; fi
timeout 60 chromium --headless=new --no-sandbox --disable-gpu --hide-scrollbars --default-background-color=00000000 \
  --window-size="$w,$h" --screenshot="$(realpath "$out")" "file://$(realpath "$page")" >/dev/null 2>&1
