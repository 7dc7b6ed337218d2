/* Stagewright: the <stagewright-calc> element.
 *
 * The class: its lifecycle and public API (design, report, reload,
 * renderReport; the statics upgradePlaceholders, encodeDesign, designText,
 * version), reading a design, the shadow DOM's frame, the engine's start
 * and the recompute after each edit. The rest of its methods live with
 * their concept and come in as mixins (form.js, schematic.js, results.js,
 * plots.js, share.js; the designer adds views/). STAGEWRIGHT_VERSION is a
 * build constant (www/build.mjs).
 *
 * House rules, for every module: user text reaches the DOM only through
 * textContent, .value and setAttribute on non-event attributes, never as
 * HTML; no inline event handlers; no eval or new Function (the page must
 * run under `script-src 'self' 'wasm-unsafe-eval'`). Every engineering
 * number shown comes from the wasm engine (the core crate); the page only
 * lays numbers out.
 */

import { designText, encodeDesign } from "./codec.js";
import { clone, getPath, ordered, own } from "./design.js";
import { h, sv } from "./dom.js";
import { shortText } from "./text.js";
import { SWEEP_PER_DECADE, asFieldError, enginePresets, loadEngine, mark } from "./engine.js";
import { withForm } from "./form.js";
import { upgradePlaceholders, watchPlaceholders } from "./placeholders.js";
import { withPlots } from "./plots.js";
import { DEFERRAL, withResults } from "./results.js";
import { EXAMPLE_DESIGN, FIELD_BY_KEY, FORMAT, GROUPS, STAGE_PARTS, schemaReady, setSchema } from "./schema.js";
import { withDiagram } from "./schematic.js";
import { withShare } from "./share.js";
import styles from "./styles.css";

let stylesheet = null;

function adoptStyles(root) {
  try {
    if (!stylesheet && typeof CSSStyleSheet === "function" && "replaceSync" in CSSStyleSheet.prototype) {
      stylesheet = new CSSStyleSheet();
      stylesheet.replaceSync(styles);
    }
    if (stylesheet && "adoptedStyleSheets" in root) {
      root.adoptedStyleSheets = [stylesheet];
      return;
    }
  } catch (e) {
    /* fall through to a <style> element */
  }
  root.append(h("style", null, styles));
}

let uid = 0;

/** The attributes by which documentation sites mark their theme. */
const HOST_THEME_ATTRIBUTES = ["class", "data-theme", "data-bs-theme", "data-color-scheme", "data-md-color-scheme", "style"];

/** The element's parent, across shadow roots. */
function parentOf(n) {
  if (n.parentElement) return n.parentElement;
  const root = n.getRootNode && n.getRootNode();
  return root && root.host ? root.host : null;
}

/** The host page's theme, "dark" or "light", from the nearest ancestor
 * that states one: `data-theme` (or `data-bs-theme`, `data-color-scheme`)
 * naming dark or light, a `data-md-color-scheme` ("slate" is dark), or a
 * class `dark`/`dark-mode`/`theme-dark` (or the light ones); else the
 * page's own `color-scheme` when it is one of the two; else null (the
 * system's preference decides). */
export function hostScheme(el) {
  for (let n = parentOf(el); n; n = parentOf(n)) {
    for (const a of ["data-theme", "data-bs-theme", "data-color-scheme"]) {
      const t = (n.getAttribute(a) || "").trim().toLowerCase();
      if (/\bdark\b|night/.test(t)) return "dark";
      if (/\blight\b|day/.test(t)) return "light";
    }
    const md = n.getAttribute("data-md-color-scheme");
    if (md) return md.trim().toLowerCase() === "slate" || /dark/i.test(md) ? "dark" : "light";
    const c = n.classList;
    if (c && (c.contains("dark") || c.contains("dark-mode") || c.contains("theme-dark"))) return "dark";
    if (c && (c.contains("light") || c.contains("light-mode") || c.contains("theme-light"))) return "light";
  }
  try {
    const cs = getComputedStyle(document.documentElement).colorScheme.trim();
    if (cs === "dark" || cs === "only dark") return "dark";
    if (cs === "light" || cs === "only light") return "light";
  } catch (e) {
    /* no computed style */
  }
  return null;
}

/** The message shown in place when the engine cannot start, naming what
 * is missing: the policy's 'wasm-unsafe-eval', or a browser feature. */
