// dist/stagewright.js on a host page, as a wiki would serve it. Pages are
// answered by a route handler for https://wiki.example/ inside the browser,
// so nothing leaves the machine.

import assert from "node:assert/strict";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { after, before, describe, test } from "node:test";
import { fileURLToPath } from "node:url";

import { cliReport, jsonDifferences, launch, scriptPath, screenshot } from "./helpers.mjs";

const here = path.dirname(fileURLToPath(import.meta.url));
const ORIGIN = "https://wiki.example";
const script = readFileSync(scriptPath);

const design = (title, extra = {}) => ({
  format: "stagewright/1",
  title,
  stage: "common-emitter",
  supply: 12,
  transistor: { preset: "general-purpose-npn" },
  parts: { r1: "47k", r2: "10k", rc: "3k9", re: "220", re_bypassed: "680", c_emitter: "100u", rs: "600", rl: "10k", c_in: "1u", c_out: "4u7" },
  ...extra,
});

/** The parts of an emitter follower (no re_bypassed or c_emitter; rc limits the collector current). */
const FOLLOWER_PARTS = { r1: "47k", r2: "47k", rc: "1k", re: "2k2", rs: "600", rl: "10k", c_in: "1u", c_out: "10u" };

const b64url = (obj) => Buffer.from(JSON.stringify(obj)).toString("base64url");

/** A title that would run script if it were ever inserted as HTML. */
const INJECTED = `<img src=x onerror="window.pwned=true;alert(1)"><script>window.pwned=true</script>`;

/** Serves `pages` (path -> {html, csp}) and the script under ORIGIN. */
async function serve(context, pages) {
  await context.route(`${ORIGIN}/**`, (route) => {
    const url = new URL(route.request().url());
    if (url.pathname === "/stagewright.js") {
      return route.fulfill({ status: 200, contentType: "text/javascript", body: script });
    }
    const page = pages[url.pathname];
    if (!page) return route.fulfill({ status: 404, body: "not here" });
    const headers = { "content-type": "text/html; charset=utf-8" };
    if (page.csp) headers["content-security-policy"] = page.csp;
    return route.fulfill({ status: 200, headers, body: page.html });
  });
}

function onlyWiki(requests) {
  return requests.filter((u) => !u.startsWith(`${ORIGIN}/`) && !/^(data|blob|about):/.test(u));
}

async function understood(page, selector) {
  await page.waitForFunction((sel) => {
    const el = document.querySelector(sel);
    const out = el && el.shadowRoot && el.shadowRoot.querySelector(".field[data-key='rc'] .understood");
    return !!(out && out.textContent.includes("kΩ"));
  }, selector, { timeout: 15000 });
}

const page = (head, body) =>
  `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Team wiki</title>${head}</head>` +
  `<body><h1>Bias network review</h1>${body}</body></html>`;

