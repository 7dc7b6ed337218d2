// The views of the one element (dist/stagewright.html and
// dist/stagewright.js): calculator, "from requirements" and tolerances, as
// tabs at the top, each built the first time it is shown. A missing file
// fails these tests, it is never skipped.
//
// - the former second deliverable is not built; the tabs, their order and
//   lazy building; the page's report equals `stagewright analyze FILE
//   --json` for an example;
// - the design of every examples/specs/*.spec.json equals `stagewright
//   design SPEC --json` (the same core function, JSON through the browser);
// - an unmeetable specification shows the core's message in place;
// - the same seed gives the same Monte Carlo yield and percentiles as
//   `stagewright check FILE --monte-carlo N --seed S --json` (exact, or
//   1e-12 relative), and the worst-vertex verdicts agree;
// - the script alone, on a page with the CSP `script-src 'self'
//   'wasm-unsafe-eval'`, has every view;
// - no network request anywhere; screenshots of each view in artifacts/
//   (views-*.png). Timings are bench.mjs's.

import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { test } from "node:test";

import {
  artifacts, cliPath, cliReport, htmlUrl, jsonDifferences, launch, networkRequests, root, scriptPath, waitReady, waitReport,
} from "./helpers.mjs";

// The same command line as cliReport's (STAGEWRIGHT_CLI, else the workspace's release build).
const bin = cliPath;
const BUILD = "bash scripts/build-web.sh builds it";
mkdirSync(artifacts, { recursive: true });

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
  assert.ok(existsSync(scriptPath), `${path.relative(root, scriptPath)} is missing (${BUILD})`);
  await page.goto(htmlUrl);
  await waitReady(page);
  return page;
}

test("views: one deliverable; the second one is gone", () => {
  for (const f of ["stagewright-designer.html", "stagewright-designer.js"]) {
    assert.ok(!existsSync(path.join(root, "dist", f)), `dist/${f} should no longer be built`);
  }
});

