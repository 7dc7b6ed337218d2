/* The designer's "from requirements" view: a specification form and its
 * stagewright-spec/1 text, designed by the engine (design_from_spec, as
 * `stagewright design` does), the ideal and standard values side by side,
 * and a button that loads the design into the calculator. */

import { h } from "../dom.js";
import { asFieldError, enginePresets } from "../engine.js";
import { STAGES } from "../schema.js";

/** The view's methods; views/index.js mixes them into the element. */
export const withSpecView = (Base) => class extends Base {
  /** The spec form's transistor menu, from the engine's presets. */
  _fillSpecPresets(api) {
    const sel = this._specInputs.preset;
    sel.textContent = "";
    for (const [v, t] of enginePresets(api)) sel.append(h("option", { value: v }, t));
    sel.value = "general-purpose-npn";
  }

  /** The "from requirements" view: a specification form (and its JSON),
   * designed by the engine's design_from_spec, the ideal and standard
   * values side by side, and a button that loads the design. */
  _buildSpecView() {
    const id = this._id;
    const field = (key, label, value, hint) => {
      const input = h("input", { type: "text", id: id("spec-" + key), value: value || "", autocomplete: "off", spellcheck: "false" });
      this._specInputs[key] = input;
      return h("div", { class: "spec-field" }, h("label", { for: id("spec-" + key) }, label), input, hint ? h("span", { class: "hint" }, hint) : null);
    };
    const select = (key, label, options, value) => {
      const input = h("select", { id: id("spec-" + key) }, ...options.map(([v, t]) => h("option", { value: v }, t)));
      input.value = value;
      this._specInputs[key] = input;
      return h("div", { class: "spec-field" }, h("label", { for: id("spec-" + key) }, label), input);
    };
    this._specInputs = {};
    const form = h("form", { class: "spec-form", novalidate: true },
      h("fieldset", null, h("legend", null, "Stage"),
        select("stage", "stage", STAGES, "common-emitter"),
        select("preset", "transistor", [["general-purpose-npn", "general-purpose-npn"]], "general-purpose-npn"),
        field("supply", "supply", "12", "V"),
        field("rs", "source resistance", "600", "Ω"),
        field("rl", "load resistance", "10k", "Ω")),
      h("fieldset", null, h("legend", null, "Requirements"),
        field("min_voltage_gain_db", "min. voltage gain", "20", "dB"),
        field("max_voltage_gain_db", "max. voltage gain", "", "dB"),
        field("min_input_impedance", "min. input impedance", "", "Ω"),
        field("max_output_impedance", "max. output impedance", "", "Ω"),
        field("min_swing", "min. swing (peak)", "", "V"),
        field("max_f_low", "max. lower corner", "20", "Hz"),
        field("min_f_high", "min. upper corner", "", "Hz"),
        field("max_supply_current", "max. supply current", "", "A")),
      h("fieldset", null, h("legend", null, "Intents"),
        select("bias", "bias", [["max-swing", "max-swing"], ["ic", "given IC"], ["vce", "given |VCE|"]], "max-swing"),
        field("bias_value", "IC or |VCE|", "", "A or V, for a given point"),
        field("saturation_reserve", "saturation reserve", "", "V, default 0.5"),
        field("stiffness", "stiffness k", "", "RTH = k·hFE(min)·RE, default 0.1"),
        select("resistors", "resistor series", [["E12", "E12"], ["E24", "E24"], ["E96", "E96"]], "E24"),
        select("capacitors", "capacitor series", [["E6", "E6"], ["E12", "E12"]], "E12"),
        field("pins", "pinned parts", "", "e.g. rc=4k7, c_in=1u")));
    form.addEventListener("submit", (e) => e.preventDefault());
    form.addEventListener("input", () => this._writeSpecJson());
    form.addEventListener("change", () => this._writeSpecJson());
    this._specJson = h("textarea", { class: "spec-json", id: id("spec-json"), rows: 10, spellcheck: "false" });
    const run = h("button", { type: "button", class: "primary", "data-action": "design-from-spec" }, "Design from requirements");
    run.addEventListener("click", () => this.designFromSpec());
    this._specError = h("p", { class: "spec-error", role: "alert", hidden: true });
    this._specOut = h("div", { class: "spec-out" });
    const view = h("section", { class: "card view-spec", "aria-labelledby": id("h-spec") },
      h("h3", { id: id("h-spec") }, "From requirements"),
      h("p", { class: "hint" }, "Give what the stage must meet; the engine designs it (as stagewright design SPEC does) and snaps every part to a standard value."),
      form,
      h("details", { class: "spec-json-box" }, h("summary", null, "Specification (JSON, stagewright-spec/1)"), h("label", { for: id("spec-json"), class: "visually-hidden" }, "specification JSON"), this._specJson),
      h("p", { class: "actions" }, run),
      this._specError, this._specOut);
    this._writeSpecJson();
    return view;
  }

  /** The specification the form describes, as JSON in the text box. */
  _writeSpecJson() {
    const v = (k) => this._specInputs[k].value.trim();
    const spec = { format: "stagewright-spec/1", stage: v("stage"), supply: v("supply"), transistor: { preset: v("preset") }, rs: v("rs"), rl: v("rl") };
    const req = {};
    for (const k of ["min_voltage_gain_db", "max_voltage_gain_db", "min_input_impedance", "max_output_impedance", "min_swing", "max_f_low", "min_f_high", "max_supply_current"]) {
      if (v(k)) req[k] = v(k);
    }
    spec.requirements = req;
    if (v("bias") !== "max-swing" && v("bias_value")) spec.bias = { [v("bias")]: v("bias_value") };
    if (v("saturation_reserve")) spec.saturation_reserve = v("saturation_reserve");
    if (v("stiffness")) spec.stiffness = v("stiffness");
    spec.series = { resistors: v("resistors"), capacitors: v("capacitors") };
    const pins = {};
    for (const item of v("pins").split(/[,;\s]+/)) {
      const m = /^([a-z_]+)=(.+)$/.exec(item);
      if (m) pins[m[1]] = m[2];
    }
    if (Object.keys(pins).length) spec.parts = pins;
    this._specJson.value = JSON.stringify(spec, null, 2);
  }

  /** Designs the specification in the text box (or `spec`, an object or
   * JSON text) and shows the result; returns it, or null with the core's
   * message shown in place. */
  designFromSpec(spec) {
    const api = this._api;
    if (!this._specOut) this._viewPanel("requirements");
    if (!this._specOut) return null;
    this._specOut.textContent = "";
    this._specError.hidden = true;
    this.specResult = null;
    const refuse = (message) => {
      this._specError.textContent = message;
      this._specError.hidden = false;
      return null;
    };
    if (spec !== undefined) {
      try {
        this._specJson.value = typeof spec === "string" ? spec : JSON.stringify(spec, null, 2);
      } catch (err) {
        return refuse(`The specification object cannot be written as JSON: ${err.message}`);
      }
    }
    if (!api || typeof api.design_from_spec !== "function") return refuse("The engine is not ready yet.");
    // The engine reads the text with the command line's reader (its JSON
    // messages included).
    const text = this._specJson.value;
    let r;
    const t0 = performance.now();
    try {
      r = api.design_from_spec(text);
      // The engine's time alone (bench.mjs reads it; the tables come after).
      this.specTiming = { engine: performance.now() - t0 };
    } catch (err) {
      const e = asFieldError(err);
      this._specError.textContent = e.message;
      this._specError.hidden = false;
      this._announce(e.message);
      return null;
    }
    this.specResult = r;
    const f = (v, unit) => (typeof v === "number" && Number.isFinite(v) ? api.format_si(v, unit) : "—");
    const signed = (v, unit) => (typeof v === "number" && Number.isFinite(v) ? (v > 0 ? "+" : "") + api.format_si(v, unit === "°C" ? "K" : unit) : "—");
    const parts = h("table", { class: "numbers spec-parts" },
      h("caption", null, "Parts: ideal and standard values"),
      h("thead", null, h("tr", null, ...["part", "ideal", "chosen", "change", "from"].map((c) => h("th", { scope: "col" }, c)))),
      h("tbody", null, ...r.parts.map((p) => {
        const unit = p.part.startsWith("c_") ? "F" : "Ω";
        return h("tr", null, h("th", { scope: "row" }, p.part), h("td", null, f(p.ideal, unit)), h("td", null, f(p.chosen, unit)),
          h("td", null, p.pinned ? "" : `${p.change >= 0 ? "+" : ""}${(100 * p.change).toFixed(2)} %`), h("td", null, p.series || "pinned"));
      })));
    const diffs = h("table", { class: "numbers spec-diffs" },
      h("caption", null, "Results: ideal and standard-value design"),
      h("thead", null, h("tr", null, ...["result", "ideal", "standard", "difference"].map((c) => h("th", { scope: "col" }, c)))),
      h("tbody", null, ...r.differences.map((d) => h("tr", null, h("th", { scope: "row" }, d.quantity.replace(/_db$/, " (dB)").replace(/_/g, " ")),
        h("td", null, f(d.ideal, d.unit)), h("td", null, f(d.snapped, d.unit)), h("td", null, signed(d.difference, d.unit))))));
    const failing = r.report.checks.filter((c) => !c.pass);
    const load = h("button", { type: "button", class: "primary", "data-action": "load-spec-design" }, "Load this design into the calculator");
    load.addEventListener("click", () => {
      this._loadDesign(r.design, false);
      this.showView("calculator");
      this._frame.scrollIntoView({ block: "start" });
    });
    this._specOut.append(
      h("p", { class: "spec-verdict " + (r.pass ? "pass" : "fail") },
        r.pass ? "The standard-value design passes every check." : `The standard-value design fails ${failing.length} check(s): ${failing.map((c) => c.id).join(", ")}.`),
      h("div", { class: "spec-tables" }, parts, diffs),
      h("ul", { class: "spec-notes", hidden: !r.notes.length }, ...r.notes.map((n) => h("li", null, n))),
      h("p", { class: "actions" }, load));
    this._announce(r.pass ? "Designed: every check passes." : "Designed, with failing checks.");
    return r;
  }
};
