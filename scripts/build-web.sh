#!/usr/bin/env bash
# Builds the web deliverables, both every time:
#   dist/stagewright.html           the calculator: self-contained page, opens
#                                   from file:// offline (budget 160 KB gzip)
#   dist/stagewright.js             embeddable classic script defining
#                                   <stagewright-calc>
#   dist/stagewright-designer.html  the offline designer: the calculator plus
#                                   the "from requirements" and tolerance
#                                   views (engine feature `extras`, the views
#                                   of www/src/views/; budget 200 KB gzip)
#   dist/stagewright-designer.js    the same element with those views
#
# Tools: rustup + cargo + node (>= 18) + npm. Steps: add the wasm target if
# missing; install the wasm-bindgen CLI of exactly the version in Cargo.lock
# if the one on PATH differs; install esbuild and lzma1 (npm,
# www/package-lock.json) if missing; `cargo build` the wasm crate with
# a size-tuned release profile; `wasm-bindgen --target no-modules`; then
# `node www/build.mjs` bundles the modules of www/src/ with esbuild and
# inlines everything, prints the size report (raw and gzip of the wasm and
# of both files) and fails when the page is over its budget (calculator:
# 400 KB raw, 160 KB gzip; designer: 400 KB raw, 200 KB gzip). Steps 4 to 6
# run once per deliverable, in the same target directory: only the wasm
# crate is rebuilt the second time.
#
# wasm-opt is never run: the Debian binaryen package produces modules that
# fail at start-up. Nothing here calls it, and wasm-pack (which would) is
# not used.
set -euo pipefail

cd "$(dirname "${BASH_SOURCE[0]}")/.."
ROOT="$PWD"
TARGET=wasm32-unknown-unknown
TARGET_DIR="$ROOT/target/wasm"
OUT_DIR="$ROOT/dist"
say() { printf '\n==> %s\n' "$*"; }

export PATH="${CARGO_HOME:-$HOME/.cargo}/bin:$PATH"

for tool in cargo rustup node; do
  command -v "$tool" >/dev/null 2>&1 || { echo "build-web.sh: '$tool' is required but not on PATH" >&2; exit 1; }
done

# 1. The wasm target.
if ! rustup target list --installed | grep -qx "$TARGET"; then
  say "adding Rust target $TARGET"
  rustup target add "$TARGET"
fi

# 2. The lock file decides the wasm-bindgen version; the CLI must match it.
# The wasm-bindgen crate version the build resolves (cargo metadata reads
# the lock file, and creates it if it is missing); the CLI must match it.
WB_VERSION="$(cargo metadata --format-version 1 --offline 2>/dev/null | node -e '
  let t = ""; process.stdin.on("data", (d) => (t += d)).on("end", () => {
    const p = JSON.parse(t).packages.find((p) => p.name === "wasm-bindgen");
    if (p) console.log(p.version);
  });' || true)"
if [ -z "$WB_VERSION" ]; then
  WB_VERSION="$(cargo metadata --format-version 1 | node -e '
    let t = ""; process.stdin.on("data", (d) => (t += d)).on("end", () => {
      const p = JSON.parse(t).packages.find((p) => p.name === "wasm-bindgen");
      if (p) console.log(p.version);
    });')"
fi
[ -n "$WB_VERSION" ] || { echo "build-web.sh: cargo metadata names no wasm-bindgen" >&2; exit 1; }

HAVE_WB="$(wasm-bindgen --version 2>/dev/null | awk '{print $2}' || true)"
if [ "$HAVE_WB" != "$WB_VERSION" ]; then
  say "installing wasm-bindgen-cli $WB_VERSION (found: ${HAVE_WB:-none})"
  # No --locked: a locked dependency of the CLI is missing from some
  # registry mirrors, and the install then fails.
  cargo install wasm-bindgen-cli --version "$WB_VERSION"
fi

# 3. The packers (npm, www/package-lock.json): esbuild bundles and minifies
# the modules of www/src/, lzma1 compresses the inlined wasm (its decoder
# goes into the page). Both are needed to keep the page within its budget.
if [ ! -d www/node_modules/esbuild ] || [ ! -d www/node_modules/lzma1 ]; then
  say "installing esbuild and lzma1 (www/package-lock.json)"
  (cd www && npm ci --no-audit --no-fund)
fi

# 4.–6., once per deliverable: NAME, then the cargo features and the flag
# for www/build.mjs.
build_one() {
  local name="$1" features=("${@:2}") bindgen_out
  bindgen_out="$TARGET_DIR/bindgen-$name"
  # 4. The wasm module, tuned for size. The root profile is shared with the
  # native builds, so the size settings come in through the environment.
  say "building stagewright-wasm for $TARGET (${name})"
  CARGO_PROFILE_RELEASE_OPT_LEVEL=z \
  CARGO_PROFILE_RELEASE_LTO=true \
  CARGO_PROFILE_RELEASE_CODEGEN_UNITS=1 \
  CARGO_PROFILE_RELEASE_PANIC=abort \
  CARGO_PROFILE_RELEASE_DEBUG=false \
  CARGO_PROFILE_RELEASE_INCREMENTAL=false \
    cargo build -p stagewright-wasm "${features[@]}" --release --target "$TARGET" --target-dir "$TARGET_DIR"

  # 5. JavaScript glue for a classic script (no ES modules: file:// pages
  # cannot load modules or fetch the wasm).
  say "wasm-bindgen $WB_VERSION (no-modules, ${name})"
  rm -rf "$bindgen_out"
  wasm-bindgen "$TARGET_DIR/$TARGET/release/stagewright_wasm.wasm" \
    --out-dir "$bindgen_out" \
    --target no-modules \
    --no-typescript \
    --omit-default-module-path \
    --remove-name-section \
    --remove-producers-section

  # 6. One page and one script, and the size report.
  say "assembling dist/${name}.html and dist/${name}.js"
  if [ "$name" = stagewright-designer ]; then
    node www/build.mjs --bindgen "$bindgen_out" --out "$OUT_DIR" --designer
  else
    node www/build.mjs --bindgen "$bindgen_out" --out "$OUT_DIR"
  fi
}

build_one stagewright
build_one stagewright-designer --features extras
