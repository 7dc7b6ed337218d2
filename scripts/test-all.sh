#!/usr/bin/env bash
# Runs every test of the project: formatting, lints, unit and cross-check
# tests, docs, the bare-metal build of the core, the web build and the
# browser tests. Installs what it needs on a fresh machine.
set -euo pipefail
cd "$(dirname "$0")/.."

step() { printf '\n==> %s\n' "$*"; }

step "toolchain targets"
rustup target add thumbv6m-none-eabi wasm32-unknown-unknown >/dev/null 2>&1 || rustup target add thumbv6m-none-eabi wasm32-unknown-unknown
rustup component add rustfmt clippy >/dev/null 2>&1 || true

step "test tools"
# xmllint (Debian's libxml2-utils) validates the JUnit report of
# `stagewright check --junit` against cli/tests/junit.xsd.
if ! command -v xmllint >/dev/null 2>&1; then
  SUDO=""
  if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
  $SUDO env DEBIAN_FRONTEND=noninteractive apt-get install -y -q libxml2-utils >/dev/null 2>&1 ||
    { $SUDO apt-get update -q >/dev/null && $SUDO env DEBIAN_FRONTEND=noninteractive apt-get install -y -q libxml2-utils; }
fi

step "cargo fmt --check"
cargo fmt --all --check

step "cargo clippy"
cargo clippy --workspace --all-targets -- -D warnings

step "cargo test"
cargo test --workspace

step "cargo doc (warnings denied)"
RUSTDOCFLAGS="-D warnings" cargo doc --workspace --no-deps

step "core without std for thumbv6m-none-eabi"
cargo build -p stagewright --no-default-features --target thumbv6m-none-eabi
cargo build -p stagewright --no-default-features --features serde --target thumbv6m-none-eabi

if [ -f scripts/build-web.sh ]; then
  step "web build"
  bash scripts/build-web.sh
fi
if [ -f scripts/test-browser.sh ]; then
  step "browser tests"
  bash scripts/test-browser.sh
fi
step "all tests passed"
