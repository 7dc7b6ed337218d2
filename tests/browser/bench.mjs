#!/usr/bin/env node
// Browser timing: how long the page takes to recompute and redraw after an
// edit. Opens dist/stagewright.html from file:// in headless Chromium with
// an example design, types ~100 values into a resistor field (one input
// event each, as a keystroke gives), and times each edit from the event to
// the end of the redraw: the analysis in wasm, the results laid out, the
// diagram updated and the three plots drawn, with every canvas flushed (a
// pixel read back forces the browser to finish the drawing commands).
//
// Prints the median and the 95th percentile; then the start-up: the time
// from navigation (performance.timeOrigin) to the first report and to the
// first frame painted after it, over fresh loads of the page (goal: first
// results within 150 ms, median); then, in the tolerance and "from
// requirements" views, the medians of a 10 000-trial Monte Carlo run (the
// engine alone, and the whole view run with its drawing) and of a design
// from a specification (alone, and with its tables). Run by hand:
//   node tests/browser/bench.mjs [--edits 100] [--design examples/X.json] [--mc-runs 7] [--loads 15]
// scripts/test-browser.sh runs it once and prints the figures; it never
// fails on them (the budget of issue 4 is a median within one 60 Hz frame,
// 16 ms).

import { readFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";

import { htmlUrl, launch, root, waitReady } from "./helpers.mjs";

function arg(name, fallback) {
  const i = process.argv.indexOf(name);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const edits = Number(arg("--edits", "100"));
const designFile = path.resolve(root, arg("--design", "examples/transducer-gain-stage.json"));

/** Times `edits` edits on the page; returns the times in ms. */
export async function measure(page, count) {
  return page.evaluate(async (n) => {
    const el = document.querySelector("stagewright-calc");
    const input = el.shadowRoot.querySelector("input[name=rc]");
    const canvases = Array.from(el.shadowRoot.querySelectorAll("canvas"));
    const frame = () => new Promise((r) => requestAnimationFrame(() => r()));
    // Values an engineer might try: E24 steps around the design's value.
    const values = ["3k3", "3k6", "3k9", "4k3", "4k7", "5k1", "4k7", "4k3", "3k9", "3k6"];
    const times = [];
    for (let i = 0; i < n + 5; i++) {
      await frame();
      input.value = values[i % values.length];
      const t0 = performance.now();
      input.dispatchEvent(new Event("input", { bubbles: true }));
      for (const c of canvases) c.getContext("2d").getImageData(0, 0, 1, 1);
      const t1 = performance.now();
      if (i >= 5) times.push(t1 - t0); // the first few warm the engine up
    }
    return times;
  }, count);
}

export function summarize(times) {
  const sorted = times.slice().sort((a, b) => a - b);
  const at = (q) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
  return { n: sorted.length, median: at(0.5), p95: at(0.95), min: sorted[0], max: sorted[sorted.length - 1] };
}

async function main() {
  const design = readFileSync(designFile, "utf8");
  const b64 = Buffer.from(design).toString("base64url");
  const browser = await launch({ viewport: { width: 1400, height: 1000 } });
  try {
    const page = await browser.page();
    await page.goto(`${htmlUrl}#design=${b64}`);
    await waitReady(page);
    await page.waitForFunction(() => document.querySelector("stagewright-calc").report, null, { timeout: 15000 });
    const s = summarize(await measure(page, edits));
    const cpu = os.cpus();
    console.log(
      `recompute + redraw after an edit (${s.n} edits, ${path.basename(designFile)}, headless Chromium, ` +
        `${cpu.length} cores ${cpu[0] ? cpu[0].model.trim() : ""}): ` +
        `median ${s.median.toFixed(2)} ms, p95 ${s.p95.toFixed(2)} ms ` +
        `(min ${s.min.toFixed(2)}, max ${s.max.toFixed(2)}; goal: median <= 8 ms, p95 <= 16 ms)`,
    );
    if (browser.errors.length) console.log(`page errors: ${browser.errors.join("; ")}`);
  } finally {
    await browser.close();
  }
  await startup();
  await views();
}

/** Start-up over `--loads` fresh loads of the standalone page, each in a
 * new tab, with the example design in its address: ms from navigation
 * (performance.timeOrigin) to the element's first `stagewright-report`
 * event (the results laid out), to the start of the next animation frame
 * (the frame that paints them), and to the end of the first plots (the
 * engine's User Timing mark "stagewright:first-plots"); with the marks of
 * the engine's start, compile and first analysis beside them. */
export async function startup() {
  const loads = Number(arg("--loads", "15"));
  const design = readFileSync(designFile, "utf8");
  const b64 = Buffer.from(design).toString("base64url");
  const browser = await launch({ viewport: { width: 1400, height: 1000 } });
  const rows = [];
  try {
    await browser.context.addInitScript(() => {
      document.addEventListener("stagewright-report", () => {
        if (window.__swFirstReport !== undefined) return;
        window.__swFirstReport = performance.now();
        requestAnimationFrame(() => {
          window.__swFirstFrame = performance.now();
        });
      }, true);
    });
    for (let i = 0; i <= loads; i++) {
      const page = await browser.context.newPage();
      await page.goto(`${htmlUrl}#design=${b64}`);
      await page.waitForFunction(() => window.__swFirstFrame !== undefined &&
        performance.getEntriesByName("stagewright:first-plots").length > 0, null, { timeout: 20000 });
      const t = await page.evaluate(() => {
        const m = (n) => (performance.getEntriesByName(n)[0] || { startTime: NaN }).startTime;
        return {
          report: window.__swFirstReport, frame: window.__swFirstFrame, plots: m("stagewright:first-plots"),
          start: m("stagewright:engine-start"), compiled: m("stagewright:engine-compiled"), computed: m("stagewright:computed"),
        };
      });
      await page.close();
      if (i) rows.push(t); // the first warms the browser's own caches
    }
  } finally {
    await browser.close();
  }
  const med = (k) => summarize(rows.map((r) => r[k]));
  const a = med("report");
  const f = (k) => med(k).median.toFixed(0);
  console.log(
    `start-up (${a.n} fresh loads of dist/stagewright.html in a new tab, ${path.basename(designFile)}; medians, ms after navigation): ` +
      `first results laid out ${a.median.toFixed(0)} (min ${a.min.toFixed(0)}, max ${a.max.toFixed(0)}), ` +
      `their frame starts ${f("frame")}, first plots drawn ${f("plots")}; goal 150 for the first results\n` +
      `  engine: script running ${f("start")}, compiled ${f("compiled")}, first analysis ${f("computed")}`,
  );
  return { report: a, frame: med("frame"), plots: med("plots") };
}

/** The tolerance and "from requirements" views of the page, medians of:
 *  (a) 10 000 Monte Carlo trials alone: the wasm `run_chunk` calls summed,
 *      plus the summary (no DOM; the element's `toleranceResult.timing`),
 *      with the set-up (the vertices and sensitivities) beside it; goal
 *      100 ms;
 *  (b) the whole tolerance view run: set-up, the chunked trials with their
 *      turns between frames, the summary, the tables and the histogram
 *      drawn (its canvas flushed);
 *  (c) one design from examples/specs/geophone-preamp.spec.json: the
 *      engine's `design_from_spec` alone (`specTiming.engine`), and with
 *      its tables laid out (goal 5 ms). */
async function views() {
  const runs = Number(arg("--mc-runs", "7"));
  const design = readFileSync(designFile, "utf8");
  const spec = readFileSync(path.join(root, "examples", "specs", "geophone-preamp.spec.json"), "utf8");
  const browser = await launch({ viewport: { width: 1400, height: 1000 } });
  try {
    const page = await browser.page();
    await page.goto(htmlUrl);
    await waitReady(page);
    const t = await page.evaluate(async ([d, sp, count]) => {
      const el = document.querySelector("stagewright-calc");
      el.design = JSON.parse(d);
      el.showView("requirements");
      el.showView("tolerances");
      const hist = el.shadowRoot.querySelector("canvas.hist");
      const alone = [];
      const trials = [];
      const summary = [];
      const setup = [];
      const whole = [];
      const chunks = [];
      for (let i = 0; i <= count; i++) {
        const t0 = performance.now();
        const r = await el.runTolerance(10000, String(i + 1));
        hist.getContext("2d").getImageData(0, 0, 1, 1);
        const t1 = performance.now();
        if (!i) continue; // the first warms the engine up
        alone.push(r.timing.trials + r.timing.summary);
        trials.push(r.timing.trials);
        summary.push(r.timing.summary);
        setup.push(r.timing.setup);
        whole.push(t1 - t0);
        chunks.push(r.timing.chunks);
      }
      const out = el.shadowRoot.querySelector(".spec-out");
      const synEngine = [];
      const synDrawn = [];
      for (let i = 0; i < 21; i++) {
        const t0 = performance.now();
        el.designFromSpec(sp);
        void out.offsetHeight; // lay the tables out
        const t1 = performance.now();
        if (!i) continue;
        synEngine.push(el.specTiming.engine);
        synDrawn.push(t1 - t0);
      }
      return { alone, trials, summary, setup, whole, chunks, synEngine, synDrawn };
    }, [design, spec, runs]);
    const f = (xs, digits = 1) => {
      const s = summarize(xs);
      return `median ${s.median.toFixed(digits)} ms (min ${s.min.toFixed(digits)}, max ${s.max.toFixed(digits)})`;
    };
    const name = path.basename(designFile);
    console.log(`tolerances view, ${t.alone.length} runs of 10 000 Monte Carlo trials of ${name}:`);
    console.log(`  (a) trials alone (run_chunk calls summed + summary): ${f(t.alone)}; goal 100 ms`);
    console.log(`      of which the trials ${f(t.trials)} in ${summarize(t.chunks).median} run_chunk calls, the summary ${f(t.summary)}`);
    console.log(`      set-up (vertices and sensitivities, before the trials): ${f(t.setup)}`);
    console.log(`  (b) the whole tolerance view run, drawing included: ${f(t.whole)}`);
    console.log(`from requirements view, ${t.synEngine.length} designs from geophone-preamp.spec.json:`);
    console.log(`  (c) synthesis alone (design_from_spec): ${f(t.synEngine, 2)}; with its tables laid out: ${f(t.synDrawn, 2)}; goal 5 ms`);
    if (browser.errors.length) console.log(`page errors: ${browser.errors.join("; ")}`);
  } finally {
    await browser.close();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await main();
}
