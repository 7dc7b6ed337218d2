#!/usr/bin/env node
// Assembles one deliverable, a script and a page, from the wasm-bindgen
// output and www/:
//
//   dist/stagewright.js    one classic script: glue, wasm and the element in
//                          one function scope; defines <stagewright-calc>;
//                          a second copy on the same page does nothing.
//   dist/stagewright.html  one self-contained page (the same script inline,
//                          plus www/page.js) that opens from file:// and
//                          makes no network request; its own CSP allows
//                          only its inline script (by hash) and wasm.
//
// With --designer (an engine built with the cargo feature `extras`), the
// offline designer instead: dist/stagewright-designer.js and
// dist/stagewright-designer.html, the same element with the "from
// requirements" and tolerance views of www/views.js, and its own budget.
//
// The wasm is LZMA-compressed before base64 (npm `lzma1` at build time,
// its decoder bundled into the script by esbuild): about 12 % smaller than
// the best gzip (zopfli), 9 % after the 3.5 KB of the decoder, and it
// unpacks in about 50 ms. Raw base64 would add a third to the size.
//
// Usage: node www/build.mjs [--bindgen DIR] [--out DIR] [--designer]
// (scripts/build-web.sh runs cargo and wasm-bindgen first, then this.)

import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { gzipSync } from "node:zlib";

// terser, esbuild and lzma1 (www/package.json; scripts/build-web.sh runs
// `npm ci` in www/).
let minify, esbuild, lzmaCompress;
try {
  ({ minify } = await import("terser"));
  esbuild = await import("esbuild");
  ({ compress: lzmaCompress } = await import("lzma1"));
} catch (e) {
  throw new Error("terser, esbuild or lzma1 is missing: run `npm ci` in www/ (scripts/build-web.sh does)");
}

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, "..");

function arg(name, fallback) {
  const i = process.argv.indexOf(name);
  return i > 0 && process.argv[i + 1] ? path.resolve(process.argv[i + 1]) : fallback;
}

const bindgenDir = arg("--bindgen", path.join(root, "target", "wasm", "bindgen"));
// --designer: the engine was built with the feature `extras`; add the views
// of www/views.js and write the designer's files.
const extras = process.argv.includes("--designer");
const outDir = arg("--out", path.join(root, "dist"));
const baseName = extras ? "stagewright-designer" : "stagewright";

// Size budgets of the standalone pages (DEVELOPERS.md, "Size"): the
// calculator 400 KB raw and 160 KB gzipped (150 KB until the page read
// design files with the core's own JSON reader, which costs about 17 KB
// of the compressed engine: serde_json's parser with correctly rounded
// numbers), the designer 400 KB raw and 200 KB gzipped.
const BUDGET_HTML_RAW = 400 * 1000;
const BUDGET_HTML_GZIP = (extras ? 200 : 160) * 1000;

const read = (p) => readFileSync(p, "utf8");

function workspaceVersion() {
  const toml = read(path.join(root, "Cargo.toml"));
  const block = /\[workspace\.package\]([\s\S]*?)(\n\[|$)/.exec(toml);
  const m = block && /\bversion\s*=\s*"([^"]+)"/.exec(block[1]);
  return m ? m[1] : "0.0.0";
}

/** Drops the glue's JSDoc blocks (whole lines inside / ** … * /) and blank
 * lines. Only comment lines are touched, so code is unchanged. */
function trimGlue(js) {
  const out = [];
  let inDoc = false;
  for (const line of js.split("\n")) {
    const t = line.trim();
    if (!inDoc && t.startsWith("/**")) {
      inDoc = !t.endsWith("*/");
      continue;
    }
    if (inDoc) {
      if (t.endsWith("*/")) inDoc = false;
      continue;
    }
    if (t === "") continue;
    out.push(line);
  }
  return out.join("\n");
}

/** Removes whole-line comments, indentation and blank lines from our own
 * hand-written JS or CSS. Only whole lines are touched, so strings keep
 * their content; a line with an unbalanced backtick (a template literal
 * running over lines, whose indentation would matter) stops the build. */