export function engineFailure(err) {
  const msg = err && err.message ? String(err.message) : String(err);
  if (/unsafe-eval|content.security.policy|\bCSP\b/i.test(msg)) {
    return "The calculator cannot start: this page's Content-Security-Policy does not allow WebAssembly. " +
      "Its script-src must include 'wasm-unsafe-eval' (see the embedding guide).";
  }
  if (/lacks /.test(msg)) return `The calculator cannot start: ${msg}.`;
  return `The calculator engine could not start: ${msg}. If this page sets a Content-Security-Policy, ` +
    "its script-src must include 'wasm-unsafe-eval'.";
}

/** The element's width (CSS px) under which it lays out in one column
 * with the results first (also the styles' container query). */
const NARROW_WIDTH = 900;

/** Other names the `views` and `view` attributes accept. */
const VIEW_ALIASES = {
  calc: "calculator", spec: "requirements", "from-requirements": "requirements", design: "requirements",
  tolerance: "tolerances", "monte-carlo": "tolerances", "worst-case": "tolerances",
};

export class StagewrightCalc extends withShare(withPlots(withResults(withDiagram(withForm(HTMLElement))))) {
  static get observedAttributes() {
    return ["readonly", "compact", "src", "theme", "views", "view"];
  }

  constructor() {
    super();
    this._uid = ++uid;
    this._design = null;
    this._report = null;
    this._analysis = null;
    this._api = null;
    this._built = false;
    this._fields = new Map(); // key -> {spec, input, understood, snap, error, warn, row}
    this._echo = new Map(); // key -> the engine's echo of its value ("4.7 kΩ"), for the diagram
    // How the engine was called: sessions made from a whole design, one-field
    // edits sent to a session, analyses (engineStats; the tests read them).
    this._stats = { sessions: 0, sets: 0, computes: 0 };
    this._invalid = new Map(); // key -> message
    this._series = { R: "E24", C: "E6" };
    this._plotFrame = 0;
    this._announceTimer = 0;
    this._sourceLoaded = false;
    this._canvasSize = new WeakMap(); // canvas -> {w, h, ratio} in device pixels
    this._onResize = (entries) => {
      for (const e of entries || []) {
        const css = e.contentBoxSize && e.contentBoxSize[0];
        const dev = e.devicePixelContentBoxSize && e.devicePixelContentBoxSize[0];
        const cssW = css ? css.inlineSize : e.contentRect.width;
        const cssH = css ? css.blockSize : e.contentRect.height;
        const ratio = window.devicePixelRatio || 1;
        const w = dev ? dev.inlineSize : Math.round(cssW * ratio);
        const h = dev ? dev.blockSize : Math.round(cssH * ratio);
        this._canvasSize.set(e.target, { w, h, ratio: cssW > 0 ? w / cssW : ratio });
      }
      this._themeCache = null;
      this._schedulePlots();
    };
    this._resizeObserver = typeof ResizeObserver === "function" ? new ResizeObserver(this._onResize) : null;
    this._onScheme = () => {
      this._applyScheme();
      this._themeCache = null;
      this._schedulePlots();
    };
    // theme="inherit": the host page's own light/dark switch, on any
    // ancestor of the element (data-theme, class="dark", …).
    this._hostObserver = typeof MutationObserver === "function" ? new MutationObserver(this._onScheme) : null;
    this._onBeforePrint = () => this._openAllForPrint(true);
    this._onAfterPrint = () => this._openAllForPrint(false);
    // A design set as a property before this element was upgraded.
    if (Object.prototype.hasOwnProperty.call(this, "design")) {
      const pending = this.design;
      delete this.design;
      this._pendingDesign = pending;
    }
  }

  /* ---------------- public API ---------------- */

  /** The current design (as valid as the last good edit), ordered. */
  get design() {
    return this._design ? this._exportDesign() : null;
  }

  set design(value) {
    if (!this._built) {
      this._pendingDesign = value;
      return;
    }
    let text;
    try {
      text = designText(value);
    } catch (e) {
      this._showLoadError(e.message);
      return;
    }
    this._loadText(text);
  }

  /** How this element has called the engine so far: `sessions` (a whole
   * design sent, after a load or a change of stage), `sets` (one field
   * sent, per keystroke), `computes` (analyses). A diagnostic. */
  get engineStats() {
    return Object.assign({}, this._stats);
  }

  /** The last report computed (null before the first one). */
  get report() {
    return this._report ? clone(this._report) : null;
  }

