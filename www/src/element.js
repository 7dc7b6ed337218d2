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
import { asFieldError, enginePresets, hasAnalysis, loadEngine, runAnalysis } from "./engine.js";
import { withForm } from "./form.js";
import { upgradePlaceholders, watchPlaceholders } from "./placeholders.js";
import { withPlots } from "./plots.js";
import { DEFERRAL, withResults } from "./results.js";
import { EXAMPLE_DESIGN, FIELD_BY_KEY, FORMAT, GROUPS, STAGE_PARTS } from "./schema.js";
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

export class StagewrightCalc extends withShare(withPlots(withResults(withDiagram(withForm(HTMLElement))))) {
  static get observedAttributes() {
    return ["readonly", "compact", "src", "theme"];
  }

  constructor() {
    super();
    this._uid = ++uid;
    this._design = null;
    this._report = null;
    this._analysis = null;
    this._api = null;
    this._built = false;
    this._fields = new Map(); // key -> {spec, input, understood, snap, error, row}
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
      this._themeCache = null;
      this._schedulePlots();
    };
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
    window.removeEventListener("beforeprint", this._onBeforePrint);
    window.removeEventListener("afterprint", this._onAfterPrint);
  }

  attributeChangedCallback(name, oldValue, newValue) {
    if (!this._built || oldValue === newValue) return;
    if (name === "readonly") this._applyReadonly();
    if (name === "compact") this._applyCompact();
    if (name === "theme") this._onScheme();
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
    const script = this.querySelector('script[type="application/json"]');
    if (script) {
      this._loadText(script.textContent);
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
        if (!this.querySelector('script[type="application/json"]')) {
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
    if (!own(STAGE_PARTS, d.stage)) d.stage = "common-emitter";
    this._design = d;
    this._isExample = !!isExample;
    this._invalid.clear();
    this._report = null;
    this._analysis = null;
    this._clearResults();
    this._setBanner("");
    this._fillForm();
    this._recompute();
  }

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
    for (const g of GROUPS) this._form.append(this._buildGroup(g));
    this._formBox = h("details", { class: "design-box", open: true },
      h("summary", null, "Design values"), this._form);

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

    this._main = h("div", { class: "layout" },
      h("div", { class: "col-form" }, this._formBox),
      h("div", { class: "col-out" }, diagramCard, this._results, this._plots));
    // The views of the designer (src/views/), on an engine with its extras.
    if (this._buildViews) this._buildViews(this._main.lastChild);
    this._frame = h("div", { class: "frame", part: "frame" }, header, this._banner, this._status, this._main, footer);
    root.append(this._frame);

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
  }

  _mark() {
    const svg = sv("svg", { viewBox: "0 0 24 24", class: "mark", width: 22, height: 22 });
    sv("path", { d: "M3 17 L9 17 L12 7 L15 17 L21 17", class: "mark-line" }, svg);
    sv("circle", { cx: 12, cy: 7, r: 2.2, class: "mark-dot" }, svg);
    return svg;
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
    this._formBox.open = !compact;
  }

  /* ---------------- engine ---------------- */

  _engineReady(api) {
    if (this._api === api) return;
    this._api = api;
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
    const msg = err && err.message ? err.message : String(err);
    this._setBanner(
      `The calculator engine could not start: ${msg}. If this page sets a Content-Security-Policy, ` +
        "its script-src must include 'wasm-unsafe-eval'.",
      "error",
    );
  }

  /* ---------------- computing ---------------- */

  _recompute() {
    if (!this._design) return;
    this._renderDiagram();
    const design = this._exportDesign();
    this._emit("stagewright-design", { design });
    const api = this._api;
    if (!api) return;
    this._clearAnalysisErrors();
    if (!hasAnalysis(api)) return;
    let out;
    try {
      out = runAnalysis(api, design);
    } catch (err) {
      const e = asFieldError(err);
      this._showAnalysisError(e);
      this._markStale(true);
      this._announce(e.message);
      return;
    }
    this._analysis = out;
    this._report = out.report;
    this._markStale(this._invalid.size > 0);
    this.renderReport(out.report);
    this._annotateDiagram(out.report);
    this._drawPlots();
    this._announce(this._summary(out.report));
    this._emit("stagewright-report", { report: clone(out.report), design });
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
    this._banner.textContent = text || "";
    this._banner.hidden = !text;
    this._banner.className = "banner" + (kind ? " " + kind : "");
  }

  _openAllForPrint(opening) {
    if (opening) {
      this._printState = { form: this._formBox.open, share: this._shareDetails.open };
      this._formBox.open = true;
      this._shareDetails.open = false;
      this._schedulePlots();
    } else if (this._printState) {
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
