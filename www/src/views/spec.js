/* The "from requirements" view: a specification form and its
 * stagewright-spec/1 text, designed by the engine (design_from_spec, as
 * `stagewright design` does), the ideal and standard values side by side,
 * and a button that loads the design into the calculator. */

import { h } from "../dom.js";
import { getPath, setPath, storedValue } from "../design.js";
import { asFieldError, enginePresets } from "../engine.js";
import { GROUPS, SPEC } from "../schema.js";

/** The form's starting specification, an invented bench scenario. */
const START = {
  stage: "common-emitter", preset: "general-purpose-npn", supply: "12", rs: "600", rl: "10k",
  min_voltage_gain_db: "20", max_f_low: "20",
};

/** The specification's fields, from the core's tables (the engine's
 * schema: its SPEC_FIELDS, and the requirements of the design file), in
 * three groups, with two entries the form composes itself: the bias (a
 * rule, or a given IC or |VCE|) and the pinned parts. Each: key in the
 * form, path in the document, label, starting value, hint (unit and
 * default); kind "select" with its options. The JSON box is the source
 * of truth: a form edit writes only its own key into the document, so
 * keys the form has no field for (typed into the box) survive every edit. */
function specFields() {
  const hint = (f) => [f.unit, f.default ? `default ${f.default}` : ""].filter(Boolean).join(", ");
  const from = (f) => ({
    key: f.key, path: f.path, label: f.desc, kind: f.kind === "select" ? "select" : undefined,
    options: f.options, value: START[f.key] || "", hint: f.kind === "select" ? "" : hint(f),
  });
  const spec = new Map(SPEC.map((f) => [f.path.join("."), f]));
  const pick = (...keys) => keys.filter((k) => spec.has(k)).map((k) => from(spec.get(k)));
  const req = GROUPS.find((g) => g.id === "requirements");
  const series = pick("series.resistors", "series.capacitors").map((f) => Object.assign(f, { value: f.value || spec.get(f.path.join(".")).default }));
  return [
    { group: "Stage" },
    ...pick("title", "stage", "transistor.preset", "transistor.polarity", "supply", "ambient", "rs", "rl", "resistor_rating"),
    { group: "Requirements" },
    ...(req ? req.fields : []).map((r) => ({ key: r.key, path: r.path, label: r.desc, value: START[r.key] || "", hint: r.unit })),
    { group: "Intents" },
    { key: "bias", label: "bias", kind: "select", options: [["max-swing", "max-swing"], ["ic", "given IC"], ["vce", "given |VCE|"]], value: "max-swing" },
    { key: "bias_value", label: "IC or |VCE|", value: "", hint: "A or V, for a given point" },
    ...pick("saturation_reserve", "stiffness", "emitter_fraction"),
    ...series,
    { key: "pins", label: "pinned parts", value: "", hint: "e.g. rc=4k7, RE=470, c_in=1u" },
  ];
}

/** Pinned parts as typed ("rc=4k7, RE=470"): {parts} or {error}. Names
 * are read in either case; anything not `name=value` is refused with
 * the item quoted. */
export function readPins(text) {
  const parts = {};
  for (const item of text.split(/[,;\s]+/).filter(Boolean)) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)\s*[=:]\s*(.+)$/.exec(item);
    if (!m) return { error: `pinned parts: "${item}" is not a part and its value, as rc=4k7` };
    parts[m[1].toLowerCase()] = m[2];
  }
  return { parts };
}

/** Pinned parts written back for the field: "rc=4k7, c_in=1u". */
function writePins(parts) {
  if (!parts || typeof parts !== "object") return "";
  return Object.entries(parts).map(([k, v]) => `${k}=${v}`).join(", ");
}

