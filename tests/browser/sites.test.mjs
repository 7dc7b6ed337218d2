// dist/stagewright.js inside two real documentation site generators:
// MkDocs with the Material theme (instant navigation on) and Sphinx with
// the furo theme. The test writes two small sites into a temporary folder,
// builds them with the generators that scripts/test-browser.sh installs
// from tests/browser/sites/requirements.txt (a virtual environment whose
// bin folder STAGEWRIGHT_SITES_PY names), serves each built site on
// 127.0.0.1 and opens it in Chromium.
//
// Each page embeds the element the way EMBEDDING.md says: recipe 1 (the
// script and the element with inline JSON) on both pages, recipe 3 (the
// placeholder div) on the first. The Markdown keeps recipe 1 exactly as
// written there, so Python-Markdown wraps the element's tags in <p> and
// the JSON script ends up after the element, not inside it.

import assert from "node:assert/strict";
import { spawnSync } from "node:child_process";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import http from "node:http";
import os from "node:os";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { launch, root, scriptPath, screenshot } from "./helpers.mjs";

/** The generators' bin folder (python, mkdocs, sphinx-build). */
const SITES_PY = path.resolve(root, process.env.STAGEWRIGHT_SITES_PY || path.join("target", "sites-venv", "bin"));

/** Waits for the elements of a page: generous, never a timing assertion. */
const WAIT = 20000;

/* ---------------- the authors' designs (invented) ---------------- */

const DESIGNS = {
  preamp: {
    format: "stagewright/1",
    title: "Bench microphone preamp",
    stage: "common-emitter",
    supply: 12,
    transistor: { preset: "general-purpose-npn" },
    parts: { r1: "47k", r2: "10k", rc: "3k9", re: "220", re_bypassed: "680", c_emitter: "100u", rs: "600", rl: "10k", c_in: "1u", c_out: "4u7" },
  },
  follower: {
    format: "stagewright/1",
    title: "Cable driver follower",
    stage: "common-collector",
    supply: 12,
    transistor: { preset: "general-purpose-npn" },
    parts: { r1: "47k", r2: "47k", rc: "1k", re: "2k2", rs: "600", rl: "10k", c_in: "1u", c_out: "10u" },
  },
  logger: {
    format: "stagewright/1",
    title: "Logger input gain stage",
    stage: "common-emitter",
    supply: 9,
    transistor: { preset: "low-noise-npn" },
    parts: { r1: "150k", r2: "33k", rc: "3k9", re: "100", re_bypassed: "910", c_emitter: "220u", rs: "600", rl: "47k", c_in: "2u2", c_out: "10u" },
  },
};

/** What a page's elements must show, in document order. */
const expected = (...names) =>
  names.map((n) => ({ title: DESIGNS[n].title, reportTitle: DESIGNS[n].title, reportStage: DESIGNS[n].stage, reportSupply: DESIGNS[n].supply }));

const SCRIPT_URL = "/files/stagewright.js";

/** Recipe 1 of EMBEDDING.md, as the Share panel writes it. */
const recipeElement = (design) =>
  `<script src="${SCRIPT_URL}"></script>\n<stagewright-calc>\n<script type="application/json">\n` +
  `${JSON.stringify(design, null, 2).replace(/</g, "\\u003c")}\n</script>\n</stagewright-calc>`;

/** Recipe 3: the placeholder div with a base64url design. */
const recipePlaceholder = (design) =>
  `<div data-stagewright data-design="${Buffer.from(JSON.stringify(design)).toString("base64url")}"></div>\n` +
  `<script src="${SCRIPT_URL}"></script>`;

const indent = (text, by) => text.split("\n").map((l) => (l ? by + l : l)).join("\n");

/* ---------------- the two sites ---------------- */

