// dist/stagewright.html opened from file:// in Debian's Chromium: no
// network, value fields, inline errors, snapping, the diagram, the address
// fragment, user text shown as text, plots, screenshots.

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";
import { fileURLToPath } from "node:url";

import { htmlUrl, launch, networkRequests, screenshot, waitReady } from "./helpers.mjs";
import { sampleCurves, sampleSweep } from "./sample-data.mjs";

const here = path.dirname(fileURLToPath(import.meta.url));
const sampleReport = JSON.parse(readFileSync(path.join(here, "fixtures", "sample-report.json"), "utf8"));

/** The shadow-root text of `selector` inside the element. */
function shadowText(page, selector) {
  return page.evaluate((sel) => {
    const el = document.querySelector("stagewright-calc");
    const node = el.shadowRoot.querySelector(sel);
    return node ? node.textContent : null;
  }, selector);
}

function field(page, key) {
  return page.locator(`stagewright-calc .field[data-key="${key}"]`);
}

/** Puts a report and plot data on screen as the analysis will. */
function showSample(page) {
  return page.evaluate(([report, sweep, curves]) => {
    const el = document.querySelector("stagewright-calc");
    el._report = report;
    el._analysis = { report, sweep, curves };
    el.renderReport(report);
    el._annotateDiagram(report);
    el._drawPlots();
  }, [sampleReport, sampleSweep(), sampleCurves()]);
}