  /** Reads the design again from the inline JSON or `src`. */
  reload() {
    this._sourceLoaded = false;
    this._readSource();
  }

  /* ---------------- lifecycle ---------------- */

  connectedCallback() {
    if (!this._built) this._build();
    if (this._resizeObserver) {
      for (const c of this._canvases()) {
        try {
          this._resizeObserver.observe(c, { box: "device-pixel-content-box" });
        } catch (e) {
          this._resizeObserver.observe(c);
        }
      }
    }
    this._scheme = window.matchMedia ? window.matchMedia("(prefers-color-scheme: dark)") : null;
    if (this._scheme && this._scheme.addEventListener) this._scheme.addEventListener("change", this._onScheme);
    this._watchHost();
    this._applyScheme();
    window.addEventListener("beforeprint", this._onBeforePrint);
    window.addEventListener("afterprint", this._onAfterPrint);
    if (!this._sourceLoaded) this._readSource();
    loadEngine().then(
      (api) => this._engineReady(api),
      (err) => this._engineFailed(err),
    );
  }

  disconnectedCallback() {
    if (this._resizeObserver) this._resizeObserver.disconnect();
    if (this._scheme && this._scheme.removeEventListener) this._scheme.removeEventListener("change", this._onScheme);
    if (this._hostObserver) this._hostObserver.disconnect();
    window.removeEventListener("beforeprint", this._onBeforePrint);
    window.removeEventListener("afterprint", this._onAfterPrint);
  }

  attributeChangedCallback(name, oldValue, newValue) {
    if (!this._built || oldValue === newValue) return;
    if (name === "readonly") this._applyReadonly();
    if (name === "compact") this._applyCompact();
    if (name === "theme") {
      this._watchHost();
      this._onScheme();
    }
    if (name === "views" || name === "view") this._applyViews();
    if (name === "src" && newValue) {
      this._sourceLoaded = false;
      this._readSource();
    }
  }

  /* ---------------- reading the design ---------------- */