function writeMkdocs(dir, siteUrl) {
  mkdirSync(path.join(dir, "docs", "files"), { recursive: true });
  copyFileSync(scriptPath, path.join(dir, "docs", "files", "stagewright.js"));
  writeFileSync(path.join(dir, "mkdocs.yml"), [
    "site_name: Bench notes",
    `site_url: ${siteUrl}`,
    "theme:",
    "  name: material",
    "  font: false", // no web fonts from elsewhere: the page stays on loopback
    "  features:",
    "    - navigation.instant",
    "nav:",
    "  - Input stages: index.md",
    "  - Logger front end: logger.md",
    "",
  ].join("\n"));
  writeFileSync(path.join(dir, "docs", "index.md"), [
    "# Input stages",
    "",
    "The preamp's first stage, as designed:",
    "",
    recipeElement(DESIGNS.preamp),
    "",
    "The follower that drives the cable, through the placeholder a strict wiki keeps:",
    "",
    recipePlaceholder(DESIGNS.follower),
    "",
    "Next: the [logger front end](logger.md).",
    "",
  ].join("\n"));
  writeFileSync(path.join(dir, "docs", "logger.md"), [
    "# Logger front end",
    "",
    "One gain stage ahead of the logger's input:",
    "",
    recipeElement(DESIGNS.logger),
    "",
    "Back to the [input stages](index.md).",
    "",
  ].join("\n"));
}

function writeSphinx(dir) {
  mkdirSync(path.join(dir, "extra", "files"), { recursive: true });
  copyFileSync(scriptPath, path.join(dir, "extra", "files", "stagewright.js"));
  writeFileSync(path.join(dir, "conf.py"), [
    'project = "Bench notes"',
    'html_theme = "furo"',
    'html_extra_path = ["extra"]',
    "",
  ].join("\n"));
  writeFileSync(path.join(dir, "index.rst"), [
    "Input stages",
    "============",
    "",
    "The preamp's first stage, as designed:",
    "",
    ".. raw:: html",
    "",
    indent(recipeElement(DESIGNS.preamp), "   "),
    "",
    "The follower that drives the cable, through the placeholder a strict wiki keeps:",
    "",
    ".. raw:: html",
    "",
    indent(recipePlaceholder(DESIGNS.follower), "   "),
    "",
    ".. toctree::",
    "",
    "   logger",
    "",
  ].join("\n"));
  writeFileSync(path.join(dir, "logger.rst"), [
    "Logger front end",
    "================",
    "",
    "One gain stage ahead of the logger's input:",
    "",
    ".. raw:: html",
    "",
    indent(recipeElement(DESIGNS.logger), "   "),
    "",
  ].join("\n"));
}

function run(tool, args, cwd) {
  const r = spawnSync(path.join(SITES_PY, tool), args, {
    cwd,
    encoding: "utf8",
    env: { ...process.env, NO_MKDOCS_2_WARNING: "1" },
  });
  if (r.error) throw r.error;
  assert.equal(r.status, 0, `${tool} ${args.join(" ")} failed:\n${r.stdout}\n${r.stderr}`);
}

/* ---------------- a static server on loopback ---------------- */

const TYPES = {
  ".html": "text/html; charset=utf-8",
  ".js": "text/javascript; charset=utf-8",
  ".mjs": "text/javascript; charset=utf-8",
  ".css": "text/css; charset=utf-8",
  ".json": "application/json",
  ".xml": "application/xml",
  ".svg": "image/svg+xml",
  ".png": "image/png",
  ".ico": "image/x-icon",
  ".woff2": "font/woff2",
  ".txt": "text/plain; charset=utf-8",
  ".gz": "application/gzip",
};

/** Serves folder `dir` on 127.0.0.1 at a free port. Resolves to
 * {origin, missing, close}; `missing` lists the paths asked for that the
 * built site does not have. A site without /favicon.ico gets an empty
 * answer there (Chromium asks for one on its own; not the page's doing). */
function serve(dir) {
  const missing = [];
  const server = http.createServer((req, res) => {
    const pathname = new URL(req.url, "http://127.0.0.1").pathname;
    let file = null;
    try {
      file = path.join(dir, path.normalize(decodeURIComponent(pathname)));
      if (!file.startsWith(dir)) file = null;
      else if (existsSync(file) && statSync(file).isDirectory()) file = path.join(file, "index.html");
    } catch (e) {
      file = null;
    }
    if (!file || !existsSync(file)) {
      if (pathname === "/favicon.ico") {
        res.writeHead(204);
        res.end();
        return;
      }
      missing.push(pathname);
      res.writeHead(404, { "content-type": "text/plain" });
      res.end("not here");
      return;
    }
    res.writeHead(200, { "content-type": TYPES[path.extname(file)] || "application/octet-stream", "cache-control": "no-store" });
    res.end(readFileSync(file));
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address();
      resolve({ origin: `http://127.0.0.1:${port}`, missing, close: () => new Promise((r) => server.close(r)) });
    });
  });
}

