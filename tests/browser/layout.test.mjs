// Layout of the element at the widths it is read at: a phone (390 px), a
// documentation column (736 px) and a desktop (1280 px), and the frame
// recipe's height following the framed page. Geometry only, measured after
// the content is in place; no timing is asserted. Screenshots go to
// artifacts/ (layout-*.png).

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";

import { artifacts, dist, htmlUrl, launch, screenshot, scriptPath, waitReady, waitReport } from "./helpers.mjs";

const ORIGIN = "https://wiki.example";
const script = readFileSync(scriptPath);
const html = readFileSync(path.join(dist, "stagewright.html"));

/** Serves `pages` (path -> html), the script and the standalone page under ORIGIN. */
async function serve(context, pages) {
  await context.route(`${ORIGIN}/**`, (route) => {
    const url = new URL(route.request().url());
    if (url.pathname === "/stagewright.js") return route.fulfill({ status: 200, contentType: "text/javascript", body: script });
    if (url.pathname === "/stagewright.html") return route.fulfill({ status: 200, contentType: "text/html; charset=utf-8", body: html });
    const body = pages[url.pathname];
    if (!body) return route.fulfill({ status: 404, body: "not here" });
    return route.fulfill({ status: 200, contentType: "text/html; charset=utf-8", body });
  });
}

/** Shows each view with its results in place: the calculator (the form
 * folded, then opened), "from requirements" after designing, tolerances
 * after a run of 2000 trials with the sensitivities opened. Calls
 * `check(label)` in each state. */
async function everyView(page, check) {
  await check("calculator");
  await page.locator("stagewright-calc .design-box > summary").click();
  await page.waitForFunction(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".design-box").open);
  await check("calculator, editor open");
  await page.locator("stagewright-calc .share > summary").click();
  // Its snippets are written on the toggle event, a task after the click.
  await page.waitForFunction(() => {
    const t = document.querySelector("stagewright-calc").shadowRoot.querySelector("textarea.snippet");
    return !!(t && t.value.length > 0);
  }, null, { timeout: 15000 });
  await check("calculator, share open");
  await page.locator("stagewright-calc .share > summary").click();
  await page.locator("stagewright-calc [role=tab][data-view=requirements]").click();
  await page.locator("stagewright-calc [data-action=design-from-spec]").click();
  await page.waitForFunction(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".spec-out table"));
  await check("requirements");
  await page.locator("stagewright-calc [role=tab][data-view=tolerances]").click();
  await page.locator("stagewright-calc input[id$='tol-n']").fill("2000");
  await page.locator("stagewright-calc [data-action=run-tolerance]").click();
  await page.waitForFunction(() => document.querySelector("stagewright-calc").toleranceResult, null, { timeout: 60000 });
  await page.locator("stagewright-calc .tol-sens-box > summary").click();
  await check("tolerances");
}

/** What sticks out sideways: the page's own scroll width; every box in
 * the shadow root whose left or right edge passes the frame's, unless an
 * ancestor clips or scrolls it (overflow-x other than visible); every
 * scrolling box that needs sideways scrolling, but for the circuit
 * diagram's own box, which scrolls on purpose so that its labels keep a
 * readable size; the rendered size of the diagram's smallest labels (the
 * part values), when the diagram shows; the tab rows. */