describe("embedding dist/stagewright.js", () => {
  let browser;

  before(async () => {
    mkdirSync(path.join(here, "artifacts"), { recursive: true });
    browser = await launch({ viewport: { width: 1280, height: 900 } });
    await serve(browser.context, {
      "/twice.html": {
        html: page(
          '<script src="/stagewright.js"></script><script src="/stagewright.js"></script>',
          `<stagewright-calc id="first"><script type="application/json">${JSON.stringify(design("First stage"))}</script></stagewright-calc>` +
            `<p>The placeholder below is what a wiki that strips unknown tags keeps:</p>` +
            `<div data-stagewright data-design="${b64url(design("Second stage", { stage: "common-collector", parts: FOLLOWER_PARTS }))}"></div>` +
            '<script src="/stagewright.js"></script>',
        ),
      },
      "/csp.html": {
        csp: "script-src 'self' 'wasm-unsafe-eval'",
        html: page("", `<stagewright-calc compact><script type="application/json">${JSON.stringify(design("Under a policy"))}</script></stagewright-calc><script src="/stagewright.js"></script>`),
      },
      "/csp-strict.html": {
        csp: "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; img-src 'self'",
        html: page("", '<stagewright-calc></stagewright-calc><script src="/stagewright.js"></script>'),
      },
      "/csp-no-wasm.html": {
        csp: "script-src 'self'",
        html: page("", '<stagewright-calc></stagewright-calc><script src="/stagewright.js"></script>'),
      },
      "/injected.html": {
        csp: "script-src 'self' 'wasm-unsafe-eval'",
        html: page("", `<div data-stagewright data-design="${b64url(design(INJECTED))}"></div><script src="/stagewright.js"></script>`),
      },
      // What Python-Markdown writes for recipe 1 left bare in a page: the
      // element's tags in paragraphs of their own, the JSON between them.
      "/markdown.html": {
        html: page('<script src="/stagewright.js"></script>',
          `<p>Our buffer:</p>\n<p><stagewright-calc id="wrapped"></p>\n<script type="application/json">${JSON.stringify(design("Wrapped by Markdown"))}</script>\n<p></stagewright-calc></p>\n` +
          `<p><stagewright-calc id="second"></p>\n<p><script type="application/json">${JSON.stringify(design("Second wrapped"))}</script></p>\n<p></stagewright-calc></p>`),
      },
      "/csp-no-wasm-inline.html": {
        csp: "script-src 'self'",
        html: page('<script src="/stagewright.js"></script>',
          `<div><stagewright-calc><p>fallback</p><script type="application/json">${JSON.stringify(design("Inline under a policy"))}</script></stagewright-calc></div>`),
      },
      "/theme.html": {
        html: '<!doctype html><html lang="en" data-theme="dark"><head><meta charset="utf-8"><title>Dark wiki</title>' +
          '<script src="/stagewright.js"></script></head><body style="background:#111;color:#eee">' +
          `<stagewright-calc id="inherit" theme="inherit"><script type="application/json">${JSON.stringify(design("Follows the site"))}</script></stagewright-calc>` +
          '<stagewright-calc id="light" theme="light"></stagewright-calc>' +
          `<div id="ph" data-stagewright data-theme="dark" data-design="${b64url(design("Dark placeholder"))}"></div></body></html>`,
      },
      "/views.html": {
        html: page('<script src="/stagewright.js"></script>',
          `<div><stagewright-calc id="two" views="calculator tolerances" view="tolerances"><script type="application/json">${JSON.stringify(design("Two views"))}</script></stagewright-calc></div>` +
          '<div><stagewright-calc id="one" views="requirements"></stagewright-calc></div>' +
          `<div id="ph2" data-stagewright data-views="tolerances calculator" data-design="${b64url(design("Placeholder views"))}"></div>`),
      },
      "/late.html": {
        html: page('<script src="/stagewright.js"></script>', '<div id="slot"></div>'),
      },
    });
  });

  after(async () => {
    await browser.close();
  });

  test("loading the script twice is harmless; inline JSON and placeholders both work", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/twice.html`);
    await understood(p, "#first");
    await understood(p, "div[data-stagewright] stagewright-calc");
    const seen = await p.evaluate(() => {
      const all = Array.from(document.querySelectorAll("stagewright-calc"));
      return {
        count: all.length,
        titles: all.map((el) => el.design && el.design.title),
        stages: all.map((el) => el.design && el.design.stage),
        defined: typeof customElements.get("stagewright-calc"),
        globals: ["wasm_bindgen", "STAGEWRIGHT_CSS", "StagewrightCalc", "loadEngine"].filter((g) => g in window),
        subscripts: all.map((el) => el.shadowRoot.querySelectorAll(".quantities sub").length),
      };
    });
    assert.ok(seen.subscripts[0] > 10 && seen.subscripts[0] === seen.subscripts[1], "each element has its own symbols");
    delete seen.subscripts;
    assert.deepEqual(seen, {
      count: 2,
      titles: ["First stage", "Second stage"],
      stages: ["common-emitter", "common-collector"],
      defined: "function",
      globals: [],
    });
    assert.deepEqual(browser.errors, []);
    assert.deepEqual(onlyWiki(browser.requests), []);
    await screenshot(p, "embed-twice.png");
    await p.close();
  });

  test("two elements on one page compute and stay independent", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/twice.html`);
    await understood(p, "#first");
    await understood(p, "div[data-stagewright] stagewright-calc");
    await p.waitForFunction(() => Array.from(document.querySelectorAll("stagewright-calc")).every((el) => el.report));
    const reports = () => p.evaluate(() => Array.from(document.querySelectorAll("stagewright-calc")).map((el) => el.report));
    const [first, second] = await reports();
    assert.equal(first.design.stage, "common-emitter");
    assert.equal(second.design.stage, "common-collector");
    // The first design, as a file, gives the same report on the command line.
    const file = path.join(here, "artifacts", "first-stage.json");
    writeFileSync(file, JSON.stringify(design("First stage")));
    assert.deepEqual(jsonDifferences(first, cliReport(file)), []);
    // An edit in the first element leaves the second alone.
    await p.locator("#first .field[data-key='rc'] input").fill("4k7");
    await p.waitForFunction((vc) => document.querySelector("#first").report.operating_point.vc !== vc, first.operating_point.vc);
    const [first2, second2] = await reports();
    assert.notEqual(first2.operating_point.vc, first.operating_point.vc);
    assert.deepEqual(jsonDifferences(second2, second), [], "the other element's report is unchanged");
    const shown = await p.evaluate(() =>
      Array.from(document.querySelectorAll("stagewright-calc")).map((el) => el.shadowRoot.querySelector(".field[data-key='rc'] input").value));
    assert.equal(shown[0], "4k7");
    assert.notEqual(shown[1], "4k7");
    assert.deepEqual(browser.errors, []);
    await p.close();
  });

  test("an injected title stays inert text", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/injected.html`);
    await p.waitForFunction(() => {
      const el = document.querySelector("stagewright-calc");
      return el && el.report;
    }, null, { timeout: 15000 });
    await p.waitForTimeout(300);
    const seen = await p.evaluate(() => {
      const el = document.querySelector("stagewright-calc");
      const root = el.shadowRoot;
      return {
        heading: root.querySelector("h2.title").textContent,
        reportTitle: el.report.design.title,
        images: root.querySelectorAll("img").length + document.querySelectorAll("img").length,
        scripts: root.querySelectorAll("script").length,
        pwned: window.pwned === true,
      };
    });
    assert.equal(seen.heading, INJECTED);
    assert.equal(seen.reportTitle, INJECTED);
    assert.deepEqual([seen.images, seen.scripts, seen.pwned], [0, 0, false]);
    assert.ok(!browser.errors.some((e) => e.startsWith("dialog")), "no script ran");
    assert.deepEqual(onlyWiki(browser.requests), []);
    await p.close();
  });

  test("works under Content-Security-Policy: script-src 'self' 'wasm-unsafe-eval'", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/csp.html`);
    await understood(p, "stagewright-calc");
    const input = p.locator("stagewright-calc .field[data-key='rc'] input");
    await p.locator("stagewright-calc details.design-box > summary").click();
    const before = await p.evaluate(() => document.querySelector("stagewright-calc").report);
    assert.ok(before && before.operating_point.region, "the engine computed under the policy");
    await input.fill("4k7");
    await p.locator("stagewright-calc .field[data-key='rc'] .understood", { hasText: "4.7 kΩ" }).waitFor({ timeout: 15000 });
    const after = await p.evaluate(() => document.querySelector("stagewright-calc").report);
    assert.notEqual(after.midband.voltage_gain, before.midband.voltage_gain, "and recomputed after the edit");
    const drawn = await p.evaluate(() =>
      Array.from(document.querySelector("stagewright-calc").shadowRoot.querySelectorAll("canvas")).map((c) => c.width > 0 && !c.hasAttribute("data-error")));
    assert.deepEqual(drawn, [true, true, true], "the plots draw under the policy");
    assert.deepEqual(browser.errors, []);
    await screenshot(p, "view-embed.png");
    await p.close();
  });

  test("works under a strict policy that also limits styles", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/csp-strict.html`);
    await understood(p, "stagewright-calc");
    const radius = await p.evaluate(() => {
      const frame = document.querySelector("stagewright-calc").shadowRoot.querySelector(".frame");
      return getComputedStyle(frame).borderTopLeftRadius;
    });
    assert.notEqual(radius, "0px", "the element's styles apply");
    assert.deepEqual(browser.errors, []);
    await p.close();
  });

  test("without 'wasm-unsafe-eval' the page says what the policy needs", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${ORIGIN}/csp-no-wasm.html`);
    const banner = p.locator("stagewright-calc .banner.error");
    await banner.waitFor({ state: "visible", timeout: 15000 });
    assert.match(await banner.textContent(), /'wasm-unsafe-eval'/);
    browser.errors.splice(before); // the refused compile is expected here
    await p.close();
  });

  test("recipe 1 wrapped in paragraphs by Markdown still shows the author's design", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${ORIGIN}/markdown.html`);
    await understood(p, "#wrapped");
    await understood(p, "#second");
    await p.waitForFunction(() => document.querySelector("#wrapped").report && document.querySelector("#second").report);
    const titles = await p.evaluate(() => ["#wrapped", "#second"].map((s) => {
      const el = document.querySelector(s);
      return [el.design.title, el.report.design.title];
    }));
    // The JSON after the element's paragraph (first) and inside the next
    // paragraph (second) are each taken by their own element.
    assert.deepEqual(titles, [["Wrapped by Markdown", "Wrapped by Markdown"], ["Second wrapped", "Second wrapped"]]);
    assert.deepEqual(browser.errors.slice(before), []);
    await p.close();
  });

  test("recipe 1 under a policy without 'wasm-unsafe-eval' says what the policy needs, in place", async () => {
    const p = await browser.context.newPage();
    const before = browser.errors.length;
    await p.goto(`${ORIGIN}/csp-no-wasm-inline.html`);
    const banner = p.locator("stagewright-calc .banner.error");
    await banner.waitFor({ state: "visible", timeout: 15000 });
    // The author's design was read after the failure: the message stays.
    await p.waitForTimeout(300);
    assert.equal(await banner.isVisible(), true);
    assert.match(await banner.textContent(), /Content-Security-Policy does not allow WebAssembly.*'wasm-unsafe-eval'/);
    browser.errors.splice(before); // the refused compile is expected here
    await p.close();
  });

  test("theme: inherit follows the site's dark switch both ways; light stays light; placeholders take data-theme", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/theme.html`);
    await understood(p, "#inherit");
    await p.waitForFunction(() => document.querySelector("#ph stagewright-calc"));
    const paper = (sel) => p.evaluate((s) => {
      const el = document.querySelector(s);
      return [el.scheme, getComputedStyle(el.shadowRoot.querySelector(".frame")).backgroundColor];
    }, sel);
    const darkPaper = "rgb(17, 26, 28)"; // --sw-paper of the dark palette, #111a1c
    const lightPaper = "rgb(244, 241, 232)"; // of the light one, #f4f1e8
    assert.deepEqual(await paper("#inherit"), ["dark", darkPaper], "html[data-theme=dark]");
    assert.deepEqual(await paper("#light"), ["light", lightPaper]);
    assert.deepEqual(await paper("#ph stagewright-calc"), ["dark", darkPaper], "data-theme on the placeholder");
    await screenshot(p, "theme-dark-site.png");
    // The site's toggle: the element follows at once, with no reload.
    await p.evaluate(() => document.documentElement.setAttribute("data-theme", "light"));
    await p.waitForFunction(() => document.querySelector("#inherit").scheme === "light");
    assert.deepEqual(await paper("#inherit"), ["light", lightPaper]);
    await p.evaluate(() => {
      document.documentElement.removeAttribute("data-theme");
      document.body.classList.add("dark");
    });
    await p.waitForFunction(() => document.querySelector("#inherit").scheme === "dark");
    assert.deepEqual(await paper("#inherit"), ["dark", darkPaper], "body.dark");
    // Sizes in px of the element's own type, not the site's root font.
    const sizes = await p.evaluate(async () => {
      const el = document.querySelector("#inherit");
      const title = () => getComputedStyle(el.shadowRoot.querySelector("h2.title")).fontSize;
      const a = title();
      document.documentElement.style.fontSize = "20px";
      await new Promise((r) => requestAnimationFrame(r));
      return [a, title()];
    });
    assert.equal(sizes[0], sizes[1], "the host's root font size does not scale the element");
    assert.deepEqual(browser.errors, []);
    await p.close();
  });

  test("the views attribute chooses the tabs of an embed, view the one shown first", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/views.html`);
    await understood(p, "#two");
    await p.waitForFunction(() => document.querySelector("#ph2 stagewright-calc") && document.querySelector("#one").shadowRoot);
    await p.waitForFunction(() => document.querySelector("#two").view === "tolerances" && document.querySelector("#one").view === "requirements");
    const seen = await p.evaluate(() => ["#two", "#one", "#ph2 stagewright-calc"].map((sel) => {
      const el = document.querySelector(sel);
      const tabs = Array.from(el.shadowRoot.querySelectorAll("[role=tab]"), (t) => t.getAttribute("data-view"));
      return { tabs, barHidden: el.shadowRoot.querySelector("[role=tablist]").hidden, view: el.view };
    }));
    // Tabs in the element's own order, whatever order the attribute names them in.
    assert.deepEqual(seen[0], { tabs: ["calculator", "tolerances"], barHidden: false, view: "tolerances" });
    assert.deepEqual(seen[1], { tabs: ["requirements"], barHidden: true, view: "requirements" }, "one view: no tab bar");
    assert.deepEqual(seen[2], { tabs: ["calculator", "tolerances"], barHidden: false, view: "calculator" }, "data-views on a placeholder");
    assert.deepEqual(browser.errors, []);
    await p.close();
  });

  test("placeholders added later (a router swapping pages) are upgraded; the API works", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/late.html`);
    await p.evaluate((d) => {
      const div = document.createElement("div");
      div.setAttribute("data-stagewright", "");
      div.setAttribute("data-readonly", "");
      div.textContent = JSON.stringify(d);
      document.getElementById("slot").append(div);
    }, design("Added later"));
    await understood(p, "#slot stagewright-calc");
    const api = await p.evaluate(async () => {
      const el = document.querySelector("#slot stagewright-calc");
      const events = [];
      document.addEventListener("stagewright-design", (e) => events.push({ bubbles: e.bubbles, composed: e.composed, title: e.detail.design.title }));
      el.design = {
        format: "stagewright/1",
        title: "Set by script",
        stage: "common-base",
        supply: 5,
        transistor: { preset: "rf-npn" },
        parts: { r1: "10k", r2: "4k7", rc: "1k", re: "1k", c_base: "100n" },
      };
      // Moving the element (as a router would) keeps it working.
      const host = document.createElement("section");
      document.body.append(host);
      host.append(el);
      await new Promise((r) => setTimeout(r, 50));
      return {
        title: el.design.title,
        stage: el.design.stage,
        readonly: el.shadowRoot.querySelector("input[name=rc]").readOnly,
        report: el.report,
        events,
        text: el.shadowRoot.querySelector("h2.title").textContent,
      };
    });
    assert.equal(api.title, "Set by script");
    assert.equal(api.stage, "common-base");
    assert.equal(api.readonly, true);
    assert.equal(api.text, "Set by script");
    assert.deepEqual(api.events[0], { bubbles: true, composed: true, title: "Set by script" });
    assert.deepEqual(browser.errors, []);
    await p.close();
  });

  test("the share panel offers the three embed recipes and the CSP line", async () => {
    const p = await browser.context.newPage();
    await p.goto(`${ORIGIN}/twice.html`);
    await understood(p, "#first");
    await p.locator("#first details.share > summary").click();
    // The panel fills its snippets on the details' toggle event, a task
    // after the click.
    await p.waitForFunction(() => {
      const t = document.querySelector("#first").shadowRoot.querySelector("textarea.snippet");
      return t && t.value.length > 0;
    });
    const snippets = await p.evaluate(() => {
      const root = document.querySelector("#first").shadowRoot;
      return {
        texts: Array.from(root.querySelectorAll("textarea.snippet")).map((t) => t.value),
        csp: root.querySelector(".csp").textContent,
      };
    });
    assert.equal(snippets.texts.length, 3);
    // Recipe 1 inside a <div>, which Markdown passes through untouched,
    // with the text shown until the script runs.
    assert.match(snippets.texts[0], /<script src="https:\/\/wiki\.example\/stagewright\.js"><\/script>\n<div class="stagewright">\n<stagewright-calc>\n<p>The Stagewright calculator appears here when stagewright\.js has loaded/);
    assert.match(snippets.texts[0], /"title": "First stage"/);
    assert.match(snippets.texts[0], /<\/stagewright-calc>\n<\/div>$/);
    assert.match(snippets.texts[1], /^<iframe class="stagewright" src="[^"]*#design=[A-Za-z0-9_-]+"/);
    assert.match(snippets.texts[1], /e\.data\.stagewright !== "height"/);
    assert.match(snippets.texts[2], /^<div data-stagewright data-design="[A-Za-z0-9_-]+"><\/div>/);
    assert.equal(snippets.csp, "Content-Security-Policy: script-src 'self' 'wasm-unsafe-eval'");
    // On a host page a link could not reopen the design: no "Copy link".
    assert.equal(await p.locator("#first button.linking").isVisible(), false);
    await p.locator("#first").screenshot({ path: path.join(here, "artifacts", "share-panel.png") });
    await p.close();
  });
});