function trimSource(text, name) {
  const out = [];
  let inBlock = false;
  text.split("\n").forEach((line, i) => {
    const t = line.trim();
    if ((t.match(/`/g) || []).length % 2 === 1) {
      throw new Error(`${name}:${i + 1}: template literals must not span lines (the build trims indentation)`);
    }
    if (inBlock) {
      if (t.includes("*/")) {
        if (!t.endsWith("*/")) throw new Error(`${name}:${i + 1}: code after a block comment`);
        inBlock = false;
      }
      return;
    }
    if (t.startsWith("/*")) {
      if (!t.includes("*/")) inBlock = true;
      else if (!t.endsWith("*/")) throw new Error(`${name}:${i + 1}: code after a block comment`);
      return;
    }
    if (t.startsWith("//") || t === "") return;
    out.push(t);
  });
  return out.join("\n");
}

/** Makes script text safe inside an HTML <script> element. "</script" and
 * "<!--" only occur inside strings, comments or regular expressions here,
 * where the escaped forms mean the same. */
function forInlineScript(js) {
  return js.replace(/<\/(script)/gi, "<\\/$1").replace(/<!--/g, "<\\!--");
}

/** The glue's `debugString` (a 57-line printer of any JavaScript value,
 * reached only when Rust formats a JsValue with `{:?}` in a message nobody
 * sees) becomes `String(val)`: 0.4 KB of the page's gzip budget. Checked:
 * the build stops if the glue no longer has that function. */
function plainDebugString(js) {
  const start = js.indexOf("function debugString(val) {");
  if (start < 0) return js;
  const indent = /\n(\s*)$/.exec(js.slice(0, start))[1];
  const end = js.indexOf(`\n${indent}}`, start);
  if (end < 0) throw new Error("unexpected wasm-bindgen glue: debugString has no end");
  return `${js.slice(0, start)}function debugString(val) { return String(val); }${js.slice(end + indent.length + 2)}`;
}

const version = workspaceVersion();
const glue = plainDebugString(trimGlue(read(path.join(bindgenDir, "stagewright_wasm.js"))));
if (!/let wasm_bindgen\b/.test(glue)) {
  throw new Error("unexpected wasm-bindgen glue: expected the no-modules target (let wasm_bindgen = …)");
}
// The engine must match the deliverable: the designer's views call the
// exports of the feature `extras`, and the calculator must not carry them.
if (/\bdesign_from_spec\b/.test(glue) !== extras) {
  throw new Error(extras
    ? "the designer needs an engine built with `--features extras` (its glue has no design_from_spec)"
    : "the calculator's engine was built with the feature `extras`: build it without");
}
const wasmPath = path.join(bindgenDir, "stagewright_wasm_bg.wasm");
const wasm = readFileSync(wasmPath);

/** The wasm in LZMA format ("lzma alone": properties, size, stream),
 * mode 9 of the npm package lzma1, whose own decoder unpacks it in the
 * page. */
const wasmLzma = Buffer.from(lzmaCompress(wasm, 9));

/** The decoder: lzma1's Decoder and its buffers only (not the encoder),
 * bundled by esbuild into one expression `STAGEWRIGHT_UNLZMA =
 * {unlzma(bytes)}` that the element calls once. Modern syntax (class
 * fields) is kept: every browser with wasm-bindgen's output has it. */
function lzmaDecoder() {
  const lib = path.join(here, "node_modules", "lzma1", "lib");
  const entry = [
    `import { Decoder } from ${JSON.stringify(path.join(lib, "decoder.js"))};`,
    `import { InputBuffer, OutputBuffer } from ${JSON.stringify(path.join(lib, "streams.js"))};`,
    "export function unlzma(bytes) {",
    "  const out = new OutputBuffer(bytes.length * 4);",
    "  new Decoder().decompress(new InputBuffer(bytes), out);",
    "  return out.buf.subarray(0, out.count);",
    "}",
  ].join("\n");
  const out = esbuild.buildSync({
    stdin: { contents: entry, resolveDir: here, sourcefile: "unlzma.js" },
    bundle: true,
    minify: true,
    format: "iife",
    globalName: "STAGEWRIGHT_UNLZMA",
    target: "es2022",
    legalComments: "none",
    write: false,
  });
  return out.outputFiles[0].text.trim();
}
const decoder = lzmaDecoder();
if (!/^var STAGEWRIGHT_UNLZMA\s*=/.test(decoder)) {
  throw new Error("unexpected esbuild output for the LZMA decoder");
}

/** CSS without the spaces around braces, semicolons, commas and child
 * combinators, and after colons. The sheet's only strings are short
 * `content` values that hold no such punctuation next to a space. */
function squeezeCss(text) {
  return text
    .replace(/\s*([{};,>])\s*/g, "$1")
    .replace(/:\s+/g, ":")
    .replace(/;}/g, "}")
    .replace(/([^\d.#-])0\.(\d)/g, "$1.$2");
}

const css = squeezeCss(trimSource(read(path.join(here, "styles.css")), "www/styles.css"));
const element = trimSource(read(path.join(here, "element.js")), "www/element.js");
const views = extras ? trimSource(read(path.join(here, "views.js")), "www/views.js") : "";
// The views extend the element's class before it is defined (a defined
// element upgrades at once, and builds its shadow root then).
const DEFINE = 'customElements.define("stagewright-calc", StagewrightCalc);';
if (extras && !element.includes(DEFINE)) throw new Error(`www/element.js lacks ${DEFINE}`);
const elementAndViews = extras ? element.replace(DEFINE, () => `${views}\n${DEFINE}`) : element;
const page = trimSource(read(path.join(here, "page.js")), "www/page.js");
const template = read(path.join(here, "index.html"));
const title = extras ? "Stagewright designer" : "Stagewright";

const banner =
  `/*! Stagewright ${version}. MIT OR Apache-2.0. CSP: script-src 'wasm-unsafe-eval'. */`;

const source = [
  banner,
  "(function () {",
  '"use strict";',
  'if (typeof window === "undefined" || !window.customElements) return;',
  'var prior = window.customElements.get("stagewright-calc");',
  'if (prior) { if (typeof prior.upgradePlaceholders === "function") prior.upgradePlaceholders(document); return; }',
  `var STAGEWRIGHT_VERSION = ${JSON.stringify(version)};`,
  'var STAGEWRIGHT_SCRIPT_URL = (document.currentScript && document.currentScript.src) || "";',
  `var STAGEWRIGHT_CSS = ${JSON.stringify(css)};`,
  `var STAGEWRIGHT_WASM_LZMA_BASE64 = "${wasmLzma.toString("base64")}";`,
  decoder,
  glue,
  elementAndViews,
  "})();",
  "",
].join("\n");

/** Minified with terser: names of locals mangled, and the element's
 * private members (`this._name`: an underscore and a letter; the glue's
 * `__wbg…` names do not match), strings untouched, the licence banner (a
 * `/*!` comment) kept. Public members (`design`, `report`, `reload`,
 * `renderReport`) keep their names. */
async function small(code) {
  const out = await minify(code, {
    ecma: 2020,
    compress: { passes: 2 },
    mangle: { properties: { regex: /^_[a-zA-Z]/ } },
    format: { comments: /^!/ },
  });
  return out.code;
}

const bundle = `${await small(source)}\n`;
const pageScript = await small(page);

// The standalone page runs the same bundle inline, then the page script.
const inline = forInlineScript(`${bundle}${pageScript}`);
const hash = createHash("sha256").update(inline, "utf8").digest("base64");
const csp = [
  "default-src 'none'",
  `script-src 'sha256-${hash}' 'wasm-unsafe-eval'`,
  "style-src 'unsafe-inline'",
  "img-src data: blob:",
  "base-uri 'none'",
  "form-action 'none'",
].join("; ");

for (const key of ["{{CSP}}", "{{SCRIPT}}", "{{VERSION}}", "{{TITLE}}"]) {
  if (!template.includes(key)) throw new Error(`www/index.html lacks ${key}`);
}
// Function replacements: "$" in the script must not be read as a pattern.
const html = template
  .replace("{{CSP}}", () => csp)
  .replace("{{VERSION}}", () => version)
  .replace("{{TITLE}}", () => title)
  .replace("{{SCRIPT}}", () => inline);

mkdirSync(outDir, { recursive: true });
const jsPath = path.join(outDir, `${baseName}.js`);
const htmlPath = path.join(outDir, `${baseName}.html`);
const shown = (p) => path.relative(root, p) || p;
writeFileSync(jsPath, bundle);
writeFileSync(htmlPath, html);

// Size report.
const kb = (n) => `${(n / 1000).toFixed(1)} KB`;
const rows = [
  ["wasm (after wasm-bindgen)", wasm.length, gzipSync(wasm, { level: 9 }).length],
  ["wasm as inlined (lzma1 -9)", wasm.length, wasmLzma.length],
  ["  its decoder (lzma1, min.)", Buffer.byteLength(decoder), gzipSync(decoder, { level: 9 }).length],
  [shown(jsPath), Buffer.byteLength(bundle), gzipSync(bundle, { level: 9 }).length],
  [shown(htmlPath), Buffer.byteLength(html), gzipSync(html, { level: 9 }).length],
];
console.log(`\nsize report, ${extras ? "the designer" : "the calculator"}`.padEnd(34) + "raw          gzip");
for (const [name, raw, gz] of rows) {
  console.log(`  ${name.padEnd(32)} ${String(raw).padStart(8)} B ${kb(raw).padStart(9)}   ${String(gz).padStart(7)} B ${kb(gz).padStart(9)}`);
}
const [, htmlRaw, htmlGz] = rows[rows.length - 1];
console.log(`  budget for ${shown(htmlPath)}: ${kb(BUDGET_HTML_RAW)} raw, ${kb(BUDGET_HTML_GZIP)} gzip ` +
  `(${kb(BUDGET_HTML_GZIP - htmlGz)} gzip to spare)`);
if (htmlRaw > BUDGET_HTML_RAW || htmlGz > BUDGET_HTML_GZIP) {
  console.error(`${shown(htmlPath)} is over its size budget`);
  process.exit(1);
}