function sideways(page) {
  return page.evaluate(() => {
    const el = document.querySelector("stagewright-calc");
    const root = el.shadowRoot;
    const frame = root.querySelector(".frame").getBoundingClientRect();
    const name = (n) => n.tagName.toLowerCase() + (n.classList.length ? "." + Array.from(n.classList).join(".") : "");
    const contained = (n) => {
      for (let a = n.parentElement; a; a = a.parentElement) {
        if (getComputedStyle(a).overflowX !== "visible") return true;
      }
      return false;
    };
    const outside = [];
    const scrolling = [];
    for (const n of root.querySelectorAll(".frame *")) {
      // Content of a closed <details> is not shown, whatever its boxes say.
      if (!n.checkVisibility()) continue;
      const r = n.getBoundingClientRect();
      if (!r.width && !r.height) continue;
      const cs = getComputedStyle(n);
      // Form controls scroll their own text; that is not the layout's.
      const control = /^(INPUT|TEXTAREA|SELECT)$/.test(n.tagName);
      if (!control && !n.classList.contains("diagram") && /auto|scroll/.test(cs.overflowX) && n.scrollWidth > n.clientWidth + 1) {
        scrolling.push(`${name(n)} ${n.scrollWidth} px of content in ${n.clientWidth} px`);
      }
      if ((r.right > frame.right + 0.5 || r.left < frame.left - 0.5) && !contained(n)) {
        outside.push(`${name(n)} ${r.left.toFixed(1)}..${r.right.toFixed(1)}`);
      }
    }
    const pval = root.querySelector(".diagram .pval");
    const diagramLabel = pval && pval.checkVisibility() ? pval.getBoundingClientRect().height : null;
    const tabTops = new Set(Array.from(root.querySelectorAll("[role=tab]"), (t) => Math.round(t.getBoundingClientRect().top)));
    return {
      scrollWidth: document.documentElement.scrollWidth,
      frame: [frame.left, frame.right],
      outside: outside.slice(0, 12),
      scrolling,
      diagramLabel,
      tabRows: tabTops.size,
    };
  });
}

