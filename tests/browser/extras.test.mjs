// The "from requirements" and tolerance views, which only a build with the
// engine's extras has (STAGEWRIGHT_EXTRAS=1 bash scripts/build-web.sh writes
// target/wasm/dist-extras/; the default page leaves them out for its size
// budget). Skipped when that build is missing.
//
// - the design of every examples/specs/*.spec.json equals `stagewright
//   design SPEC --json` (the same core function, JSON through the browser);
// - an unmeetable specification shows the core's message in place;
// - the same seed gives the same Monte Carlo yield and percentiles as
//   `stagewright check FILE --monte-carlo N --seed S --json` (exact, or
//   1e-12 relative), and the worst-vertex verdicts agree;
// - screenshots of both views, and the timings (median of 10 000 trials
//   and of one synthesis), printed, never failing.

import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { test } from "node:test";
import { pathToFileURL } from "node:url";

import { artifacts, launch, networkRequests, root, waitReady } from "./helpers.mjs";

const extrasHtml = path.join(root, "target", "wasm", "dist-extras", "stagewright.html");
const skip = existsSync(extrasHtml) ? false : "no extras build (STAGEWRIGHT_EXTRAS=1 bash scripts/build-web.sh)";
const bin = path.join(root, "target", "release", "stagewright");

function cli(args) {
  try {
    return execFileSync(bin, args, { encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
  } catch (e) {
    if (e.stdout) return e.stdout;
    throw e;
  }
}

function close(a, b) {
  return a === b || Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));
}

async function open(b) {
  const page = await b.page();
  await page.goto(pathToFileURL(extrasHtml).href);
  await waitReady(page);
  return page;
}

test("extras: designs from specifications as the command line does", { skip }, async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const dir = path.join(root, "examples", "specs");
    for (const name of readdirSync(dir).filter((f) => f.endsWith(".spec.json"))) {
      const file = path.join(dir, name);
      const expected = JSON.parse(cli(["design", file, "--json"]));
      const got = await page.evaluate((text) => {
        const el = document.querySelector("stagewright-calc");
        el.shadowRoot.querySelector("[data-view=spec]").open = true;
        return el.designFromSpec(text);
      }, readFileSync(file, "utf8"));
      assert.deepEqual(got, expected, name);
    }
    await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector("[data-view=spec]").scrollIntoView());
    await page.screenshot({ path: path.join(artifacts, "extras-from-requirements.png"), fullPage: false });
    // Unmeetable: the core's explanation, in place.
    const spec = JSON.parse(readFileSync(path.join(dir, "line-driver.spec.json"), "utf8"));
    spec.requirements.min_swing = 9;
    const message = await page.evaluate((s) => {
      const el = document.querySelector("stagewright-calc");
      const r = el.designFromSpec(s);
      const box = el.shadowRoot.querySelector(".view-spec .spec-error");
      return { r, hidden: box.hidden, text: box.textContent };
    }, spec);
    assert.equal(message.r, null);
    assert.equal(message.hidden, false);
    assert.match(message.text, /^requirements\.min_swing: 9 V peak is more than the supply allows/);
    await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".view-spec .spec-error").scrollIntoView({ block: "center" }));
    await page.screenshot({ path: path.join(artifacts, "extras-unmeetable.png") });
    // Load the snapped design into the calculator.
    const loaded = await page.evaluate((text) => {
      const el = document.querySelector("stagewright-calc");
      const r = el.designFromSpec(text);
      el.shadowRoot.querySelector("[data-action=load-spec-design]").click();
      return { want: r.design, have: el.design };
    }, readFileSync(path.join(dir, "line-driver.spec.json"), "utf8"));
    assert.equal(loaded.have.parts.r1, loaded.want.parts.r1);
    assert.deepEqual(networkRequests(b.requests), []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("extras: the same seed gives the command line's Monte Carlo", { skip }, async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const timings = [];
    for (const [name, trials, seed] of [["transducer-gain-stage.json", 10000, "1"], ["sensor-cable-buffer.json", 2000, "42"]]) {
      const file = path.join(root, "examples", name);
      const entry = JSON.parse(cli(["check", file, "--worst-case", "--monte-carlo", String(trials), "--seed", seed, "--json"]));
      const want = (Array.isArray(entry.files) ? entry.files[0] : entry);
      const got = await page.evaluate(async ([text, n, s]) => {
        const el = document.querySelector("stagewright-calc");
        el.design = JSON.parse(text);
        el.shadowRoot.querySelector("[data-view=tolerance]").open = true;
        return el.runTolerance(n, s);
      }, [readFileSync(file, "utf8"), trials, seed]);
      timings.push(got.ms);
      const mc = want.monte_carlo;
      assert.ok(close(got.summary.yield, mc.yield), `${name}: yield ${got.summary.yield} vs ${mc.yield}`);
      assert.equal(got.summary.completed, mc.completed);
      for (const d of got.summary.distributions) {
        const p = mc.percentiles[d.quantity];
        assert.ok(p, `${name}: ${d.quantity} missing from the command line`);
        for (const k of ["p1", "p50", "p99"]) assert.ok(close(d[k], p[k]), `${name}: ${d.quantity} ${k} ${d[k]} vs ${p[k]}`);
      }
      assert.equal(got.summary.distributions.length, Object.keys(mc.percentiles).length);
      const checks = want.worst_case.checks.map((c) => [c.id, c.pass, c.value]);
      assert.deepEqual(got.report.checks.map((c) => [c.id, c.pass, c.value]), checks, `${name}: worst-vertex checks`);
    }
    await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector("[data-view=tolerance]").scrollIntoView());
    await page.screenshot({ path: path.join(artifacts, "extras-tolerance.png") });
    await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".hist-box").scrollIntoView());
    await page.screenshot({ path: path.join(artifacts, "extras-histogram.png") });
    assert.deepEqual(networkRequests(b.requests), []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});