describe("standalone page from file://", () => {
  let browser;
  let page;

  before(async () => {
    browser = await launch();
    page = await browser.page();
    await page.goto(htmlUrl);
    await waitReady(page);
  });

  after(async () => {
    await browser.close();
  });

  test("makes no network request", async () => {
    await page.waitForTimeout(300);
    assert.deepEqual(networkRequests(browser.requests), []);
    assert.deepEqual(browser.requests, [htmlUrl], "only the file itself is read");
    assert.deepEqual(browser.errors, []);
  });

  test("typing 4k7 into a resistor field shows 4.7 kΩ as understood", async () => {
    const input = field(page, "rc").locator("input");
    await input.fill("4k7");
    const understood = field(page, "rc").locator(".understood");
    await assert.doesNotReject(understood.filter({ hasText: "4.7 kΩ" }).waitFor({ timeout: 2000 }));
    assert.equal(await page.evaluate(() => document.querySelector("stagewright-calc").design.parts.rc), "4k7");
    // The diagram shows the same value.
    const onDiagram = await shadowText(page, '.schematic g[data-part="rc"] .pval');
    assert.equal(onDiagram, "4.7 kΩ");
  });

  test("an invalid entry is flagged in place, naming the field, and the last good value stays", async () => {
    await showSample(page);
    const before = await shadowText(page, 'output[data-key="operating_point.ic"]');
    const input = field(page, "rc").locator("input");
    await input.fill("4k7k");
    const error = field(page, "rc").locator(".error");
    await error.waitFor({ state: "visible", timeout: 2000 });
    const message = await error.textContent();
    assert.match(message, /\brc\b/, `message names the field: ${message}`);
    assert.match(message, /4k7k/);
    assert.equal(await input.getAttribute("aria-invalid"), "true");
    // The last good value and the last results stay.
    assert.equal(await page.evaluate(() => document.querySelector("stagewright-calc").design.parts.rc), "4k7");
    assert.equal(await shadowText(page, 'output[data-key="operating_point.ic"]'), before);
    assert.notEqual(before, "—");
    await page.locator("stagewright-calc fieldset.group-parts").screenshot({ path: path.join(here, "artifacts", "invalid-entry.png") });
    // Fixing it clears the message.
    await input.fill("4k7");
    await error.waitFor({ state: "hidden", timeout: 2000 });
  });

  test("the nearest standard value is one click away", async () => {
    const input = field(page, "rc").locator("input");
    await input.fill("4k6");
    const snap = field(page, "rc").locator("button.snap");
    await snap.waitFor({ state: "visible", timeout: 2000 });
    assert.match(await snap.textContent(), /E24\s*4\.7 kΩ/);
    await snap.click();
    assert.equal(await input.inputValue(), "4.7k");
    await field(page, "rc").locator(".std").waitFor({ state: "visible", timeout: 2000 });
  });

  test("choosing a part on the diagram focuses its input, by mouse and by keyboard", async () => {
    const focused = () =>
      page.evaluate(() => {
        const a = document.querySelector("stagewright-calc").shadowRoot.activeElement;
        return a ? a.name : null;
      });
    await page.locator('stagewright-calc .schematic g[data-part="r2"]').click();
    assert.equal(await focused(), "r2");
    await page.locator('stagewright-calc .schematic g[data-part="c_in"]').focus();
    await page.keyboard.press("Enter");
    assert.equal(await focused(), "c_in");
  });

  test("the design follows in the address fragment", async () => {
    await field(page, "r1").locator("input").fill("56k");
    await page.waitForFunction(() => location.hash.startsWith("#design="), null, { timeout: 2000 });
    await page.waitForTimeout(400);
    const design = await page.evaluate(() => {
      const b64 = location.hash.slice("#design=".length).replace(/-/g, "+").replace(/_/g, "/");
      const bin = atob(b64 + "===".slice((b64.length + 3) % 4));
      return JSON.parse(new TextDecoder().decode(Uint8Array.from(bin, (c) => c.charCodeAt(0))));
    });
    assert.equal(design.format, "stagewright/1");
    assert.equal(design.parts.r1, "56k");
  });

  test("a title with markup is shown as text", async () => {
    const title = "<img src=x onerror=alert(1)>";
    await field(page, "title").locator("input").fill(title);
    assert.equal(await shadowText(page, "h2.title"), title);
    const images = await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelectorAll("img").length);
    assert.equal(images, 0);
    await page.waitForTimeout(400);
    assert.ok(!browser.errors.some((e) => e.startsWith("dialog")), "no script ran");
    assert.deepEqual(networkRequests(browser.requests), []);
  });

  test("plots are drawn sharp at the canvas size and numbers are in a table", async () => {
    await showSample(page);
    const info = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const c = el._plotParts.gain.canvas;
      const ctx = c.getContext("2d");
      const data = ctx.getImageData(0, 0, c.width, c.height).data;
      const colours = new Set();
      for (let i = 0; i < data.length; i += 4 * 97) colours.add(`${data[i]},${data[i + 1]},${data[i + 2]}`);
      return { w: c.width, h: c.height, cw: c.clientWidth, ch: c.clientHeight, dpr: devicePixelRatio, colours: colours.size };
    });
    assert.equal(info.w, Math.round(info.cw * info.dpr));
    assert.equal(info.h, Math.round(info.ch * info.dpr));
    assert.ok(info.colours > 3, "something was drawn");
    await page.locator('stagewright-calc figure[data-plot="gain"] summary').click();
    await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr').first().waitFor({ timeout: 2000 });
    const rows = await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr').count();
    assert.equal(rows, sampleSweep().freq.length);
    const firstFreq = await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr th').first().textContent();
    assert.equal(firstFreq, "1 Hz");
    await page.locator('stagewright-calc figure[data-plot="gain"] summary').click();
    await page.waitForFunction(() => !document.querySelector("stagewright-calc").shadowRoot.querySelector('figure[data-plot="gain"] details').open);
  });

  test("an edit is recomputed and redrawn quickly", async () => {
    await showSample(page);
    const median = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const input = el.shadowRoot.querySelector("input[name=rc]");
      const times = [];
      for (let i = 0; i < 41; i++) {
        input.value = `${(3 + (i % 10) / 10).toFixed(1)}k`;
        const t0 = performance.now();
        input.dispatchEvent(new Event("input"));
        el._drawPlots();
        times.push(performance.now() - t0);
      }
      times.sort((a, b) => a - b);
      return times[20];
    });
    console.log(`# edit + redraw of three plots: median ${median.toFixed(1)} ms`);
    assert.ok(median < 16, `median ${median} ms`);
  });

  test("screenshots", async () => {
    await field(page, "title").locator("input").fill("Example: small-signal common-emitter stage");
    await field(page, "rc").locator("input").fill("3k9");
    await showSample(page);
    await screenshot(page, "standalone-light.png");
    // The print layout for design reviews.
    await page.emulateMedia({ media: "print" });
    await page.evaluate(() => window.dispatchEvent(new Event("beforeprint")));
    await page.waitForTimeout(200);
    await screenshot(page, "print.png");
    await page.emulateMedia({ media: "screen" });
    await page.evaluate(() => window.dispatchEvent(new Event("afterprint")));
  });
});

