// The plots' tools and the field warnings, in dist/stagewright.html from
// file://: the cursor readout (the frequency under the pointer and each
// trace's value there), the numbers as CSV (equal to `stagewright sweep
// --json` at the same frequencies: the same core), the PNG export, the
// warning for a value far outside a part's usual range, and ro with no
// Early effect written as infinite.

import assert from "node:assert/strict";
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { artifacts, cliPath, htmlUrl, launch, root, waitReady, waitReport } from "./helpers.mjs";

const EXAMPLE = path.join(root, "examples", "transducer-gain-stage.json");

function url(designText) {
  return `${htmlUrl}#design=${Buffer.from(designText).toString("base64url")}`;
}

describe("plots and warnings", () => {
  let browser;
  let page;

  before(async () => {
    browser = await launch({ viewport: { width: 1280, height: 900 } });
    page = await browser.page();
    await page.goto(url(readFileSync(EXAMPLE, "utf8")));
    await waitReady(page);
    await waitReport(page);
    // The first plots are drawn after the first results are painted.
    await page.waitForFunction(() => performance.getEntriesByName("stagewright:first-plots").length > 0);
  });

  after(async () => {
    await browser.close();
  });

  test("the cursor readout names the frequency under the pointer and every trace there", async () => {
    const canvas = page.locator("stagewright-calc figure[data-plot=gain] canvas");
    await canvas.scrollIntoViewIfNeeded();
    const box = await canvas.boundingBox();
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.3);
    const text = await page.locator("stagewright-calc figure[data-plot=gain] .cursor-readout").textContent();
    // "7.08 kHz · voltage gain 21.4 dB · current gain … · phase of voltage gain −180°"
    assert.match(text, /^[\d.]+ (k|M)?Hz · voltage gain -?[\d.]+ dB · current gain -?[\d.]+ dB · power gain -?[\d.]+ dB · phase of voltage gain -?[\d.]+°$/);
    // The value shown is the CSV's (the computed point nearest the pointer).
    const csv = await page.evaluate(() => document.querySelector("stagewright-calc").plotCsv("gain"));
    const rows = csv.trim().split("\r\n").slice(1).map((r) => r.split(",").map(Number));
    // The readout's numbers (3 significant digits) are one computed row's.
    const m = /^([\d.]+) (k|M)?Hz · voltage gain (-?[\d.]+) dB/.exec(text);
    const freq = Number(m[1]) * (m[2] === "k" ? 1e3 : m[2] === "M" ? 1e6 : 1);
    const row = rows.find((r) => Math.abs(r[0] - freq) <= 0.01 * freq);
    assert.ok(row, `a computed point at ${freq} Hz`);
    assert.ok(Math.abs(row[1] - Number(m[3])) <= 0.05 + 1e-9, `voltage gain ${m[3]} dB shown, ${row[1]} dB computed (3 digits)`);
    const line = await page.locator("stagewright-calc figure[data-plot=gain] .cursor-line");
    assert.equal(await line.isVisible(), true, "a line marks the pointer's frequency");
    // Off the plot: the hint again, the line gone.
    await page.mouse.move(2, 2);
    assert.equal(await page.locator("stagewright-calc figure[data-plot=gain] .cursor-readout").textContent(), "Point at the plot to read its values.");
    assert.equal(await line.isVisible(), false);
    // On the load lines: VCE and IC under the pointer.
    const ll = page.locator("stagewright-calc figure[data-plot=loadlines] canvas");
    await ll.scrollIntoViewIfNeeded();
    const lb = await ll.boundingBox();
    await page.mouse.move(lb.x + lb.width * 0.5, lb.y + lb.height * 0.5);
    assert.match(await page.locator("stagewright-calc figure[data-plot=loadlines] .cursor-readout").textContent(), /^VCE [\d.]+ m?V · IC -?[\d.]+ (n|µ|m)?A$/);
    assert.deepEqual(browser.errors, []);
  });

  test("the gain plot's CSV is the command line's sweep at the same frequencies", async () => {
    const csv = await page.evaluate(() => document.querySelector("stagewright-calc").plotCsv("gain"));
    const lines = csv.split("\r\n");
    assert.equal(lines[0], "frequency (Hz),voltage gain (dB),current gain (dB),power gain (dB),phase of voltage gain (°)");
    assert.equal(lines[lines.length - 1], "", "every row ends in CRLF (RFC 4180)");
    const rows = lines.slice(1, -1).map((r) => r.split(",").map(Number));
    const f0 = rows[0][0];
    const f1 = rows[rows.length - 1][0];
    const r = spawnSync(cliPath, ["sweep", EXAMPLE, "--from", String(f0), "--to", String(f1), "--points", String(rows.length), "--json"], { encoding: "utf8" });
    assert.equal(r.status, 0, r.stderr);
    const cli = JSON.parse(r.stdout).rows;
    assert.equal(cli.length, rows.length);
    const close = (a, b, tol) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));
    rows.forEach((row, i) => {
      // Frequencies: both log-spaced between the same ends, so they differ
      // only by the rounding of the spacing (1e-9 allows far more). Gains:
      // the same core at those frequencies; a gain moves by at most about
      // 17 dB per unit of ln f (40 dB a decade), so the 1e-9 frequency
      // rounding moves it below 2e-8 dB: 1e-7 relative covers that.
      assert.ok(close(row[0], cli[i].frequency, 1e-9), `row ${i}: ${row[0]} Hz vs ${cli[i].frequency}`);
      assert.ok(close(row[1], cli[i].voltage_gain_db, 1e-7), `row ${i}: voltage gain ${row[1]} vs ${cli[i].voltage_gain_db}`);
      assert.ok(close(row[2], cli[i].current_gain_db, 1e-7), `row ${i}: current gain`);
      assert.ok(close(row[3], cli[i].power_gain_db, 1e-7), `row ${i}: power gain`);
    });
  });

  test("each plot saves as a PNG image and its numbers as a CSV file", async () => {
    for (const key of ["gain", "impedance", "loadlines"]) {
      const [png] = await Promise.all([
        page.waitForEvent("download"),
        page.locator(`stagewright-calc figure[data-plot=${key}] [data-action=plot-png]`).click(),
      ]);
      assert.match(png.suggestedFilename(), new RegExp(`-${key}\\.png$`));
      const file = path.join(artifacts, `export-${key}.png`);
      await png.saveAs(file);
      const bytes = readFileSync(file);
      assert.deepEqual([...bytes.subarray(0, 8)], [137, 80, 78, 71, 13, 10, 26, 10], "the PNG signature (ISO/IEC 15948)");
      const [csv] = await Promise.all([
        page.waitForEvent("download"),
        page.locator(`stagewright-calc figure[data-plot=${key}] [data-action=plot-csv]`).click(),
      ]);
      assert.match(csv.suggestedFilename(), new RegExp(`-${key}\\.csv$`));
      const text = readFileSync(await csv.path(), "utf8");
      assert.ok(text.split("\r\n").length > 10, `${key}: the CSV holds the plot's numbers`);
    }
    assert.deepEqual(browser.errors, []);
  });

  test("a value far outside a part's usual range gets a visible warning; a usual one none", async () => {
    const input = page.locator("stagewright-calc input[name=rc]");
    const warn = page.locator("stagewright-calc .field[data-key=rc] .warn");
    await input.fill("1m");
    assert.equal(await warn.isVisible(), true);
    assert.match(await warn.textContent(), /^1 mΩ is unusual for a collector resistor \(usually 1 Ω to 10 MΩ\)/);
    await input.fill("4k7");
    assert.equal(await warn.isVisible(), false);
    const c = page.locator("stagewright-calc input[name=c_in]");
    await c.fill("2.2");
    assert.match(await page.locator("stagewright-calc .field[data-key=c_in] .warn").textContent(), /^2\.2 F is unusual for a coupling capacitor/);
    await c.fill("2u2");
  });

  test("ro with no Early effect reads as infinite, not as 1e15 Ω", async () => {
    const design = JSON.parse(readFileSync(EXAMPLE, "utf8"));
    // The device's data without an Early voltage (no preset).
    design.transistor = {
      polarity: "npn", hfe: 200, hfe_min: 100, hfe_max: 300, vbe: 0.65, vbe_at_ic: 1e-3, ft: 250e6, cob: 4e-12, rbb: 100,
      vce_sat: 0.2, vceo_max: 40, ic_max: 0.2, ptot_max: 0.5, rth_ja: 250, tj_max: 150,
    };
    const out = await page.evaluate((d) => {
      const el = document.querySelector("stagewright-calc");
      el.design = d;
      return [el.report.small_signal.r_o, el.shadowRoot.querySelector('output[data-key="small_signal.r_o"]').textContent];
    }, design);
    assert.ok(out[0] >= 1e15, "the report keeps the open circuit as a number");
    assert.equal(out[1], "∞ (no Early effect)");
  });
});
