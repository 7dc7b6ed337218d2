#!/usr/bin/env bash
# Builds the web deliverable, one element with every view:
#   dist/stagewright.html  the calculator: self-contained page, opens from
#                          file:// offline (budget 280 KB gzip, 800 KB raw)
#   dist/stagewright.js    embeddable classic script defining
#                          <stagewright-calc>
# Both carry every view: the calculator, "from requirements" and
# tolerances (www/src/views/), built only when a view is first opened.
#
# Tools: rustup + cargo + node (>= 18) + npm. Steps: add the wasm target if
# missing; install the wasm-bindgen CLI of exactly the version in Cargo.lock
# if the one on PATH differs; install esbuild (npm, www/package-lock.json)
# if missing; `cargo build` the wasm crate with a size-tuned release
# profile; `wasm-bindgen --target no-modules`; then `node www/build.mjs`
# bundles the modules of www/src/ with esbuild and inlines everything
# (the wasm gzip-compressed, as base64; the page unpacks it with the
# browser's own DecompressionStream), prints the size report (raw and gzip
# of the wasm and of both files) and fails when the page is over its
# budget.
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

# 3. The bundler (npm, www/package-lock.json): esbuild bundles and
# minifies the modules of www/src/.
if [ ! -d www/node_modules/esbuild ]; then
  say "installing esbuild (www/package-lock.json)"
  (cd www && npm ci --no-audit --no-fund)
fi

# 4. The wasm module, tuned for size. The root profile is shared with the
# native builds, so the size settings come in through the environment.
BINDGEN_OUT="$TARGET_DIR/bindgen"
say "building stagewright-wasm for $TARGET"
CARGO_PROFILE_RELEASE_OPT_LEVEL=z \
CARGO_PROFILE_RELEASE_LTO=true \
CARGO_PROFILE_RELEASE_CODEGEN_UNITS=1 \
CARGO_PROFILE_RELEASE_PANIC=abort \
CARGO_PROFILE_RELEASE_DEBUG=false \
CARGO_PROFILE_RELEASE_INCREMENTAL=false \
  cargo build -p stagewright-wasm --release --target "$TARGET" --target-dir "$TARGET_DIR"

# 5. JavaScript glue for a classic script (no ES modules: file:// pages
# cannot load modules or fetch the wasm).
say "wasm-bindgen $WB_VERSION (no-modules)"
rm -rf "$BINDGEN_OUT"
wasm-bindgen "$TARGET_DIR/$TARGET/release/stagewright_wasm.wasm" \
  --out-dir "$BINDGEN_OUT" \
  --target no-modules \
  --no-typescript \
  --omit-default-module-path \
  --remove-name-section \
  --remove-producers-section

# 6. One page and one script, and the size report. Files of the former
# second deliverable are removed, so that nothing stale is served.
say "assembling dist/stagewright.html and dist/stagewright.js"
rm -f "$OUT_DIR/stagewright-designer.html" "$OUT_DIR/stagewright-designer.js"
node www/build.mjs --bindgen "$BINDGEN_OUT" --out "$OUT_DIR"
