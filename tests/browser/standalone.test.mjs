// dist/stagewright.html opened from file:// in Debian's Chromium: no
// network, value fields, inline errors, snapping, the diagram, the address
// fragment, user text shown as text, plots from the engine,
// screenshots of each view.

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";
import { fileURLToPath } from "node:url";

import { htmlUrl, launch, networkRequests, root, screenshot, waitReady, waitReport } from "./helpers.mjs";

const here = path.dirname(fileURLToPath(import.meta.url));

/** The standalone page's address with an example design in its fragment. */
function exampleUrl(name) {
  const text = readFileSync(path.join(root, "examples", `${name}.json`), "utf8");
  return `${htmlUrl}#design=${Buffer.from(text).toString("base64url")}`;
}

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

describe("standalone page from file://", () => {
  let browser;
  let page;

  before(async () => {
    browser = await launch();
    page = await browser.page();
    await page.goto(htmlUrl);
    await waitReady(page);
    await waitReport(page);
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
    await assert.doesNotReject(understood.filter({ hasText: "4.7 kΩ" }).waitFor({ timeout: 15000 }));
    assert.equal(await page.evaluate(() => document.querySelector("stagewright-calc").design.parts.rc), "4k7");
    // The diagram shows the same value.
    const onDiagram = await shadowText(page, '.schematic g[data-part="rc"] .pval');
    assert.equal(onDiagram, "4.7 kΩ");
  });

  test("an invalid entry is flagged in place, naming the field, and the last good value stays", async () => {
    const before = await shadowText(page, 'output[data-key="operating_point.ic"]');
    const input = field(page, "rc").locator("input");
    await input.fill("4k7k");
    const error = field(page, "rc").locator(".error");
    await error.waitFor({ state: "visible", timeout: 15000 });
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
    await error.waitFor({ state: "hidden", timeout: 15000 });
  });

  test("the nearest standard value is one click away", async () => {
    const input = field(page, "rc").locator("input");
    await input.fill("4k6");
    const snap = field(page, "rc").locator("button.snap");
    await snap.waitFor({ state: "visible", timeout: 15000 });
    assert.match(await snap.textContent(), /E24\s*4\.7 kΩ/);
    await snap.click();
    assert.equal(await input.inputValue(), "4.7k");
    await field(page, "rc").locator(".std").waitFor({ state: "visible", timeout: 15000 });
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
    await page.waitForFunction(() => location.hash.startsWith("#design="), null, { timeout: 15000 });
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
    const info = await page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const c = el.shadowRoot.querySelector('figure[data-plot="gain"] canvas');
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
    await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr').first().waitFor({ timeout: 15000 });
    const rows = await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr').count();
    assert.ok(rows >= 81, `a row per frequency, 20 a decade over four decades or more: ${rows}`);
    const firstFreq = await page.locator('stagewright-calc figure[data-plot="gain"] tbody tr th').first().textContent();
    assert.match(firstFreq, /^(1|10|100) (m|k|M)?Hz$/, "the sweep starts on a whole decade");
    const errors = await page.evaluate(() =>
      Array.from(document.querySelector("stagewright-calc").shadowRoot.querySelectorAll("canvas[data-error]")).length);
    assert.equal(errors, 0, "every plot drew");
    await page.locator('stagewright-calc figure[data-plot="gain"] summary').click();
    await page.waitForFunction(() => !document.querySelector("stagewright-calc").shadowRoot.querySelector('figure[data-plot="gain"] details').open);
  });

  test("screenshots: standalone (light) and print", async () => {
    await page.goto(exampleUrl("transducer-gain-stage"));
    await page.waitForFunction(() => document.querySelector("stagewright-calc").report.design.title.startsWith("Transducer"));
    await page.waitForTimeout(200);
    await screenshot(page, "view-standalone-light.png");
    // The print layout for design reviews.
    await page.emulateMedia({ media: "print" });
    await page.evaluate(() => window.dispatchEvent(new Event("beforeprint")));
    await page.waitForTimeout(300);
    await screenshot(page, "view-print.png");
    await page.emulateMedia({ media: "screen" });
    await page.evaluate(() => window.dispatchEvent(new Event("afterprint")));
    assert.deepEqual(networkRequests(browser.requests), []);
    assert.deepEqual(browser.errors, []);
  });
});

describe("standalone page, other looks", () => {
  test("dark, high-DPI, each stage, cautions, compact and read-only", async () => {
    const browser = await launch({ colorScheme: "dark", deviceScaleFactor: 2, viewport: { width: 1200, height: 900 } });
    try {
      const page = await browser.page();
      await page.goto(exampleUrl("pnp-gain-stage"));
      await waitReady(page);
      await waitReport(page);
      // A supply above the extra-low-voltage limit: cautions, a failed rating.
      await field(page, "supply").locator("input").fill("70");
      await page.locator("stagewright-calc section.cautions li").first().waitFor({ timeout: 15000 });
      const cautions = await page.evaluate(() => document.querySelector("stagewright-calc").report.cautions.map((c) => c.id));
      assert.ok(cautions.length > 0, "the design draws cautions");
      assert.equal(
        await page.locator("stagewright-calc section.cautions li").count(),
        cautions.length,
        "every caution is listed",
      );
      await screenshot(page, "view-standalone-dark.png");
      await field(page, "supply").locator("input").fill("12");
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
      assert.deepEqual(networkRequests(browser.requests), []);
      assert.deepEqual(browser.errors, []);
    } finally {
      await browser.close();
    }
  });

  test("compact and read-only views", async () => {
    const browser = await launch({ viewport: { width: 1000, height: 900 } });
    try {
      const page = await browser.page();
      await page.goto(exampleUrl("sensor-cable-buffer"));
      await waitReady(page);
      await waitReport(page);
      await page.evaluate(() => document.querySelector("stagewright-calc").setAttribute("compact", ""));
      await page.waitForTimeout(200);
      const compact = await page.evaluate(() => document.querySelector("stagewright-calc").shadowRoot.querySelector("details.design-box").open);
      assert.equal(compact, false, "compact folds the form away");
      await screenshot(page, "view-compact.png");
      await page.evaluate(() => {
        const el = document.querySelector("stagewright-calc");
        el.removeAttribute("compact");
        el.setAttribute("readonly", "");
      });
      await page.waitForTimeout(200);
      const ro = await page.evaluate(() => {
        const root = document.querySelector("stagewright-calc").shadowRoot;
        return {
          readOnly: root.querySelector("input[name=rc]").readOnly,
          formOpen: root.querySelector("details.design-box").open,
          snaps: Array.from(root.querySelectorAll("button.snap")).filter((b) => !b.hidden).length,
        };
      });
      assert.deepEqual(ro, { readOnly: true, formOpen: true, snaps: 0 });
      await screenshot(page, "view-readonly.png");
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
      await waitReport(page);
      const reportTitle = await page.evaluate(() => document.querySelector("stagewright-calc").report.design.title);
      assert.equal(reportTitle, design.title, "the report carries the title as text");
      await page.waitForTimeout(300);
      assert.ok(!browser.errors.some((e) => e.startsWith("dialog")));
      await screenshot(page, "fragment-narrow.png");
      assert.deepEqual(networkRequests(browser.requests), []);
    } finally {
      await browser.close();
    }
  });
});
