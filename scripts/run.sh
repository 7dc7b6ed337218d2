#!/usr/bin/env bash
# Builds the calculator (dist/stagewright.html and dist/stagewright.js), the
# offline designer (dist/stagewright-designer.html and .js) and the command
# line, prints where both pages are (opening the calculator when a desktop
# is available), then analyses an example design.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/build-web.sh
page="$PWD/dist/stagewright.html"
designer="$PWD/dist/stagewright-designer.html"
echo
echo "calculator: file://$page"
echo "            (the lean page, also for wikis: dist/stagewright.js)"
echo "designer:   file://$designer"
echo "            (offline, with the \"from requirements\" and tolerance views)"
if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ] && command -v xdg-open >/dev/null 2>&1; then
  xdg-open "$page" >/dev/null 2>&1 || true
fi
echo
cargo build --release -q -p stagewright-cli
./target/release/stagewright analyze examples/transducer-gain-stage.json
