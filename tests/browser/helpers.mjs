// Shared set-up for the browser tests: Debian's Chromium through
// playwright-core, a fresh profile per browser (deleted afterwards), and a
// record of every request the page makes.

import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { chromium } from "playwright-core";

const here = path.dirname(fileURLToPath(import.meta.url));
export const root = path.resolve(here, "..", "..");
export const dist = path.join(root, "dist");
export const artifacts = path.join(here, "artifacts");
export const htmlUrl = pathToFileURL(path.join(dist, "stagewright.html")).href;
export const scriptPath = path.join(dist, "stagewright.js");

const CHROMIUM = process.env.CHROMIUM || "/usr/bin/chromium";
const FLAGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--host-resolver-rules=MAP * ~NOTFOUND",
];

/** Starts Chromium with a new profile. Returns {context, requests, close}.
 * `requests` lists every request URL any page of the context made. Every
 * host name resolves to nothing; `loopback: true` lets 127.0.0.1 through,
 * for a test that serves pages from a server of its own on this machine. */
export async function launch(options = {}) {
  const args = options.loopback
    ? FLAGS.map((f) => (f.startsWith("--host-resolver-rules=") ? `${f}, EXCLUDE 127.0.0.1` : f))
    : FLAGS;
  const profile = mkdtempSync(path.join(os.tmpdir(), "stagewright-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args,
    viewport: options.viewport || { width: 1400, height: 1000 },
    deviceScaleFactor: options.deviceScaleFactor || 1,
    colorScheme: options.colorScheme || "light",
    serviceWorkers: "block",
  });
  const requests = [];
  context.on("request", (r) => requests.push(r.url()));
  const errors = [];
  const watch = (page) => {
    page.on("pageerror", (e) => errors.push(String(e)));
    page.on("console", (m) => {
      if (m.type() === "error") errors.push(m.text());
    });
    page.on("dialog", (d) => {
      errors.push(`dialog: ${d.message()}`);
      d.dismiss().catch(() => {});
    });
  };
  context.on("page", watch);
  for (const p of context.pages()) watch(p);
  return {
    context,
    requests,
    errors,
    async page() {
      const pages = context.pages();
      const page = pages.length ? pages[0] : await context.newPage();
      return page;
    },
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Requests that left the machine or could have: anything but file:,
 * data:, blob: and about:. */
export function networkRequests(urls) {
  return urls.filter((u) => !/^(file|data|blob|about):/.test(u));
}

/** Waits until the element's engine has started (understood values show). */
export async function waitReady(page, selector = "stagewright-calc") {
  await page.waitForFunction((sel) => {
    const el = document.querySelector(sel);
    const out = el && el.shadowRoot && el.shadowRoot.querySelector(".field[data-key='rc'] .understood");
    return !!(out && out.textContent.trim());
  }, selector, { timeout: 15000 });
}

export async function screenshot(page, name, options = {}) {
  mkdirSync(artifacts, { recursive: true });
  const file = path.join(artifacts, name);
  // From the top, so sticky parts (the form column, table heads) sit where
  // a reader first sees them.
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: file, fullPage: true, ...options });
  return file;
}

/** The native command line, built by scripts/test-browser.sh with
 * `cargo build --release -p stagewright-cli`. */
export const cliPath = process.env.STAGEWRIGHT_CLI || path.join(root, "target", "release", "stagewright");

/** `stagewright analyze FILE --json --small-signal-only`, parsed: the
 * report the page's engine gives (the command line's large-signal section
 * is its own). The exit status says pass (0) or fail (1); either way the
 * report is on standard output. */
export function cliReport(file) {
  const r = spawnSync(cliPath, ["analyze", file, "--json", "--small-signal-only"], { encoding: "utf8" });
  if (r.error) throw r.error;
  if (r.status !== 0 && r.status !== 1) throw new Error(`stagewright analyze ${file}: exit ${r.status}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

/** Differences between two JSON documents: same keys in the same order,
 * same strings and booleans, numbers within a relative difference `rel`
 * (absolute below 1e-300). Returns a list of messages, empty when equal. */
export function jsonDifferences(a, b, rel = 1e-9, where = "") {
  const out = [];
  const kind = (v) => (v === null ? "null" : Array.isArray(v) ? "array" : typeof v);
  if (kind(a) !== kind(b)) return [`${where || "."}: ${kind(a)} ${JSON.stringify(a)} vs ${kind(b)} ${JSON.stringify(b)}`];
  if (kind(a) === "number") {
    const d = Math.abs(a - b);
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (!(d <= rel * scale || d < 1e-300)) out.push(`${where}: ${a} vs ${b} (relative difference ${(d / scale).toExponential(2)})`);
  } else if (kind(a) === "array") {
    if (a.length !== b.length) return [`${where}: ${a.length} entries vs ${b.length}`];
    a.forEach((v, i) => out.push(...jsonDifferences(v, b[i], rel, `${where}[${i}]`)));
  } else if (kind(a) === "object") {
    const ka = Object.keys(a);
    const kb = Object.keys(b);
    if (ka.join() !== kb.join()) return [`${where || "."}: keys ${ka.join(",")} vs ${kb.join(",")}`];
    for (const k of ka) out.push(...jsonDifferences(a[k], b[k], rel, where ? `${where}.${k}` : k));
  } else if (a !== b) {
    out.push(`${where}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
  }
  return out;
}

/** Waits for the element's first report. */
export async function waitReport(page, selector = "stagewright-calc") {
  await page.waitForFunction((sel) => {
    const el = document.querySelector(sel);
    return !!(el && el.report);
  }, selector, { timeout: 15000 });
}
