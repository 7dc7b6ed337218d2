// The schematic follows the transistor's polarity: an NPN common-emitter
// stage has rc from the supply down to the collector (above the transistor)
// and the emitter resistance below it to ground; a PNP stage is the mirror
// image on the same positive supply (core/src/stage.rs), emitter resistance
// from the supply down to the emitter (above the transistor) and rc from the
// collector down to ground (below it).

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { artifacts, htmlUrl, launch, root, waitReady, waitReport } from "./helpers.mjs";

/** pnp-gain-stage.json with the given transistor preset. */
function designUrl(preset) {
  const design = JSON.parse(readFileSync(path.join(root, "examples", "pnp-gain-stage.json"), "utf8"));
  design.stage = "common-emitter";
  design.transistor = { preset };
  return `${htmlUrl}#design=${Buffer.from(JSON.stringify(design)).toString("base64url")}`;
}

/** SVG bounding boxes (user units) of the drawn parts, by data-part. */
function partBoxes(page) {
  return page.evaluate(() => {
    const svg = document.querySelector("stagewright-calc").shadowRoot.querySelector("svg.schematic");
    const out = {};
    for (const g of svg.querySelectorAll("g[data-part]")) {
      // The resistor body (or the transistor envelope), not the labels.
      const shape = g.querySelector(".body, .envelope") || g;
      const b = shape.getBBox();
      out[g.getAttribute("data-part")] = { top: b.y, bottom: b.y + b.height, left: b.x, right: b.x + b.width };
    }
    out.polarityText = svg.querySelector('g[data-part="transistor"] text').textContent;
    return out;
  });
}

describe("schematic orientation by polarity (common emitter)", () => {
  let browser;
  let page;

  before(async () => {
    browser = await launch();
    page = await browser.page();
  });

  after(async () => {
    await browser.close();
  });

  for (const [polarity, preset] of [["pnp", "general-purpose-pnp"], ["npn", "general-purpose-npn"]]) {
    test(`${polarity.toUpperCase()}: rc and re on the right sides of the transistor`, async () => {
      await page.goto("about:blank");
      await page.goto(designUrl(preset));
      await waitReady(page);
      await waitReport(page);
      const boxes = await partBoxes(page);
      assert.equal(boxes.polarityText, polarity.toUpperCase());
      const q = boxes.transistor;
      const { rc, re, re_bypassed: rb } = boxes;
      if (polarity === "pnp") {
        assert.ok(rc.top > q.bottom, `rc (top ${rc.top}) is below the transistor (bottom ${q.bottom})`);
        assert.ok(re.bottom < q.top, `re (bottom ${re.bottom}) is above the transistor (top ${q.top})`);
        assert.ok(rb.bottom < q.top, "re_bypassed is above the transistor too");
      } else {
        assert.ok(rc.bottom < q.top, `rc (bottom ${rc.bottom}) is above the transistor (top ${q.top})`);
        assert.ok(re.top > q.bottom, `re (top ${re.top}) is below the transistor (bottom ${q.bottom})`);
        assert.ok(rb.top > q.bottom, "re_bypassed is below the transistor too");
      }
      // Every part of the stage is still drawn and focusable.
      const parts = await page.evaluate(() =>
        Array.from(document.querySelector("stagewright-calc").shadowRoot.querySelectorAll(".schematic g[data-part]"))
          .map((g) => `${g.getAttribute("data-part")}:${g.getAttribute("tabindex")}`)
          .sort());
      for (const key of ["supply", "r1", "r2", "rc", "re", "re_bypassed", "c_emitter", "rs", "rl", "c_in", "c_out", "transistor"]) {
        assert.ok(parts.includes(`${key}:0`), `${key} is drawn and focusable (${parts.join(", ")})`);
      }
      await page.locator("stagewright-calc svg.schematic").screenshot({
        path: path.join(artifacts, `diagram-common-emitter-${polarity}-test.png`),
      });
      assert.deepEqual(browser.errors, []);
    });
  }
});
