#!/usr/bin/env node
// Assembles the two deliverables from the wasm-bindgen output and www/:
//
//   dist/stagewright.js    one classic script: glue, wasm and the element in
//                          one function scope; defines <stagewright-calc>;
//                          a second copy on the same page does nothing.
//   dist/stagewright.html  one self-contained page (the same script inline,
//                          plus www/page.js) that opens from file:// and
//                          makes no network request; its own CSP allows
//                          only its inline script (by hash) and wasm.
//
// The wasm is gzip-compressed before base64 (the page unpacks it with the
// browser's DecompressionStream): raw base64 would add a third to the size.
//
// Usage: node www/build.mjs [--bindgen DIR] [--out DIR]
// (scripts/build-web.sh runs cargo and wasm-bindgen first, then this.)

import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { gzipSync } from "node:zlib";

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, "..");

function arg(name, fallback) {
  const i = process.argv.indexOf(name);
  return i > 0 && process.argv[i + 1] ? path.resolve(process.argv[i + 1]) : fallback;
}

const bindgenDir = arg("--bindgen", path.join(root, "target", "wasm", "bindgen"));
const outDir = arg("--out", path.join(root, "dist"));

// Size budget for the standalone page (issue 4): 400 KB, 150 KB gzipped.
const BUDGET_HTML_RAW = 400 * 1000;
const BUDGET_HTML_GZIP = 150 * 1000;

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

const version = workspaceVersion();
const glue = trimGlue(read(path.join(bindgenDir, "stagewright_wasm.js")));
if (!/let wasm_bindgen\b/.test(glue)) {
  throw new Error("unexpected wasm-bindgen glue: expected the no-modules target (let wasm_bindgen = …)");
}
const wasm = readFileSync(path.join(bindgenDir, "stagewright_wasm_bg.wasm"));
const wasmGzip = gzipSync(wasm, { level: 9 });
const css = trimSource(read(path.join(here, "styles.css")), "www/styles.css");
const element = trimSource(read(path.join(here, "element.js")), "www/element.js");
const page = trimSource(read(path.join(here, "page.js")), "www/page.js");
const template = read(path.join(here, "index.html"));

const banner =
  `/*! Stagewright ${version}: calculator for one-transistor amplifier stages. ` +
  "MIT OR Apache-2.0. Defines <stagewright-calc>; a page with a Content-Security-Policy " +
  "needs script-src 'wasm-unsafe-eval'. */";

const bundle = [
  banner,
  "(function () {",
  '"use strict";',
  'if (typeof window === "undefined" || !window.customElements) return;',
  'var prior = window.customElements.get("stagewright-calc");',
  'if (prior) { if (typeof prior.upgradePlaceholders === "function") prior.upgradePlaceholders(document); return; }',
  `var STAGEWRIGHT_VERSION = ${JSON.stringify(version)};`,
  'var STAGEWRIGHT_SCRIPT_URL = (document.currentScript && document.currentScript.src) || "";',
  `var STAGEWRIGHT_CSS = ${JSON.stringify(css)};`,
  `var STAGEWRIGHT_WASM_GZIP_BASE64 = "${wasmGzip.toString("base64")}";`,
  glue,
  element,
  "})();",
  "",
].join("\n");

// The standalone page runs the same bundle inline, then the page script.
const inline = forInlineScript(`${bundle}\n${page}`);
const hash = createHash("sha256").update(inline, "utf8").digest("base64");
const csp = [
  "default-src 'none'",
  `script-src 'sha256-${hash}' 'wasm-unsafe-eval'`,
  "style-src 'unsafe-inline'",
  "img-src data: blob:",
  "base-uri 'none'",
  "form-action 'none'",
].join("; ");

for (const key of ["{{CSP}}", "{{SCRIPT}}", "{{VERSION}}"]) {
  if (!template.includes(key)) throw new Error(`www/index.html lacks ${key}`);
}
// Function replacements: "$" in the script must not be read as a pattern.
const html = template
  .replace("{{CSP}}", () => csp)
  .replace("{{VERSION}}", () => version)
  .replace("{{SCRIPT}}", () => inline);

mkdirSync(outDir, { recursive: true });
const jsPath = path.join(outDir, "stagewright.js");
const htmlPath = path.join(outDir, "stagewright.html");
writeFileSync(jsPath, bundle);
writeFileSync(htmlPath, html);

// Size report.
const kb = (n) => `${(n / 1000).toFixed(1)} KB`;
const rows = [
  ["wasm (after wasm-bindgen)", wasm.length, gzipSync(wasm, { level: 9 }).length],
  ["dist/stagewright.js", Buffer.byteLength(bundle), gzipSync(bundle, { level: 9 }).length],
  ["dist/stagewright.html", Buffer.byteLength(html), gzipSync(html, { level: 9 }).length],
];
console.log("\nsize report                       raw          gzip");
for (const [name, raw, gz] of rows) {
  console.log(`  ${name.padEnd(28)} ${String(raw).padStart(8)} B ${kb(raw).padStart(9)}   ${String(gz).padStart(7)} B ${kb(gz).padStart(9)}`);
}
const [, htmlRaw, htmlGz] = rows[2];
console.log(`  budget for the page: ${kb(BUDGET_HTML_RAW)} raw, ${kb(BUDGET_HTML_GZIP)} gzip`);
if (htmlRaw > BUDGET_HTML_RAW || htmlGz > BUDGET_HTML_GZIP) {
  console.error("dist/stagewright.html is over its size budget");
  process.exit(1);
}