/* ---------------- reading the page ---------------- */

/** What the page's elements show, in document order. */
const read = () =>
  Array.from(document.querySelectorAll("stagewright-calc")).map((el) => ({
    title: el.design ? el.design.title : null,
    reportTitle: el.report ? el.report.design.title : null,
    reportStage: el.report ? el.report.design.stage : null,
    reportSupply: el.report ? el.report.design.supply : null,
  }));

/** Polls until the page shows `want` (one entry per element, in document
 * order) or WAIT has passed, then returns what it shows, so a wrong design
 * fails the assertion with the difference rather than a bare time-out. */
async function shown(page, want) {
  const deadline = Date.now() + WAIT;
  let seen = await page.evaluate(read);
  while (JSON.stringify(seen) !== JSON.stringify(want) && Date.now() < deadline) {
    await page.waitForTimeout(100);
    seen = await page.evaluate(read);
  }
  return seen;
}

/** Requests that went anywhere but the site's own origin. */
const elsewhere = (requests, origin) => requests.filter((u) => !u.startsWith(`${origin}/`) && !/^(data|blob|about):/.test(u));

function requireGenerators() {
  const missing = ["python", "mkdocs", "sphinx-build"].filter((t) => !existsSync(path.join(SITES_PY, t)));
  if (missing.length) {
    throw new Error(
      `the documentation site generators are not installed: ${missing.join(", ")} missing in ${SITES_PY}. ` +
        "scripts/test-browser.sh makes that virtual environment from tests/browser/sites/requirements.txt " +
        "(python3 -m venv target/sites-venv; target/sites-venv/bin/pip install -r tests/browser/sites/requirements.txt) " +
        "and names its bin folder in STAGEWRIGHT_SITES_PY.",
    );
  }
}

/* ---------------- MkDocs + Material ---------------- */

