#!/usr/bin/env bash
# Browser tests: opens dist/stagewright.html (from file://) and
# dist/stagewright.js (on pages served inside the browser) in Debian's
# Chromium through playwright-core, with `node --test`.
#
# Installs Chromium from Debian packages when /usr/bin/chromium is missing
# (never a tool's own browser download), installs the test dependency
# (playwright-core only), builds dist/ if it is missing, builds the native
# `stagewright` command (the tests compare the page's report with its
# `analyze --json` for every example design), and runs the tests. Then runs
# the timing script once and prints its figures (it never fails the run).
# sites.test.mjs builds small MkDocs (Material theme) and Sphinx (furo)
# sites with the generators from PyPI, pinned in
# tests/browser/sites/requirements.txt and installed into their own
# virtual environment, target/sites-venv, whose bin folder the test reads
# from STAGEWRIGHT_SITES_PY.
# Screenshots land in tests/browser/artifacts/ (not committed).
set -euo pipefail

cd "$(dirname "${BASH_SOURCE[0]}")/.."
ROOT="$PWD"

if [ ! -x /usr/bin/chromium ]; then
  echo "==> installing Chromium (Debian packages)"
  SUDO=""
  if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
  $SUDO apt-get update
  $SUDO env DEBIAN_FRONTEND=noninteractive apt-get install -y chromium chromium-driver
fi

if [ ! -f dist/stagewright.html ] || [ ! -f dist/stagewright.js ]; then
  echo "==> dist/ is missing: building it"
  bash scripts/build-web.sh
fi

echo "==> building the native stagewright command (reference reports)"
cargo build --release -p stagewright-cli

# The documentation site generators, made again only when the environment
# is missing or the requirements changed: a copy of the file that made it
# is kept inside it, written once the install has succeeded.
SITES_VENV="$ROOT/target/sites-venv"
SITES_REQ="$ROOT/tests/browser/sites/requirements.txt"
if [ ! -x "$SITES_VENV/bin/python" ] || ! cmp -s "$SITES_REQ" "$SITES_VENV/requirements.txt"; then
  echo "==> installing the documentation site generators (tests/browser/sites/requirements.txt)"
  rm -rf "$SITES_VENV"
  python3 -m venv "$SITES_VENV"
  "$SITES_VENV/bin/python" -m pip install --quiet --disable-pip-version-check -r "$SITES_REQ"
  cp "$SITES_REQ" "$SITES_VENV/requirements.txt"
fi
export STAGEWRIGHT_SITES_PY="$SITES_VENV/bin"

cd "$ROOT/tests/browser"
echo "==> installing test dependencies"
if [ -f package-lock.json ]; then
  npm ci --no-audit --no-fund
else
  npm install --no-audit --no-fund
fi

echo "==> running browser tests"
mkdir -p artifacts
node --test --test-concurrency=1

echo "==> timing (recompute + redraw after an edit, start-up, Monte Carlo, synthesis; figures only, never a failure)"
node bench.mjs || echo "(the timing script did not finish; its figures are missing)"
