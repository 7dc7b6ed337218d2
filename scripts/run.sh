#!/usr/bin/env bash
# Builds the calculator (dist/stagewright.html, and dist/stagewright.js for
# wikis: one element with every view) and the command line, prints where
# the page is (opening it when a desktop is available), then analyses an
# example design.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/build-web.sh
page="$PWD/dist/stagewright.html"
echo
echo "calculator: file://$page"
echo "            (views: calculator, from requirements, tolerances;"
echo "             for wikis: dist/stagewright.js, see www/EMBEDDING.md)"
if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ] && command -v xdg-open >/dev/null 2>&1; then
  xdg-open "$page" >/dev/null 2>&1 || true
fi
echo
cargo build --release -q -p stagewright-cli
./target/release/stagewright analyze examples/transducer-gain-stage.json
