#!/usr/bin/env node
// Assembles the one deliverable, a script and a page, from the
// wasm-bindgen output and the modules of www/src/, bundled by esbuild:
//
//   dist/stagewright.js    one classic script: glue, wasm and the element in
//                          one function scope; defines <stagewright-calc>
//                          with every view; a second copy on the same page
//                          does nothing.
//   dist/stagewright.html  one self-contained page (the same script inline,
//                          plus www/src/page.js) that opens from file:// and
//                          makes no network request; its own CSP allows
//                          only its inline script (by hash) and wasm.
//
// esbuild bundles the entry point src/main.js (format "iife", minified,
// the element's `_private` members mangled) with three modules made here:
// the glue (stagewright:glue), the wasm (stagewright:wasm) and the
// stylesheet (src/styles.css, minified by esbuild's CSS loader and
// imported as text). The wasm is gzip-compressed (level 9) before base64:
// the page unpacks it with the browser's own DecompressionStream, which
// streams into WebAssembly.compileStreaming, so no decoder runs in
// JavaScript. The page's own gzip then costs the base64 almost nothing
// (Huffman coding takes its 64 symbols back to 6 bits each).
//
// Usage: node www/build.mjs [--bindgen DIR] [--out DIR]
// (scripts/build-web.sh runs cargo and wasm-bindgen first, then this.)

import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { gzipSync } from "node:zlib";

// esbuild (www/package.json; scripts/build-web.sh runs `npm ci` in www/).
let esbuild;
try {
  esbuild = await import("esbuild");
} catch (e) {
  throw new Error("esbuild is missing: run `npm ci` in www/ (scripts/build-web.sh does)");
}

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, "..");
const src = path.join(here, "src");

function arg(name, fallback) {
  const i = process.argv.indexOf(name);
  return i > 0 && process.argv[i + 1] ? path.resolve(process.argv[i + 1]) : fallback;
}

const bindgenDir = arg("--bindgen", path.join(root, "target", "wasm", "bindgen"));
const outDir = arg("--out", path.join(root, "dist"));
const baseName = "stagewright";

// Size budget of the standalone page (DEVELOPERS.md, "Size"): 800 KB raw
// and 280 KB gzipped, for the element with every view. 250 KB until the
// page checked max_thd: the check links the large-signal engine (the
// transient integrator, the steady-state shooting and the DFT), 24 KB gzip.
const BUDGET_HTML_RAW = 800 * 1000;
const BUDGET_HTML_GZIP = 280 * 1000;

const read = (p) => readFileSync(p, "utf8");

function workspaceVersion() {
  const toml = read(path.join(root, "Cargo.toml"));
  const block = /\[workspace\.package\]([\s\S]*?)(\n\[|$)/.exec(toml);
  const m = block && /\bversion\s*=\s*"([^"]+)"/.exec(block[1]);
  return m ? m[1] : "0.0.0";
}

/** Makes script text safe inside an HTML <script> element. "</script" and
 * "<!--" only occur inside strings, comments or regular expressions here,
 * where the escaped forms mean the same. */
function forInlineScript(js) {
  return js.replace(/<\/(script)/gi, "<\\/$1").replace(/<!--/g, "<\\!--");
}

const version = workspaceVersion();
const glue = read(path.join(bindgenDir, "stagewright_wasm.js"));
if (!/^let wasm_bindgen\b/m.test(glue)) {
  throw new Error("unexpected wasm-bindgen glue: expected the no-modules target (let wasm_bindgen = …)");
}
if (!/\bdesign_from_spec\b/.test(glue) || !/\bTolerance\b/.test(glue)) {
  throw new Error("unexpected wasm-bindgen glue: the engine lacks design_from_spec or Tolerance");
}
const wasmPath = path.join(bindgenDir, "stagewright_wasm_bg.wasm");
const wasm = readFileSync(wasmPath);

/** The wasm, gzip level 9: the page's DecompressionStream("gzip") unpacks
 * it (src/engine.js). */
const wasmGzip = gzipSync(wasm, { level: 9 });

/** The modules this build makes:
 *   stagewright:glue  the no-modules glue as a module whose default export
 *                     is `wasm_bindgen` (the glue's one top-level name);
 *   stagewright:wasm  the gzip-packed wasm as base64 text;
 *   *.css             minified by esbuild's CSS loader, imported as text. */