/** The view's methods; views/index.js mixes them into the element. */
export const withSpecView = (Base) => class extends Base {
  /** The spec form's transistor menu, from the engine's presets. */
  _fillSpecPresets(api) {
    const sel = this._specInputs.preset;
    const current = sel.value || "general-purpose-npn";
    sel.textContent = "";
    for (const [v, t] of enginePresets(api)) sel.append(h("option", { value: v }, t));
    if (!Array.from(sel.options).some((o) => o.value === current)) sel.append(h("option", { value: current }, current));
    sel.value = current;
  }

  /** The "from requirements" view: a specification form and its JSON
   * (the source of truth), designed by the engine's design_from_spec, the
   * ideal and standard values side by side, and a button that loads the
   * design. */
  _buildSpecView() {
    const id = this._id;
    this._specInputs = {};
    const form = h("form", { class: "spec-form", novalidate: true });
    let fs = null;
    this._specFields = specFields();
    for (const f of this._specFields) {
      if (f.group) {
        fs = h("fieldset", null, h("legend", null, f.group));
        form.append(fs);
        continue;
      }
      const fid = id("spec-" + f.key);
      const input = f.kind === "select"
        ? h("select", { id: fid, "data-key": f.key }, ...(f.options || []).map(([v, t]) => h("option", { value: v }, t)))
        : h("input", { type: "text", id: fid, "data-key": f.key, value: f.value || "", autocomplete: "off", spellcheck: "false" });
      // A starting choice the menu does not list yet (the presets come
      // from the engine a moment later) is offered as it is.
      if (f.kind === "select" && f.value && !Array.from(input.options).some((o) => o.value === f.value)) {
        input.append(h("option", { value: f.value }, f.value));
      }
      input.value = f.value;
      this._specInputs[f.key] = input;
      fs.append(h("div", { class: "spec-field" }, h("label", { for: fid }, f.label), input, f.hint ? h("span", { class: "hint" }, f.hint) : null));
    }
    this._specFormError = h("p", { class: "spec-form-error", role: "alert", hidden: true });
    form.addEventListener("submit", (e) => e.preventDefault());
    const edited = (e) => {
      const key = e.target && e.target.getAttribute("data-key");
      if (key) this._specFieldEdited(key);
    };
    form.addEventListener("input", edited);
    form.addEventListener("change", edited);
    this._specJson = h("textarea", { class: "spec-json", id: id("spec-json"), rows: 12, spellcheck: "false" });
    this._specJson.addEventListener("input", () => this._specJsonEdited());
    const run = h("button", { type: "button", class: "primary", "data-action": "design-from-spec" }, "Design from requirements");
    run.addEventListener("click", () => this.designFromSpec());
    this._specError = h("p", { class: "spec-error", role: "alert", hidden: true });
    this._specOut = h("div", { class: "spec-out" });
    const view = h("section", { class: "card view-spec", "aria-labelledby": id("h-spec") },
      h("h3", { id: id("h-spec") }, "From requirements"),
      h("p", { class: "hint" }, "Give what the stage must meet; the engine designs it (as stagewright design SPEC does) and snaps every part to a standard value. The JSON below is the specification itself: keys typed there that the form has no field for are kept."),
      form,
      this._specFormError,
      h("details", { class: "spec-json-box", open: true }, h("summary", null, "Specification (JSON, stagewright-spec/1)"), h("label", { for: id("spec-json"), class: "visually-hidden" }, "specification JSON"), this._specJson),
      h("p", { class: "actions" }, run),
      this._specError, this._specOut);
    // The first document: every field's default.
    const spec = { format: "stagewright-spec/1" };
    for (const f of this._specFields) if (f.key) this._specPut(spec, f.key);
    this._specJson.value = JSON.stringify(spec, null, 2);
    return view;
  }

  /** The specification in the box, or null (with the reason shown). */
  _specDocument() {
    try {
      const doc = JSON.parse(this._specJson.value);
      if (doc && typeof doc === "object" && !Array.isArray(doc)) return doc;
      throw new Error("it is not a JSON object");
    } catch (err) {
      this._specFormError.textContent = `The specification JSON below does not read (${err.message}): the form's edit was not written into it. Fix the JSON, or clear the box to start again from the form.`;
      this._specFormError.hidden = false;
      return null;
    }
  }

  /** Writes one field's value into `doc` (deleting the key when empty). */
  _specPut(doc, key) {
    const input = this._specInputs[key];
    const value = input.value.trim();
    const f = this._specFields.find((x) => x.key === key);
    if (key === "pins") {
      const r = readPins(value);
      if (r.error) return r.error;
      if (Object.keys(r.parts).length) doc.parts = r.parts;
      else delete doc.parts;
      return "";
    }
    if (key === "bias" || key === "bias_value") {
      const kind = this._specInputs.bias.value;
      const v = this._specInputs.bias_value.value.trim();
      if (kind === "max-swing") delete doc.bias;
      else if (v) doc.bias = { [kind]: v };
      else delete doc.bias;
      return "";
    }
    setPath(doc, f.path, value === "" ? undefined : storedValue(value));
    // An emptied block goes too.
    const top = f.path[0];
    if (f.path.length > 1 && doc[top] && typeof doc[top] === "object" && !Object.keys(doc[top]).length && top !== "requirements") delete doc[top];
    return "";
  }

  /** A form edit: that one key, written into the document in the box. */
  _specFieldEdited(key) {
    if (this._specJson.value.trim() === "") this._specJson.value = '{ "format": "stagewright-spec/1" }';
    const doc = this._specDocument();
    if (!doc) return;
    const problem = this._specPut(doc, key);
    if (problem) {
      this._specFormError.textContent = problem;
      this._specFormError.hidden = false;
      return;
    }
    this._specFormError.hidden = true;
    this._specJson.value = JSON.stringify(doc, null, 2);
  }

  /** A JSON edit: the form shows what the document says (the document
   * itself is not rewritten). */
  _specJsonEdited() {
    let doc;
    try {
      doc = JSON.parse(this._specJson.value);
    } catch (err) {
      return;
    }
    if (!doc || typeof doc !== "object" || Array.isArray(doc)) return;
    this._specFormError.hidden = true;
    this._fillSpecForm(doc);
  }

  _fillSpecForm(doc) {
    for (const f of this._specFields) {
      if (!f.key) continue;
      const input = this._specInputs[f.key];
      let v;
      if (f.key === "pins") v = writePins(doc.parts);
      else if (f.key === "bias") v = doc.bias && typeof doc.bias === "object" ? Object.keys(doc.bias)[0] || "max-swing" : "max-swing";
      else if (f.key === "bias_value") v = doc.bias && typeof doc.bias === "object" ? String(Object.values(doc.bias)[0] ?? "") : "";
      else v = getPath(doc, f.path);
      const text = v === undefined || v === null ? "" : String(v);
      if (input.tagName === "SELECT" && text && !Array.from(input.options).some((o) => o.value === text)) {
        input.append(h("option", { value: text }, text));
      }
      input.value = text;
    }
  }

  /** A result's name as the core's tables give it ("collector current"
   * for ic), with "(dB)" for a result in decibels. */
  _quantityName(key) {
    const base = key.replace(/_db$/, "");
    const q = this._tables && this._tables.quantities.find((x) => x.key === base);
    const name = q ? q.label : base.replace(/_/g, " ");
    return key.endsWith("_db") ? `${name} (dB)` : name;
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
        this._specJsonEdited();
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
      h("tbody", null, ...r.differences.map((d) => h("tr", null, h("th", { scope: "row" }, this._quantityName(d.quantity)),
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
