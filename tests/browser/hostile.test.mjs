// Hostile designs through every way into the page: the element's `design`
// property (as text and as an object), the standalone page's `#design=`
// address and the form. For each, the page gives the command line's message
// in place, keeps the last good design, and goes on computing: the next
// good design is analysed as before. The messages are compared with
// `stagewright analyze FILE` of the native binary on the same text.

import assert from "node:assert/strict";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { cliPath, htmlUrl, launch, networkRequests, root, waitReady, waitReport } from "./helpers.mjs";

const good = JSON.parse(readFileSync(path.join(root, "examples", "transducer-gain-stage.json"), "utf8"));
const goodText = JSON.stringify(good);

/** `good` with `edit` applied to a deep copy. */
function variant(edit) {
  const d = JSON.parse(goodText);
  edit(d);
  return d;
}

/** Hostile design texts, each a file a user could be sent. */
function hostileTexts() {
  const deep = (n) => "[".repeat(n) + "]".repeat(n);
  return {
    "preset true": JSON.stringify(variant((d) => (d.transistor.preset = true))),
    "preset number": JSON.stringify(variant((d) => (d.transistor.preset = 42))),
    "preset object": JSON.stringify(variant((d) => (d.transistor.preset = { name: "general-purpose-npn" }))),
    "notes 4000 levels deep (8 KB)": goodText.replace('"notes":', `"notes": ${deep(4000)}, "x":`),
    "stage constructor": JSON.stringify(variant((d) => (d.stage = "constructor"))),
    "stage __proto__": JSON.stringify(variant((d) => (d.stage = "__proto__"))),
    "stage toString": JSON.stringify(variant((d) => (d.stage = "toString"))),
    "top-level __proto__": goodText.replace('"supply":', '"__proto__": {"supply": 99}, "supply":'),
    "top-level constructor": goodText.replace('"supply":', '"constructor": 1, "supply":'),
    "a 1 MB word in notes": JSON.stringify(variant((d) => (d.notes = "w".repeat(1 << 20)))),
    "no format": JSON.stringify(variant((d) => delete d.format)),
    "a leading space in the format": JSON.stringify(variant((d) => (d.format = " stagewright/1"))),
    "a part the stage does not use": JSON.stringify(variant((d) => (d.parts.c_base = "100n"))),
    "nesting 129 deep": goodText.replace('"notes":', `"notes": ${deep(129)}, "x":`),
    "a key given twice": goodText.replace('"supply":', '"supply": 12, "supply":'),
    "a 2 MB unknown key": goodText.replace('"supply":', `"${"k".repeat(2 << 20)}": 1, "supply":`),
    "an empty key": goodText.replace('"supply":', '"": 1, "supply":'),
    "rs of 1e-12 Ω": JSON.stringify(variant((d) => (d.parts.rs = 1e-12))),
    "rbb of 1e-300 Ω": JSON.stringify(variant((d) => (d.transistor.rbb = 1e-300))),
    "a 10 fF input capacitor": JSON.stringify(variant((d) => (d.parts.c_in = "10f"))),
  };
}

let tmp;

/** What the command line says of `text`: its message (exit 2), or null
 * when it reads the file (exit 0 or 1). */
function cliMessage(text) {
  const file = path.join(tmp, "design.json");
  writeFileSync(file, text);
  const r = spawnSync(cliPath, ["analyze", file, "--small-signal-only"], { encoding: "utf8", maxBuffer: 1 << 26 });
  if (r.status === 0 || r.status === 1) return null;
  assert.equal(r.status, 2, r.stderr);
  return r.stderr.trim().replace(`error: ${file}: `, "");
}

