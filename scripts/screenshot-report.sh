#!/usr/bin/env bash
# Renders a report.html to a PNG screenshot in headless Chromium, installing
# Debian's chromium package first if it is missing.
#   scripts/screenshot-report.sh lagfold-out/monthly-steady/report.html [out.png] [height]
set -euo pipefail
report=${1:?usage: $0 path/to/report.html [out.png] [height]}
out=${2:-${report%.html}.png}
height=${3:-2400}
if ! command -v chromium >/dev/null 2>&1; then
    if [ "$(id -u)" -eq 0 ]; then apt-get update -qq && apt-get install -y -qq chromium >/dev/null
    else sudo apt-get update -qq && sudo apt-get install -y -qq chromium >/dev/null; fi
fi
profile=$(mktemp -d)
trap 'rm -rf "$profile"' EXIT
abs=$(cd "$(dirname "$report")" && pwd)/$(basename "$report")
case "$out" in /*) ;; *) out=$(pwd)/$out ;; esac
chromium --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$profile" --hide-scrollbars \
    --screenshot="$out" --window-size=1280,"$height" "file://$abs" 2>/dev/null
echo "wrote $out"