describe("standalone page, other looks", () => {
  test("dark, high-DPI, each stage, compact and read-only", async () => {
    const browser = await launch({ colorScheme: "dark", deviceScaleFactor: 2, viewport: { width: 1200, height: 900 } });
    try {
      const page = await browser.page();
      await page.goto(htmlUrl);
      await waitReady(page);
      await showSample(page);
      await screenshot(page, "standalone-dark-2x.png");
      for (const stage of ["common-collector", "common-base"]) {
        await field(page, "stage").locator("select").selectOption(stage);
        const card = page.locator("stagewright-calc .card-diagram");
        await card.screenshot({ path: path.join(here, "artifacts", `diagram-${stage}.png`) });
        const parts = await page.evaluate(() =>
          Array.from(document.querySelector("stagewright-calc").shadowRoot.querySelectorAll(".schematic [data-part]"))
            .map((g) => g.getAttribute("data-part")));
        if (stage === "common-base") assert.ok(parts.includes("c_base"));
        else assert.ok(!parts.includes("c_base") && !parts.includes("c_emitter"));
      }
      await page.evaluate(() => {
        const el = document.querySelector("stagewright-calc");
        el.setAttribute("compact", "");
        el.setAttribute("readonly", "");
      });
      const ro = await page.evaluate(() => {
        const root = document.querySelector("stagewright-calc").shadowRoot;
        return {
          readOnly: root.querySelector("input[name=rc]").readOnly,
          formOpen: root.querySelector("details.design-box").open,
        };
      });
      assert.deepEqual(ro, { readOnly: true, formOpen: false });
      await screenshot(page, "compact-readonly-dark.png");
      assert.deepEqual(networkRequests(browser.requests), []);
      assert.deepEqual(browser.errors, []);
    } finally {
      await browser.close();
    }
  });

  test("a design in the #design= fragment is loaded, its text kept as text", async () => {
    const design = {
      format: "stagewright/1",
      title: "<img src=x onerror=alert(1)>",
      stage: "common-base",
      supply: 9,
      transistor: { preset: "rf-npn" },
      parts: { r1: "33k", r2: "10k", rc: "1k", re: "470", rl: "1k", c_in: "10n", c_out: "10n", c_base: "100n" },
    };
    const b64 = Buffer.from(JSON.stringify(design)).toString("base64url");
    const browser = await launch({ viewport: { width: 900, height: 900 } });
    try {
      const page = await browser.page();
      await page.goto(`${htmlUrl}#design=${b64}`);
      await waitReady(page);
      const seen = await page.evaluate(() => {
        const el = document.querySelector("stagewright-calc");
        return { title: el.shadowRoot.querySelector("h2.title").textContent, stage: el.design.stage, rc: el.design.parts.rc };
      });
      assert.deepEqual(seen, { title: design.title, stage: "common-base", rc: "1k" });
      await page.waitForTimeout(300);
      assert.ok(!browser.errors.some((e) => e.startsWith("dialog")));
      await screenshot(page, "fragment-narrow.png");
      assert.deepEqual(networkRequests(browser.requests), []);
    } finally {
      await browser.close();
    }
  });
});