describe("hostile designs through the page", () => {
  let browser;
  let page;

  before(async () => {
    tmp = mkdtempSync(path.join(os.tmpdir(), "stagewright-hostile-"));
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

  /** Loads `good`, then `source` through `how`; returns what the page
   * shows and whether it still computes a good design afterwards. */
  async function feed(how, source) {
    return page.evaluate(
      async ([how, source, goodText]) => {
        const el = document.querySelector("stagewright-calc");
        el.design = goodText;
        const before = JSON.stringify(el.design);
        const t0 = performance.now();
        if (how === "text") el.design = source;
        else if (how === "object") el.design = JSON.parse(source);
        else {
          // The standalone page's address: a link someone shared.
          location.hash = "#design=" + source;
          await new Promise((r) => setTimeout(r, 50));
        }
        const ms = performance.now() - t0;
        const banner = el.shadowRoot.querySelector(".banner");
        const shown = banner.hidden ? "" : banner.textContent;
        const kept = JSON.stringify(el.design) === before;
        // The engine still works: a good design computes.
        const good = JSON.parse(goodText);
        good.parts.rc = "4k7";
        el.design = good;
        const alive = !!(el.report && el.report.design && el.report.checks && el.design.parts.rc === "4k7");
        return { shown, kept, alive, ms, title: el.design.title };
      },
      [how, source, goodText],
    );
  }

  test("each hostile design gives the command line's message and keeps the last good one", async () => {
    const cases = hostileTexts();
    const log = [];
    for (const [name, text] of Object.entries(cases)) {
      const expected = cliMessage(text);
      for (const how of ["text", "object", "link"]) {
        // Chromium keeps addresses up to 2 MB: the 2 MB key is no link.
        if (how === "link" && text.length > 1.5e6) continue;
        const source = how === "link" ? Buffer.from(text).toString("base64url") : text;
        const seen = await feed(how, source);
        log.push(`${name} (${how}): ${seen.ms.toFixed(1)} ms`);
        assert.ok(seen.alive, `${name} (${how}): the engine still computes`);
        if (expected === null) {
          // A file the command line reads: the page loads it too.
          assert.equal(seen.shown, "", `${name} (${how}): no refusal, as on the command line`);
          continue;
        }
        if (how === "object") {
          // An object is written back as JSON by the browser: a key given
          // twice is already gone (JSON.parse kept the last), and a syntax
          // position moves with the spacing.
          if (name === "a key given twice") continue;
          const place = / \(line \d+, column \d+\)$/;
          assert.equal(seen.shown.replace(place, ""), expected.replace(place, ""), `${name} (object)`);
        } else {
          assert.equal(seen.shown, expected, `${name} (${how}): the page's message is the command line's`);
        }
        assert.ok(seen.kept, `${name} (${how}): the last good design stays`);
      }
    }
    console.log(`# time to refuse each (ms, headless Chromium): ${log.join("; ")}`);
    assert.deepEqual(browser.errors, [], "no uncaught error on any of them");
    assert.deepEqual(networkRequests(browser.requests), []);
  });

  test("an object that is not JSON (a cycle) gets a message, not an exception", async () => {
    const seen = await page.evaluate((goodText) => {
      const el = document.querySelector("stagewright-calc");
      el.design = goodText;
      const d = JSON.parse(goodText);
      d.parts.self = d;
      el.design = d;
      const banner = el.shadowRoot.querySelector(".banner");
      return { shown: banner.textContent, title: el.design.title };
    }, goodText);
    assert.match(seen.shown, /cannot be written as JSON/);
    assert.equal(seen.title, good.title);
    assert.deepEqual(browser.errors, []);
  });

  test("the form: values a user can type get the command line's messages", async () => {
    for (const [typed, field] of [["1e-30", "rc"], ["1T1", "rc"], ["0.001f", "c_in"]]) {
      const text = JSON.stringify(variant((d) => (d.parts[field] = typed)));
      const expected = cliMessage(text);
      assert.ok(expected, `${typed} in ${field} is refused on the command line`);
      // From the good design each time: the core names the first problem.
      await page.evaluate((t) => (document.querySelector("stagewright-calc").design = t), goodText);
      await page.locator(`stagewright-calc .field[data-key='${field}'] input`).fill(typed);
      const shown = await page.waitForFunction(
        (f) => {
          const e = document.querySelector("stagewright-calc").shadowRoot.querySelector(`.field[data-key='${f}'] .error`);
          return e && !e.hidden && e.textContent;
        },
        field,
        { timeout: 15000 },
      );
      assert.equal(await shown.jsonValue(), expected, `${typed} in ${field}`);
    }
    // The notes and title are cut where the file format stops them.
    const limits = await page.evaluate(() => {
      const root = document.querySelector("stagewright-calc").shadowRoot;
      return [root.querySelector("[name=title]").maxLength, root.querySelector("[name=notes]").maxLength];
    });
    assert.deepEqual(limits, [200, 20000]);
    // The longest notes allowed, one unbroken word, still leave the page
    // computing (the time is printed, not judged).
    const ms = await page.evaluate(async (goodText) => {
      const el = document.querySelector("stagewright-calc");
      const d = JSON.parse(goodText);
      d.notes = "w".repeat(20000);
      const t0 = performance.now();
      el.design = d;
      await new Promise((r) => requestAnimationFrame(() => setTimeout(r, 0)));
      return performance.now() - t0;
    }, goodText);
    console.log(`# a design with 20 000 characters of unbroken notes: loaded and drawn in ${ms.toFixed(0)} ms`);
    assert.deepEqual(browser.errors, []);
  });

  test("a file that is not UTF-8 gets the command line's message", async () => {
    const file = path.join(root, "examples", "broken", "not-utf8.json");
    const expected = readFileSync(file.replace(/\.json$/, ".expected"), "utf8").trim();
    await page.evaluate((t) => (document.querySelector("stagewright-calc").design = t), goodText);
    await page.locator("stagewright-calc details.share > summary").click();
    await page.locator("stagewright-calc input[type=file]").setInputFiles(file);
    const banner = page.locator("stagewright-calc .banner");
    await banner.waitFor({ state: "visible", timeout: 15000 });
    assert.equal(await banner.textContent(), `not-utf8.json: ${expected}`);
    const title = await page.evaluate(() => document.querySelector("stagewright-calc").design.title);
    assert.equal(title, good.title, "the last good design stays");
  });
});