describe("in a MkDocs site with the Material theme (instant navigation)", () => {
  let tmp;
  let server;
  let browser;

  before(async () => {
    requireGenerators();
    tmp = mkdtempSync(path.join(os.tmpdir(), "stagewright-mkdocs-"));
    // The server first: Material's instant navigation follows only the
    // addresses of sitemap.xml, which come from site_url, port included.
    server = await serve(path.join(tmp, "site"));
    writeMkdocs(tmp, `${server.origin}/`);
    run("mkdocs", ["build", "--quiet", "--site-dir", path.join(tmp, "site")], tmp);
    browser = await launch({ viewport: { width: 1400, height: 1000 }, loopback: true });
  });

  after(async () => {
    if (browser) await browser.close();
    if (server) await server.close();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  test("the Markdown keeps recipe 1 as written: the JSON script lands outside the element", () => {
    // What this suite exists for: Python-Markdown wraps the element's tags
    // in <p>, so the browser closes the element before its JSON script.
    const html = readFileSync(path.join(tmp, "site", "index.html"), "utf8");
    assert.match(html, /<p><stagewright-calc><\/p>\s*<script type="application\/json">/, "the element's start tag sits alone in a <p>, the JSON after it");
  });

  test("page 1: the element and the placeholder show the author's designs", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${server.origin}/`);
    const seen = await shown(p, expected("preamp", "follower"));
    await screenshot(p, "site-mkdocs-page1.png");
    assert.deepEqual(seen, expected("preamp", "follower"), "each element shows and computed its own page's design (not the example design)");
    assert.deepEqual(browser.errors, [], "no console error and no page error");
    assert.deepEqual(elsewhere(browser.requests, server.origin), [], "nothing is fetched from anywhere but the site");
    assert.deepEqual(server.missing, [], "every file the page asks for is in the built site");
    await p.close();
  });

  test("page 2, opened directly: the element shows page 2's design", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${server.origin}/logger/`);
    const seen = await shown(p, expected("logger"));
    await screenshot(p, "site-mkdocs-page2.png");
    assert.deepEqual(seen, expected("logger"), "the element shows page 2's own design");
    assert.deepEqual(browser.errors.slice(before), [], "no console error and no page error");
    await p.close();
  });

  test("instant navigation from page 1 to page 2 and back: each page's designs, no error", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${server.origin}/`);
    assert.deepEqual(await shown(p, expected("preamp", "follower")), expected("preamp", "follower"), "page 1 is ready before navigating");
    await p.evaluate(() => {
      window.stagewrightSameDocument = true;
    });
    await p.locator("nav.md-nav--primary a.md-nav__link", { hasText: "Logger front end" }).first().click();
    await p.waitForURL(`${server.origin}/logger/`, { timeout: WAIT });
    const seen = await shown(p, expected("logger"));
    await screenshot(p, "site-mkdocs-page2-instant.png");
    assert.deepEqual(seen, expected("logger"), "after the router swapped the page, the element shows page 2's design");
    assert.equal(await p.evaluate(() => window.stagewrightSameDocument === true), true,
      "the click was the theme's instant navigation (same document), not a full load");
    assert.deepEqual(browser.errors.slice(before), [], "no console error and no page error after instant navigation to page 2");

    // The browser's back button: the router puts page 1 back.
    await p.goBack();
    await p.waitForURL(`${server.origin}/`, { timeout: WAIT });
    assert.deepEqual(await shown(p, expected("preamp", "follower")), expected("preamp", "follower"),
      "after going back, page 1's element and placeholder show page 1's designs");
    assert.equal(await p.evaluate(() => window.stagewrightSameDocument === true), true, "going back stayed in the same document");
    assert.deepEqual(browser.errors.slice(before), [], "no console error and no page error after going back");
    assert.deepEqual(elsewhere(browser.requests, server.origin), [], "nothing is fetched from anywhere but the site");
    assert.deepEqual(server.missing, [], "every file the page asks for is in the built site");
    await p.close();
  });
});

/* ---------------- Sphinx + furo ---------------- */

describe("in a Sphinx site with the furo theme (.. raw:: html)", () => {
  let tmp;
  let server;
  let browser;

  before(async () => {
    requireGenerators();
    tmp = mkdtempSync(path.join(os.tmpdir(), "stagewright-sphinx-"));
    writeSphinx(tmp);
    run("sphinx-build", ["-q", "-b", "html", tmp, path.join(tmp, "_build")], tmp);
    server = await serve(path.join(tmp, "_build"));
    browser = await launch({ viewport: { width: 1400, height: 1000 }, loopback: true });
  });

  after(async () => {
    if (browser) await browser.close();
    if (server) await server.close();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  test("page 1: the element and the placeholder show the author's designs", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${server.origin}/index.html`);
    const seen = await shown(p, expected("preamp", "follower"));
    await screenshot(p, "site-sphinx-page1.png");
    assert.deepEqual(seen, expected("preamp", "follower"), "each element shows and computed its own page's design (not the example design)");
    assert.deepEqual(browser.errors, [], "no console error and no page error");
    assert.deepEqual(elsewhere(browser.requests, server.origin), [], "nothing is fetched from anywhere but the site");
    assert.deepEqual(server.missing, [], "every file the page asks for is in the built site");
    await p.close();
  });

  test("page 2, reached by its link: the element shows page 2's design", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${server.origin}/index.html`);
    await p.locator("article a.reference.internal", { hasText: "Logger front end" }).first().click();
    await p.waitForURL(`${server.origin}/logger.html`, { timeout: WAIT });
    const seen = await shown(p, expected("logger"));
    await screenshot(p, "site-sphinx-page2.png");
    assert.deepEqual(seen, expected("logger"), "the element shows page 2's own design");
    assert.deepEqual(browser.errors.slice(before), [], "no console error and no page error");
    await p.close();
  });
});