const stagewrightModules = {
  name: "stagewright",
  setup(build) {
    build.onResolve({ filter: /^stagewright:(glue|wasm)$/ }, (a) => ({ path: a.path, namespace: "stagewright" }));
    build.onLoad({ filter: /.*/, namespace: "stagewright" }, (a) => ({
      contents: a.path === "stagewright:glue"
        ? `${glue}\nexport default wasm_bindgen;\n`
        : `export default ${JSON.stringify(wasmGzip.toString("base64"))};\n`,
      loader: "js",
    }));
    build.onLoad({ filter: /\.css$/ }, async (a) => {
      const css = await esbuild.transform(read(a.path), { loader: "css", minify: true, sourcefile: a.path });
      return { contents: css.code.trim(), loader: "text" };
    });
  },
};

/** The bundle's outer function: strict, and it returns at once when the
 * page has no custom elements or already has the element (a second copy
 * of the script, or the other deliverable's): then it only upgrades the
 * placeholders that the copy before it may not have seen. The engine's
 * compiled module lives in this scope, so however many elements a page
 * holds, and across a documentation site's router navigation, it is
 * compiled once. */
const guard =
  '(function(){"use strict";if(typeof window>"u"||!window.customElements)return;' +
  'var prior=window.customElements.get("stagewright-calc");' +
  'if(prior){typeof prior.upgradePlaceholders=="function"&&prior.upgradePlaceholders(document);return}';

const built = await esbuild.build({
  entryPoints: [path.join(src, "main.js")],
  bundle: true,
  format: "iife",
  minify: true,
  // Every browser with DecompressionStream has this.
  target: "es2022",
  charset: "utf8",
  legalComments: "none",
  // The element's private members (`this._name`: an underscore and a
  // letter; the glue's `__wbg…` names do not match). Public members
  // (`design`, `report`, `reload`, `renderReport`, …) keep their names.
  mangleProps: /^_[a-zA-Z]/,
  define: { STAGEWRIGHT_VERSION: JSON.stringify(version) },
  banner: { js: `/*! Stagewright ${version}. MIT OR Apache-2.0. CSP: script-src 'wasm-unsafe-eval'. */\n${guard}` },
  footer: { js: "})();" },
  plugins: [stagewrightModules],
  metafile: true,
  write: false,
  logLevel: "warning",
});
const bundle = built.outputFiles[0].text;
// The standalone page's own script (the address keeps the design).
const pageScript = (await esbuild.transform(read(path.join(src, "page.js")), {
  minify: true, target: "es2022", charset: "utf8", legalComments: "none",
})).code;
const template = read(path.join(here, "index.html"));
const title = "Stagewright";

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

// Size report: the wasm, what each part takes of the script (raw, after
// minifying; gzip only as a whole), then both files.
const kb = (n) => `${(n / 1000).toFixed(1)} KB`;
const inputs = Object.entries(Object.values(built.metafile.outputs)[0].inputs);
const inBundle = (test) => inputs.filter(([name]) => test(name)).reduce((sum, [, i]) => sum + i.bytesInOutput, 0);
const isWasm = (n) => n.endsWith("stagewright:wasm");
const isGlue = (n) => n.endsWith("stagewright:glue");
const isCss = (n) => n.endsWith(".css");
const rows = [
  ["wasm (after wasm-bindgen)", wasm.length, gzipSync(wasm, { level: 9 }).length],
  ["wasm as inlined (gzip -9)", wasm.length, wasmGzip.length],
  ["  in the script: wasm, base64", inBundle(isWasm), null],
  ["  the glue", inBundle(isGlue), null],
  ["  the styles", inBundle(isCss), null],
  ["  the element (www/src)", inBundle((n) => !isWasm(n) && !isGlue(n) && !isCss(n)), null],
  [shown(jsPath), Buffer.byteLength(bundle), gzipSync(bundle, { level: 9 }).length],
  [shown(htmlPath), Buffer.byteLength(html), gzipSync(html, { level: 9 }).length],
];
console.log("\nsize report".padEnd(34) + "raw          gzip");
for (const [name, raw, gz] of rows) {
  const gzip = gz === null ? "" : `   ${String(gz).padStart(7)} B ${kb(gz).padStart(9)}`;
  console.log(`  ${name.padEnd(32)} ${String(raw).padStart(8)} B ${kb(raw).padStart(9)}${gzip}`);
}
const [, htmlRaw, htmlGz] = rows[rows.length - 1];
console.log(`  budget for ${shown(htmlPath)}: ${kb(BUDGET_HTML_RAW)} raw, ${kb(BUDGET_HTML_GZIP)} gzip ` +
  `(${kb(BUDGET_HTML_GZIP - htmlGz)} gzip to spare)`);
if (htmlRaw > BUDGET_HTML_RAW || htmlGz > BUDGET_HTML_GZIP) {
  console.error(`${shown(htmlPath)} is over its size budget`);
  process.exit(1);
}