  _readSource() {
    this._sourceLoaded = true;
    if (this._pendingDesign !== undefined) {
      const d = this._pendingDesign;
      this._pendingDesign = undefined;
      this.design = d;
      return;
    }
    const script = this._jsonScript();
    if (script) {
      // Read, kept, and taken out of the page: a documentation site's
      // router that swaps pages in and runs their inline scripts again
      // (copying each one's text into a new <script> without its type)
      // then finds no JSON to run as code.
      this._inlineText = script.textContent;
      script.remove();
      this._loadText(this._inlineText);
      return;
    }
    if (this._inlineText !== undefined) {
      this._loadText(this._inlineText);
      return;
    }
    const src = this.getAttribute("src");
    if (src) {
      this._setBanner("Loading the design…", "info");
      fetch(src, { credentials: "same-origin" })
        .then((r) => {
          if (!r.ok) throw new Error(`the design file could not be loaded (${r.status})`);
          return r.text();
        })
        .then((text) => {
          this._setBanner("");
          this._loadText(text);
        })
        .catch((e) => {
          this._showLoadError(e.message);
          if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
        });
      return;
    }
    if (document.readyState === "loading") {
      // Children may still be arriving from the parser.
      document.addEventListener("DOMContentLoaded", () => {
        if (!this._jsonScript()) {
          if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
          return;
        }
        this.reload();
      }, { once: true });
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
  }

  /** The design's inline JSON: a `<script type="application/json">`
   * inside the element, or, where a Markdown processor has wrapped the
   * element's tags in paragraphs and so moved the script out of it, the
   * script that directly follows the element or its paragraph (empty
   * paragraphs between are skipped), alone or as the only content of the
   * next paragraph. The element removes the script once read, so no other
   * element takes it again. */
  _jsonScript() {
    const JSON_SCRIPT = 'script[type="application/json"]';
    const inside = this.querySelector(JSON_SCRIPT);
    if (inside) return inside;
    let n = this.nextElementSibling;
    if (!n && this.parentElement && this.parentElement.tagName === "P") n = this.parentElement.nextElementSibling;
    const emptyP = (e) => e && e.tagName === "P" && !e.textContent.trim() && !e.firstElementChild;
    while (emptyP(n)) n = n.nextElementSibling;
    if (n && n.tagName === "P" && n.children.length === 1 && n.firstElementChild.matches(JSON_SCRIPT)) n = n.firstElementChild;
    if (!n || !n.matches(JSON_SCRIPT)) return null;
    return n;
  }

  /** Loads a design from its JSON text once the engine has read it with
   * the command line's reader: a text it refuses (bad JSON, a key given
   * twice, nesting too deep, an unknown key, a value out of range) shows
   * the command line's message, and the last good design stays. Before
   * the engine is ready the text waits (the last one given wins). */
  _loadText(text) {
    const api = this._api;
    if (!api || typeof api.read_design !== "function") {
      this._pendingText = text;
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    this._pendingText = undefined;
    try {
      api.read_design(text);
    } catch (err) {
      this._showLoadError(asFieldError(err).message);
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    // Read by the core: JSON.parse sees the same document (no key twice,
    // no unknown key, at most 16 levels).
    this._loadDesign(JSON.parse(text));
  }

  _loadDesign(design, isExample) {
    const d = clone(design);
    d.format = FORMAT;
    this._engineeringParts(d);
    if (schemaReady() && !own(STAGE_PARTS, d.stage)) d.stage = "common-emitter";
    this._design = d;
    this._sessionStale = true;
    this._isExample = !!isExample;
    this._invalid.clear();
    this._report = null;
    this._analysis = null;
    this._clearResults();
    this._setBanner("");
    this._fillForm();
    this._onDesignLoaded();
    this._recompute();
  }

  /** A part given as a bare number (`0.0000047`, `120000`) is written the
   * way engineers read it, with exactly the digits that read back to the
   * same number (`4.7u`, `120k`: the engine's format_exact, the unit
   * beside the field), so the form, the file saved and Share show it so. */
  _engineeringParts(d) {
    const api = this._api;
    if (!api || typeof api.format_exact !== "function" || !d.parts || typeof d.parts !== "object") return;
    for (const [k, v] of Object.entries(d.parts)) {
      const spec = FIELD_BY_KEY.get(k);
      if (!spec || !spec.series || typeof v !== "number" || !Number.isFinite(v) || v <= 0) continue;
      d.parts[k] = shortText(api.format_exact(v, spec.unit), spec.unit);
    }
  }

  /** Hooks for the views: a design was loaded (its fields to fill), the
   * design changed (results computed from an earlier one are stale). */
  _onDesignLoaded() {}

  _onDesignChanged() {}

  _showLoadError(message) {
    this._setBanner(message, "error");
  }

  /** The design as it goes out: documented order, only the parts the
   * chosen stage uses. */
  _exportDesign() {
    const d = clone(this._design);
    const used = own(STAGE_PARTS, d.stage);
    if (used && d.parts && typeof d.parts === "object") {
      for (const k of Object.keys(d.parts)) {
        const spec = FIELD_BY_KEY.get(k);
        if (spec && spec.series && !used.includes(k)) delete d.parts[k];
      }
    }
    return ordered(d);
  }

  /* ---------------- building the shadow DOM ---------------- */

  _build() {
    this._built = true;
    const root = this.shadowRoot || this.attachShadow({ mode: "open" });
    root.textContent = "";
    adoptStyles(root);
    const id = (s) => `sw${this._uid}-${s}`;
    this._id = id;

    // Header: title, share tools.
    this._titleEl = h("h2", { class: "title", id: id("title") });
    this._stageEl = h("p", { class: "subtitle" });
    this._banner = h("p", { class: "banner", hidden: true, role: "alert" });
    this._status = h("p", { class: "visually-hidden", role: "status", "aria-live": "polite" });
    const header = h("header", { class: "head" },
      h("div", { class: "brand", "aria-hidden": "true" }, this._mark(), h("span", null, "Stagewright")),
      h("div", { class: "heading" }, this._titleEl, this._stageEl),
      this._buildShare());

    // The form.
    this._form = h("form", { class: "design", novalidate: true, "aria-labelledby": id("title") });
    this._form.addEventListener("submit", (e) => e.preventDefault());
    this._seriesR = this._seriesSelect("R", "resistor series");
    this._seriesC = this._seriesSelect("C", "capacitor series");
    // The fields come from the engine's schema: built once it has started.
    this._form.append(h("p", { class: "hint form-wait" }, "Starting the engine…"));
    this._formBox = h("details", { class: "design-box", open: true },
      h("summary", null, "Edit the design"), this._form);
    this._formBox.addEventListener("toggle", () => {
      // A toggle event comes a task after the change: the reader's own
      // when the state is not the one set last.
      if (this._formBox.open !== this._formExpected) this._formToggled = true;
    });

    // Diagram.
    this._diagram = h("div", { class: "diagram" });
    const diagramCard = h("section", { class: "card card-diagram", "aria-labelledby": id("h-diagram") },
      h("h3", { id: id("h-diagram") }, "Circuit"),
      h("p", { class: "hint" }, "Choose a part to edit its value."),
      this._diagram);

    // Results.
    this._results = this._buildResults();

    // Plots.
    this._plots = this._buildPlots();

    const footer = h("footer", { class: "foot" },
      h("p", { class: "deferral" }, DEFERRAL),
      h("p", { class: "version" }, `Stagewright ${STAGEWRIGHT_VERSION}`));

    this._main = h("div", { class: "layout view-panel", "data-view": "calculator" },
      h("div", { class: "col-form" }, this._formBox),
      h("div", { class: "col-out" }, diagramCard, this._results, this._plots));
    // The view switcher: a tab per view (the calculator here; views/ adds
    // "from requirements" and tolerances). A view is built the first time
    // it is shown, so views a page does not open cost no start-up time.
    this._tabBar = h("div", { class: "tabs", role: "tablist", "aria-label": "Views" });
    this._tabBar.addEventListener("keydown", (e) => this._onTabKey(e));
    this._panels = new Map([["calculator", this._main]]);
    this._tabs = new Map();
    this._frame = h("div", { class: "frame", part: "frame" }, header, this._tabBar, this._banner, this._status, this._main, footer);
    root.append(this._frame);
    this._applyViews();

    // Diagram: choose a part → focus its input.
    this._diagram.addEventListener("click", (e) => {
      const g = e.target.closest("[data-part]");
      if (g) this._focusField(g.getAttribute("data-part"));
    });
    this._diagram.addEventListener("keydown", (e) => {
      if (e.key !== "Enter" && e.key !== " ") return;
      const g = e.target.closest("[data-part]");
      if (!g) return;
      e.preventDefault();
      this._focusField(g.getAttribute("data-part"));
    });

    // Files dropped on the element open as designs.
    this._frame.addEventListener("dragover", (e) => {
      if (this.hasAttribute("readonly")) return;
      if (e.dataTransfer && Array.from(e.dataTransfer.types || []).includes("Files")) e.preventDefault();
    });
    this._frame.addEventListener("drop", (e) => {
      if (this.hasAttribute("readonly")) return;
      const file = e.dataTransfer && e.dataTransfer.files && e.dataTransfer.files[0];
      if (!file) return;
      e.preventDefault();
      this._openFile(file);
    });

    this._applyReadonly();
    this._applyCompact();
    this._widthObserver = typeof ResizeObserver === "function"
      ? new ResizeObserver((entries) => {
        for (const e of entries) this._onWidth(e.contentRect.width);
      })
      : null;
    // The observer's first call comes after the first layout and before
    // the first paint: no layout is forced here, while the engine compiles.
    if (this._widthObserver) this._widthObserver.observe(this);
  }

  _mark() {
    const svg = sv("svg", { viewBox: "0 0 24 24", class: "mark", width: 22, height: 22 });
    sv("path", { d: "M3 17 L9 17 L12 7 L15 17 L21 17", class: "mark-line" }, svg);
    sv("circle", { cx: 12, cy: 7, r: 2.2, class: "mark-dot" }, svg);
    return svg;
  }

  /* ---------------- theme ---------------- */

  /** "light" or "dark", from the `theme` attribute: light, dark, auto (the
   * system's preference, the default) or inherit (the host page's own
   * switch, see hostScheme, else the system's). The shadow styles key the
   * palette on the host's `data-sw-scheme`, which this sets. */
  get scheme() {
    const t = (this.getAttribute("theme") || "auto").trim().toLowerCase();
    if (t === "light" || t === "dark") return t;
    if (t === "inherit") {
      const host = hostScheme(this);
      if (host) return host;
    }
    return this._scheme && this._scheme.matches ? "dark" : "light";
  }

  _applyScheme() {
    const s = this.scheme;
    if (this.getAttribute("data-sw-scheme") !== s) this.setAttribute("data-sw-scheme", s);
  }

  /** With theme="inherit", watches the element's ancestors' attributes
   * that carry a site's theme; otherwise nothing. */
  _watchHost() {
    const mo = this._hostObserver;
    if (!mo) return;
    mo.disconnect();
    if ((this.getAttribute("theme") || "").trim().toLowerCase() !== "inherit") return;
    for (let n = parentOf(this); n; n = parentOf(n)) {
      mo.observe(n, { attributes: true, attributeFilter: HOST_THEME_ATTRIBUTES });
    }
  }

  /* ---------------- views ---------------- */

  /** The views this element can show: [name, tab label]. The views/
   * mixin adds its own after the calculator. */
  _viewDefs() {
    return [["calculator", "Calculator"]];
  }

  /** The views the `views` attribute asks for (space- or comma-separated
   * names, in the order of the tabs), else all; unknown names are left out. */
  _shownViews() {
    const defs = this._viewDefs();
    const names = defs.map(([n]) => n);
    const asked = (this.getAttribute("views") || "").toLowerCase().split(/[\s,]+/).filter(Boolean)
      .map((n) => VIEW_ALIASES[n] || n).filter((n) => names.includes(n));
    return asked.length ? defs.filter(([n]) => asked.includes(n)) : defs;
  }

  /** Builds the tab bar for the views shown and shows the `view`
   * attribute's view, the current one if still shown, or the first. */
  _applyViews() {
    const shown = this._shownViews();
    this._tabBar.textContent = "";
    this._tabs.clear();
    for (const [name, label] of shown) {
      const tab = h("button", { type: "button", role: "tab", class: "tab", id: this._id("tab-" + name), "data-view": name }, label);
      tab.addEventListener("click", () => this.showView(name));
      this._tabs.set(name, tab);
      this._tabBar.append(tab);
    }
    this._tabBar.hidden = shown.length < 2;
    const names = shown.map(([n]) => n);
    const asked = VIEW_ALIASES[this.getAttribute("view")] || this.getAttribute("view");
    const next = names.includes(asked) ? asked : names.includes(this._view) ? this._view : names[0];
    this._view = null;
    this.showView(next);
  }

  /** The view on screen ("calculator", "requirements", "tolerances"). */
  get view() {
    return this._view || "calculator";
  }

  set view(name) {
    this.showView(name);
  }

  /** Shows one view (built the first time); returns whether it is shown. */
  showView(name) {
    name = VIEW_ALIASES[name] || name;
    if (!this._built || !this._tabs.has(name)) return false;
    if (this._view === name) return true;
    const panel = this._viewPanel(name);
    if (!panel) return false;
    this._view = name;
    for (const [n, p] of this._panels) {
      p.hidden = n !== name;
      p.setAttribute("role", "tabpanel");
      const tab = this._tabs.get(n);
      if (tab) p.setAttribute("aria-labelledby", tab.id);
    }
    for (const [n, tab] of this._tabs) {
      const on = n === name;
      tab.setAttribute("aria-selected", on ? "true" : "false");
      tab.tabIndex = on ? 0 : -1;
      tab.setAttribute("aria-controls", this._id("panel-" + n));
    }
    panel.id = this._id("panel-" + name);
    if (this._onViewShown) this._onViewShown(name);
    this._schedulePlots();
    this._emit("stagewright-view", { view: name });
    return true;
  }

  /** The panel of a view, built (hidden) if it was not yet, or null. */
  _viewPanel(name) {
    let panel = this._panels.get(name);
    // A view's fields come from the engine's schema: built once it runs.
    if (!panel && this._built && name !== "calculator" && !this._api) {
      this._wantView = name;
      return null;
    }
    if (!panel && this._built) {
      panel = this._buildView(name);
      if (!panel) return null;
      panel.classList.add("view-panel");
      panel.setAttribute("data-view", name);
      panel.hidden = this._view !== name;
      this._panels.set(name, panel);
      this._main.after(panel);
    }
    return panel || null;
  }

  /** Builds a view other than the calculator (views/ overrides it). */
  _buildView() {
    return null;
  }

  _onTabKey(e) {
    const tabs = Array.from(this._tabs.values());
    const i = tabs.indexOf(e.target);
    if (i < 0) return;
    let j = -1;
    if (e.key === "ArrowRight") j = (i + 1) % tabs.length;
    else if (e.key === "ArrowLeft") j = (i - 1 + tabs.length) % tabs.length;
    else if (e.key === "Home") j = 0;
    else if (e.key === "End") j = tabs.length - 1;
    if (j < 0) return;
    e.preventDefault();
    this.showView(tabs[j].getAttribute("data-view"));
    tabs[j].focus();
  }

  /** The design form, from the engine's schema (its tolerances group is
   * the tolerance view's box). */
  _buildForm() {
    if (this._formBuilt || !schemaReady()) return;
    this._formBuilt = true;
    this._form.textContent = "";
    for (const g of GROUPS) if (g.id !== "tolerances") this._form.append(this._buildGroup(g));
    this._applyReadonly();
    if (this._design) this._fillForm();
  }

  /* ---------------- attributes ---------------- */

  _applyReadonly() {
    const ro = this.hasAttribute("readonly");
    for (const f of this._fields.values()) {
      if (f.input.tagName === "SELECT") f.input.disabled = ro;
      else f.input.readOnly = ro;
    }
    this._seriesR.disabled = ro;
    this._seriesC.disabled = ro;
    this._frame.classList.toggle("is-readonly", ro);
    // Snapping to a standard value is an edit: hide the offers, or show them again.
    if (this._design && this._api) this._refreshAllFields();
  }

  _applyCompact() {
    const compact = this.hasAttribute("compact");
    this._frame.classList.toggle("is-compact", compact);
    this._foldForm();
  }

  /** Under 900 px of the element's own width: one column, results first,
   * the form folded into an editor panel (opened by its summary, or by
   * choosing a part in the diagram). */
  _onWidth(width) {
    if (!(width > 0)) return;
    const narrow = width < NARROW_WIDTH;
    if (narrow === this._narrow) return;
    this._narrow = narrow;
    this._frame.classList.toggle("is-narrow", narrow);
    this._foldForm();
  }

  /** Folds the form when compact or narrow, unfolds it otherwise; once
   * the reader has opened or closed it, their choice stands. */
  _foldForm() {
    if (this._formToggled) return;
    const fold = this.hasAttribute("compact") || !!this._narrow;
    this._formExpected = !fold;
    this._formBox.open = !fold;
  }

  /* ---------------- engine ---------------- */

  _engineReady(api) {
    if (this._api === api) return;
    this._api = api;
    setSchema(typeof api.fields === "function" ? api.fields() : null);
    this._buildForm();
    // The result cards' rows and the checks' names: the core's tables.
    this._buildResultCards(typeof api.tables === "function" ? api.tables() : null);
    const presetField = this._fields.get("preset");
    if (presetField) {
      const sel = presetField.input;
      const current = getPath(this._design, ["transistor", "preset"]) || "";
      sel.textContent = "";
      sel.append(h("option", { value: "" }, "none: enter the data below"));
      for (const [v, t] of enginePresets(api)) sel.append(h("option", { value: v }, t));
      if (current && !Array.from(sel.options).some((o) => o.value === current)) {
        sel.append(h("option", { value: current }, current));
      }
      sel.value = current;
    }
    if (this._fillSpecPresets && this._specInputs) this._fillSpecPresets(api);
    if (this._onEngine) this._onEngine(api);
    if (this._wantView) {
      const v = this._wantView;
      this._wantView = null;
      this.showView(v);
    }
    if (this._pendingText !== undefined) {
      this._loadText(this._pendingText);
      return;
    }
    if (this._design) {
      this._refreshAllFields();
      this._refreshHeading();
      this._recompute();
    }
  }

  _engineFailed(err) {
    this._engineError = engineFailure(err);
    this._setBanner(this._engineError, "error");
    this._frame.classList.add("no-engine");
  }

  /* ---------------- computing ---------------- */

  _recompute() {
    if (!this._design) return;
    this._renderDiagram();
    const design = this._exportDesign();
    this._emit("stagewright-design", { design });
    this._onDesignChanged(design);
    const api = this._api;
    if (!api) return;
    this._clearAnalysisErrors();
    let out;
    try {
      out = this._compute(design);
    } catch (err) {
      this._sessionStale = true;
      const e = asFieldError(err);
      this._showAnalysisError(e);
      this._markStale(true);
      this._announce(e.message);
      return;
    }
    if (!this._report) mark("stagewright:computed");
    this._analysis = out;
    this._report = out.report;
    this._markStale(this._invalid.size > 0);
    this.renderReport(out.report);
    this._annotateDiagram(out.report);
    // An edit redraws at once (the timing script measures edit → redraw);
    // the first results are painted before the first plots are drawn.
    if (this._reported) this._drawPlots();
    else this._schedulePlots(true);
    this._announce(this._summary(out.report));
    if (!this._reported) {
      this._reported = true;
      mark("stagewright:first-report");
    }
    this._emit("stagewright-report", { report: clone(out.report), design });
  }

  /** The analysis of `design` (the exported design): through the
   * engine's session, made again from `design` after a load or an edit
   * the session was not told of. */
  _compute(design) {
    const api = this._api;
    if (!this._session || this._sessionStale) {
      this._dropSession();
      this._session = new api.Session(JSON.stringify(design));
      this._sessionStale = false;
      this._stats.sessions++;
    }
    this._stats.computes++;
    return this._session.compute(SWEEP_PER_DECADE);
  }

  /** The session when it holds the design on screen, else null. */
  _liveSession() {
    return this._session && !this._sessionStale ? this._session : null;
  }

  _dropSession() {
    if (this._session) this._session.free();
    this._session = null;
  }

  _emit(type, detail) {
    this.dispatchEvent(new CustomEvent(type, { bubbles: true, composed: true, detail }));
  }

  _showAnalysisError(e) {
    const f = this._fieldForError(e.field);
    if (f) {
      this._setFieldError(f, e.message);
      f.row.classList.add("from-analysis");
      this._analysisErrorField = f;
    }
    this._resultNotice.textContent = this._report
      ? `Not computed: ${e.message}. The results below are for the last design that could be computed.`
      : `Not computed: ${e.message}.`;
    this._resultNotice.hidden = false;
  }

  _clearAnalysisErrors() {
    const f = this._analysisErrorField;
    if (f) {
      f.row.classList.remove("from-analysis");
      if (!this._invalid.has(f.spec.key)) this._setFieldError(f, "");
      this._analysisErrorField = null;
    }
    this._resultNotice.hidden = true;
  }

  _fieldForError(field) {
    if (!field) return null;
    if (FIELD_BY_KEY.has(field)) return this._fields.get(field);
    const parts = String(field).split(".");
    for (let i = parts.length - 1; i >= 0; i--) {
      if (this._fields.has(parts[i])) return this._fields.get(parts[i]);
    }
    return null;
  }

  _markStale(stale) {
    this._results.classList.toggle("stale", stale && !!this._report);
    if (stale && this._report && this._resultNotice.hidden) {
      const keys = Array.from(this._invalid.keys());
      this._resultNotice.textContent = keys.length
        ? `Not understood: ${keys.join(", ")}. The results below use the last values that were understood.`
        : "The results below are for the last design that could be computed.";
      this._resultNotice.hidden = false;
    } else if (!stale && this._invalid.size === 0) {
      this._resultNotice.hidden = true;
    }
  }

  _announce(text) {
    clearTimeout(this._announceTimer);
    this._announceTimer = setTimeout(() => {
      this._status.textContent = text;
    }, 500);
  }

  _setBanner(text, kind) {
    // A failure to start stays on screen whatever is loaded after it.
    if (!text && this._engineError) {
      text = this._engineError;
      kind = "error";
    }
    this._banner.textContent = text || "";
    this._banner.hidden = !text;
    this._banner.className = "banner" + (kind ? " " + kind : "");
  }

  _openAllForPrint(opening) {
    if (opening) {
      this._printState = { form: this._formBox.open, share: this._shareDetails.open, expected: this._formExpected };
      this._formExpected = true;
      this._formBox.open = true;
      this._shareDetails.open = false;
      this._schedulePlots();
    } else if (this._printState) {
      this._formExpected = this._printState.form;
      this._formBox.open = this._printState.form;
      this._printState = null;
    }
  }
}

StagewrightCalc.upgradePlaceholders = upgradePlaceholders;
StagewrightCalc.encodeDesign = encodeDesign;
StagewrightCalc.designText = designText;
StagewrightCalc.version = STAGEWRIGHT_VERSION;

/** Defines <stagewright-calc> as `cls` (the element, or the designer's
 * subclass with its views), then turns placeholders into elements, now
 * and as they arrive. The entry point calls it once; a second copy of the
 * script on the page stops before it (www/build.mjs). */
export function defineElement(cls) {
  customElements.define("stagewright-calc", cls);
  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", watchPlaceholders, { once: true });
  } else {
    watchPlaceholders();
  }
}