test("views: the report equals the command line's; the tabs are at the top and build a view when first opened", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    await waitReport(page);
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    const seen = await page.evaluate((t) => {
      const el = document.querySelector("stagewright-calc");
      el.design = t;
      const tabs = Array.from(el.shadowRoot.querySelectorAll("[role=tab]"), (v) => v.getAttribute("data-view"));
      const built = () => Array.from(el.shadowRoot.querySelectorAll(".view-panel"), (v) => v.getAttribute("data-view"));
      const before = built();
      const tabTop = el.shadowRoot.querySelector("[role=tablist]").getBoundingClientRect().top;
      el.shadowRoot.querySelector("[role=tab][data-view=tolerances]").click();
      const shown = el.view;
      const hidden = el.shadowRoot.querySelector(".view-panel[data-view=calculator]").hidden;
      el.showView("calculator");
      return { report: el.report, tabs, before, after: built(), shown, hidden, tabTop, title: document.title };
    }, readFileSync(file, "utf8"));
    const diffs = jsonDifferences(seen.report, cliReport(file));
    assert.deepEqual(diffs, [], `differences:\n${diffs.slice(0, 20).join("\n")}`);
    // Every view is a tab, in this order; only the calculator is built at
    // start-up, and a tab builds its view when first opened.
    assert.deepEqual(seen.tabs, ["calculator", "requirements", "tolerances"]);
    assert.deepEqual(seen.before, ["calculator"]);
    assert.deepEqual(seen.after.sort(), ["calculator", "tolerances"]);
    assert.equal(seen.shown, "tolerances");
    assert.equal(seen.hidden, true, "the calculator's panel is hidden while another view is shown");
    // Near the top: under the header, within the first screen (not below the plots).
    assert.ok(seen.tabTop < 200, `the tab bar starts ${seen.tabTop} px down`);
    assert.match(seen.title, /Stagewright$/);
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: path.join(artifacts, "views-calculator.png"), fullPage: true });
    assert.deepEqual(networkRequests(b.requests), []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: from requirements designs as the command line does", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const dir = path.join(root, "examples", "specs");
    for (const name of readdirSync(dir).filter((f) => f.endsWith(".spec.json"))) {
      const file = path.join(dir, name);
      const expected = JSON.parse(cli(["design", file, "--json"]));
      const got = await page.evaluate((text) => {
        const el = document.querySelector("stagewright-calc");
        el.showView("requirements");
        return el.designFromSpec(text);
      }, readFileSync(file, "utf8"));
      assert.deepEqual(got, expected, name);
    }
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: path.join(artifacts, "views-requirements.png"), fullPage: true });
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
    await page.screenshot({ path: path.join(artifacts, "views-unmeetable.png") });
    // Load the snapped design into the calculator.
    const loaded = await page.evaluate((text) => {
      const el = document.querySelector("stagewright-calc");
      const r = el.designFromSpec(text);
      el.shadowRoot.querySelector("[data-action=load-spec-design]").click();
      return { want: r.design, have: el.design, view: el.view };
    }, readFileSync(path.join(dir, "line-driver.spec.json"), "utf8"));
    assert.equal(loaded.have.parts.r1, loaded.want.parts.r1);
    assert.equal(loaded.view, "calculator", "loading the design shows the calculator");
    assert.deepEqual(networkRequests(b.requests), []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: the same seed gives the command line's Monte Carlo", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    // The line driver has max_thd: its THD worst case (the vertex search)
    // and its trials' THD come from the same core as the command line's.
    for (const [name, trials, seed] of [["transducer-gain-stage.json", 10000, "1"], ["sensor-cable-buffer.json", 2000, "42"], ["line-driver-600.json", 200, "5"]]) {
      const file = path.join(root, "examples", name);
      const entry = JSON.parse(cli(["check", file, "--worst-case", "--monte-carlo", String(trials), "--seed", seed, "--json"]));
      const want = (Array.isArray(entry.files) ? entry.files[0] : entry);
      const got = await page.evaluate(async ([text, n, s]) => {
        const el = document.querySelector("stagewright-calc");
        el.design = JSON.parse(text);
        el.showView("tolerances");
        return el.runTolerance(n, s);
      }, [readFileSync(file, "utf8"), trials, seed]);
      const mc = want.monte_carlo;
      assert.ok(close(got.summary.yield, mc.yield), `${name}: yield ${got.summary.yield} vs ${mc.yield}`);
      assert.equal(got.summary.completed, mc.completed);
      for (const d of got.summary.distributions) {
        const p = mc.percentiles[d.quantity];
        assert.ok(p, `${name}: ${d.quantity} missing from the command line`);
        for (const k of ["p1", "p50", "p99"]) assert.ok(close(d[k], p[k]), `${name}: ${d.quantity} ${k} ${d[k]} vs ${p[k]}`);
      }
      assert.equal(got.summary.distributions.length, Object.keys(mc.percentiles).length);
      // The worst case is the command line's document, key for key: the
      // corner table and the requirements at their worst vertex.
      assert.equal(got.report.format, "stagewright-tolerance/1");
      for (const key of ["tolerances", "corners", "worst_case", "sensitivity"]) {
        const diffs = jsonDifferences(got.report[key], want[key]);
        assert.deepEqual(diffs, [], `${name}: ${key} differs from check --json:\n${diffs.slice(0, 10).join("\n")}`);
      }
    }
    // The histogram's bins as CSV: every completed trial in one bin (a
    // trial outside the histogram's range would be a bug of the bins).
    const hist = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      return { csv: el.plotCsv("histogram"), completed: el.toleranceResult.summary.completed };
    });
    const lines = hist.csv.trim().split("\r\n");
    assert.match(lines[0], /^\w+ from( \(.+\))?,\w+ to( \(.+\))?,trials$/);
    const counted = lines.slice(1).reduce((sum, l) => sum + Number(l.split(",")[2]), 0);
    assert.equal(counted, hist.completed, "the bins hold every trial");
    const [png] = await Promise.all([
      page.waitForEvent("download"),
      page.locator("stagewright-calc figure[data-plot=histogram] [data-action=plot-png]").click(),
    ]);
    assert.match(png.suggestedFilename(), /-histogram\.png$/);
    // The readout under the pointer names the bin and its trials.
    const histCanvas = page.locator("stagewright-calc figure[data-plot=histogram] canvas");
    await histCanvas.scrollIntoViewIfNeeded();
    const hb = await histCanvas.boundingBox();
    await page.mouse.move(hb.x + hb.width * 0.5, hb.y + hb.height * 0.5);
    assert.match(await page.locator("stagewright-calc figure[data-plot=histogram] .cursor-readout").textContent(),
      / · (bin .+ to .+: \d+ trials|outside the trials)$/);
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: path.join(artifacts, "views-tolerances.png"), fullPage: true });
    await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".hist-box").scrollIntoView());
    await page.screenshot({ path: path.join(artifacts, "views-histogram.png") });
    assert.deepEqual(networkRequests(b.requests), []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: a long Monte Carlo run can be cancelled, and the trial limit is the command line's", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    // Over the limit: the core's message, as `check --monte-carlo 2000000` gives it.
    const over = await page.evaluate(async (text) => {
      const el = document.querySelector("stagewright-calc");
      el.design = text;
      el.showView("tolerances");
      await el.runTolerance(2000000, 1);
      return el.shadowRoot.querySelector(".view-tol .spec-error").textContent;
    }, readFileSync(file, "utf8"));
    assert.match(over, /trials must be between 1 and 1000000/);
    // A million trials (several seconds): the page keeps answering, shows
    // Cancel, and a click stops the run with the trials done summarised.
    const run = page.evaluate(() => document.querySelector("stagewright-calc").runTolerance(1000000, 1));
    const cancel = page.locator("stagewright-calc [data-action=cancel-tolerance]");
    await cancel.waitFor({ state: "visible", timeout: 10000 });
    await cancel.click();
    const got = await run;
    assert.equal(got.cancelled, true);
    assert.ok(got.summary.completed > 0 && got.summary.completed < 1000000, `completed ${got.summary.completed}`);
    assert.equal(await cancel.isVisible(), false);
    const note = await page.locator("stagewright-calc .tol-cancelled").textContent();
    assert.match(note, /^Cancelled after \d+ of 1000000 trials/);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: the script alone, under a strict CSP, has every view", async () => {
  const ORIGIN = "https://wiki.example";
  const script = readFileSync(scriptPath);
  const spec = readFileSync(path.join(root, "examples", "specs", "geophone-preamp.spec.json"), "utf8");
  const b = await launch({ viewport: { width: 1280, height: 900 } });
  try {
    await b.context.route(`${ORIGIN}/**`, (route) => {
      const url = new URL(route.request().url());
      if (url.pathname === "/stagewright.js") {
        return route.fulfill({ status: 200, contentType: "text/javascript", body: script });
      }
      return route.fulfill({
        status: 200,
        headers: { "content-type": "text/html; charset=utf-8", "content-security-policy": "script-src 'self' 'wasm-unsafe-eval'" },
        body: '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Designer</title>' +
          '<script src="/stagewright.js"></script></head><body><stagewright-calc></stagewright-calc></body></html>',
      });
    });
    const page = await b.page();
    await page.goto(`${ORIGIN}/views.html`);
    await waitReady(page);
    const r = await page.evaluate((text) => {
      const el = document.querySelector("stagewright-calc");
      el.showView("requirements");
      return el.designFromSpec(text);
    }, spec);
    assert.deepEqual(r, JSON.parse(cli(["design", path.join(root, "examples", "specs", "geophone-preamp.spec.json"), "--json"])));
    const outside = b.requests.filter((u) => !u.startsWith(`${ORIGIN}/`) && !/^(data|blob|about):/.test(u));
    assert.deepEqual(outside, []);
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: the tolerance box is editable, the results name their design and box, and go stale on an edit", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    const text = readFileSync(file, "utf8");
    const first = await page.evaluate(async (t) => {
      const el = document.querySelector("stagewright-calc");
      el.design = t;
      el.showView("tolerances");
      const root = el.shadowRoot;
      const box = root.querySelector(".tol-box input[data-key=resistor_tolerance]");
      // Refused by the core's reader, with its message beside the field.
      box.value = "5";
      box.dispatchEvent(new Event("input", { bubbles: true }));
      const refused = root.querySelector("#" + box.getAttribute("aria-describedby")).textContent;
      const kept = el.design.tolerances && el.design.tolerances.resistor_tolerance;
      box.value = "1 %";
      box.dispatchEvent(new Event("input", { bubbles: true }));
      const r = await el.runTolerance(500, "7");
      return {
        refused, kept, stored: el.design.tolerances.resistor_tolerance, used: r.report.tolerances.resistor_tolerance,
        heading: root.querySelector(".tol-for").textContent, stale: r.stale, notice: root.querySelector(".tol-stale").hidden,
      };
    }, text);
    assert.match(first.refused, /resistor_tolerance/, "a bare 5 is refused (README: read as 500 % otherwise), naming the key");
    assert.equal(first.stored, "1 %", "the accepted value is kept in the design file's tolerances block as typed");
    assert.ok(Math.abs(first.used - 0.01) < 1e-15, "the run used the edited box (1 % = 0.01)");
    assert.match(first.heading, /^For “[^”]+” \(common emitter\), with the tolerance box: resistors ±1 %, capacitors ±/);
    assert.equal(first.stale, false);
    assert.equal(first.notice, true, "no stale notice right after a run");
    // An edit in the calculator: the results are marked stale at once.
    const after = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      el.showView("calculator");
      const rc = el.shadowRoot.querySelector("input[name=rc]");
      rc.value = "4k7";
      rc.dispatchEvent(new Event("input", { bubbles: true }));
      el.showView("tolerances");
      const root = el.shadowRoot;
      return { stale: el.toleranceResult.stale, notice: root.querySelector(".tol-stale").hidden, text: root.querySelector(".tol-stale").textContent, dim: root.querySelector(".tol-out").classList.contains("stale") };
    });
    assert.deepEqual([after.stale, after.notice, after.dim], [true, false, true], "stale after the design changed");
    assert.match(after.text, /The design has changed since this run/);
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: path.join(artifacts, "views-tolerances-stale.png"), fullPage: true });
    // Undone: fresh again.
    const undone = await page.evaluate((rc) => {
      const el = document.querySelector("stagewright-calc");
      const input = el.shadowRoot.querySelector("input[name=rc]");
      input.value = rc;
      input.dispatchEvent(new Event("input", { bubbles: true }));
      return el.toleranceResult.stale;
    }, JSON.parse(text).parts.rc);
    assert.equal(undone, false, "the same design as the run's is not stale");
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});