describe("layout", () => {
  test("at 390 px (a phone) nothing needs sideways scrolling in any view, light or dark", async () => {
    for (const colorScheme of ["light", "dark"]) {
      const b = await launch({ viewport: { width: 390, height: 844 }, colorScheme });
      try {
        const page = await b.page();
        await page.goto(htmlUrl);
        await waitReady(page);
        await waitReport(page);
        // Every problem of every view is listed, each with what it means
        // for a reader, before the one assertion.
        const problems = [];
        await everyView(page, async (label) => {
          const s = await sideways(page);
          const where = `${label} (${colorScheme})`;
          if (s.scrollWidth > 390) problems.push(`${where}: the page is ${s.scrollWidth} px wide on a 390 px screen, so it scrolls sideways`);
          if (s.frame[1] > 390) problems.push(`${where}: the element's frame ends at ${s.frame[1]} px, past the screen`);
          for (const o of s.outside) problems.push(`${where}: sticks out of the element's frame (cut off or over the page): ${o}`);
          for (const o of s.scrolling) problems.push(`${where}: needs sideways scrolling to be read: ${o}`);
          // A label's box is about 1.2 times its font size: 10.5 px is a
          // font of about 9 px, the least that reads on a phone.
          if (s.diagramLabel !== null && s.diagramLabel < 10.5) problems.push(`${where}: the diagram's part values are drawn ${s.diagramLabel.toFixed(1)} px high, too small to read`);
          if (s.tabRows !== 1) problems.push(`${where}: the view tabs wrap onto ${s.tabRows} rows, so a selected tab no longer sits on the tab bar's line`);
          await screenshot(page, `layout-390-${colorScheme}-${label.replace(/[ ,]+/g, "-")}.png`);
        });
        assert.deepEqual(problems, [], `at 390 px in ${colorScheme}:\n${problems.join("\n")}`);
        assert.deepEqual(b.errors, [], "no script error on the way");
      } finally {
        await b.close();
      }
    }
  });

  describe("in a documentation column and on a desktop", () => {
    let b;

    before(async () => {
      b = await launch({ viewport: { width: 1280, height: 900 } });
      await serve(b.context, {
        "/column.html": '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Docs</title>' +
          '<script src="/stagewright.js"></script></head><body style="margin:0">' +
          '<main style="width:736px;margin:0 auto"><h1>Bias network</h1><stagewright-calc></stagewright-calc><p>After the element.</p></main></body></html>',
      });
    });

    after(async () => {
      await b.close();
    });

    /** Where the parts of the calculator view are, in page coordinates. */
    const geometry = (page) => page.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const root = el.shadowRoot;
      const box = (sel) => {
        const n = root.querySelector(sel);
        // A closed <details> keeps its content's boxes; checkVisibility()
        // says whether the content is shown.
        if (!n || !n.checkVisibility()) return null;
        const r = n.getBoundingClientRect();
        return { top: r.top + scrollY, bottom: r.bottom + scrollY, left: r.left, right: r.right };
      };
      return {
        width: el.getBoundingClientRect().width,
        narrow: root.querySelector(".frame").classList.contains("is-narrow"),
        open: root.querySelector(".design-box").open,
        summary: box(".design-box > summary"),
        field: box(".design .field"),
        firstResult: box(".col-out > :first-child"),
        checks: box(".card-checks"),
        form: box(".col-form"),
        out: box(".col-out"),
      };
    });

    test("at 736 px the results come first and the form waits folded in the editor panel", async () => {
      const page = await b.context.newPage();
      await page.goto(`${ORIGIN}/column.html`);
      await waitReady(page);
      await waitReport(page);
      const g = await geometry(page);
      assert.equal(Math.round(g.width), 736, "the element fills the 736 px column");
      assert.equal(g.narrow, true, "under 900 px the frame is marked is-narrow");
      assert.equal(g.open, false, "the editor panel starts closed, so the results are not pushed below the whole form");
      assert.equal(g.field, null, "the form's fields are folded away until the editor is opened");
      assert.ok(g.summary, "the editor panel's summary (Edit the design) shows");
      assert.ok(g.firstResult && g.checks, "the results show");
      assert.ok(g.firstResult.top >= g.summary.bottom && g.firstResult.top - g.summary.bottom < 40,
        `the first results card starts right under the editor's summary (${g.firstResult.top - g.summary.bottom} px below), above any field of the form`);
      assert.ok(g.checks.top < 900, `the checks card starts at ${g.checks.top} px, on the first screen`);
      await screenshot(page, "layout-736-folded.png");
      // A click on the summary opens the editor in place.
      await page.locator("stagewright-calc .design-box > summary").click();
      await page.waitForFunction(() => document.querySelector("stagewright-calc").shadowRoot.querySelector(".design .field").checkVisibility());
      const o = await geometry(page);
      assert.equal(o.open, true, "the summary's click opens the editor panel");
      assert.ok(o.field && o.field.top > o.summary.bottom, "the first field shows under the summary");
      assert.ok(o.field.left >= o.summary.left - 1 && o.field.right <= o.summary.right + 1, "the opened form keeps to the column");
      await screenshot(page, "layout-736-open.png");
      assert.deepEqual(b.errors, []);
      await page.close();
    });

    test("at 1280 px the form is open beside the results", async () => {
      const page = await b.context.newPage();
      await page.goto(htmlUrl);
      await waitReady(page);
      await waitReport(page);
      const g = await geometry(page);
      assert.ok(g.width >= 900, `the element is ${g.width} px wide`);
      assert.equal(g.narrow, false, "at 900 px and over the frame is not narrow");
      assert.equal(g.open, true, "the form is open from the start");
      assert.ok(g.field, "the form's fields show");
      assert.ok(g.form.right <= g.out.left, "the form column is left of the results column");
      assert.ok(g.field.top < g.checks.bottom && g.firstResult.top < g.field.bottom + 200,
        "the first field and the first results sit side by side near the top, not one under the other");
      assert.ok(!g.summary, "the editor panel's summary is not shown beside an open form");
      await screenshot(page, "layout-1280.png");
      assert.deepEqual(b.errors, []);
      await page.close();
    });
  });

  test("the frame recipe: the frame takes the height the framed page posts, and follows it", async () => {
    const b = await launch({ viewport: { width: 1280, height: 900 } });
    try {
      await serve(b.context, {});
      // The recipe as the Share panel writes it, from the page it frames.
      const source = await b.context.newPage();
      await source.goto(`${ORIGIN}/stagewright.html`);
      await waitReady(source);
      await source.locator("stagewright-calc .share > summary").click();
      // The panel fills its snippets on the details' toggle event, a task
      // after the click: wait for the frame recipe to be written.
      await source.waitForFunction(() => {
        const t = document.querySelector("stagewright-calc").shadowRoot.querySelectorAll("textarea.snippet")[1];
        return !!(t && t.value.length > 0);
      }, null, { timeout: 15000 });
      const recipe = await source.locator("stagewright-calc textarea.snippet").nth(1).inputValue();
      await source.close();
      assert.match(recipe, /<iframe class="stagewright" src="https:\/\/wiki\.example\/stagewright\.html#design=/, "the frame recipe points at the page it was written on");
      assert.match(recipe, /<script>[\s\S]*addEventListener\("message"[\s\S]*<\/script>/, "the frame recipe carries the height listener");
      const pages = {
        "/framed.html": '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Docs</title></head>' +
          `<body style="margin:8px"><h1>Bias network</h1>${recipe}<p id="after">After the frame.</p></body></html>`,
      };
      await b.context.unrouteAll();
      await serve(b.context, pages);
      const page = await b.context.newPage();
      await page.goto(`${ORIGIN}/framed.html`);
      const framed = () => page.frames().find((f) => f.url().startsWith(`${ORIGIN}/stagewright.html`));
      await page.waitForFunction(() => document.querySelector("iframe.stagewright").contentWindow, null, { timeout: 15000 });
      await page.waitForFunction(() => {
        const f = document.querySelector("iframe.stagewright");
        const doc = f.contentDocument;
        const el = doc && doc.querySelector("stagewright-calc");
        return !!(el && el.report);
      }, null, { timeout: 15000 });
      // The posted height lands a frame or so after a layout change: wait
      // for the frame to settle on the body's height, then measure.
      const settled = () => page.waitForFunction(() => {
        const f = document.querySelector("iframe.stagewright");
        const body = f.contentDocument.body.getBoundingClientRect().height;
        return f.style.height && Math.abs(f.getBoundingClientRect().height - body) <= 3;
      }, null, { timeout: 15000 }).then(() => page.evaluate(() => {
        const f = document.querySelector("iframe.stagewright");
        const doc = f.contentDocument;
        return {
          frame: f.getBoundingClientRect().height,
          body: doc.body.getBoundingClientRect().height,
          scroll: doc.documentElement.scrollHeight,
          inner: f.contentWindow.innerWidth,
        };
      }));
      const wide = await settled();
      assert.ok(framed(), "the framed page is the standalone page");
      assert.ok(Math.abs(wide.frame - wide.body) <= 3, `the frame is ${wide.frame} px high for a page of ${wide.body} px`);
      assert.notEqual(Math.round(wide.frame), 1500, "the listener replaced the recipe's fixed 1500 px");
      assert.ok(wide.scroll <= wide.frame + 3, `the framed page (${wide.scroll} px) fits the frame without a scroll bar of its own`);
      await screenshot(page, "layout-frame-1280.png");
      // A narrower window: the framed page goes one column and grows; the
      // frame follows.
      await page.setViewportSize({ width: 736, height: 900 });
      await page.waitForFunction((w) => document.querySelector("iframe.stagewright").contentWindow.innerWidth < w, wide.inner);
      await page.waitForFunction((h) => {
        const f = document.querySelector("iframe.stagewright");
        return Math.abs(f.getBoundingClientRect().height - h) > 3;
      }, wide.frame, { timeout: 15000 });
      const narrow = await settled();
      assert.ok(Math.abs(narrow.frame - narrow.body) <= 3, `at 736 px the frame is ${narrow.frame} px high for a page of ${narrow.body} px`);
      assert.ok(narrow.scroll <= narrow.frame + 3, `at 736 px the framed page (${narrow.scroll} px) fits the frame`);
      await screenshot(page, "layout-frame-736.png");
      // The frame's end, as a reader scrolls to it: the framed page's
      // footer, then the host page's next paragraph (a full-page capture
      // of a page with a tall frame may cut the frame's content short).
      await page.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
      await page.screenshot({ path: path.join(artifacts, "layout-frame-736-end.png") });
      assert.deepEqual(b.errors, [], "no script error in the page or the frame");
    } finally {
      await b.close();
    }
  });
});
