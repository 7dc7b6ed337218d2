// The numbers on the page are the command line's: for every example design,
// the report of dist/stagewright.html (opened from file://, el.report) equals
// `stagewright analyze FILE --json` of the native binary, every number
// within a relative difference of 1e-9; an edit gives the report of the
// edited file; an invalid entry keeps the last good report.

import assert from "node:assert/strict";
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { cliReport, htmlUrl, jsonDifferences, launch, networkRequests, root, waitReady, waitReport } from "./helpers.mjs";

const examples = readdirSync(path.join(root, "examples"))
  .filter((f) => f.endsWith(".json"))
  .sort()
  .map((f) => path.join(root, "examples", f));

/** Sets the element's design to `text` and returns its report. */
function reportFor(page, text) {
  return page.evaluate((t) => {
    const el = document.querySelector("stagewright-calc");
    el.design = t;
    return el.report;
  }, text);
}

describe("the engine in the page", () => {
  let browser;
  let page;
  let tmp;

  before(async () => {
    tmp = mkdtempSync(path.join(os.tmpdir(), "stagewright-designs-"));
    browser = await launch();
    page = await browser.page();
    await page.goto(htmlUrl);
    await waitReady(page);
    await waitReport(page);
  });

  after(async () => {
    await browser.close();
    rmSync(tmp, { recursive: true, force: true });
  });

  test("there are example designs to compare", () => {
    assert.ok(examples.length >= 4, `examples: ${examples.join(", ")}`);
  });

  for (const file of examples) {
    test(`el.report equals \`stagewright analyze ${path.relative(root, file)} --json\``, async () => {
      const expected = cliReport(file);
      const seen = await reportFor(page, readFileSync(file, "utf8"));
      assert.ok(seen, "the page computed a report");
      const diffs = jsonDifferences(seen, expected);
      assert.deepEqual(diffs, [], `differences:\n${diffs.slice(0, 20).join("\n")}`);
    });
  }

  test("typing 4k7 into rc gives the report of the file with rc = 4k7", async () => {
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    const design = JSON.parse(readFileSync(file, "utf8"));
    const before = await reportFor(page, JSON.stringify(design));
    const vcText = () =>
      page.evaluate(() =>
        document.querySelector("stagewright-calc").shadowRoot.querySelector('output[data-key="operating_point.vc"]').textContent);
    const shownBefore = await vcText();
    const events = page.evaluate(
      () =>
        new Promise((resolve) => {
          document.addEventListener("stagewright-report", (e) => resolve({ bubbles: e.bubbles, composed: e.composed, report: e.detail.report }), { once: true });
        }),
    );
    await page.locator("stagewright-calc .field[data-key='rc'] input").fill("4k7");
    const event = await events;
    const after = await page.evaluate(() => document.querySelector("stagewright-calc").report);
    design.parts.rc = "4k7";
    const edited = path.join(tmp, "edited.json");
    writeFileSync(edited, JSON.stringify(design));
    assert.deepEqual(jsonDifferences(after, cliReport(edited)), [], "the page's report is the edited file's");
    assert.deepEqual(jsonDifferences(event.report, after), [], "the event carries the same report");
    assert.equal(event.bubbles && event.composed, true, "the event bubbles out of the shadow root");
    // A larger collector resistor: more gain, lower collector voltage.
    assert.ok(Math.abs(after.midband.voltage_gain) > Math.abs(before.midband.voltage_gain) * 1.1);
    assert.ok(after.operating_point.vc < before.operating_point.vc);
    assert.notEqual(await vcText(), shownBefore, "the collector voltage on screen follows");
  });

  test("a run of edits, one field each through the engine's session, ends at the report of the file they make", async () => {
    // Keystrokes reach the engine one field at a time (Session.set), with
    // no design text sent; invalid and emptied entries, a requirement, a
    // device value and a change of stage (after which the session is made
    // again) in between. The end state must be the command line's report
    // of the design the page exports.
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    await reportFor(page, readFileSync(file, "utf8"));
    const stats = () => page.evaluate(() => document.querySelector("stagewright-calc").engineStats);
    const start = await stats();
    const type = async (key, text) => {
      await page.locator(`stagewright-calc .field[data-key='${key}'] input`).fill(text);
    };
    await type("rc", "4k3");
    await type("rc", "4k3x"); // not understood: the last good value stays
    await type("re", "270");
    await type("min_swing", "2");
    await type("hfe", "300");
    await type("rl", "22k");
    await type("hfe", ""); // back to the class's value
    await page.locator("stagewright-calc .field[data-key='stage'] select").selectOption("common-collector");
    await type("re", "2k2");
    await type("rc", "");
    await type("rl", "4k7");
    const got = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      return { report: el.report, design: el.design };
    });
    const end = await stats();
    // fill() clears then types: one edit event per fill. Ten value edits,
    // each one field through the session; the whole design is sent once
    // more, for the change of stage; every accepted edit is analysed.
    assert.equal(end.sets - start.sets, 10, "each value edit sends one field");
    assert.equal(end.sessions - start.sessions, 1, "the whole design is sent again only after the change of stage");
    assert.equal(end.computes - start.computes, 10, "ten accepted edits, ten analyses (the refused entry is not analysed)");
    assert.equal(got.design.stage, "common-collector");
    assert.equal(got.design.parts.rl, "4k7");
    assert.equal(got.design.parts.rc, undefined, "an emptied field leaves the file");
    assert.equal(got.design.transistor.hfe, undefined);
    const ended = path.join(tmp, "edited-run.json");
    writeFileSync(ended, JSON.stringify(got.design));
    assert.deepEqual(jsonDifferences(got.report, cliReport(ended)), [], "the page's report is the exported design's");
    assert.deepEqual(browser.errors, []);
  });

  test("parts given as bare numbers are written as engineers read them, with the same numbers", async () => {
    const file = path.join(root, "examples", "transducer-gain-stage.json");
    const design = JSON.parse(readFileSync(file, "utf8"));
    design.parts.rc = 3900;
    design.parts.c_out = 0.0000047;
    design.parts.r1 = 150000;
    const numeric = path.join(tmp, "numeric.json");
    writeFileSync(numeric, JSON.stringify(design));
    const got = await page.evaluate((t) => {
      const el = document.querySelector("stagewright-calc");
      el.design = t;
      const input = (k) => el.shadowRoot.querySelector(`.field[data-key='${k}'] input`).value;
      return { report: el.report, parts: el.design.parts, shown: [input("rc"), input("c_out"), input("r1")] };
    }, JSON.stringify(design));
    assert.deepEqual(got.shown, ["3.9k", "4.7u", "150k"], "the fields, after a load");
    assert.deepEqual([got.parts.rc, got.parts.c_out, got.parts.r1], ["3.9k", "4.7u", "150k"], "the design saved and shared");
    // Exactly the same numbers: the report is the numeric file's.
    assert.deepEqual(jsonDifferences(got.report, cliReport(numeric), 0), [], "bit for bit");
  });

  test("an invalid entry shows its message in place and the last good results stay", async () => {
    const good = await page.evaluate(() => document.querySelector("stagewright-calc").report);
    const shownBefore = await page.evaluate(() =>
      document.querySelector("stagewright-calc").shadowRoot.querySelector('output[data-key="midband.voltage_gain"]').textContent);
    await page.locator("stagewright-calc .field[data-key='rc'] input").fill("4k7k");
    const error = page.locator("stagewright-calc .field[data-key='rc'] .error");
    await error.waitFor({ state: "visible", timeout: 15000 });
    assert.match(await error.textContent(), /\brc\b.*4k7k/);
    const state = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const root = el.shadowRoot;
      return {
        report: el.report,
        shown: root.querySelector('output[data-key="midband.voltage_gain"]').textContent,
        stale: root.querySelector("section.results").classList.contains("stale"),
        notice: root.querySelector(".notice").textContent,
      };
    });
    assert.deepEqual(jsonDifferences(state.report, good), [], "the report is the last good one");
    assert.equal(state.shown, shownBefore, "the results on screen stay");
    assert.equal(state.stale, true, "and are marked as standing for the last good values");
    assert.match(state.notice, /rc/);
    // A value the parser reads but the engine refuses: the core's message.
    await page.locator("stagewright-calc .field[data-key='rc'] input").fill("-1k");
    await page.locator("stagewright-calc .notice", { hasText: "Not computed" }).waitFor({ timeout: 15000 });
    const notice = await page.locator("stagewright-calc .notice").textContent();
    assert.match(notice, /parts\.rc must be/);
    assert.deepEqual(jsonDifferences(await page.evaluate(() => document.querySelector("stagewright-calc").report), good), []);
    await page.locator("stagewright-calc .field[data-key='rc'] input").fill("4k7");
    await page.locator("stagewright-calc .notice").waitFor({ state: "hidden", timeout: 15000 });
  });

  test("broken design files give the command line's message, and the last good design stays", async () => {
    // Every broken example but the one that is not UTF-8 text (a browser
    // string is always text; hostile.test.mjs opens that one as a file).
    const names = readdirSync(path.join(root, "examples", "broken"))
      .filter((f) => f.endsWith(".json") && f !== "not-utf8.json")
      .map((f) => f.replace(/\.json$/, ""));
    assert.ok(names.length >= 15, names.join(", "));
    const good = readFileSync(examples[0], "utf8");
    for (const name of names) {
      const file = path.join(root, "examples", "broken", `${name}.json`);
      const expected = readFileSync(file.replace(/\.json$/, ".expected"), "utf8").trim();
      const seen = await page.evaluate(([g, t]) => {
        const el = document.querySelector("stagewright-calc");
        el.design = g;
        const title = el.design.title;
        el.design = t;
        const banner = el.shadowRoot.querySelector(".banner");
        return { title, after: el.design.title, banner: banner.hidden ? "" : banner.textContent };
      }, [good, readFileSync(file, "utf8")]);
      assert.equal(seen.banner, expected, `${name}: the page's message is the command line's`);
      assert.equal(seen.after, seen.title, `${name}: the last good design stays`);
    }
  });

  test("the engine's presets and their data reach the form", async () => {
    const info = await page.evaluate(() => {
      const root = document.querySelector("stagewright-calc").shadowRoot;
      return {
        options: Array.from(root.querySelectorAll("select[name=preset] option")).map((o) => o.value).filter(Boolean),
        placeholder: root.querySelector("input[name=hfe]").placeholder,
      };
    });
    assert.deepEqual(info.options, ["general-purpose-npn", "general-purpose-pnp", "low-noise-npn", "medium-power-npn", "rf-npn"]);
    assert.match(info.placeholder, /^\d+$/, "an empty device field shows the class's value");
    assert.deepEqual(networkRequests(browser.requests), []);
    assert.deepEqual(browser.errors, []);
  });
});