test("views: from requirements keeps keys typed into its JSON through form edits; pinned parts in either case", async () => {
  const b = await launch();
  try {
    const page = await open(b);
    const got = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      el.showView("requirements");
      const root = el.shadowRoot;
      const json = root.querySelector(".spec-json");
      const doc = JSON.parse(json.value);
      doc.resistor_rating = 0.5;
      doc.ambient = 40;
      doc.title = "Sensor front end";
      json.value = JSON.stringify(doc, null, 2);
      json.dispatchEvent(new Event("input", { bubbles: true }));
      const title = root.querySelector(".spec-form [data-key=title]").value;
      const supply = root.querySelector(".spec-form [data-key=supply]");
      supply.value = "15";
      supply.dispatchEvent(new Event("input", { bubbles: true }));
      const pins = root.querySelector(".spec-form [data-key=pins]");
      pins.value = "RE=470, c_in=1u";
      pins.dispatchEvent(new Event("input", { bubbles: true }));
      const after = JSON.parse(json.value);
      pins.value = "RE470";
      pins.dispatchEvent(new Event("input", { bubbles: true }));
      const refused = root.querySelector(".spec-form-error");
      return { title, after, refusedHidden: refused.hidden, refused: refused.textContent, unchanged: JSON.parse(json.value).parts };
    });
    assert.equal(got.title, "Sensor front end", "the form shows what the JSON says");
    assert.equal(got.after.resistor_rating, 0.5, "a key with no form field survives a form edit");
    assert.equal(got.after.ambient, 40);
    assert.equal(got.after.title, "Sensor front end");
    assert.equal(got.after.supply, 15, "the form's edit is written");
    assert.deepEqual(got.after.parts, { re: "470", c_in: "1u" }, "RE=470 is the part re");
    assert.equal(got.refusedHidden, false);
    assert.match(got.refused, /"RE470" is not a part and its value/);
    assert.deepEqual(got.unchanged, { re: "470", c_in: "1u" }, "a refused entry leaves the document as it was");
    assert.deepEqual(b.errors, []);
  } finally {
    await b.close();
  }
});
