/* The design form: a field per design-file key (schema.js), what each
 * entry was understood as, its nearest standard value and the button that
 * snaps to it, preset placeholders, the stage's parts shown or hidden, the
 * heading; each edit updates the design and recomputes. Methods of the
 * element. */

import { getPath, own, setPath, storedValue } from "./design.js";
import { h } from "./dom.js";
import { asFieldError, presetData } from "./engine.js";
import { shortText } from "./text.js";
import { SERIES_CHOICES, STAGES, STAGE_PARTS, schemaReady } from "./schema.js";

/** The form's methods, mixed into the element (element.js). */
export const withForm = (Base) => class extends Base {
  _seriesSelect(family, label) {
    const sel = h("select", { "aria-label": label, class: "series" },
      SERIES_CHOICES.map((s) => h("option", { value: s }, s)));
    sel.value = this._series[family];
    sel.addEventListener("change", () => {
      this._series[family] = sel.value;
      for (const f of this._fields.values()) if (f.spec.series === family) this._refreshField(f);
    });
    return sel;
  }

  _buildGroup(group) {
    const id = this._id;
    const fs = h("fieldset", { class: `group group-${group.id}`, "data-group": group.id });
    fs.append(h("legend", null, group.legend));
    if (group.id === "parts") {
      fs.append(h("div", { class: "series-row" },
        h("span", null, "Standard values:"),
        h("label", null, "resistors ", this._seriesR),
        h("label", null, "capacitors ", this._seriesC)));
      this._partsNote = h("p", { class: "note", hidden: true });
      fs.append(this._partsNote);
    }
    if (group.id === "transistor") {
      this._presetNote = h("p", { class: "note" });
      fs.append(this._presetNote);
    }
    for (const spec of group.fields) {
      const fid = id("f-" + spec.key);
      const label = h("label", { for: fid },
        h("span", { class: "name" }, spec.key),
        h("span", { class: "desc" }, spec.desc));
      let input;
      if (spec.kind === "select") {
        input = h("select", { id: fid, name: spec.key });
        if (spec.options) for (const [v, t] of spec.options) input.append(h("option", { value: v }, t));
      } else if (spec.kind === "textarea") {
        input = h("textarea", { id: fid, name: spec.key, rows: 2, spellcheck: "true", maxlength: spec.maxlength });
      } else {
        input = h("input", {
          id: fid,
          name: spec.key,
          type: "text",
          autocomplete: "off",
          spellcheck: "false",
          autocapitalize: "off",
          maxlength: spec.maxlength,
        });
      }
      const understood = h("output", { id: id("u-" + spec.key), class: "understood", for: fid });
      const error = h("p", { id: id("e-" + spec.key), class: "error", hidden: true });
      // A value the core reads but that lies far outside the part's usual
      // range (1 mΩ typed for a resistor, 2.2 F for a capacitor).
      const warn = h("p", { id: id("w-" + spec.key), class: "warn", hidden: true });
      const snap = h("button", { type: "button", class: "snap", hidden: true });
      const std = h("span", { class: "std", hidden: true });
      if (spec.kind === "value") {
        input.setAttribute("aria-describedby", `${understood.id} ${error.id} ${warn.id}`);
      }
      const unit = spec.kind === "value" ? h("span", { class: "unit", "aria-hidden": "true" }, spec.unit) : null;
      const row = h("div", { class: `field field-${spec.kind}`, "data-key": spec.key },
        label,
        h("div", { class: "entry" }, input, unit),
        spec.kind === "value" ? h("div", { class: "aside" }, understood, std, snap) : null,
        error, warn);
      fs.append(row);
      const f = { spec, input, understood, error, warn, snap, std, row };
      this._fields.set(spec.key, f);
      const handler = () => this._onEdit(f);
      input.addEventListener(spec.kind === "select" ? "change" : "input", handler);
      snap.addEventListener("click", () => this._snap(f));
    }
    return fs;
  }

  _fillForm() {
    const d = this._design;
    for (const f of this._fields.values()) {
      const v = getPath(d, f.spec.path);
      const text = v === undefined || v === null ? "" : String(v);
      if (f.spec.kind === "select") {
        if (text && !Array.from(f.input.options).some((o) => o.value === text)) {
          f.input.append(h("option", { value: text }, text));
        }
        f.input.value = text;
      } else {
        f.input.value = text;
      }
      this._setFieldError(f, "");
    }
    this._refreshAllFields();
    this._refreshHeading();
    this._applyStage();
  }

  _refreshAllFields() {
    for (const f of this._fields.values()) this._refreshField(f);
    this._refreshPresetNote();
  }

  /** Re-reads one field's text: understood value, standard value, error. */
  _refreshField(f) {
    const spec = f.spec;
    if (spec.kind !== "value") return;
    const text = f.input.value.trim();
    if (!text || !this._api) return this._showField(f, text ? { ok: true } : { ok: true, empty: true });
    return this._showField(f, this._fieldStatus(f, text));
  }

  /** What the engine makes of a field's text, in the shape of the
   * session's set(): {ok, empty?, value?, echo?, nearest?, unusual?,
   * error?}, from the separate exports (for a refresh of every field). */
  _fieldStatus(f, text) {
    const api = this._api;
    const spec = f.spec;
    let value;
    try {
      value = api.parse_value(spec.key, text, spec.unit);
    } catch (err) {
      return { ok: false, error: asFieldError(err) };
    }
    const r = { ok: true, value, echo: api.format_si(value, spec.unit) };
    const odd = typeof api.unusual === "function" ? api.unusual(spec.key, value) : null;
    if (odd) r.unusual = odd;
    if (spec.series && value > 0) {
      const name = this._series[spec.series];
      let look = null;
      try {
        look = api.series_lookup(name, value);
      } catch (e) {
        look = null;
      }
      if (look) r.nearest = { series: name, value: look.nearest, echo: api.format_si(look.nearest, spec.unit), error: look.error };
    }
    return r;
  }

  /** Shows a field's status: what it was understood as, the nearest
   * standard value (and the button that snaps to it), a warning for an
   * unusual value, or the core's message. Returns {ok, empty?, value?,
   * message?}. */
  _showField(f, r) {
    const spec = f.spec;
    f.snap.hidden = true;
    f.std.hidden = true;
    if (f.warn) f.warn.hidden = true;
    if (r.empty || !r.ok) this._echo.delete(spec.key);
    if (r.empty) {
      f.understood.textContent = this._placeholderText(spec);
      f.understood.classList.add("muted");
      f.input.placeholder = this._placeholderValue(spec);
      this._setFieldError(f, "");
      return { ok: true, empty: true };
    }
    f.understood.classList.remove("muted");
    if (!r.ok) {
      const e = asFieldError(r.error);
      f.understood.textContent = "";
      this._setFieldError(f, e.message);
      return { ok: false, message: e.message };
    }
    this._setFieldError(f, "");
    if (r.echo === undefined) {
      f.understood.textContent = "";
      return { ok: true };
    }
    f.understood.textContent = "= " + r.echo;
    if (r.unusual && f.warn) {
      f.warn.textContent = `${r.unusual}: check the entry.`;
      f.warn.hidden = false;
    }
    if (r.nearest && !this.hasAttribute("readonly")) this._showSeries(f, r.nearest);
    this._echo.set(spec.key, r.echo);
    return { ok: true, value: r.value };
  }

  _showSeries(f, n) {
    const name = n.series;
    if (Math.abs(n.error) < 1e-6) {
      f.std.textContent = `${name} value`;
      f.std.hidden = false;
      return;
    }
    const target = n.echo;
    f.snap.textContent = "";
    f.snap.append(h("span", { class: "snap-series" }, name), " ", target);
    f.snap.setAttribute("aria-label", `Use the nearest ${name} value, ${target}, for ${f.spec.key}`);
    f.snap.title = `Nearest ${name} value (${(n.error * 100).toFixed(1)} % away)`;
    f.snap.dataset.value = String(n.value);
    f.snap.hidden = false;
  }

  _placeholderValue(spec) {
    if (spec.default !== undefined) return spec.default;
    const preset = this._presetValues();
    if (preset && spec.path[0] === "transistor" && preset[spec.key] !== undefined && this._api) {
      const v = preset[spec.key];
      return typeof v === "number" ? this._api.format_si(v, spec.unit) : String(v);
    }
    return "";
  }

  _placeholderText(spec) {
    if (spec.default !== undefined) return `default ${spec.default}${spec.unit ? " " + spec.unit : ""}`;
    if (spec.path[0] === "transistor") {
      return getPath(this._design, ["transistor", "preset"]) ? "from the class" : "not given";
    }
    if (spec.path[0] === "requirements") return "no requirement";
    if (spec.path[0] === "parts" && spec.key !== "resistor_rating") return "not fitted";
    return "not given";
  }

  _presetValues() {
    const name = getPath(this._design, ["transistor", "preset"]);
    return presetData(this._api, name);
  }

  _refreshPresetNote() {
    if (!this._presetNote) return;
    const name = getPath(this._design, ["transistor", "preset"]);
    this._presetNote.textContent = name
      ? "Empty fields take the class's typical values; type a value to override it with your device's data."
      : "Choose a device class, or enter the device's data below.";
  }

  _setFieldError(f, message) {
    f.error.textContent = message;
    f.error.hidden = !message;
    if (message) {
      f.input.setAttribute("aria-invalid", "true");
      f.row.classList.add("invalid");
    } else {
      f.input.removeAttribute("aria-invalid");
      f.row.classList.remove("invalid");
    }
  }

  _onEdit(f) {
    const spec = f.spec;
    const raw = f.input.value;
    const text = spec.kind === "textarea" || spec.kind === "text" ? raw : raw.trim();
    if (spec.kind === "value") {
      // A keystroke sends the one field to the engine's session, which
      // answers with its echo, nearest standard value and warning.
      const s = this._liveSession();
      if (s) this._stats.sets++;
      const r = s
        ? this._showField(f, s.set(spec.path.join("."), text, spec.series ? this._series[spec.series] : ""))
        : this._refreshField(f);
      if (!r || !r.ok) {
        this._invalid.set(spec.key, r ? r.message : "");
        this._markStale(true);
        this._announce(r && r.message ? r.message : "");
        return;
      }
      this._invalid.delete(spec.key);
      setPath(this._design, spec.path, r.empty ? undefined : storedValue(text));
    } else {
      setPath(this._design, spec.path, text === "" ? undefined : text);
      // The stage changes which parts are sent; the rest is rare: the
      // session is made again from the design at the next compute.
      this._sessionStale = true;
      if (spec.key === "preset") {
        this._refreshAllFields();
      }
    }
    if (spec.key === "title" || spec.key === "stage" || spec.key === "supply") this._refreshHeading();
    if (spec.key === "stage") this._applyStage();
    this._isExample = false;
    this._recompute();
  }

  _snap(f) {
    const v = Number(f.snap.dataset.value);
    if (!Number.isFinite(v) || !this._api) return;
    // "4.7 kΩ" is written "4.7k": the unit stands beside the field; the
    // digits are exactly those that read back to the standard value.
    const unit = f.spec.unit;
    const api = this._api;
    let text = shortText(typeof api.format_exact === "function" ? api.format_exact(v, unit) : api.format_si(v, unit), unit);
    try {
      const back = this._api.parse_value(f.spec.key, text, f.spec.unit);
      if (Math.abs(back - v) > 1e-9 * Math.abs(v)) text = String(v);
    } catch (e) {
      text = String(v);
    }
    f.input.value = text;
    this._onEdit(f);
    f.input.focus();
  }

  _applyStage() {
    if (!schemaReady()) return;
    const stage = this._design.stage;
    const used = own(STAGE_PARTS, stage) || STAGE_PARTS["common-emitter"];
    const unused = [];
    for (const f of this._fields.values()) {
      if (!f.spec.series) continue;
      const on = used.includes(f.spec.key);
      f.row.hidden = !on;
      const v = getPath(this._design, f.spec.path);
      if (!on && v !== undefined && v !== "") unused.push(f.spec.key);
    }
    if (this._partsNote) {
      this._partsNote.hidden = unused.length === 0;
      this._partsNote.textContent = unused.length
        ? `Kept but not used by this stage: ${unused.join(", ")}.`
        : "";
    }
  }

  _refreshHeading() {
    const d = this._design;
    const title = typeof d.title === "string" && d.title.trim() ? d.title : "Untitled stage";
    this._titleEl.textContent = title;
    const stage = STAGES.find(([v]) => v === d.stage);
    const supply = getPath(d, ["supply"]);
    const parts = [stage ? stage[1] : String(d.stage || "")];
    if (supply !== undefined && this._api) {
      try {
        parts.push(this._api.format_si(this._api.parse_value("supply", String(supply), "V"), "V") + " supply");
      } catch (e) {
        /* shown at the field */
      }
    }
    this._stageEl.textContent = parts.filter(Boolean).join(" · ");
  }

  _focusField(key) {
    if (key === "transistor") key = "preset";
    const f = this._fields.get(key);
    if (!f) return;
    if (this.view !== "calculator") this.showView("calculator");
    if (!this._formBox.open) this._formBox.open = true;
    f.row.hidden = false;
    f.input.focus({ preventScroll: true });
    f.row.scrollIntoView({ block: "nearest", behavior: "smooth" });
    f.row.classList.remove("flash");
    void f.row.offsetWidth;
    f.row.classList.add("flash");
  }
};
